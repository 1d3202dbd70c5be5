"""Trees built for a clinical goal (a least cross-validated sensitivity or specificity).

References (docs/references.md):
- scikit-learn trees refitted on the same leave-one-out folds with the same class weights
  (altered priors for the miss cost) and ``ccp_alpha=α′`` must give exactly the pooled
  held-out counts, hence the cross-validated sensitivity and specificity, of every size that
  the one-pass evaluation counts; and the boxes' positive shares behind net benefit.
- The Wisconsin diagnostic breast cancer data (Wolberg, Street & Mangasarian; UCI Machine
  Learning Repository, shipped with scikit-learn as ``load_breast_cancer``), with 30% set
  aside: the goal tree reaches the goal under cross-validation, and its sensitivity on the
  patients set aside is close to it.
- Wilson score intervals (Wilson 1927; Newcombe 1998) for the chosen tree's measures.
"""

from __future__ import annotations

import json
import threading

import numpy as np
import pandas as pd
import pytest
from sklearn.datasets import load_breast_cancer

from core.checking.intervals import wilson_interval
from core.errors import Cancelled, InputError
from core.sizing import cross_validate_path
from core.sizing.cv_counts import THRESHOLDS
from core.sizing.folds import CVSettings
from core.sizing.goal import Goal, miss_cost_grid
from core.sizing.goal_search import choose_for_goal, search_goal
from core.sizing.grow import TreeSettings, growth_class_weights, make_estimator
from core.sizing.request import DerivationRequest
from tests.helpers import analysis_from_arrays, prunella


def _small_breast_cancer(n=70, seed=3):
    X, y = load_breast_cancer(return_X_y=True)
    rows = np.random.default_rng(seed).choice(len(y), n, replace=False)
    # Classes c0 (malignant) and c1 (benign); the default positive class is the rarer, c0.
    return analysis_from_arrays(X[rows][:, :8], y[rows], "classification")[0]


def _refit_counts(data, settings, grid, costs):
    """Leave-one-out confusion and 'treated' counts at each grid α′, the naive way: one
    scikit-learn refit per case and α′ with the fold's class weights."""
    X = np.column_stack([p.numbers for p in data.predictors]).astype(np.float32)
    y = data.y
    confusion = np.zeros((len(grid), 2, 2))
    treated = np.zeros((len(grid), len(THRESHOLDS), 2))
    for i in range(len(y)):
        train = np.delete(np.arange(len(y)), i)
        weights = growth_class_weights(costs, y[train])
        for g, alpha in enumerate(grid):
            estimator = make_estimator("classification", settings, class_weight=weights)
            estimator.set_params(ccp_alpha=float(alpha) if np.isfinite(alpha) else 1e300)
            estimator.fit(X[train], y[train])
            predicted = int(estimator.predict(X[i:i + 1])[0])
            confusion[g, y[i], predicted] += 1
            # The box's positive share among the fold's own patients (unweighted counts).
            leaf = estimator.apply(X[i:i + 1])[0]
            in_leaf = estimator.apply(X[train]) == leaf
            share = y[train][in_leaf].sum() / in_leaf.sum()
            treated[g, share >= THRESHOLDS, y[i]] += 1
    return confusion, treated


@pytest.mark.slow
@pytest.mark.parametrize("miss_cost", [1.0, 4.0])
def test_pooled_cv_sensitivity_and_specificity_equal_leave_one_out_refits(miss_cost):
    data = _small_breast_cancer()
    # Impurity risk: scikit-learn's own ccp_alpha pruning, so a refit is an exact reference;
    # the miss cost enters through the class weights (altered priors, Breiman et al. 1984 §4.4).
    settings = TreeSettings(min_leaf=2, risk="impurity", miss_cost=miss_cost, seed=4)
    path = cross_validate_path(data, settings, CVSettings(plan="loo"))
    confusion, treated = _refit_counts(data, settings, path.grid, path.grown.costs)
    assert len(path.grid) > 3
    np.testing.assert_array_equal(path.counts.confusion, confusion)
    np.testing.assert_array_equal(path.counts.treated, treated)
    sens = confusion[:, 1, 1] / confusion[:, 1, :].sum(axis=1)
    spec = confusion[:, 0, 0] / confusion[:, 0, :].sum(axis=1)
    np.testing.assert_array_equal(path.counts.sensitivity, sens)
    np.testing.assert_array_equal(path.counts.specificity, spec)


@pytest.mark.slow
def test_search_paths_equal_refits_and_choice_is_the_smallest_reaching_the_goal():
    data = _small_breast_cancer(n=50, seed=8)
    settings = TreeSettings(min_leaf=2, risk="impurity", seed=1)
    goal = Goal("sensitivity", 0.9)
    search = search_goal(data, settings, CVSettings(plan="loo"), goal)
    assert len(search.paths) == len(search.miss_costs) == len(miss_cost_grid(goal, search.path.grown.costs.priors))
    # Each cost's path counts equal the naive refits with that cost (two costs checked).
    for i in (0, len(search.miss_costs) - 1):
        path = search.paths[i]
        confusion, _ = _refit_counts(data, TreeSettings(min_leaf=2, risk="impurity", seed=1,
                                                        miss_cost=float(search.miss_costs[i])),
                                     path.grid, path.grown.costs)
        np.testing.assert_array_equal(path.counts.confusion, confusion)
    # The choice by brute force over every (cost, size).
    candidates = [(int(p.leaves[k]), -p.counts.specificity[k])
                  for p in search.paths for k in range(len(p.leaves))
                  if p.leaves[k] >= 2 and p.counts.specificity[k] > 0
                  and p.counts.sensitivity[k] >= 0.9]
    chosen = search.path
    k = search.size_index
    assert (int(chosen.leaves[k]), -chosen.counts.specificity[k]) == min(candidates)
    assert chosen.counts.sensitivity[k] >= 0.9


def test_miss_cost_grid_is_log_spaced_and_reaches_past_the_balancing_cost():
    grid = miss_cost_grid(Goal("sensitivity", 0.95), np.array([0.9, 0.1]))
    np.testing.assert_allclose(grid[1:] / grid[:-1], np.sqrt(2))
    assert grid[0] == 1 and grid[-1] >= 16 * 9
    low = miss_cost_grid(Goal("specificity", 0.95), np.array([0.5, 0.5]))
    assert low[0] == 1 and low[-1] == pytest.approx(1 / 16)
    for bad in (0, 1, 1.5, -0.2):
        with pytest.raises(InputError, match="share between 0 and 1"):
            Goal("sensitivity", bad)
    with pytest.raises(InputError):
        Goal("accuracy", 0.9)


def test_goal_not_reached_names_the_best_reached():
    data = _small_breast_cancer(n=80, seed=2)
    search = search_goal(data, TreeSettings(min_leaf=5), CVSettings(folds=5),
                         Goal("sensitivity", 0.5))
    with pytest.raises(InputError) as refused:
        choose_for_goal(search.paths, search.miss_costs, Goal("sensitivity", 0.99999))
    best = max(p.counts.sensitivity[k] for p in search.paths for k in range(len(p.leaves))
               if p.leaves[k] >= 2 and p.counts.specificity[k] > 0)
    assert "No tree reaches cross-validated sensitivity of at least 100%" in str(refused.value)
    assert f"sensitivity {best:.1%}" in str(refused.value)


def test_progress_cancel_and_parallel_folds_agree():
    data = _small_breast_cancer(n=120, seed=5)
    seen = []
    goal = Goal("specificity", 0.8)
    one = search_goal(data, TreeSettings(min_leaf=5), CVSettings(folds=4), goal,
                      progress=lambda d, t: seen.append((d, t)))
    total = len(one.miss_costs) * 5
    assert seen[-1] == (total, total) and len(seen) == total
    two = search_goal(data, TreeSettings(min_leaf=5), CVSettings(folds=4), goal, jobs=2)
    assert (one.cost_index, one.size_index) == (two.cost_index, two.size_index)
    np.testing.assert_array_equal(one.path.counts.confusion, two.path.counts.confusion)
    flag = threading.Event()
    with pytest.raises(Cancelled):
        search_goal(data, TreeSettings(min_leaf=5), CVSettings(folds=4), goal,
                    progress=lambda d, t: flag.set() if d == 3 else None, cancel=flag.is_set)


def test_request_keeps_its_goal():
    request = DerivationRequest.from_dict({"design": {"outcome": "y", "predictors": ["a"]},
                                           "goal": {"measure": "specificity", "at_least": 0.9}})
    assert request.goal == Goal("specificity", 0.9)
    assert DerivationRequest.from_dict(request.to_dict()) == request
    plain = DerivationRequest.from_dict({"design": {"outcome": "y", "predictors": ["a"]}})
    assert plain.goal is None and "goal" not in plain.to_dict()


def _breast_cancer_csv(tmp_path):
    data = load_breast_cancer()
    frame = pd.DataFrame(data.data, columns=[f"f{j}" for j in range(data.data.shape[1])])
    frame["diagnosis"] = np.where(data.target == 0, "malignant", "benign")
    path = tmp_path / "breast_cancer.csv"
    frame.to_csv(path, index=False)
    return path


def test_breast_cancer_goal_tree_meets_its_goal_and_holds_on_the_patients_set_aside(tmp_path):
    """Wisconsin diagnostic breast cancer data (Wolberg, Street & Mangasarian; UCI, shipped
    with scikit-learn), 30% set aside before growing; malignant is the class to catch."""
    csv = _breast_cancer_csv(tmp_path)
    model_path = tmp_path / "goal.json"
    ran = prunella("fit", csv, "--outcome", "diagnosis", "--positive", "malignant",
                   "--holdout", "0.3", "--min-sensitivity", "0.95", "--model", model_path,
                   "--dictionary", "none")
    assert ran.returncode == 0, ran.stderr
    chosen = json.loads(model_path.read_text())["chosen"]
    assert chosen["rule"] == "goal"
    assert chosen["goal"] == {"measure": "sensitivity", "at_least": 0.95}
    assert chosen["cv_sensitivity"] >= 0.95
    assert chosen["miss_cost"] in chosen["miss_cost_grid"]
    assert str(len(chosen["miss_cost_grid"])) + " miss costs" in chosen["grid_description"]
    low, high = chosen["cv_sensitivity_interval"]
    assert low < chosen["cv_sensitivity"] <= high
    # The Wilson interval over the malignant derivation patients (each held out once).
    model = json.loads(model_path.read_text())
    positives = model["cohort"]["outcome_counts"]["malignant"]
    hits = round(chosen["cv_sensitivity"] * positives)
    assert (low, high) == pytest.approx(wilson_interval(hits, positives))
    heldout = model["validation"]["sensitivity"][0]
    # Close: within the sampling spread of about 64 malignant patients set aside.
    assert abs(heldout - chosen["cv_sensitivity"]) < 0.1
    assert "goal choice" in ran.stdout and "Built for cross-validated sensitivity" in ran.stdout


@pytest.mark.parametrize("options, words", [
    (("--min-sensitivity", "0.9", "--min-specificity", "0.9"), "Give one goal"),
    (("--min-sensitivity", "0.9", "--miss-cost", "3"), "either a goal or costs"),
    (("--min-sensitivity", "95"), "between 0 and 1"),
])
def test_goal_options_refused_in_one_sentence(tmp_path, options, words):
    csv = _breast_cancer_csv(tmp_path)
    ran = prunella("fit", csv, "--outcome", "diagnosis", "--model", tmp_path / "m.json",
                   "--dictionary", "none", *options)
    assert ran.returncode == 2 and words in ran.stderr
    assert not (tmp_path / "m.json").exists()


def test_goal_needs_two_classes(tmp_path):
    frame = pd.DataFrame({"x": np.arange(60) % 7, "y": np.array(["a", "b", "c"] * 20)})
    frame.to_csv(tmp_path / "three.csv", index=False)
    ran = prunella("fit", tmp_path / "three.csv", "--outcome", "y", "--model",
                   tmp_path / "m.json", "--min-sensitivity", "0.9", "--dictionary", "none",
                   "--min-leaf", "2")
    assert ran.returncode == 2 and "two classes" in ran.stderr


def test_the_chart_and_the_report_say_which_goal_the_tree_was_built_for(tmp_path):
    """The chart's side panel and the report's methods table name the goal and the
    cross-validated value reached, never "chosen by the user"."""
    from pypdf import PdfReader

    csv = _breast_cancer_csv(tmp_path)
    model_path, chart = tmp_path / "goal.json", tmp_path / "goal.pdf"
    ran = prunella("fit", csv, "--outcome", "diagnosis", "--positive", "malignant",
                   "--min-sensitivity", "0.95", "--model", model_path, "--dictionary", "none",
                   "--chart", chart, "--paper", "a3")
    assert ran.returncode == 0, ran.stderr
    chosen = json.loads(model_path.read_text())["chosen"]
    words = " ".join(PdfReader(chart).pages[0].extract_text().split())
    assert "built to reach a sensitivity of at least 95%" in words
    assert f"cross-validated {round(100 * chosen['cv_sensitivity'])}%" in words
    assert "chosen by the user" not in words
    report = tmp_path / "report.pdf"
    ran = prunella("report", model_path, csv, "--dictionary", "none", "--no-nested",
                   "--bootstrap", "5", "--out", report)
    assert ran.returncode == 0, ran.stderr
    text = " ".join(" ".join(p.extract_text().split()) for p in PdfReader(report).pages)
    assert "clinical goal: the smallest tree whose cross-validated sensitivity is at least 95%" \
        in text
