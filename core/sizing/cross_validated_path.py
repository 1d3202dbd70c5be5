"""Cross-validated risk over the whole pruning path, one tree fit per fold.

Each fold grows ONE maximal tree on its training part and finds its own collapse α's. Every
held-out case is then routed once: along its path the collapse α's never increase, so its
prediction at grid value α′ is the first node on the path with collapse α ≤ α′. Counting, per
case, how many path nodes are still internal at each α′ gives every prediction at once
(no loop over α). The grid is the full-data sequence's geometric midpoints.

The full-data tree is grown as one more task beside the folds, not before them, so no core
waits for it: a fold sends back its tree's collapse α's and each held-out case's path, and
the losses on the grid are counted once the full-data tree has fixed the grid.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from functools import cached_property
from typing import Sequence

import numpy as np
from joblib import Parallel, delayed

from ..design.analysis import AnalysisData
from ..design.matrix import Encoding, fit_encoding, training_matrix
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


def growth_costs(data: AnalysisData, settings: TreeSettings) -> ClassCosts | None:
    """The priors and losses every tree of a path is grown and judged with (None for a
    measured outcome), refused with one sentence when the rows are too few to grow on."""
    if data.n < 2 * settings.min_leaf:
        raise InputError(say("size.too_few_rows", n=data.n, min_leaf=settings.min_leaf))
    return class_costs(settings, data.y, len(data.classes)) if data.task == "classification" else None


def grow_full(data: AnalysisData, settings: TreeSettings) -> DerivationTree:
    """Grow the maximal tree on every derivation row and compute its pruning sequence."""
    costs = growth_costs(data, settings)
    encoding = fit_encoding(data, coarsen=settings.coarsen)
    X = encoding.matrix(data)
    tree = grow_tree(X, data.y, data.task, settings, costs)
    sequence = pruning_sequence(tree.children_left, tree.children_right, tree.prune_risk,
                                tree.cost_risk)
    return DerivationTree(data, settings, costs, encoding, tree, sequence)


def grown_for_return(data: AnalysisData, settings: TreeSettings) -> DerivationTree:
    """:func:`grow_full` as a worker runs it: the rows are left out of what it sends back (the
    caller has them), so a million rows do not travel back with a tree of a few hundred boxes."""
    return replace(grow_full(data, settings), data=None)


def path_nodes(tree: FullTree, collapse: np.ndarray, X: np.ndarray,
               grid: np.ndarray) -> np.ndarray:
    """For each case (row of X) and grid α′, the node that predicts it: shape (cases, grid)."""
    paths = tree.estimator.decision_path(X)
    return nodes_on_grid(paths.indptr, paths.indices, collapse, grid)


def nodes_on_grid(indptr: np.ndarray, indices: np.ndarray, collapse: np.ndarray,
                  grid: np.ndarray) -> np.ndarray:
    """For each case and grid α′, the node that predicts it, from the cases' paths (CSR:
    ``indices[indptr[i]:indptr[i + 1]]`` are case i's nodes, root to outcome box)."""
    n, g = len(indptr) - 1, len(grid)
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
    """Loss of each case at each grid α′: cost × prior weight, or squared error. ``tree`` is
    anything with the tree's ``task`` and per-node ``label`` (a FullTree, a FoldRoutes)."""
    if tree.task == "regression":
        return (tree.label[nodes] - y[:, None]) ** 2
    predicted = tree.label[nodes]
    return costs.loss[y[:, None], predicted] * costs.case_weight[y][:, None]


@dataclass(frozen=True)
class FoldRoutes:
    """What one fold's worker sends back: its tree's collapse α's and outcome per node, and the
    path of every held-out case through it. Small: a few hundred nodes, and about a
    tree's depth of node numbers per held-out case."""

    task: str
    test: np.ndarray = field(repr=False)
    indptr: np.ndarray = field(repr=False)  # case i's path: indices[indptr[i]:indptr[i + 1]]
    indices: np.ndarray = field(repr=False)
    collapse: np.ndarray = field(repr=False)  # per node of the fold's tree
    label: np.ndarray = field(repr=False)  # per node: class code or mean
    share: np.ndarray | None = field(repr=False)  # two classes: the positive share per node

    def on_grid(self, y: np.ndarray, costs: ClassCosts | None, grid: np.ndarray):
        """Each held-out case's loss at every grid α′, and (two classes) the fold's counts:
        what :class:`PathTally` adds up."""
        y_test = y[self.test]
        chunk = max(1, _CHUNK_CELLS // max(1, len(grid)))
        counts = empty_counts(len(grid)) if self.share is not None else None
        parts = []
        for start in range(0, len(self.test), chunk):
            stop = min(start + chunk, len(self.test))
            offset = self.indptr[start]
            nodes = nodes_on_grid(self.indptr[start:stop + 1] - offset,
                                  self.indices[offset:self.indptr[stop]], self.collapse, grid)
            parts.append(case_losses(self, nodes, y_test[start:stop], costs).astype(np.float64))
            if counts is not None:
                counts = counts + fold_counts(self.label[nodes], self.share[nodes],
                                              y_test[start:stop])
        losses = np.concatenate(parts) if parts else np.zeros((0, len(grid)))
        return self.test, losses, counts


def fold_routes(data: AnalysisData, settings: TreeSettings, costs: ClassCosts | None,
                train: np.ndarray, test: np.ndarray) -> FoldRoutes:
    """One fold, in a worker: grow on ``train`` and route ``test`` once (no grid needed)."""
    encoding, X = training_matrix(data, train, coarsen=settings.coarsen)
    tree = grow_tree(X, data.y[train], data.task, settings, costs)
    del X  # the fold's matrix is the worker's largest array: free it before routing
    collapse = collapse_alphas(tree.children_left, tree.children_right, tree.prune_risk)
    paths = tree.estimator.decision_path(encoding.matrix(data, test))
    two_classes = tree.task == "classification" and tree.class_counts.shape[1] == 2
    share = tree.class_counts[:, 1] / np.maximum(tree.n, 1) if two_classes else None
    # Node numbers fit in 32 bits (a tree has fewer nodes than rows): half the bytes to send.
    return FoldRoutes(tree.task, test, paths.indptr.astype(np.int64),
                      paths.indices.astype(np.int32), collapse, tree.label, share)


def fold_losses(data: AnalysisData, settings: TreeSettings, costs: ClassCosts | None,
                train: np.ndarray, test: np.ndarray, grid: np.ndarray):
    """One fold: grow on ``train``, route ``test`` once; each held-out case's loss at every
    grid α′, and (two classes) the fold's counts."""
    return fold_routes(data, settings, costs, train, test).on_grid(data.y, costs, grid)


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
    costs = growth_costs(data, settings) if grown is None else grown.costs
    sent = data.for_workers()  # the numbers only: what a cluster's workers receive
    # The full-data tree is the first task and the folds follow at once, so while one worker
    # grows it the others are growing folds. Always through joblib, so a joblib backend set
    # by the caller (a cluster, say) spreads the work without code changes; jobs=None defers
    # to that backend's own default. Results come back in task order (the full-data tree
    # first, then the folds in order), so repeated folds add up in the same order for any
    # worker count.
    tasks = [] if grown is not None else [delayed(grown_for_return)(sent, settings)]
    tasks += [delayed(fold_routes)(sent, settings, costs, f.train, f.test) for f in folds]
    with sent_once(sent):  # on a cluster, the rows travel to each worker once
        results = iter(Parallel(n_jobs=jobs, return_as="generator")(tasks))
        if grown is None:
            grown = replace(next(results), data=data)  # the whole analysis again, notes included
        stop_if_cancelled(cancel)
        if progress:
            progress(1, total)
        grid = grown.sequence.grid
        tally = PathTally(data.n, len(grid))
        for done, routes in enumerate(results, start=2):
            stop_if_cancelled(cancel)
            tally.add(*routes.on_grid(data.y, costs, grid))
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
