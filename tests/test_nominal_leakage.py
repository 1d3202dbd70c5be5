"""A nominal predictor with random levels must not look predictive under cross-validation.

Ordering a nominal predictor's levels by the outcome (Breiman et al. 1984, §4.2.2) on all rows
and then cross-validating leaks the held-out outcomes into the splits (common practice: any
supervised preprocessing belongs inside the folds). Prunella orders inside each training fold.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import core.sizing.cross_validated_path as pathcv
from core.design import DesignSpec, fit_encoding, prepare_analysis
from core.dictionary import ColumnSpec, DataDictionary
from core.sizing import CVSettings, TreeSettings, cross_validate_path


def _noise_data(seed=0, n=400, levels=200):
    rng = np.random.default_rng(seed)
    frame = pd.DataFrame({
        "ward": [f"ward {i:02d}" for i in rng.integers(0, levels, size=n)],
        "outcome": np.where(rng.random(n) < 0.4, "yes", "no"),
    })
    dictionary = DataDictionary((
        ColumnSpec("ward", kind="nominal", levels=tuple(sorted(frame["ward"].unique()))),
        ColumnSpec("outcome", role="outcome", kind="binary", levels=("no", "yes")),
    ))
    return prepare_analysis(frame, dictionary, DesignSpec("outcome", ("ward",)))


def _root_risk(data):
    return min(np.mean(data.y), 1 - np.mean(data.y))


@pytest.mark.parametrize("seed", range(3))
def test_random_levels_do_not_look_predictive(seed):
    data = _noise_data(seed)
    path = cross_validate_path(data, TreeSettings(min_leaf=1), CVSettings(folds=10, seed=0))
    # No subtree does clearly better than predicting the majority class for everyone.
    assert path.cv_risk.min() > _root_risk(data) - 2 * path.cv_se[-1]
    assert path.leaves[path.one_se_index] <= 2


@pytest.mark.parametrize("seed", range(3))
def test_ordering_on_all_rows_would_leak(monkeypatch, seed):
    """The same check fails when the ordering is (wrongly) learnt from all rows: the test
    above can tell leakage from none."""
    data = _noise_data(seed)
    def learnt_on_all_rows(d, rows, coarsen=None):
        encoding = fit_encoding(d, coarsen=coarsen)  # every row, held-out ones too
        return encoding, encoding.matrix(d, rows)

    monkeypatch.setattr(pathcv, "training_matrix", learnt_on_all_rows)
    path = cross_validate_path(data, TreeSettings(min_leaf=1), CVSettings(folds=10, seed=0))
    assert path.cv_risk.min() < _root_risk(data) - 2 * path.cv_se[-1]
