"""Cross-validating the whole pruning path in one pass per fold.

Reference (docs/references.md): scikit-learn trees refitted with ``ccp_alpha=α′`` on the same
data, parameters and ``random_state`` must predict exactly what the one-pass evaluation
predicts, for every fold and every grid α′; leave-one-out makes the folds unambiguous. Data: the
bundled diabetes (Efron et al. 2004) and breast-cancer (Street et al. 1993) sets.
"""

from __future__ import annotations

import threading

import numpy as np
import pytest
from sklearn.datasets import load_breast_cancer, load_diabetes

from core.errors import Cancelled, InputError
from core.sizing import cross_validate_path
from core.sizing.folds import CVSettings, fold_plan
from core.sizing.grow import TreeSettings, growth_class_weights, make_estimator
from tests.helpers import analysis_from_arrays


def _refit_risk(data, settings, grid, costs):
    """CV risk at each grid α by the naive way: one scikit-learn refit per case and α′."""
    X = np.column_stack([p.numbers for p in data.predictors]).astype(np.float32)
    y = data.y
    losses = np.zeros((len(y), len(grid)))
    for i in range(len(y)):
        train = np.delete(np.arange(len(y)), i)
        weights = growth_class_weights(costs, y[train]) if costs is not None else None
        for g, alpha in enumerate(grid):
            estimator = make_estimator(data.task, settings, class_weight=weights)
            estimator.set_params(ccp_alpha=float(alpha) if np.isfinite(alpha) else 1e300)
            predicted = estimator.fit(X[train], y[train]).predict(X[i:i + 1])[0]
            if data.task == "regression":
                losses[i, g] = (predicted - y[i]) ** 2
            else:
                losses[i, g] = costs.loss[y[i], int(predicted)] * costs.case_weight[y[i]]
    return losses.mean(axis=0)


@pytest.mark.slow
def test_leave_one_out_regression_equals_refits_with_ccp_alpha():
    X, y = load_diabetes(return_X_y=True)
    data, _, _ = analysis_from_arrays(X[:110], y[:110], "regression")
    settings = TreeSettings(min_leaf=3, seed=5)
    path = cross_validate_path(data, settings, CVSettings(plan="loo"))
    reference = _refit_risk(data, settings, path.grid, None)
    np.testing.assert_allclose(path.cv_risk, reference, rtol=1e-10)


@pytest.mark.slow
def test_leave_one_out_classification_impurity_risk_equals_refits():
    X, y = load_breast_cancer(return_X_y=True)
    rows = np.random.default_rng(0).choice(len(y), 120, replace=False)
    data, _, _ = analysis_from_arrays(X[rows], y[rows], "classification")
    settings = TreeSettings(min_leaf=2, risk="impurity", seed=2)
    path = cross_validate_path(data, settings, CVSettings(plan="loo"))
    reference = _refit_risk(data, settings, path.grid, path.grown.costs)
    np.testing.assert_allclose(path.cv_risk, reference, rtol=1e-12, atol=1e-15)
    assert len(path.grid) > 3


def _regression_data(n=300, seed=0):
    rng = np.random.default_rng(seed)
    X = rng.normal(size=(n, 5))
    y = 3 * (X[:, 0] > 0.3) + X[:, 1] + rng.normal(size=n)
    return analysis_from_arrays(X, y, "regression")[0]


def test_k_fold_costs_one_fit_per_fold_plus_one(monkeypatch):
    """k-fold needs k fits and leave-one-out n, plus the full-data tree (common practice)."""
    import core.sizing.cross_validated_path as pathcv

    calls = []
    real = pathcv.grow_tree

    def counting(*args, **kwargs):
        calls.append(1)
        return real(*args, **kwargs)

    monkeypatch.setattr(pathcv, "grow_tree", counting)
    data = _regression_data(n=60)
    cross_validate_path(data, TreeSettings(min_leaf=5), CVSettings(folds=7))
    assert len(calls) == 8
    calls.clear()
    cross_validate_path(data, TreeSettings(min_leaf=5), CVSettings(plan="loo"))
    assert len(calls) == 61


def test_same_seed_same_path_and_parallel_folds_agree():
    data = _regression_data()
    a = cross_validate_path(data, TreeSettings(min_leaf=5, seed=1), CVSettings(seed=4))
    b = cross_validate_path(data, TreeSettings(min_leaf=5, seed=1), CVSettings(seed=4), jobs=2)
    np.testing.assert_array_equal(a.cv_risk, b.cv_risk)
    np.testing.assert_array_equal(a.cv_se, b.cv_se)
    c = cross_validate_path(data, TreeSettings(min_leaf=5, seed=1), CVSettings(seed=5))
    assert not np.array_equal(a.cv_risk, c.cv_risk)


def test_cv_risk_reported_beside_training_risk_and_choices():
    data = _regression_data()
    path = cross_validate_path(data, TreeSettings(min_leaf=5), CVSettings(repeats=3))
    assert path.n_folds == 30
    assert len(path.cv_risk) == len(path.train_risk) == len(path.leaves) == len(path.grid)
    # Training risk never rises with more leaves (common practice; the definition of the
    # pruning sequence, Breiman et al. 1984, ch. 3 (from memory)); CV risk is honest, so
    # above it for big trees.
    assert np.all(np.diff(path.train_risk) >= -1e-12)
    assert path.cv_risk[0] > path.train_risk[0]
    k_min, k_1se = path.min_index, path.one_se_index
    assert path.cv_risk[k_min] == pytest.approx(path.cv_risk.min())
    assert path.leaves[k_1se] <= path.leaves[k_min]
    assert path.cv_risk[k_1se] <= path.cv_risk[k_min] + path.cv_se[k_min] + 1e-12
    # The 1-SE tree is the smallest such tree: every smaller one is above the limit.
    limit = path.cv_risk[k_min] + path.cv_se[k_min]
    assert np.all(path.cv_risk[k_1se + 1:] > limit)
    # The planted structure (a step on x0) is found: the 1-SE tree is small but not the root.
    assert 2 <= path.leaves[k_1se] <= 12
    assert path.index_for(path.leaves[3]) == (3, "user")
    assert path.index_for(10_000)[0] == 0
    with pytest.raises(InputError):
        path.index_for("big")


def test_progress_and_cancel():
    data = _regression_data()
    seen = []
    cross_validate_path(data, TreeSettings(), CVSettings(folds=5),
                        progress=lambda done, total: seen.append((done, total)))
    assert seen == [(i, 6) for i in range(1, 7)]
    flag = threading.Event()

    def stop_after_two(done, total):
        if done == 2:
            flag.set()

    with pytest.raises(Cancelled):
        cross_validate_path(data, TreeSettings(), CVSettings(folds=5), progress=stop_after_two,
                            cancel=flag.is_set)


def test_grouped_folds_keep_each_patients_visits_together():
    rng = np.random.default_rng(1)
    groups = rng.integers(0, 150, size=600)
    y = rng.integers(0, 2, size=600)
    for settings in (CVSettings(folds=5), CVSettings(folds=5, repeats=2), CVSettings(plan="split"),
                     CVSettings(plan="loo")):
        folds = fold_plan(settings, 600, y=y, groups=groups)
        for fold in folds:
            assert not set(groups[fold.train]) & set(groups[fold.test])
        if settings.plan == "kfold":
            tested = np.concatenate([f.test for f in folds if f.repeat == 0])
            assert np.array_equal(np.sort(tested), np.arange(600))
            shares = [y[f.test].mean() for f in folds]
            assert max(shares) - min(shares) < 0.15


def test_leave_one_site_out_and_stratified_folds():
    sites = np.repeat([0, 1, 2], 50)
    folds = fold_plan(CVSettings(plan="site"), 150, sites=sites)
    assert [sorted(set(sites[f.test])) for f in folds] == [[0], [1], [2]]
    y = np.array([0] * 120 + [1] * 30)
    folds = fold_plan(CVSettings(folds=10), 150, y=y)
    assert all(y[f.test].sum() == 3 for f in folds)
    with pytest.raises(InputError, match="site column"):
        fold_plan(CVSettings(plan="site"), 150)
    with pytest.raises(InputError, match="fewer folds"):
        fold_plan(CVSettings(folds=200), 150)


def test_folds_follow_a_joblib_backend_chosen_by_the_caller():
    """With jobs=None the caller's joblib configuration decides where folds run (a cluster
    backend plugs in the same way); results do not depend on it."""
    from joblib import parallel_config

    data = _regression_data(n=200)
    plain = cross_validate_path(data, TreeSettings(min_leaf=5), CVSettings(folds=4))
    with parallel_config(backend="threading", n_jobs=2):
        threaded = cross_validate_path(data, TreeSettings(min_leaf=5), CVSettings(folds=4), jobs=None)
    np.testing.assert_array_equal(plain.cv_risk, threaded.cv_risk)
