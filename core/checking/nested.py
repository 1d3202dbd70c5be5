"""The honest error of the whole procedure: nested cross-validation.

The cross-validated risk of the chosen tree is slightly optimistic, because the same folds
also chose its size. Nested cross-validation repeats the whole procedure inside each outer
fold — grow, cross-validate the pruning path with the same settings, choose the size by the
same rule — and measures the chosen tree on the outer fold's patients, who took no part in
any of it. Outer folds keep each patient's visits together when an identifier is set.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from joblib import Parallel, delayed

from ..design.analysis import AnalysisData
from ..errors import InputError
from ..precision import decimals_observed, summary_number
from ..messages.message import say
from ..option_limits import check_request_limits, check_setting
from ..phrases import patients_among, plural, rows_word
from ..progress import CancelFlag, Progress, stop_if_cancelled
from ..sizing.cross_validated_path import case_losses, cross_validate_path, path_nodes
from ..sizing.folds import CVSettings, fold_plan
from ..sizing.grow import class_costs
from ..sizing.request import DerivationRequest
from ..work_place import sent_once
from .metrics import Measures, RegressionMeasures, classification_measures, regression_measures

DEFAULT_OUTER_FOLDS = 5


@dataclass(frozen=True)
class NestedFold:
    """One outer fold: the size the inner procedure chose and how it did on the outer part."""

    fold: int
    n_train: int
    n_test: int
    leaves: int  # size chosen inside the fold
    inner_cv_risk: float  # what the inner cross-validation promised for that size
    test_risk: float  # what the outer patients showed


@dataclass(frozen=True)
class NestedResult:
    """Nested cross-validation of the whole procedure."""

    description: str  # the outer plan in words
    size_rule: str  # how the size was chosen inside each fold
    risk_measure: str
    risk: float  # mean loss per outer test case (same measure as the pruning path's CV risk)
    risk_se: float
    n: int
    folds: tuple[NestedFold, ...]
    measures: Measures  # from the pooled outer predictions (no calibration by box)

    def summary(self) -> str:
        """One printable line."""
        sizes = sorted(f.leaves for f in self.folds)
        size_text = (f"{sizes[0]}" if sizes[0] == sizes[-1] else f"{sizes[0]}–{sizes[-1]}")
        if isinstance(self.measures, RegressionMeasures):
            decimals = self.measures.decimals
            # A mean squared error, to the squares' precision, and its root in the unit.
            error = (f"{summary_number(self.risk, decimals, power=2)} ± "
                     f"{summary_number(self.risk_se, decimals, power=2)} (root "
                     f"{self.measures.number(math.sqrt(max(self.risk, 0.0)), with_unit=True)})")
        else:
            error = f"{self.risk:.3f} ± {self.risk_se:.3f}"
        return (f"Nested cross-validated error {error} "
                f"({self.risk_measure}; {self.description}; {size_text} outcome boxes chosen "
                "inside the folds)")


def _size_rule(size) -> str:
    """How the size was chosen, as it reads after 'choosing the size'."""
    if size in ("1se", "1-se"):
        return "by the 1-SE rule"
    if size == "min":
        return "at the lowest cross-validated error"
    return f"as the largest tree of at most {plural(int(size), 'outcome box', 'outcome boxes')}"


def _outer_fold(data: AnalysisData, request: DerivationRequest, costs, train, test,
                cancel: CancelFlag | None):
    inner = data.subset(train)
    path = cross_validate_path(inner, request.tree, request.cv, jobs=1, cancel=cancel)
    index, _ = path.index_for(request.size)
    grown = path.grown
    tree = grown.tree
    X = grown.encoding.matrix(data, test)
    nodes = path_nodes(tree, grown.sequence.collapse, X, np.array([path.grid[index]]))
    losses = case_losses(tree, nodes, data.y[test], costs)[:, 0].astype(float)
    nodes = nodes[:, 0]
    if data.task == "classification":
        counts = tree.class_counts[nodes].astype(float)
        probabilities = counts / np.maximum(counts.sum(axis=1, keepdims=True), 1)
    else:
        probabilities = None
    return (test, tree.label[nodes], probabilities, losses, int(path.leaves[index]),
            float(path.cv_risk[index]), len(train))


def nested_cross_validate(data: AnalysisData, request: DerivationRequest,
                          outer_folds: int = DEFAULT_OUTER_FOLDS, seed: int | None = None,
                          jobs: int = 1, progress: Progress | None = None,
                          cancel: CancelFlag | None = None) -> NestedResult:
    """Nested cross-validation of the derivation ``request`` on ``data``.

    Outer folds: ``outer_folds``-fold, stratified by class, patients kept together when
    ``data`` has an identifier (and the request's CV keeps them together). Inside each outer
    fold the request's own tree, CV and size settings are used. ``progress(done, total)`` is
    called after each outer fold; ``cancel()`` returning True raises :class:`Cancelled`.
    ``jobs`` runs outer folds in parallel (each inner CV then runs on one core).
    """
    if outer_folds < 2:
        raise InputError(say("nested.outer_folds"))
    check_setting("outer_folds", outer_folds, where="outer folds")
    check_request_limits(request)
    seed = request.cv.seed if seed is None else seed
    outer = CVSettings(plan="kfold", folds=outer_folds, grouped=request.cv.grouped,
                       stratified=True, seed=seed + 1)  # other folds than the inner CV's
    strat = data.y if data.task == "classification" else None
    folds = fold_plan(outer, data.n, y=strat, groups=data.groups)
    costs = (class_costs(request.tree, data.y, len(data.classes))
             if data.task == "classification" else None)
    stop_if_cancelled(cancel)
    total = len(folds)
    predicted = np.zeros(data.n, dtype=float if data.task == "regression" else np.int64)
    probabilities = (np.zeros((data.n, len(data.classes)))
                     if data.task == "classification" else None)
    losses = np.zeros(data.n)
    fold_results = []
    sent = data if jobs == 1 else data.for_workers()  # the numbers only: what workers receive
    with sent_once(sent):  # on a cluster, the rows travel to each worker once
        if jobs == 1:
            results = (_outer_fold(data, request, costs, f.train, f.test, cancel) for f in folds)
        else:
            results = Parallel(n_jobs=jobs, return_as="generator")(
                delayed(_outer_fold)(sent, request, costs, f.train, f.test, None) for f in folds)
        for number, (test, label, probs, loss, leaves, inner_risk, n_train) in enumerate(
                results, 1):
            stop_if_cancelled(cancel)
            predicted[test] = label
            if probabilities is not None:
                probabilities[test] = probs
            losses[test] = loss
            fold_results.append(NestedFold(number, n_train, len(test), leaves, inner_risk,
                                           float(loss.mean())))
            if progress:
                progress(number, total)
    if data.task == "classification":
        measures = classification_measures(data.y, predicted, probabilities, data.classes,
                                           loss=costs.loss, case_weight=costs.case_weight,
                                           groups=data.groups)
        per = rows_word(data.n, patients_among(data.groups))[:-1]  # "visit" or "patient"
        risk_measure = f"expected misclassification cost per {per}"
    else:
        measures = regression_measures(data.y, predicted, label=data.outcome.display,
                                       unit=data.outcome.unit, groups=data.groups,
                                       decimals=decimals_observed(data.y))
        risk_measure = "mean squared error"
    grouped = outer.grouped and data.groups is not None
    description = f"{outer.describe(grouped)} outside; {request.cv.describe(grouped)} inside"
    return NestedResult(description=description, size_rule=_size_rule(request.size),
                        risk_measure=risk_measure, risk=float(losses.mean()),
                        risk_se=float(losses.std() / math.sqrt(data.n)), n=data.n,
                        folds=tuple(fold_results), measures=measures)
