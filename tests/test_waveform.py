"""Breiman's waveform problem: the 1-SE tree's error on fresh cases.

Breiman, Friedman, Olshen & Stone (1984), §2.6.2 and §3.4 (from memory): a 1-SE pruned tree
grown on 300 cases misclassifies about 0.28–0.30 of fresh cases (Bayes error ≈ 0.14). Check
(REFERENCES.md): averaged over a few seeds, the error on 5,000 fresh cases lies in 0.24–0.36,
and the cross-validated estimate is within 0.06 of it.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from core.derive import DerivationRequest, derive
from core.design import DesignSpec
from core.grow import TreeSettings
from core.resample import CVSettings
from core.table import LoadedTable, Provenance
from core.variables import ColumnSpec, DataDictionary
from tests.waveform import waveform

NAMES = [f"x{m}" for m in range(1, 22)]
CLASSES = ("class 1", "class 2", "class 3")


def _table(X, y):
    frame = pd.DataFrame(X, columns=NAMES)
    frame["wave"] = np.array(CLASSES, dtype=object)[y]
    provenance = Provenance(path="waveform", sheet=None, sha256="0" * 64, n_rows=len(frame),
                            n_columns=frame.shape[1])
    return LoadedTable(frame, provenance)


def _dictionary():
    columns = [ColumnSpec(n, kind="numeric") for n in NAMES]
    columns.append(ColumnSpec("wave", role="outcome", kind="nominal", levels=CLASSES))
    return DataDictionary(tuple(columns))


@pytest.mark.slow
def test_one_se_tree_error_on_fresh_cases_and_its_cv_estimate():
    fresh_X, fresh_y = waveform(5000, seed=999)
    fresh = _table(fresh_X, fresh_y).frame
    errors, estimates = [], []
    for seed in range(4):
        X, y = waveform(300, seed=seed)
        request = DerivationRequest(
            design=DesignSpec(outcome="wave", predictors=tuple(NAMES), task="classification"),
            tree=TreeSettings(min_leaf=3, priors="equal", seed=seed),
            cv=CVSettings(folds=10, seed=seed), size="1se")
        model = derive(_table(X, y), _dictionary(), request).model
        predicted = model.apply(fresh).prediction
        errors.append(np.mean(predicted != fresh["wave"].to_numpy()))
        estimates.append(model.chosen["cv_risk"])
    error, estimate = float(np.mean(errors)), float(np.mean(estimates))
    assert 0.24 <= error <= 0.36, errors
    assert abs(estimate - error) <= 0.06, (estimates, errors)
