"""Coarsening measurements with many distinct values (--coarsen N, core/design/matrix.py).

No outside reference is needed: what is checked follows from the definition. A column with at
most N distinct values is left as it is, so coarsening with N at least every column's count
must give exactly the uncoarsened tree (path, CV risks, boxes). With a smaller N, every
printed threshold lies in a gap between observed values of the patients at its box, and the
printed tree routes every derivation patient to the box the grower (on quantile levels) sent
them to; quantile edges are observed values (inverted-CDF quantiles, common practice).
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import core.sizing.derivation as derivation_module
from core.design.matrix import fit_encoding, quantile_edges, quantile_levels
from core.errors import InputError
from core.sizing import CVSettings, DerivationRequest, cross_validate_path, derive
from core.sizing.grow import TreeSettings
from core.design import DesignSpec
from tests.helpers import DEMO_CSV, analysis_from_arrays, demo_inputs, prunella

PREDICTORS = ("age", "resp_rate", "spo2", "heart_rate", "arrival_mode", "crp", "triage_level")


def _distinct(values: np.ndarray) -> int:
    return int(np.unique(values[~np.isnan(values)]).size)


def test_quantile_edges_are_observed_values_and_few_distinct_values_are_left_alone():
    rng = np.random.default_rng(0)
    values = rng.normal(size=5000)
    values[::17] = np.nan
    edges = quantile_edges(values, 16)
    assert edges is not None and len(edges) <= 15
    assert np.isin(edges, values).all()  # each edge is a value some patient had
    levels = quantile_levels(values, edges)
    assert np.isnan(levels[::17]).all() and not np.isnan(np.delete(levels, slice(None, None, 17))).any()
    recorded = levels[~np.isnan(levels)]
    assert recorded.min() == 0 and recorded.max() == len(edges) <= 15
    counts = np.bincount(recorded.astype(int))
    assert counts.max() - counts.min() <= 2  # quantile levels: equal shares, up to ties
    # Order is kept: a larger value never has a lower level.
    order = np.argsort(values[~np.isnan(values)])
    assert (np.diff(recorded[order]) >= 0).all()
    assert quantile_edges(np.round(values, 0), 16) is None  # about 8 distinct values: as it is
    assert quantile_edges(np.full(10, np.nan), 4) is None


def test_fold_levels_are_learnt_from_the_training_rows_only():
    rng = np.random.default_rng(1)
    X = rng.normal(size=(400, 2))
    data = analysis_from_arrays(X, (X[:, 0] > 0).astype(int), "classification")[0]
    train = np.arange(200)
    encoding = fit_encoding(data, train, coarsen=8)
    expected = quantile_edges(data.predictors[0].numbers[train], 8)
    assert np.array_equal(encoding.columns[0].edges, expected)


def test_coarsening_with_n_at_least_every_columns_distinct_count_gives_the_same_tree():
    table, dictionary, _ = demo_inputs()
    request = DerivationRequest(DesignSpec("admitted", PREDICTORS, patient_id="patient_id"),
                                cv=CVSettings(folds=5, seed=2))
    plain = derive(table, dictionary, request, jobs=1)
    most = max(_distinct(p.numbers) for p in plain.data.predictors if p.numbers is not None)
    assert most > 50  # the demo has real measurements, so the check means something
    for n in (most, most + 1, 65_536):
        request_n = DerivationRequest(request.design, tree=TreeSettings(coarsen=n), cv=request.cv)
        coarse = derive(table, dictionary, request_n, jobs=1)
        assert np.array_equal(coarse.path.leaves, plain.path.leaves)
        assert np.array_equal(coarse.path.alpha, plain.path.alpha)
        assert np.array_equal(coarse.path.cv_risk, plain.path.cv_risk)  # exact
        assert np.array_equal(coarse.path.cv_se, plain.path.cv_se)
        assert coarse.model.nodes == plain.model.nodes
        assert coarse.model.extra["settings"]["tree"]["coarsen"] == n
        assert any("changed nothing" in note for note in coarse.notes)
    assert "coarsen" not in plain.model.extra["settings"]["tree"]  # off: not recorded


def _descendant_leaves(model) -> dict[int, set[int]]:
    by_id = {node.id: node for node in model.nodes}
    below: dict[int, set[int]] = {}
    for node in reversed(model.nodes):  # children come after parents
        below[node.id] = ({node.id} if node.leaf else
                          set().union(*(below[c] for c in node.children)))
    return below if by_id else {}


@pytest.mark.parametrize("levels", [4, 12, 40])
def test_with_fewer_levels_thresholds_sit_between_observed_values_and_routes_are_kept(levels):
    table, dictionary, _ = demo_inputs()
    request = DerivationRequest(DesignSpec("admitted", PREDICTORS, patient_id="patient_id"),
                                tree=TreeSettings(coarsen=levels), cv=CVSettings(folds=5))
    derivation = derive(table, dictionary, request, jobs=1)
    model, data = derivation.model, derivation.data
    assert any("quantile levels (coarsened)" in note for note in derivation.notes)
    boxes = model.route(model.asked_values(data.predictors), data.n)
    below = _descendant_leaves(model)
    numbers = {p.spec.name: p.numbers for p in data.predictors if p.numbers is not None}
    asked_numeric = 0
    for node in model.nodes:
        here = np.isin(boxes, list(below[node.id]))
        assert here.sum() == node.n  # the grower's count: the printed tree sends the same rows
        if node.leaf:
            assert tuple(np.bincount(data.y[here], minlength=2)) == node.counts
            continue
        question = node.question
        if question.kind != "above":
            continue
        asked_numeric += 1
        values = numbers[question.column][here]
        values = values[~np.isnan(values)]
        lo = values[values <= question.threshold].max()
        hi = values[values > question.threshold].min()
        assert lo <= question.threshold < hi  # inside the gap between two observed values
        assert not ((values > lo) & (values < hi)).any()  # no patient at the box in the gap
    assert asked_numeric >= 1


def test_coarsening_on_the_command_line_is_recorded_and_a_bad_level_count_refused(tmp_path):
    out = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--coarsen", "1",
                   "--model", tmp_path / "m.json")
    assert out.returncode == 2 and "--coarsen" in out.stderr and "2 to 65536" in out.stderr
    out = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--coarsen", "8", "--folds", "3",
                   "--jobs", "1", "--model", tmp_path / "m.json")
    assert out.returncode == 0, out.stderr
    assert "grown on as 8 quantile levels (coarsened)" in out.stderr
    saved = json.loads((tmp_path / "m.json").read_text())
    assert saved["settings"]["tree"]["coarsen"] == 8
    with pytest.raises(InputError):
        derive(*demo_inputs()[:2], DerivationRequest(
            DesignSpec("admitted", PREDICTORS), tree=TreeSettings(coarsen=1)))


def test_the_fit_suggests_coarsening_on_a_large_file(tmp_path, monkeypatch):
    # An invented clinic file (other names, a rare outcome); the suggestion's row count is
    # lowered so the test stays small.
    rng = np.random.default_rng(5)
    n = 900
    frame = pd.DataFrame({"mrn": [f"M{100000 + i}" for i in range(n)],
                          "lactate_mmol": np.round(rng.gamma(2, 1.1, n), 2),
                          "sbp": rng.integers(90, 140, n)})  # 50 values
    frame["icu"] = np.where((frame["lactate_mmol"] > 4) | (rng.random(n) < 0.03), "yes", "no")
    path = tmp_path / "ward_audit.csv"
    frame.to_csv(path, index=False)
    before = path.read_bytes()
    monkeypatch.setattr(derivation_module, "COARSEN_SUGGESTED_ABOVE", 500)
    out = prunella("fit", path, "--outcome", "icu", "--folds", "3", "--jobs", "1",
                   "--model", tmp_path / "m.json", "--quiet")
    assert out.returncode == 0, out.stderr
    assert "900 rows: growing may take long; --coarsen 256" in out.stderr
    out = prunella("fit", path, "--outcome", "icu", "--folds", "3", "--jobs", "1",
                   "--coarsen", "64", "--model", tmp_path / "m2.json", "--quiet")
    assert out.returncode == 0 and "growing may take long" not in out.stderr
    assert "Lactate with more than 64 different values was grown on as 64" in out.stderr
    assert path.read_bytes() == before  # the input file is never written


def test_coarsened_cv_is_the_same_for_any_worker_count():
    rng = np.random.default_rng(3)
    X = rng.normal(size=(3000, 4))
    y = ((X[:, 0] + 0.5 * X[:, 1] + rng.normal(size=3000)) > 0.3).astype(int)
    data = analysis_from_arrays(X, y, "classification")[0]
    settings = TreeSettings(min_leaf=20, coarsen=32)
    cv = CVSettings(folds=4, repeats=2, seed=1)
    one = cross_validate_path(data, settings, cv, jobs=1)
    two = cross_validate_path(data, settings, cv, jobs=2)
    assert np.array_equal(one.cv_risk, two.cv_risk) and np.array_equal(one.cv_se, two.cv_se)


def test_the_model_file_the_chart_and_the_report_say_coarsening_was_used(tmp_path):
    import io

    from pypdf import PdfReader

    from core.chart import ChartOptions
    from core.chart.content import chart_text
    from core.model import TreeModel
    from core.report import prepare_report, write_report

    table, dictionary, _ = demo_inputs()
    request = DerivationRequest(DesignSpec("admitted", PREDICTORS, patient_id="patient_id"),
                                tree=TreeSettings(coarsen=12), cv=CVSettings(folds=4))
    derivation = derive(table, dictionary, request, jobs=1)
    model = derivation.model
    assert model.extra["coarsened"]["levels"] == 12
    assert "age" in model.extra["coarsened"]["columns"]
    assert "triage_level" not in model.extra["coarsened"]["columns"]  # five levels: as it is
    model.save(tmp_path / "m.json")
    again = TreeModel.load(tmp_path / "m.json")
    said = again.coarsening()
    assert said is not None and said.startswith("Coarsened: Age") and "12 quantile levels" in said
    panel = [item.text for section in chart_text(again, ChartOptions().checked()).sections
             for item in section.items]
    assert said in panel
    contents = prepare_report(derivation, outer_folds=2, bootstrap=0, printed="2026-12-03")
    write_report(contents, tmp_path / "r.pdf")
    text = " ".join(" ".join(page.extract_text() for page in
                             PdfReader(io.BytesIO((tmp_path / "r.pdf").read_bytes())).pages).split())
    assert "Measurements coarsened" in text and "12 quantile levels" in text
    plain = derive(table, dictionary, DerivationRequest(request.design, cv=request.cv), jobs=1)
    assert plain.model.coarsening() is None and "coarsened" not in plain.model.extra
