"""Weakest-link pruning against outside references.

- scikit-learn's ``cost_complexity_pruning_path`` (a reference library, docs/references.md)
  on the bundled diabetes data (Efron, Hastie, Johnstone & Tibshirani 2004) and breast-cancer
  data (Street, Wolberg & Mangasarian 1993).
- Weakest-link optimality (Breiman, Friedman, Olshen & Stone 1984, ch. 3 and 10): each
  subtree of the sequence is the smallest minimiser of R(T) + α|leaves(T)| among all prunings,
  checked by exhaustive enumeration.
- Training risk never rises as leaves are added (common practice; the definition of the
  pruning sequence).
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from sklearn.datasets import load_breast_cancer, load_diabetes
from sklearn.tree import DecisionTreeClassifier, DecisionTreeRegressor

from core.sizing.grow import TreeSettings, class_costs, grow_tree
from core.sizing.prune import collapse_alphas, parents_of, pruning_sequence


def _sklearn_path(estimator, X, y):
    """scikit-learn's path with exact ties collapsed: it prunes one branch per round, so
    mathematically equal α's appear as repeats; keep the last (most pruned) of each."""
    path = estimator.cost_complexity_pruning_path(X, y)
    alphas, risks = path.ccp_alphas, path.impurities
    keep = np.append(np.diff(alphas) > 1e-11 * max(risks[-1], 1e-300), True)
    return alphas[keep], risks[keep]


@pytest.mark.parametrize("min_leaf", [1, 2, 5, 10, 20])
def test_regression_sequence_equals_scikit_learn_on_diabetes(min_leaf):
    X, y = load_diabetes(return_X_y=True)
    settings = TreeSettings(min_leaf=min_leaf, seed=3)
    tree = grow_tree(X.astype(np.float32), y, "regression", settings)
    ours = pruning_sequence(tree.children_left, tree.children_right, tree.prune_risk, tree.cost_risk)
    reference = DecisionTreeRegressor(min_samples_leaf=min_leaf, min_samples_split=max(2, 2 * min_leaf),
                                      random_state=3)
    alphas, risks = _sklearn_path(reference, X, y)
    assert len(ours.alpha) == len(alphas)
    np.testing.assert_allclose(ours.alpha, alphas, rtol=1e-9, atol=1e-9)
    np.testing.assert_allclose(ours.prune_risk, risks, rtol=1e-10)
    # For squared error the resubstitution risk is the impurity risk: the training MSE.
    np.testing.assert_allclose(ours.train_risk, risks, rtol=1e-10)


@pytest.mark.parametrize("criterion", ["gini", "entropy"])
@pytest.mark.parametrize("min_leaf", [1, 4])
def test_classification_impurity_option_equals_scikit_learn(criterion, min_leaf):
    X, y = load_breast_cancer(return_X_y=True)
    settings = TreeSettings(min_leaf=min_leaf, criterion=criterion, risk="impurity", seed=1)
    costs = class_costs(settings, y, 2)
    tree = grow_tree(X.astype(np.float32), y, "classification", settings, costs)
    ours = pruning_sequence(tree.children_left, tree.children_right, tree.prune_risk, tree.cost_risk)
    # Observed priors and unit costs make the class weights all 1, as in the plain estimator.
    reference = DecisionTreeClassifier(criterion=criterion, min_samples_leaf=min_leaf,
                                       min_samples_split=max(2, 2 * min_leaf), random_state=1)
    alphas, risks = _sklearn_path(reference, X, y)
    assert len(ours.alpha) == len(alphas)
    np.testing.assert_allclose(ours.alpha, alphas, rtol=1e-9, atol=1e-12)
    np.testing.assert_allclose(ours.prune_risk, risks, rtol=1e-9, atol=1e-12)


# --- exhaustive optimality on small random trees -----------------------------------------


def _random_tree(rng, max_leaves):
    """A random binary tree in preorder numbering with random node risks that obey
    R(t) >= R(left) + R(right) (a split never raises resubstitution risk)."""
    left, right = [], []

    def build(budget):
        node = len(left)
        left.append(-1)
        right.append(-1)
        if budget >= 2 and rng.random() < 0.8:
            share = int(rng.integers(1, budget))
            left[node] = build(share)
            right[node] = build(budget - share)
        return node

    build(int(rng.integers(2, max_leaves + 1)))
    left, right = np.array(left), np.array(right)
    risk = np.zeros(len(left))
    for t in range(len(left) - 1, -1, -1):
        if left[t] < 0:
            risk[t] = rng.uniform(0, 1)
        else:
            below = risk[left[t]] + risk[right[t]]
            # Sometimes exactly no gain (ties at α = 0), sometimes a gain on a coarse grid so
            # exact ties between branches occur too.
            gain = 0.0 if rng.random() < 0.1 else float(rng.integers(1, 6)) / 4
            risk[t] = below + gain
    return left, right, risk


def _prunings(left, right, node=0):
    """Every pruned subtree rooted at ``node`` as a frozenset of its leaves."""
    yield frozenset([node])
    if left[node] >= 0:
        for a in _prunings(left, right, left[node]):
            for b in _prunings(left, right, right[node]):
                yield a | b


@pytest.mark.parametrize("seed", range(40))
def test_each_subtree_is_the_smallest_minimiser_among_all_prunings(seed):
    rng = np.random.default_rng(seed)
    left, right, risk = _random_tree(rng, max_leaves=12)
    sequence = pruning_sequence(left, right, risk)
    candidates = [(sum(risk[t] for t in leaves), len(leaves), leaves)
                  for leaves in _prunings(left, right)]
    parent = parents_of(left, right)
    for k, alpha in enumerate(sequence.alpha):
        costs = np.array([r + alpha * n for r, n, _ in candidates])
        best = costs.min()
        minimisers = [c for c, cost in zip(candidates, costs) if cost <= best + 1e-9]
        smallest = min(minimisers, key=lambda c: c[1])
        assert sequence.leaves[k] == smallest[1]
        assert sequence.prune_risk[k] == pytest.approx(smallest[0], abs=1e-9)
        # And the mask at α is exactly that pruning.
        internal = sequence.internal_at(alpha)
        present = np.array([parent[t] < 0 or internal[parent[t]] for t in range(len(left))])
        ours = frozenset(np.flatnonzero(present & ~internal).tolist())
        assert ours == smallest[2]


def test_collapse_alphas_never_increase_from_root_to_leaf():
    rng = np.random.default_rng(7)
    for _ in range(50):
        left, right, risk = _random_tree(rng, max_leaves=30)
        collapse = collapse_alphas(left, right, risk)
        parent = parents_of(left, right)
        for t in range(1, len(left)):
            assert collapse[t] <= collapse[parent[t]]


# --- invariants on real grown trees -------------------------------------------------------


@pytest.mark.parametrize("task", ["regression", "classification"])
def test_sequence_invariants(task):
    """α's increase, leaves decrease, training risk never falls as the tree shrinks
    (common practice: the definition of the sequence), and the subtrees nest."""
    if task == "regression":
        X, y = load_diabetes(return_X_y=True)
        settings, costs = TreeSettings(min_leaf=2), None
    else:
        X, y = load_breast_cancer(return_X_y=True)
        settings = TreeSettings(min_leaf=1, miss_cost=3.0)
        costs = class_costs(settings, y, 2)
    tree = grow_tree(X.astype(np.float32), y, task, settings, costs)
    seq = pruning_sequence(tree.children_left, tree.children_right, tree.prune_risk, tree.cost_risk)
    assert seq.alpha[0] == 0.0
    assert np.all(np.diff(seq.alpha) > 0)
    assert np.all(np.diff(seq.leaves) < 0)
    assert seq.leaves[-1] == 1
    assert np.all(np.diff(seq.prune_risk) >= -1e-12)
    masks = [seq.internal_at(a) for a in seq.grid]
    for bigger, smaller in itertools.pairwise(masks):
        assert np.all(bigger | ~smaller)  # every node internal in the smaller is internal in the bigger
        assert smaller.sum() < bigger.sum()
    for mask, leaves in zip(masks, seq.leaves):
        assert mask.sum() + 1 == leaves
