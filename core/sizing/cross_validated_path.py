"""Cross-validated risk over the whole pruning path, one tree fit per fold.

Each fold grows ONE maximal tree on its training part and finds its own collapse α's. Every
held-out case is then routed once: along its path the collapse α's never increase, so its
prediction at grid value α′ is the first node on the path with collapse α ≤ α′. Counting, per
case, how many path nodes are still internal at each α′ gives every prediction at once
(no loop over α). The grid is the full-data sequence's geometric midpoints.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from functools import cached_property
from typing import Sequence

import numpy as np
from joblib import Parallel, delayed

from ..design.analysis import AnalysisData
from ..design.matrix import Encoding, fit_encoding
from ..errors import InputError
from ..messages.message import say
from ..phrases import plural
from ..progress import CancelFlag, Progress, stop_if_cancelled
from ..work_place import sent_once
from .cv_counts import PathCounts, empty_counts, fold_counts
from .folds import CVSettings, fold_plan
from .grow import ClassCosts, FullTree, TreeSettings, class_costs, grow_tree
from .prune import PruningSequence, collapse_alphas, pruning_sequence

_CHUNK_CELLS = 4_000_000  # cases × grid values routed at once, to cap memory


@dataclass(frozen=True)
class DerivationTree:
    """The full tree grown on every derivation row, with its encoding and pruning sequence:
    every size the user may choose is cut from it."""

    data: AnalysisData = field(repr=False)
    settings: TreeSettings
    costs: ClassCosts | None = field(repr=False)
    encoding: Encoding = field(repr=False)
    tree: FullTree = field(repr=False)
    sequence: PruningSequence = field(repr=False)

    @cached_property
    def matrix(self) -> np.ndarray:
        """The derivation rows as the grower saw them (computed once)."""
        return self.encoding.matrix(self.data)

    @cached_property
    def membership(self):
        """Which derivation rows pass through each node (CSC: column = node), computed once."""
        return self.tree.estimator.decision_path(self.matrix).tocsc()


def one_se_limit(cv_risk: Sequence[float] | np.ndarray, cv_se: Sequence[float] | np.ndarray,
                 min_index: int) -> float:
    """The 1-SE rule's limit: the lowest cross-validated error plus its standard error. Kept
    apart so a saved model's path (lists, as in ``TreeModel.path``) is read the same way."""
    return float(cv_risk[min_index] + cv_se[min_index])


@dataclass(frozen=True)
class CrossValidatedPath:
    """CV risk and its SE for every subtree of the full-data sequence."""

    grown: DerivationTree = field(repr=False)
    cv: CVSettings
    grid: np.ndarray
    cv_risk: np.ndarray
    cv_se: np.ndarray
    n_folds: int
    n_cases: int
    description: str
    # Two-class outcomes: pooled held-out counts per size (sensitivity, specificity, net benefit).
    counts: PathCounts | None = field(default=None, repr=False)

    @property
    def leaves(self) -> np.ndarray:
        return self.grown.sequence.leaves

    @property
    def train_risk(self) -> np.ndarray:
        return self.grown.sequence.train_risk

    @property
    def alpha(self) -> np.ndarray:
        return self.grown.sequence.alpha

    @property
    def min_index(self) -> int:
        """The subtree with the smallest CV risk (the smaller tree on exact ties)."""
        best = np.flatnonzero(self.cv_risk <= self.cv_risk.min() * (1 + 1e-12) + 1e-15)
        return int(best.max())

    @property
    def one_se_index(self) -> int:
        """The smallest tree whose CV risk is within one SE of the minimum (1-SE rule)."""
        limit = one_se_limit(self.cv_risk, self.cv_se, self.min_index)
        return int(np.flatnonzero(self.cv_risk <= limit * (1 + 1e-12) + 1e-15).max())

    def index_for(self, size: str | int) -> tuple[int, str]:
        """Resolve '1se', 'min' or a number of leaves to a position in the sequence."""
        if size in ("1se", "1-se"):
            return self.one_se_index, "1se"
        if size == "min":
            return self.min_index, "min"
        try:
            wanted = int(size)
        except (TypeError, ValueError):
            raise InputError(say("size.size_word", size=size)) from None
        fits = np.flatnonzero(self.leaves <= wanted)
        if wanted < 1 or fits.size == 0:
            raise InputError(say("size.size_at_least_one",
                                 sizes=", ".join(map(str, self.leaves[::-1]))))
        return int(fits.min()), "user"

    def size_note(self, size: str | int, index: int) -> str | None:
        """Why the tree at ``index`` has another number of outcome boxes than the ``size``
        asked for (no tree of that size on the path), or None when it has that size."""
        if size in ("1se", "1-se", "min", "goal"):
            return None
        wanted, used = int(size), int(self.leaves[index])
        if used == wanted:
            return None
        key = "size.not_on_path_largest" if index == 0 else "size.not_on_path_smaller"
        return say(key, wanted=wanted, used=plural(used, "outcome box", "outcome boxes"))


def grow_full(data: AnalysisData, settings: TreeSettings) -> DerivationTree:
    """Grow the maximal tree on every derivation row and compute its pruning sequence."""
    if data.n < 2 * settings.min_leaf:
        raise InputError(say("size.too_few_rows", n=data.n, min_leaf=settings.min_leaf))
    costs = class_costs(settings, data.y, len(data.classes)) if data.task == "classification" else None
    encoding = fit_encoding(data, coarsen=settings.coarsen)
    X = encoding.matrix(data)
    tree = grow_tree(X, data.y, data.task, settings, costs)
    sequence = pruning_sequence(tree.children_left, tree.children_right, tree.prune_risk,
                                tree.cost_risk)
    return DerivationTree(data, settings, costs, encoding, tree, sequence)


def path_nodes(tree: FullTree, collapse: np.ndarray, X: np.ndarray,
               grid: np.ndarray) -> np.ndarray:
    """For each case (row of X) and grid α′, the node that predicts it: shape (cases, grid)."""
    paths = tree.estimator.decision_path(X)
    indptr, indices = paths.indptr, paths.indices  # per row: node ids root→leaf (preorder)
    n, g = X.shape[0], len(grid)
    lengths = np.diff(indptr)
    rows = np.repeat(np.arange(n), lengths)
    # How many grid values lie below each path node's collapse α: it is internal for those.
    below = np.searchsorted(grid, collapse[indices], side="left")
    counts = np.bincount(rows * (g + 1) + below, minlength=n * (g + 1)).reshape(n, g + 1)
    # Internal path nodes at grid j = those with more than j grid values below their collapse.
    internal = lengths[:, None] - np.cumsum(counts, axis=1)[:, :g]
    return indices[indptr[:-1, None] + internal]


def case_losses(tree: FullTree, nodes: np.ndarray, y: np.ndarray,
                costs: ClassCosts | None) -> np.ndarray:
    """Loss of each case at each grid α′: cost × prior weight, or squared error."""
    if tree.task == "regression":
        return (tree.label[nodes] - y[:, None]) ** 2
    predicted = tree.label[nodes]
    return costs.loss[y[:, None], predicted] * costs.case_weight[y][:, None]


def fold_losses(data: AnalysisData, settings: TreeSettings, costs: ClassCosts | None,
                train: np.ndarray, test: np.ndarray, grid: np.ndarray):
    """One fold: grow on ``train``, route ``test`` once; each held-out case's loss at every
    grid α′, and (two classes) the fold's counts."""
    encoding = fit_encoding(data, train, coarsen=settings.coarsen)
    tree = grow_tree(encoding.matrix(data, train), data.y[train], data.task, settings, costs)
    collapse = collapse_alphas(tree.children_left, tree.children_right, tree.prune_risk)
    X_test = encoding.matrix(data, test)
    y_test = data.y[test]
    chunk = max(1, _CHUNK_CELLS // max(1, len(grid)))
    two_classes = tree.task == "classification" and tree.class_counts.shape[1] == 2
    counts = empty_counts(len(grid)) if two_classes else None
    if two_classes:
        share = tree.class_counts[:, 1] / np.maximum(tree.n, 1)
    parts = []
    for start in range(0, len(test), chunk):
        stop = start + chunk
        nodes = path_nodes(tree, collapse, X_test[start:stop], grid)
        parts.append(case_losses(tree, nodes, y_test[start:stop], costs).astype(np.float64))
        if two_classes:
            counts = counts + fold_counts(tree.label[nodes], share[nodes], y_test[start:stop])
    return test, np.concatenate(parts) if parts else np.zeros((0, len(grid))), counts


def cross_validate_path(data: AnalysisData, settings: TreeSettings, cv: CVSettings,
                        jobs: int | None = 1, progress: Progress | None = None,
                        cancel: CancelFlag | None = None,
                        grown: DerivationTree | None = None) -> CrossValidatedPath:
    """Grow, prune and cross-validate the whole pruning path; returns CV risk and SE per size.

    ``progress(done, total)`` is called after the full tree and after each fold; when
    ``cancel()`` returns True the work stops and :class:`Cancelled` is raised.
    """
    strat = data.y if data.task == "classification" else None
    folds = fold_plan(cv, data.n, y=strat, groups=data.groups, sites=data.sites)
    total = len(folds) + 1
    stop_if_cancelled(cancel)
    if grown is None:
        grown = grow_full(data, settings)
    if progress:
        progress(1, total)
    grid = grown.sequence.grid
    tally = PathTally(data.n, len(grid))
    sent = data.for_workers()  # the numbers only: what a cluster's workers receive
    tasks = (delayed(fold_losses)(sent, settings, grown.costs, f.train, f.test, grid)
             for f in folds)
    done = 1
    # Always through joblib, so a joblib backend set by the caller (a cluster, say) spreads the
    # folds without code changes; jobs=None defers to that backend's own default. Results come
    # back in fold order, so repeated folds add up in the same order for any worker count.
    with sent_once(sent):  # on a cluster, the rows travel to each worker once
        for result in Parallel(n_jobs=jobs, return_as="generator")(tasks):
            stop_if_cancelled(cancel)
            tally.add(*result)
            done += 1
            if progress:
                progress(done, total)
    return tally.path(grown, cv, data, len(folds))


class PathTally:
    """Held-out losses and counts gathered fold by fold, made into a CrossValidatedPath."""

    def __init__(self, n: int, sizes: int):
        self.sums = np.zeros((n, sizes))
        self.times = np.zeros(n)
        self.counts: PathCounts | None = None

    def add(self, test: np.ndarray, losses: np.ndarray, counts: PathCounts | None) -> None:
        self.sums[test] += losses
        self.times[test] += 1
        if counts is not None:
            self.counts = counts if self.counts is None else self.counts + counts

    def path(self, grown: DerivationTree, cv: CVSettings, data: AnalysisData,
             n_folds: int) -> "CrossValidatedPath":
        seen = self.times > 0
        per_case = self.sums[seen] / self.times[seen][:, None]
        n_cases = int(seen.sum())
        cv_risk = per_case.mean(axis=0)
        # Breiman et al. (1984, §3.4.3): SE from the spread of the per-case losses.
        cv_se = per_case.std(axis=0) / np.sqrt(n_cases)
        grouped = cv.grouped and data.groups is not None and cv.plan in ("kfold", "loo", "split")
        counts = None
        if self.counts is not None:
            held = data.y[seen]
            counts = replace(self.counts, class_cases=(int((held == 0).sum()),
                                                       int((held == 1).sum())))
        return CrossValidatedPath(grown=grown, cv=cv, grid=grown.sequence.grid, cv_risk=cv_risk,
                                  cv_se=cv_se, n_folds=n_folds, n_cases=n_cases,
                                  description=cv.describe(grouped), counts=counts)
