"""Does a tree fit on the page legibly, and which trees of its pruning sequence do?

A tree that cannot be printed at the minimum text size is refused, naming the largest tree of
its pruning sequence that fits. With a whole derivation at hand (the app, ``prunella fit``)
the candidates are built from its pruning path by
:func:`core.sizing.chosen_tree.build_model`. From a saved model alone (``prunella chart``)
they are its own prunings: every smaller tree of the sequence is the chosen tree with the
boxes whose collapse α (recorded in the model file's path) lies at or below that tree's α made
outcome boxes.
"""

from __future__ import annotations

import math
from dataclasses import replace
from functools import cached_property, lru_cache
from typing import TYPE_CHECKING

from ..errors import InputError
from ..messages.message import Message, say
from ..model.tree import TreeModel, better_than_no_tree
from .content import chart_text
from .layout import BoxSpec, LayoutStyle, Measure, Para, TreeSpec, layout_tree, reportlab_measure
from .options import LARGER_PAPER, PAPER_NAMES, ChartOptions, margin_for, page_size
from .arrange import deepest_possible, plan_page
from .page import ChartPlan

if TYPE_CHECKING:
    from ..sizing.derivation import Derivation


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
        """Outcome boxes of the largest tree of the model's pruning sequence that fits (up
        from the smallest, as :func:`fitting_sizes` searches)."""
        model, options, measure = self._model, self._options, self._measure
        most = _most_leaves(options.paper, options.min_text, measure)
        trees = dict(smaller_trees(model, most)[1:])
        return max(fitting_sizes(trees, lambda n: tree_fits(model, options, measure,
                                                             trees[n])), default=None)

    @cached_property
    def rules_fit(self) -> bool:
        """Whether the same tree prints on the page as numbered rules."""
        return tree_fits(self._model, replace(self._options, form="rules"), self._measure)

    def __str__(self) -> str:
        model = self._model
        return too_large_message(len(model.leaves), self.largest_fitting, self._options,
                                 recorded=len(model.leaves) == 1 or bool(recorded_collapse(model)),
                                 rules=self.rules_fit)


def plan_chart(model: TreeModel, options: ChartOptions | None = None,
               measure: Measure = reportlab_measure) -> ChartPlan:
    """Where everything of ``model``'s chart goes; raises ChartTooLarge if it cannot fit, and
    InputError for a one-box tree, which is never printed as if it were a decision chart."""
    options = (options or ChartOptions()).checked()
    if len(model.leaves) <= 1:  # one box for everyone is no decision chart
        raise InputError(say("chart.one_box", statement=model.no_tree_statement))
    text = chart_text(model, options)
    if options.form == "rules":
        from .rules import plan_rules

        plan = plan_rules(model, text, options, measure)
        if plan is None:
            raise InputError(say("chart.rules_too_large", leaves=len(model.leaves),
                                 paper=options.paper_name, size=f"{options.min_text:g}"))
        return plan
    # More outcome boxes than the page could hold packed edge to edge: no arrangement is
    # tried (a file's tree of thousands of boxes would take minutes to refuse).
    if len(model.leaves) > _most_leaves(options.paper, options.min_text, measure):
        raise ChartTooLarge(model, options, measure)
    plan = plan_page(text, options, measure)
    if plan is None:
        raise ChartTooLarge(model, options, measure)
    return plan


def tree_fits(model: TreeModel, options: ChartOptions, measure: Measure = reportlab_measure,
              collapsed: frozenset[int] = frozenset()) -> bool:
    """Whether ``model`` (pruned at the ``collapsed`` boxes) fits at the minimum text size."""
    options = options.checked()
    if _leaf_count(model, collapsed) <= 1:  # one box for everyone is never printed as a chart
        return False
    if options.form == "rules":
        from .rules import plan_rules

        if collapsed:
            model = as_checked(pruned_model(model, collapsed), model.recorded_check)
        return plan_rules(model, chart_text(model, options), options, measure) is not None
    if _leaf_count(model, collapsed) > _most_leaves(options.paper, options.min_text, measure):
        return False
    if collapsed:
        model = as_checked(pruned_model(model, collapsed), model.recorded_check)
    return plan_page(chart_text(model, options), options, measure, quick=True) is not None


def as_checked(model: TreeModel, check: dict | None) -> TreeModel:
    """``model`` carrying ``check`` as its own (None: as it is), for measuring only: a smaller
    tree is measured with the side panel it prints once it is checked, as the tree it comes
    from was. Never saved or printed: a check counts only for the tree it names."""
    if not check:
        return model
    record = {**check, "model_fingerprint": model.fingerprint}
    return replace(model, extra={**model.extra, "validation": record})


def pruned_model(model: TreeModel, collapsed: frozenset[int]) -> TreeModel:
    """``model`` with the boxes in ``collapsed`` made outcome boxes, renumbered 1, 2, ...
    breadth-first (YES first) as core/sizing/chosen_tree.py numbers a tree, its size and errors taken
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
    # The chosen tree itself keeps its record whole; a smaller one gets what the path keeps
    # per size. The cross-validated net benefit is kept for the chosen size only, so a
    # smaller tree made from the file alone has none rather than a borrowed one.
    if collapsed and leaves in path.get("leaves", ()):
        k = path["leaves"].index(leaves)
        chosen = {"leaves": leaves, "rule": "user", "cv_risk": path["cv_risk"][k],
                  "cv_se": path["cv_se"][k], "train_risk": path["train_risk"][k],
                  "one_box_cv_risk": path["cv_risk"][-1],
                  "better_than_no_tree": better_than_no_tree(
                      path["leaves"], (path["cv_risk"], path["cv_se"]), k)}
    return replace(model, nodes=tuple(nodes), chosen=chosen)


def smaller_trees(model: TreeModel, most: int | None = None) -> list[tuple[int, frozenset[int]]]:
    """The model's tree and every smaller tree of its pruning sequence, largest first, each as
    (number of outcome boxes, question boxes collapsed into outcome boxes); with ``most``,
    only the model's own tree and those of at most ``most`` boxes. A model file that does not
    record its boxes' collapse α (an older one) yields its own tree alone.

    The sizes of all trees are counted in one pass (a box is an outcome box of the tree at α
    from its own collapse α, or from the start for an outcome box, until an ancestor
    collapses), so a file's tree of 100,000 boxes is sized in well under a second."""
    collapse = recorded_collapse(model)
    if not collapse:
        return [(len(model.leaves), frozenset())]
    alphas = sorted({0.0} | set(collapse.values()))
    counts = _leaf_counts(model, collapse, alphas)
    trees, seen = [], set()
    for alpha, leaves in zip(alphas, counts):
        if leaves in seen or (trees and most is not None and leaves > most):
            continue
        seen.add(leaves)
        trees.append((leaves, frozenset(box for box, at in collapse.items() if at <= alpha)))
    return trees


def _leaf_counts(model: TreeModel, collapse: dict[int, float], alphas: list[float]) -> list[int]:
    """Outcome boxes of the tree pruned at each α of ``alphas`` (ascending), as
    :func:`_leaf_count` would count them for the boxes collapsed at or below it."""
    import bisect

    above = {model.root.id: math.inf}  # the least collapse α of a box's ancestors
    starts, ends = [], []
    for node in model.nodes:  # parents come before children
        if not node.leaf:
            for child in node.children:
                above[child] = min(above[node.id], collapse[node.id])
        start = -math.inf if node.leaf else collapse[node.id]
        if start < above[node.id]:  # an outcome box of the trees from start up to that α
            starts.append(start)
            ends.append(above[node.id])
    starts.sort()
    ends.sort()
    return [bisect.bisect_right(starts, a) - bisect.bisect_right(ends, a) for a in alphas]


def recorded_collapse(model: TreeModel) -> dict[int, float]:
    """Each question box's collapse α as the model file records it ({} when it does not, or
    when the record does not match the boxes)."""
    record = model.path.get("collapse_alpha")
    if not isinstance(record, list) or len(record) != len(model.nodes):
        return {}
    collapse = {}
    for node, alpha in zip(model.nodes, record):
        if node.leaf:
            continue
        if not isinstance(alpha, (int, float)) or isinstance(alpha, bool) or alpha != alpha:
            return {}
        collapse[node.id] = float(alpha)
    return collapse


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


def too_large_message(leaves: int, fitting: int | None, options: ChartOptions,
                      recorded: bool = True, rules: bool = False) -> Message:
    """The refusal, naming the largest size that fits, larger paper and, when the same tree
    fits as numbered rules (``rules``), that form. ``recorded`` is False for a model file that
    does not record its pruning sequence."""
    paper = options.paper_name
    where = {"auto": "portrait or landscape"}.get(options.orientation, options.orientation)
    if fitting is not None:
        choice = say("chart.too_large.smaller_fits", fitting=fitting)
    elif not recorded:
        choice = say("chart.too_large.not_recorded")
    else:
        choice = say("chart.too_large.nothing_fits")
    larger = LARGER_PAPER.get(options.paper)
    if larger:
        instead = say("chart.too_large.larger_paper_or_rules" if rules
                      else "chart.too_large.larger_paper", paper=PAPER_NAMES[larger])
    else:
        instead = say("chart.too_large.largest_paper_or_rules" if rules
                      else "chart.too_large.largest_paper", paper=paper)
    return say("chart.too_large", leaves=leaves, paper=paper, where=where,
               size=f"{options.min_text:g}", advice=choice + instead)


def sizes_that_fit(derivation: "Derivation", options: ChartOptions | None = None,
                   measure: Measure = reportlab_measure) -> list[int]:
    """Numbers of outcome boxes (leaves) of ``derivation.path.leaves`` whose tree fits on one
    page as ``options`` print it (paper, orientation, minimum text, and the title, bands,
    counts and small-group flags that change what the boxes and panel hold), in the order of
    the path (largest first).

    Candidates are built from the path with :func:`core.sizing.chosen_tree.build_model`, as
    :func:`core.sizing.derivation.choose_model` builds them, but without checking each on the held-out
    patients: a candidate carries the chosen tree's check in its place, worded alike, so
    its side panel is the one it will print. Trees with more boxes than the page could hold
    packed edge to edge, or deeper than any arrangement allows, are skipped before they are
    built, and the sizes are tried from the smallest up as :func:`fitting_sizes` says."""
    from ..sizing.chosen_tree import build_model

    if options is not None and not isinstance(options, ChartOptions):
        raise TypeError("sizes_that_fit takes the chart's ChartOptions, e.g. "
                        "ChartOptions(paper='a3'), not a paper name")
    options = (options or ChartOptions()).checked()
    if options.form == "rules":  # rows: no bound from the tree's drawing
        most = deepest = len(derivation.model.nodes) + max(int(v) for v in derivation.path.leaves)
    else:
        most = _most_leaves(options.paper, options.min_text, measure)
        deepest = deepest_possible(chart_text(derivation.model, options), options, measure)
    path = derivation.path
    checked = derivation.model.recorded_check
    depths = _subtree_depths(path)
    candidates = []
    for index, leaves in enumerate(int(v) for v in path.leaves):
        if leaves not in candidates and 1 < leaves <= most and depths[index] <= deepest:
            candidates.append(leaves)

    def fits(leaves: int) -> bool:
        model = build_model(path, *path.index_for(leaves), derivation.table,
                            derivation.dictionary, derivation.request)
        return tree_fits(as_checked(model, checked), options, measure)

    found = fitting_sizes(candidates, fits)
    return [leaves for leaves in candidates if leaves in found]


GIVE_UP = 3  # larger trees are not tried after this many sizes in a row that do not fit


def fitting_sizes(sizes, fits) -> set[int]:
    """The sizes (numbers of outcome boxes of one pruning sequence) for which ``fits``
    holds, tried from the smallest up. Each tree of a pruning sequence holds every smaller
    one, so once :data:`GIVE_UP` sizes in a row do not fit, the larger ones are not tried:
    refusing a large tree tries every page arrangement, the slowest answer there is."""
    found, misses = set(), 0
    for leaves in sorted(set(sizes)):
        if fits(leaves):
            found.add(leaves)
            misses = 0
        else:
            misses += 1
            if misses == GIVE_UP:
                break
    return found


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
