"""Growing the full tree with scikit-learn, and each node's risk and outcome.

scikit-learn grows the tree (best splitter, seeded). What it does not know about is the loss
matrix and class priors of classification and regression trees; they enter the growth as
altered priors (class weights, Breiman et al. 1984, §4.4) and the node risks and labels as the
expected misclassification cost, so pruning and cross-validation measure what the user said
matters.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from ..messages.message import say

CLASSIFICATION_CRITERIA = ("gini", "entropy")
REGRESSION_CRITERIA = ("squared_error", "friedman_mse")
RISKS = ("cost", "impurity")


@dataclass(frozen=True)
class TreeSettings:
    """How the maximal tree is grown and how node risk is measured."""

    min_leaf: int = 5
    max_depth: int | None = None
    criterion: str | None = None  # default: gini / squared_error
    priors: str | tuple[float, ...] = "observed"  # "observed", "equal" or one value per class
    loss: tuple[tuple[float, ...], ...] | None = None  # loss[true][predicted]
    miss_cost: float | None = None  # two classes: missing a positive vs a needless alarm
    risk: str = "cost"  # classification pruning risk: "cost" (Breiman et al.) or "impurity"
    seed: int = 0
    # Numeric predictors with more than this many distinct values are grown on as this many
    # quantile levels (core/design/matrix.py); None: never (the default).
    coarsen: int | None = None

    def to_dict(self) -> dict:
        out = {
            "min_leaf": self.min_leaf, "max_depth": self.max_depth, "criterion": self.criterion,
            "priors": self.priors if isinstance(self.priors, str) else list(self.priors),
            "loss": None if self.loss is None else [list(r) for r in self.loss],
            "miss_cost": self.miss_cost, "risk": self.risk, "seed": self.seed,
        }
        if self.coarsen is not None:  # recorded only when used, so older files read the same
            out["coarsen"] = self.coarsen
        return out

    @classmethod
    def from_dict(cls, data: dict) -> "TreeSettings":
        priors = data.get("priors", "observed")
        loss = data.get("loss")
        return cls(min_leaf=int(data.get("min_leaf", 5)), max_depth=data.get("max_depth"),
                   criterion=data.get("criterion"),
                   priors=priors if isinstance(priors, str) else tuple(float(p) for p in priors),
                   loss=None if loss is None else tuple(tuple(float(v) for v in r) for r in loss),
                   miss_cost=data.get("miss_cost"), risk=data.get("risk", "cost"),
                   seed=int(data.get("seed", 0)), coarsen=data.get("coarsen"))


@dataclass(frozen=True)
class ClassCosts:
    """Priors, loss matrix and the per-case weights they imply, from the whole data set."""

    priors: np.ndarray  # pi_j, sums to 1
    loss: np.ndarray  # L[true, predicted]
    case_weight: np.ndarray  # pi_j * N / N_j: makes a case's loss count as its prior says

    def node_costs(self, class_counts: np.ndarray, class_totals: np.ndarray) -> np.ndarray:
        """Expected cost of predicting each class at each node: shape (nodes, classes)."""
        share = class_counts / np.maximum(class_totals, 1)[None, :] * self.priors[None, :]
        return share @ self.loss


def class_costs(settings: TreeSettings, y: np.ndarray, n_classes: int) -> ClassCosts:
    """Priors and loss matrix as the user set them, checked."""
    counts = np.bincount(y, minlength=n_classes).astype(float)
    if isinstance(settings.priors, str):
        if settings.priors == "observed":
            priors = counts / counts.sum()
        elif settings.priors == "equal":
            priors = np.full(n_classes, 1.0 / n_classes)
        else:
            raise InputError(say("grow.priors_word", given=settings.priors))
    else:
        priors = np.asarray(settings.priors, dtype=float)
        if priors.shape != (n_classes,) or (priors < 0).any() or priors.sum() <= 0:
            raise InputError(say("grow.priors_count", n=n_classes))
        priors = priors / priors.sum()
    if settings.loss is not None:
        loss = np.asarray(settings.loss, dtype=float)
        if loss.shape != (n_classes, n_classes) or (loss < 0).any() or np.diag(loss).any():
            raise InputError(say("grow.costs_table", n=n_classes))
    else:
        loss = 1.0 - np.eye(n_classes)
        if settings.miss_cost is not None:
            if n_classes != 2:
                raise InputError(say("grow.miss_cost_two_classes"))
            if not settings.miss_cost > 0:
                raise InputError(say("grow.miss_cost_positive"))
            loss[1, 0] = float(settings.miss_cost)
    with np.errstate(divide="ignore", invalid="ignore"):
        case_weight = np.where(counts > 0, priors * counts.sum() / counts, 0.0)
    return ClassCosts(priors=priors, loss=loss, case_weight=case_weight)


def growth_class_weights(costs: ClassCosts, y_train: np.ndarray) -> dict[int, float]:
    """Altered priors as scikit-learn class weights: pi_j * c_j / (N_j / N), c_j = sum_i L[j, i]."""
    n_classes = len(costs.priors)
    counts = np.bincount(y_train, minlength=n_classes).astype(float)
    altered = costs.priors * costs.loss.sum(axis=1)
    altered = altered / altered.sum()
    weight = np.where(counts > 0, altered * counts.sum() / np.maximum(counts, 1), 0.0)
    return {j: float(weight[j]) for j in range(n_classes)}


@dataclass(frozen=True)
class FullTree:
    """A tree grown to full size on some rows (one fold's, or every derivation row), as plain
    arrays in scikit-learn's preorder node numbering, with each node's risk and outcome."""

    task: str
    children_left: np.ndarray = field(repr=False)
    children_right: np.ndarray = field(repr=False)
    feature: np.ndarray = field(repr=False)
    threshold: np.ndarray = field(repr=False)
    missing_left: np.ndarray = field(repr=False)  # where NaN goes at each split
    n: np.ndarray = field(repr=False)  # patients (unweighted rows) per node
    class_counts: np.ndarray | None = field(repr=False)  # (nodes, classes), unweighted
    mean: np.ndarray | None = field(repr=False)  # regression: node mean
    prune_risk: np.ndarray = field(repr=False)  # R(t) used for pruning
    cost_risk: np.ndarray = field(repr=False)  # R(t) as misclassification cost / squared error
    label: np.ndarray = field(repr=False)  # prediction per node: class index or mean
    estimator: object = field(repr=False, compare=False)

    @property
    def node_count(self) -> int:
        return len(self.children_left)

    @property
    def is_leaf(self) -> np.ndarray:
        return self.children_left < 0


def make_estimator(task: str, settings: TreeSettings, class_weight=None):
    """The scikit-learn estimator these settings describe (used for reference checks too)."""
    from sklearn.tree import DecisionTreeClassifier, DecisionTreeRegressor  # loaded when growing

    if settings.min_leaf < 1:
        raise InputError(say("grow.min_leaf"))
    common = dict(min_samples_leaf=int(settings.min_leaf),
                  min_samples_split=max(2, 2 * int(settings.min_leaf)),
                  max_depth=settings.max_depth, random_state=settings.seed)
    if task == "classification":
        criterion = settings.criterion or "gini"
        if criterion not in CLASSIFICATION_CRITERIA:
            raise InputError(say("grow.criterion_classification",
                                 choices=", ".join(CLASSIFICATION_CRITERIA), given=criterion))
        return DecisionTreeClassifier(criterion=criterion, class_weight=class_weight, **common)
    criterion = settings.criterion or "squared_error"
    if criterion not in REGRESSION_CRITERIA:
        raise InputError(say("grow.criterion_regression", choices=", ".join(REGRESSION_CRITERIA),
                             given=criterion))
    return DecisionTreeRegressor(criterion=criterion, **common)


def grow_tree(X: np.ndarray, y: np.ndarray, task: str, settings: TreeSettings,
              costs: ClassCosts | None = None) -> FullTree:
    """Grow the maximal tree on (X, y) and compute every node's risk and outcome."""
    if settings.risk not in RISKS:
        raise InputError(say("grow.risk", given=settings.risk))
    if task == "classification":
        if costs is None:
            raise ValueError("classification needs class costs")
        weights = growth_class_weights(costs, y)
        estimator = make_estimator(task, settings, class_weight=weights)
    else:
        estimator = make_estimator(task, settings)
    estimator.fit(X, y)
    tree = estimator.tree_
    weighted_n = tree.weighted_n_node_samples
    n = tree.n_node_samples.astype(np.int64)
    impurity_risk = tree.impurity * weighted_n / weighted_n[0]
    if task == "regression":
        mean = tree.value[:, 0, 0].copy()
        cost_risk = impurity_risk  # squared error: SSE(t) / N
        return FullTree(task, tree.children_left.copy(), tree.children_right.copy(),
                         tree.feature.copy(), tree.threshold.copy(),
                         tree.missing_go_to_left.astype(bool), n, None, mean,
                         impurity_risk, cost_risk, mean, estimator)
    n_classes = len(costs.priors)
    fractions = np.zeros((tree.node_count, n_classes))
    fractions[:, estimator.classes_.astype(int)] = tree.value[:, 0, :]
    weight_vector = np.array([weights[j] for j in range(n_classes)])
    with np.errstate(divide="ignore", invalid="ignore"):
        counts = np.where(weight_vector > 0, fractions * weighted_n[:, None] / weight_vector, 0.0)
    counts = np.rint(counts).astype(np.int64)
    class_totals = counts[0].astype(float)
    expected = costs.node_costs(counts.astype(float), class_totals)
    cost_risk = expected.min(axis=1)
    if settings.risk == "cost":
        label = expected.argmin(axis=1)
        prune_risk = cost_risk
    else:
        label = fractions.argmax(axis=1)  # what scikit-learn itself would predict
        prune_risk = impurity_risk
    return FullTree(task, tree.children_left.copy(), tree.children_right.copy(),
                     tree.feature.copy(), tree.threshold.copy(),
                     tree.missing_go_to_left.astype(bool), n, counts, None, prune_risk,
                     np.take_along_axis(expected, label[:, None], axis=1)[:, 0], label.astype(np.int64),
                     estimator)
