"""Breiman's waveform problem: the 1-SE tree's error on fresh cases.

Breiman, Friedman, Olshen & Stone (1984), §2.6.2 and §3.4 (from memory): a 1-SE pruned tree
grown on 300 cases misclassifies about 0.28–0.30 of fresh cases (Bayes error ≈ 0.14). Check
(docs/references.md): averaged over a few seeds, the error on 5,000 fresh cases lies in 0.24–0.36,
and the cross-validated estimate is within 0.06 of it.
"""

from __future__ import annotations

import numpy as np
import pytest

from core.design import DesignSpec
from core.sizing import CVSettings, DerivationRequest, TreeSettings, derive
from tests.waveform import FEATURES, waveform_dictionary, waveform_table


@pytest.mark.slow
def test_one_se_tree_error_on_fresh_cases_and_its_cv_estimate():
    fresh = waveform_table(5000, seed=999).frame
    errors, estimates = [], []
    for seed in range(4):
        request = DerivationRequest(
            design=DesignSpec(outcome="wave", predictors=FEATURES, task="classification"),
            tree=TreeSettings(min_leaf=3, priors="equal", seed=seed),
            cv=CVSettings(folds=10, seed=seed), size="1se")
        model = derive(waveform_table(300, seed), waveform_dictionary(), request).model
        predicted = model.apply(fresh).prediction
        errors.append(np.mean(predicted != fresh["wave"].to_numpy()))
        estimates.append(model.chosen["cv_risk"])
    error, estimate = float(np.mean(errors)), float(np.mean(estimates))
    assert 0.24 <= error <= 0.36, errors
    assert abs(estimate - error) <= 0.06, (estimates, errors)
