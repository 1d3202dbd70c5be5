"""Weakest-link cost-complexity pruning (Breiman, Friedman, Olshen & Stone 1984, ch. 3 and 10).

For a complexity α, the best subtree minimises R(T) + α·|leaves(T)|; as α grows the smallest
such subtrees nest, and each internal node stops being internal at one α, its *collapse α*.
Given those, the subtree at any α is just a mask, and a case's prediction at any α is found
along its path (the collapse α's never increase from root to leaf).

How the collapse α's are found without repeating the weakest-link loop: for a branch rooted at
c, the cost of its best pruning is C_c(α) = R(T_c) + α + Σ_d min(α, a_d) over its internal
nodes d, where a_d is d's collapse α inside that branch. A node t is collapsed exactly when
R(t) + α ≤ C_left(α) + C_right(α), i.e. when α + Σ min(α, a_d) ≥ R(t) − R(T_t). Solving that
bottom up, with the descendants' a_d kept in a max-heap that is clipped at t's own α, costs
O(n log n) for the whole tree instead of one pass over the tree per pruning step.
"""

from __future__ import annotations

import heapq
from dataclasses import dataclass, field

import numpy as np

# Mathematically equal α's computed along different routes differ in the last bits; α's closer
# than this share of the root risk are one α (scikit-learn's path shows them as repeats).
ALPHA_TOLERANCE = 1e-11


@dataclass(frozen=True)
class PruningSequence:
    """The nested subtrees T1 > T2 > ... > {root} and the α at which each begins."""

    alpha: np.ndarray  # α_k, increasing, α_1 = 0
    leaves: np.ndarray  # |leaves(T_k)|, decreasing
    prune_risk: np.ndarray  # R(T_k) under the pruning risk
    train_risk: np.ndarray  # R(T_k) as misclassification cost / mean squared error
    collapse: np.ndarray = field(repr=False)  # per node: α from which it is a leaf (0 for leaves)

    @property
    def grid(self) -> np.ndarray:
        """Geometric midpoints √(α_k α_k+1) (Breiman et al. 1984, §3.4); ∞ for the root."""
        mids = np.sqrt(self.alpha[:-1] * self.alpha[1:])
        return np.append(mids, np.inf)

    def internal_at(self, alpha: float) -> np.ndarray:
        """Mask of nodes that are internal in the smallest optimal subtree at ``alpha``."""
        return self.collapse > alpha

    def index_of_leaves(self, n_leaves: int) -> int:
        matches = np.flatnonzero(self.leaves == n_leaves)
        if matches.size == 0:
            raise KeyError(n_leaves)
        return int(matches[0])


def parents_of(children_left: np.ndarray, children_right: np.ndarray) -> np.ndarray:
    parent = np.full(len(children_left), -1, dtype=np.int64)
    internal = np.flatnonzero(children_left >= 0)
    parent[children_left[internal]] = internal
    parent[children_right[internal]] = internal
    return parent


def collapse_alphas(children_left: np.ndarray, children_right: np.ndarray,
                    node_risk: np.ndarray) -> np.ndarray:
    """Each node's collapse α (0 for leaves); nodes must be numbered parents before children."""
    n_nodes = len(children_left)
    tol = ALPHA_TOLERANCE * max(float(node_risk[0]), np.finfo(float).tiny)
    left = children_left.tolist()
    right = children_right.tolist()
    risk = node_risk.tolist()
    branch_risk = risk[:]  # R(T_t): sum of leaf risks below t
    own = [0.0] * n_nodes  # a_t: collapse α of t within its own branch
    heaps: list = [None] * n_nodes  # max-heap of (-a_d, count) over internal descendants
    sums = [0.0] * n_nodes  # Σ a_d·count in the heap
    for t in range(n_nodes - 1, -1, -1):
        lt = left[t]
        if lt < 0:
            continue
        rt = right[t]
        branch_risk[t] = branch_risk[lt] + branch_risk[rt]
        heap_a, heap_b = heaps[lt], heaps[rt]
        sum_a, sum_b = sums[lt], sums[rt]
        heaps[lt] = heaps[rt] = None
        if heap_a is None:
            heap, total = (heap_b if heap_b is not None else []), sum_b
        elif heap_b is None:
            heap, total = heap_a, sum_a
        else:
            if len(heap_a) < len(heap_b):
                heap_a, heap_b = heap_b, heap_a
            for item in heap_b:
                heapq.heappush(heap_a, item)
            heap, total = heap_a, sum_a + sum_b
        gain = risk[t] - branch_risk[t]
        if gain <= tol:
            # Splitting t does not lower the risk: it is collapsed already in T1.
            alpha, clipped = 0.0, 0
            for item in heap:
                clipped += item[1]
            heap, total = [], 0.0
        else:
            clipped = 0
            while True:
                alpha = (gain - total) / (1 + clipped)
                if not heap or alpha >= -heap[0][0]:
                    break
                value, count = heapq.heappop(heap)
                total += value * count  # value is negative
                clipped += count
            alpha = max(alpha, 0.0)
        heapq.heappush(heap, (-alpha, clipped + 1))
        total += alpha * (clipped + 1)
        heaps[t], sums[t], own[t] = heap, total, alpha
    own_arr = np.asarray(own)
    parent = parents_of(children_left, children_right)
    collapse = own_arr.copy()
    # Top-down: a node is internal only while all its ancestors are.
    for t in range(1, n_nodes):
        p = parent[t]
        if collapse[p] < collapse[t]:
            collapse[t] = collapse[p]
    collapse[children_left < 0] = 0.0
    return _merge_ties(collapse, children_left >= 0, tol)


def _merge_ties(collapse: np.ndarray, internal: np.ndarray, tol: float) -> np.ndarray:
    """Give α's within ``tol`` of each other one shared value (the smallest of the group)."""
    values = collapse[internal]
    if values.size == 0:
        return collapse
    distinct = np.unique(values)
    starts = np.concatenate(([True], np.diff(distinct) > tol))
    representative = distinct[starts][np.cumsum(starts) - 1]
    merged = collapse.copy()
    merged[internal] = representative[np.searchsorted(distinct, values)]
    merged[internal & (merged <= tol)] = 0.0
    return merged


def pruning_sequence(children_left: np.ndarray, children_right: np.ndarray,
                     prune_risk: np.ndarray, train_risk: np.ndarray | None = None) -> PruningSequence:
    """The weakest-link sequence of a grown tree, with each subtree's size and risks."""
    collapse = collapse_alphas(children_left, children_right, prune_risk)
    internal = children_left >= 0
    alpha = np.unique(np.append(collapse[internal], 0.0))
    parent = parents_of(children_left, children_right)
    parent_collapse = np.where(parent >= 0, collapse[np.maximum(parent, 0)], np.inf)
    # Node t is a leaf of T_k for α_k in [collapse(t), collapse(parent)).
    first = np.searchsorted(alpha, collapse, side="left")
    stop = np.searchsorted(alpha, parent_collapse, side="left")
    live = first < stop

    def per_subtree(node_values: np.ndarray) -> np.ndarray:
        diff = np.zeros(len(alpha) + 1)
        np.add.at(diff, first[live], node_values[live])
        np.add.at(diff, stop[live], -node_values[live])
        return np.cumsum(diff)[:-1]

    leaves = np.rint(per_subtree(np.ones(len(collapse)))).astype(np.int64)
    prune = per_subtree(prune_risk)
    train = prune if train_risk is None else per_subtree(train_risk)
    return PruningSequence(alpha=alpha, leaves=leaves, prune_risk=prune, train_risk=train,
                           collapse=collapse)
