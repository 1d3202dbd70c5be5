"""Does a tree fit on the page legibly, and which trees of its pruning sequence do?

A tree that cannot be printed at the minimum text size is refused, naming the largest tree of
its pruning sequence that fits. With a whole derivation at hand (the app, ``prunella fit``)
the candidates are built by :func:`core.derive.choose_model`. From a saved model alone (``prunella
chart``) they are its own weakest-link prunings: every smaller tree of the sequence is a
pruning of the chosen one, and the optimal subtrees for larger α are the chosen tree's own
optimal prunings, so the node risks the model keeps (counts, priors and costs, or SDs) are
enough to find them with core/prune.py.
"""

from __future__ import annotations

from dataclasses import replace
from functools import cached_property, lru_cache
from typing import TYPE_CHECKING

import numpy as np

from ..errors import InputError
from ..grow import ClassCosts, growth_class_weights
from ..model import TreeModel
from ..prune import collapse_alphas
from .content import chart_text
from .layout import BoxSpec, LayoutStyle, Measure, Para, TreeSpec, layout_tree, reportlab_measure
from .options import LARGER_PAPER, PAPER_NAMES, ChartOptions, margin_for, page_size
from .page import ChartPlan, deepest_possible, plan_page

if TYPE_CHECKING:
    from ..derive import Derivation


class ChartTooLarge(InputError):
    """The tree cannot be printed on one page at the minimum text size.

    The largest smaller tree that fits is searched for only when it is asked for (the
    message, :attr:`largest_fitting`): a caller that tries larger paper next, or knows the
    candidate trees better, does not pay for the search."""

    def __init__(self, model: TreeModel, options: ChartOptions, measure: Measure):
        super().__init__()
        self._model, self._options, self._measure = model, options, measure

    @cached_property
    def largest_fitting(self) -> int | None:
        """Outcome boxes of the largest tree of the model's pruning sequence that fits."""
        model, options, measure = self._model, self._options, self._measure
        return next((leaves for leaves, collapsed in smaller_trees(model)[1:]
                     if tree_fits(model, options, measure, collapsed)), None)

    def __str__(self) -> str:
        return too_large_message(len(self._model.leaves), self.largest_fitting, self._options)


def plan_chart(model: TreeModel, options: ChartOptions | None = None,
               measure: Measure = reportlab_measure) -> ChartPlan:
    """Where everything of ``model``'s chart goes; raises ChartTooLarge if it cannot fit."""
    options = (options or ChartOptions()).checked()
    plan = plan_page(chart_text(model, options), options, measure)
    if plan is None:
        raise ChartTooLarge(model, options, measure)
    return plan


def tree_fits(model: TreeModel, options: ChartOptions, measure: Measure = reportlab_measure,
              collapsed: frozenset[int] = frozenset()) -> bool:
    """Whether ``model`` (pruned at the ``collapsed`` boxes) fits at the minimum text size."""
    options = options.checked()
    if _leaf_count(model, collapsed) > _most_leaves(options.paper, options.min_text, measure):
        return False
    if collapsed:
        model = pruned_model(model, collapsed)
    return plan_page(chart_text(model, options), options, measure, quick=True) is not None


def pruned_model(model: TreeModel, collapsed: frozenset[int]) -> TreeModel:
    """``model`` with the boxes in ``collapsed`` made outcome boxes, renumbered 1, 2, ...
    breadth-first (YES first) as core/derive.py numbers a tree, its size and errors taken
    from the pruning path the model keeps."""
    order, queue = [], [model.root.id]
    while queue:  # breadth-first, YES before NO
        node = model.node(queue.pop(0))
        order.append(node)
        if not (node.leaf or node.id in collapsed):
            queue.extend(node.children)
    number = {node.id: k + 1 for k, node in enumerate(order)}
    nodes = []
    for node in order:
        if node.leaf or node.id in collapsed:
            text = node.text if node.leaf else model.expected_outcome(node)
            nodes.append(replace(node, id=number[node.id], question=None, children=(), text=text))
        else:
            nodes.append(replace(node, id=number[node.id],
                                 children=tuple(number[c] for c in node.children)))
    leaves = sum(1 for node in nodes if node.leaf)
    path, chosen = model.path, dict(model.chosen)
    if leaves in path.get("leaves", ()):
        k = path["leaves"].index(leaves)
        chosen = {"leaves": leaves, "rule": "user", "cv_risk": path["cv_risk"][k],
                  "cv_se": path["cv_se"][k], "train_risk": path["train_risk"][k]}
    return replace(model, nodes=tuple(nodes), chosen=chosen)


def smaller_trees(model: TreeModel) -> list[tuple[int, frozenset[int]]]:
    """The model's tree and every smaller tree of its pruning sequence, largest first, each as
    (number of outcome boxes, internal boxes collapsed into outcome boxes)."""
    internal = [n for n in model.nodes if not n.leaf]
    if not internal:
        return [(1, frozenset())]
    left = np.full(len(model.nodes), -1, dtype=np.int64)
    right = np.full(len(model.nodes), -1, dtype=np.int64)
    for n in internal:  # core/prune.py's convention: right = YES (value above), left = NO
        right[n.id - 1], left[n.id - 1] = n.children[0] - 1, n.children[1] - 1
    collapse = collapse_alphas(left, right, node_risks(model))
    alphas = sorted({0.0} | {float(collapse[n.id - 1]) for n in internal})
    trees, seen = [], set()
    for alpha in alphas:
        collapsed = frozenset(n.id for n in internal if collapse[n.id - 1] <= alpha)
        leaves = _leaf_count(model, collapsed)
        if leaves not in seen:
            seen.add(leaves)
            trees.append((leaves, collapsed))
    return trees


def node_risks(model: TreeModel) -> np.ndarray:
    """Each box's risk R(t) as the pruning used it (per patient of the derivation data)."""
    total = float(model.n_rows)
    if model.task == "regression":
        return np.array([(n.sd or 0.0) ** 2 * max(n.n - 1, 1) / total for n in model.nodes])
    counts = np.array([n.counts for n in model.nodes], dtype=float)
    k = len(model.classes)
    costs = model.extra.get("costs") or {"priors": (counts[0] / counts[0].sum()).tolist(),
                                         "loss": (1 - np.eye(k)).tolist()}
    priors, loss = np.asarray(costs["priors"], float), np.asarray(costs["loss"], float)
    totals = counts[0]
    tree = model.extra.get("settings", {}).get("tree", {})
    if tree.get("risk", "cost") == "cost":
        with np.errstate(divide="ignore", invalid="ignore"):
            weight = np.where(totals > 0, priors * totals.sum() / totals, 0.0)
        return ClassCosts(priors, loss, weight).node_costs(counts, totals).min(axis=1)
    # Impurity risk: the grower's weighted impurity × weighted share of the root.
    y = np.repeat(np.arange(k), totals.astype(int))
    weights = growth_class_weights(ClassCosts(priors, loss, np.ones(k)), y)
    weighted = counts * np.array([weights[j] for j in range(k)])
    share = weighted / np.maximum(weighted.sum(axis=1, keepdims=True), 1e-300)
    if tree.get("criterion") in ("entropy", "log_loss"):
        with np.errstate(divide="ignore", invalid="ignore"):
            impurity = -np.nansum(np.where(share > 0, share * np.log(share), 0.0), axis=1)
    else:
        impurity = 1 - (share ** 2).sum(axis=1)
    return impurity * weighted.sum(axis=1) / weighted[0].sum()


def _leaf_count(model: TreeModel, collapsed: frozenset[int]) -> int:
    count, stack = 0, [model.root.id]
    while stack:
        node = model.node(stack.pop())
        if node.leaf or node.id in collapsed:
            count += 1
        else:
            stack.extend(node.children)
    return count


@lru_cache(maxsize=64)
def _most_leaves(paper: str, size: float, measure: Measure) -> int:
    """An upper bound on the outcome boxes any page arrangement can hold: boxes never overlap,
    so all of them (each at least as big as the smallest possible outcome box and question
    box) must fit in the printable area."""
    s = size
    spec = TreeSpec(1, {1: (2, 3)}, {1: BoxSpec("question", "1", (Para("x"),)),
                                     2: BoxSpec("outcome", "2", (Para("x"),), Para("LOW", True)),
                                     3: BoxSpec("outcome", "3", (Para("x"),), Para("LOW", True))},
                    {(1, 2): (Para("YES", True),), (1, 3): (Para("NO", True),)})
    boxes = layout_tree(spec, LayoutStyle(s), measure).boxes
    area = (boxes[2].rect.w * boxes[2].rect.h) + (boxes[1].rect.w * boxes[1].rect.h)
    w, h = page_size(paper, False)
    m = margin_for(paper)
    return max(1, int((w - 2 * m) * (h - 2 * m) / area) + 1)


def too_large_message(leaves: int, fitting: int | None, options: ChartOptions) -> str:
    """The refusal, naming the largest size that fits and larger paper."""
    paper = options.paper_name
    where = {"auto": "portrait or landscape"}.get(options.orientation, options.orientation)
    text = (f"The tree has {leaves} outcome boxes and does not fit on one {paper} page "
            f"({where}) with text of at least {options.min_text:g} pt. ")
    if fitting is not None:
        text += (f"The largest tree of its pruning sequence that fits has {fitting} outcome "
                 f"boxes: choose that size (--size {fitting}, or on the pruning curve)")
    else:
        text += "No smaller tree of its pruning sequence fits either: check the minimum text size"
    larger = LARGER_PAPER.get(options.paper)
    if larger:
        text += f", or print on larger paper ({PAPER_NAMES[larger]})."
    else:
        text += f"; {paper} is already among the largest papers Prunella prints on (A3, Tabloid)."
    return text


def sizes_that_fit(derivation: "Derivation", options: ChartOptions | None = None,
                   measure: Measure = reportlab_measure) -> list[int]:
    """Numbers of outcome boxes (leaves) of ``derivation.path.leaves`` whose tree fits on one
    page as ``options`` print it (paper, orientation, minimum text, and the title, bands,
    counts and small-group flags that change what the boxes and panel hold), in the order of
    the path (largest first).

    Candidates come from :func:`core.derive.choose_model`; trees with more boxes than the
    page could hold packed edge to edge, or deeper than any arrangement allows, are
    skipped before they are built."""
    from ..derive import choose_model

    if options is not None and not isinstance(options, ChartOptions):
        raise TypeError("sizes_that_fit takes the chart's ChartOptions, e.g. "
                        "ChartOptions(paper='a3'), not a paper name")
    options = (options or ChartOptions()).checked()
    most = _most_leaves(options.paper, options.min_text, measure)
    deepest = deepest_possible(chart_text(derivation.model, options), options, measure)
    path = derivation.path
    depths = _subtree_depths(path)
    sizes = []
    for index, leaves in enumerate(int(v) for v in path.leaves):
        if leaves in sizes or leaves > most or depths[index] > deepest:
            continue
        model = choose_model(derivation, leaves).model
        if tree_fits(model, options, measure):
            sizes.append(leaves)
    return sizes


def _subtree_depths(path) -> list[int]:
    """Depth of every subtree of the pruning sequence, from the grown tree's arrays."""
    grown = path.grown
    left, right = grown.tree.children_left, grown.tree.children_right
    depths = []
    for alpha in path.grid:
        internal = grown.sequence.internal_at(alpha)
        deepest, stack = 0, [(0, 0)]
        while stack:
            node, d = stack.pop()
            deepest = max(deepest, d)
            if internal[node]:
                stack += [(int(left[node]), d + 1), (int(right[node]), d + 1)]
        depths.append(deepest)
    return depths
