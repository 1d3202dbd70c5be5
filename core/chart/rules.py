"""The numbered-rules form of a chart: one row per outcome box, its route in words.

When a tree is too large to draw legibly on the page, the same tree still prints on one page
as rows: each outcome box as the tree chart draws it (number, band, expected outcome, rate,
interval, count), beside the answers that lead to it. The header, side panel, cautions,
footer and QR code are the tree chart's own (core/chart/page.py lays them out); only the tree's
place on the page holds rows instead.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

from ..model.tree import TreeModel
from .arrange import MAX_TREE_SCALE, STEP, rows_arrangements
from .boxes import LayoutStyle, TreeSpec, size_boxes
from .content import ChartText
from .layout import PlacedBox
from .options import ChartOptions, page_size
from .page import ChartPlan, finished_plan, frames
from .text import Line, Measure, Rect

ROUTE_EM = 16.0  # the route column is at least this wide, in units of the text size


@dataclass(frozen=True)
class RuleRow:
    """One outcome box and the answers that lead to it, placed."""

    box: PlacedBox
    route: tuple[Line, ...]
    rect: Rect  # the whole row


def route_steps(model: TreeModel, box: int) -> list[list[tuple[str, bool]]]:
    """The answers that lead from box 1 to ``box``, one step each, as text runs (answers in
    bold)."""
    steps = []
    for step in model.steps_to(box):
        runs = [(step.question, False), (step.answer, True)]
        if step.includes_missing:
            runs.append(("(or not recorded)", False))
        steps.append(runs)
    return steps or [[("Every patient", False)]]


def _route(frame, model: TreeModel, box: int, x: float, width: float,
           size: float) -> tuple[list[Line], float]:
    """The route's lines from y = 0, one step to a line (wrapped, indented after the first
    line of a step), and their height."""
    lines: list[Line] = []
    y = 0.0
    for runs in route_steps(model, box):
        first = len(lines)
        y = frame.runs(lines, runs, x, y, width, size)
        top = lines[first].baseline
        lines[first:] = [ln.moved(size, 0) if ln.baseline > top else ln for ln in lines[first:]]
    return lines, y


def _rows(model: TreeModel, spec: TreeSpec, frame, area: Rect, size: float, columns: int,
          measure: Measure) -> list[RuleRow] | None:
    """The rows at text ``size`` in ``columns`` columns of ``area``, or None if they overflow."""
    outcomes = TreeSpec(spec.root, {}, {i: b for i, b in spec.boxes.items()
                                        if b.kind == "outcome"}, {})
    sized = size_boxes(outcomes, LayoutStyle(size), measure)
    gap = 1.2 * size
    col_w = (area.w - (columns - 1) * gap) / columns
    box_w = max(b.w for b in sized.values())
    route_w = col_w - box_w - size
    if route_w < ROUTE_EM * size:
        return None
    rows, column, y = [], 0, area.y
    for leaf in sorted(sized):
        box = sized[leaf]
        x = area.x + column * (col_w + gap)
        lines, height = _route(frame, model, leaf, x + box_w + size, route_w - size, size)
        h = max(box.h, height)
        if y + h > area.bottom + 1e-6:
            column, y = column + 1, area.y
            if column == columns:
                return None
            x = area.x + column * (col_w + gap)
            lines, _ = _route(frame, model, leaf, x + box_w + size, route_w - size, size)
        top = y + (h - box.h) / 2
        placed = PlacedBox(leaf, "outcome", Rect(x, top, box.w, box.h),
                           tuple(ln.moved(x, top) for ln in box.lines),
                           (box.badge[0] + x, box.badge[1] + top, box.badge[2]), box.strip, 0.0)
        shift = y + (h - height) / 2
        rows.append(RuleRow(placed, tuple(ln.moved(0, shift) for ln in lines),
                            Rect(x, y, col_w, h)))
        y += h + 0.8 * size
    return rows


def _most_rows(options: ChartOptions) -> int:
    """An upper bound on the rules a page can hold: each takes at least one line of the
    minimum text size, in at most three columns down the longer side of the page."""
    w, h = page_size(options.paper, False)
    return 3 * int(max(w, h) / options.min_text) + 1


def plan_rules(model: TreeModel, text: ChartText, options: ChartOptions,
               measure: Measure) -> ChartPlan | None:
    """The best page of rows for ``model`` (largest text, then fewest columns), or None when
    the rows fit no arrangement at the minimum text size."""
    floor = options.min_text
    if len(model.leaves) > _most_rows(options):  # refused at once, not after every layout
        return None
    best, best_key = None, None
    for frame in frames(text, options, measure):
        for (area, panel), columns in itertools.product(rows_arrangements(frame), (1, 2, 3)):
            if _rows(model, text.tree, frame, area, floor, columns, measure) is None:
                continue
            lo, hi = 0, int(math.floor(floor * (MAX_TREE_SCALE - 1) / STEP + 1e-9))
            while lo < hi:  # the rows grow with the text: bisect on the grid
                mid = (lo + hi + 1) // 2
                if _rows(model, text.tree, frame, area, floor + mid * STEP, columns,
                         measure) is None:
                    hi = mid - 1
                else:
                    lo = mid
            size = floor + lo * STEP
            key = (round(size, 2), -columns, frame.width < frame.height)
            if best_key is None or key > best_key:
                best_key, best = key, (frame, area, panel, columns, size)
    if best is None:
        return None
    frame, area, panel, columns, size = best
    rows = _rows(model, text.tree, frame, area, size, columns, measure)
    return finished_plan(text, options, frame, area, panel, None, tuple(rows), size)
