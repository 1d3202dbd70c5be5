"""Where the work runs (core/work_place.py): one worker and all cores give identical results,
the command line uses every core unless told otherwise, bad worker counts are refused.

The equality checks need no outside reference: the work is split the same way and every
seed comes from the settings, so the numbers must be bit-for-bit the same (common practice
for parallel statistical software: results may not depend on the worker count).
"""

from __future__ import annotations

import numpy as np
import pytest

from core.checking import bootstrap_stability, nested_cross_validate
from core.errors import InputError
from core.sizing import CVSettings, DerivationRequest, derive
from core.design import DesignSpec
from core.work_place import ALL_CORES, WorkPlace, cores
from tests.helpers import demo_inputs, prunella, DEMO_CSV

PREDICTORS = ("age", "resp_rate", "spo2", "arrival_mode", "crp", "triage_level")


def _request() -> DerivationRequest:
    # Repeated folds: each visit is held out twice, so its losses are added up across folds,
    # which is where an order that followed the workers would show.
    return DerivationRequest(DesignSpec("admitted", PREDICTORS, patient_id="patient_id"),
                             cv=CVSettings(folds=5, repeats=2, seed=3))


@pytest.fixture(scope="module")
def runs():
    table, dictionary, _ = demo_inputs()
    request = _request()
    return {jobs: derive(table, dictionary, request, jobs=jobs) for jobs in (1, ALL_CORES, 3)}


def test_path_cv_risks_and_chosen_tree_are_identical_for_any_worker_count(runs):
    one = runs[1]
    for jobs in (ALL_CORES, 3):
        other = runs[jobs]
        assert np.array_equal(one.path.leaves, other.path.leaves)
        assert np.array_equal(one.path.alpha, other.path.alpha)
        assert np.array_equal(one.path.cv_risk, other.path.cv_risk)  # exact, not approximate
        assert np.array_equal(one.path.cv_se, other.path.cv_se)
        assert one.model.nodes == other.model.nodes
        assert one.model.to_dict() == other.model.to_dict()


def test_nested_cv_and_stability_are_identical_for_any_worker_count(runs):
    derivation = runs[1]
    data, request, model = derivation.data, derivation.request, derivation.model
    nested = [nested_cross_validate(data, request, outer_folds=3, jobs=j) for j in (1, ALL_CORES)]
    assert repr(nested[0]) == repr(nested[1])  # repr: the ROC's first cut is NaN, never == itself
    stability = [bootstrap_stability(data, request, model, resamples=4, jobs=j)
                 for j in (1, ALL_CORES)]
    assert repr(stability[0]) == repr(stability[1])


def test_work_place_words_and_limits():
    assert WorkPlace().jobs == ALL_CORES and WorkPlace().n_jobs == ALL_CORES
    assert str(cores()) in WorkPlace().describe() or cores() == 1
    assert WorkPlace(jobs=2).describe() == "this computer, 2 workers"
    assert WorkPlace(cluster="tcp://10.0.0.5:8786").n_jobs == ALL_CORES
    for bad in (0, -2, 1.5):
        with pytest.raises(InputError) as caught:
            WorkPlace(jobs=bad)
        assert caught.value.args[0].code == "limit.refused"  # the one table of limits


def test_command_line_uses_all_cores_by_default_and_refuses_bad_jobs(tmp_path, monkeypatch):
    import core.sizing.derivation as derivation_module

    seen = []

    real = derivation_module.derive

    def spy(*args, jobs=1, **kwargs):
        seen.append(jobs)
        return real(*args, jobs=jobs, **kwargs)

    monkeypatch.setattr(derivation_module, "derive", spy)
    out = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--predictors", "age,spo2",
                   "--folds", "3", "--model", tmp_path / "m.json", "--quiet")
    assert out.returncode == 0, out.stderr
    assert seen == [ALL_CORES]
    out = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--predictors", "age,spo2",
                   "--folds", "3", "--jobs", "1", "--model", tmp_path / "m1.json", "--quiet")
    assert out.returncode == 0 and seen[-1] == 1
    assert (tmp_path / "m.json").read_text() == (tmp_path / "m1.json").read_text()
    out = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--jobs", "0",
                   "--model", tmp_path / "m0.json")
    assert out.returncode == 2 and "-1 (every core)" in out.stderr
    assert not (tmp_path / "m0.json").exists()
