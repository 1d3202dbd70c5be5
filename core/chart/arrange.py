"""Arranging the tree and the panel's sections on the page, at the largest legible text size.

A tidy tree is narrow at the top (and a deep one often at the bottom too), so the corners of
the zone beside it are empty. The panel's sections (where the tree comes from, how well it
predicts, its check on separate patients, the key) go in order into stacks in those corners
and into columns below the tree: all below is the classic page, all in one corner a column
beside the tree. For each tree the planner tries both orientations (unless one is fixed),
several drawings of the tree (core/chart/boxes.py's LayoutStyle: growing down or to the
right; questions widened over their children, on one line or wrapped; outcome boxes below
their question or beside it, of one width or each of its own) and, for each, where the
sections fit around it. It keeps the arrangement whose tree text is largest (never below
the minimum, at most 1.5 × it; sizes within a twentieth of the minimum count as equal), then
top-down over left-to-right (how flowcharts are read), then the one with fewer groups of
sections, then the calmer drawing, then the larger text, then the one the tree fills best.
Spare room is shared out by spreading the tree. A tree that fits no arrangement at the
minimum size gets None (the caller refuses it).

A layout is exactly proportional to its text size, so one layout at the minimum answers every
size: its outline (the boxes, labels and arrows, sorted by their top and by their bottom) is
scaled, not drawn again; and a search at a size stops at the first arrangement that fits.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, replace
from functools import lru_cache

from .boxes import size_boxes
from .content import ChartText
from .layout import BoxSpec, LayoutStyle, Para, TreeLayout, TreeSpec, layout_tree
from .options import ChartOptions
from .page import ChartPlan, Frame, PanelBlock, finished_plan, frames
from .text import LEADING, Measure, Rect

MAX_TREE_SCALE = 1.5  # tree text up to 1.5 × the minimum when the tree leaves room
QUESTION_EMS = (9.0, 11.0, 14.0)  # wrap widths of question text tried, in units of the text size
OUTCOME_EMS = (0.0, 15.0)  # outcome text wrapped as narrow as its numbers, or not at all
STACK_EMS = (15.0, 19.0, 24.0)  # widths of a corner stack, in units of the body size
STEP = 0.05  # text sizes are tried on a 0.05 pt grid


CORNERS = ("top left", "top right", "bottom left", "bottom right")  # filled in this order
_INF = float("inf")


class Outline:
    """Everything of a tree layout that the panel must keep clear of (boxes, arrow labels,
    arrow segments), sorted by its top and by its bottom, with how far left and right the
    tree reaches above (or below) any depth."""

    def __init__(self, layout: TreeLayout):
        rects = layout.rects()
        for arrow in layout.arrows:
            for (x0, y0), (x1, y1) in zip(arrow.points, arrow.points[1:]):
                rects.append(Rect(min(x0, x1), min(y0, y1), abs(x1 - x0), abs(y1 - y0)))
        self.width, self.height = layout.width, layout.height
        # From the top down: the depth where each piece starts, and the running extremes.
        down = sorted(rects, key=lambda r: r.y)
        self.tops = [r.y for r in down]
        self.top_least = list(itertools.accumulate((r.x for r in down), min))
        self.top_most = list(itertools.accumulate((r.right for r in down), max))
        # From the bottom up, as negative depths (so that both lists ascend).
        up = sorted(rects, key=lambda r: -r.bottom)
        self.bottoms = [-r.bottom for r in up]
        self.bottom_least = list(itertools.accumulate((r.x for r in up), min))
        self.bottom_most = list(itertools.accumulate((r.right for r in up), max))

    def clear_depth(self, corner: str, edge: float) -> float:
        """In a top corner: the depth of the first piece reaching past ``edge`` (left of it
        in a left corner, right of it in a right one), from the top; in a bottom corner the
        same from the bottom up (a negative depth). Infinite when nothing reaches it."""
        top, left = corner.startswith("top"), corner.endswith("left")
        reach = (self.top_least if left else self.top_most) if top else \
            (self.bottom_least if left else self.bottom_most)
        # The running extremes only grow outwards: bisect for the first piece past the edge.
        lo, hi = 0, len(reach)
        while lo < hi:
            mid = (lo + hi) // 2
            if (reach[mid] < edge) if left else (reach[mid] > edge):
                hi = mid
            else:
                lo = mid + 1
        if lo == len(reach):
            return _INF
        return self.tops[lo] if top else self.bottoms[lo]


@dataclass(frozen=True)
class Arrangement:
    """The tree's place and the panel's: ``stacks`` of consecutive sections in the corners
    of the zone (corner, first, last, width in points), the sections from ``band`` on in
    columns below the tree; the tree's top-left corner at (x, y) in ``area`` (the zone above
    the band)."""

    stacks: tuple[tuple[str, int, int, float], ...]
    band: int
    x: float
    y: float
    area: Rect

    def groups(self, sections: int) -> int:
        return len(self.stacks) + (self.band < sections)


def _arrange(frame: Frame, outline: Outline, scale: float, calmest: bool) -> Arrangement | None:
    """The tree (its outline scaled by ``scale``) and the sections together in the zone, or
    None. Sections go below the tree from some section on; those before it fill the
    corners in order, each corner taking as many as fit at one of the stack widths, with
    the tree centred, to the left or to the right, low or high. The first arrangement found,
    or with ``calmest`` the one with the fewest groups of sections (the classic page and a
    single column beside the tree first)."""
    zone, gap = frame.zone, frame.gap
    count = len(frame.sections)
    width, height = outline.width * scale, outline.height * scale
    if width > zone.w + 1e-6:
        return None
    best = None
    for band in range(count + 1):  # all below first (the classic page), then fewer and fewer
        bottom = zone.bottom - (frame.band(band)[1] + gap if band < count else 0.0)
        if height > bottom - zone.y + 1e-6:
            continue
        area = Rect(zone.x, zone.y, zone.w, bottom - zone.y)
        if band == 0:
            found = Arrangement((), 0, zone.x + (zone.w - width) / 2,
                                zone.y + (area.h - height) / 2, area)
            if not calmest:
                return found
            best = _calmer(best, found, count)
            continue
        spare = zone.w - width
        for x, y in itertools.product((zone.x + spare / 2, zone.x, zone.x + spare),
                                      (bottom - height, zone.y)):
            stacks = _fill(frame, outline, scale, x, y, area, band)
            if stacks is not None:
                found = Arrangement(stacks, band, x, y, area)
                if not calmest:
                    return found
                best = _calmer(best, found, count)
    return best


def _calmer(best: Arrangement | None, found: Arrangement, count: int) -> Arrangement:
    return found if best is None or found.groups(count) < best.groups(count) else best


def _fill(frame: Frame, outline: Outline, scale: float, x: float, y: float, area: Rect,
          last: int) -> tuple | None:
    """Sections 0 to ``last`` (exclusive) in the corners beside the tree placed at (x, y),
    in order, each corner taking as many as fit; None if some are left over."""
    gap, body = frame.gap, frame.body
    stacks, first, taken = [], 0, []
    for corner in CORNERS:
        if first == last:
            break
        top, left = corner.startswith("top"), corner.endswith("left")
        best = None
        for em in STACK_EMS:
            stack_w = em * body
            edge = area.x + stack_w + gap if left else area.right - stack_w - gap
            depth = outline.clear_depth(corner, (edge - x) / scale)
            if depth == _INF:
                room = area.h
            elif top:
                room = y + depth * scale - gap - area.y
            else:
                room = area.bottom - (y - depth * scale) - gap
            k = first
            while k < last and frame.stack_height(first, k + 1, stack_w) <= room + 1e-6:
                k += 1
            while k > first and any(_stack_rect(area, corner, stack_w, frame.stack_height(
                    first, k, stack_w)).overlaps(other) for other in taken):
                k -= 1  # one gap clear of the stacks in the other corners
            if k > first and (best is None or k > best[1]):
                best = (stack_w, k)
        if best is None:
            continue
        stack_w, k = best
        rect = _stack_rect(area, corner, stack_w, frame.stack_height(first, k, stack_w))
        taken.append(Rect(rect.x - gap, rect.y - gap, rect.w + 2 * gap, rect.h + 2 * gap))
        stacks.append((corner, first, k, stack_w))
        first = k
    return tuple(stacks) if first == last else None


def _stack_rect(area: Rect, corner: str, width: float, height: float) -> Rect:
    """Where a stack of sections ``width`` × ``height`` goes in ``corner`` of ``area``."""
    return Rect(area.x if corner.endswith("left") else area.right - width,
                area.y if corner.startswith("top") else area.bottom - height, width, height)


def _panel(frame: Frame, arr: Arrangement) -> tuple[PanelBlock, ...]:
    """The sections placed as ``arr`` says."""
    area, placed = arr.area, []
    for corner, first, last, width in arr.stacks:
        blocks, height = frame.stack(first, last, width)
        rect = _stack_rect(area, corner, width, height)
        placed += [b.moved(rect.x, rect.y) for b in blocks]
    if arr.band < len(frame.sections):
        placed += [b.moved(area.x, area.bottom + frame.gap) for b in frame.band(arr.band)[0]]
    return tuple(placed)


def rows_arrangements(frame: Frame) -> list[tuple[Rect, tuple[PanelBlock, ...]]]:
    """For the rules form: the zone with every section below it, or beside it in one
    column (the narrowest that fits the zone's height); each as (area, placed sections)."""
    zone, count, out = frame.zone, len(frame.sections), []
    bottom = zone.bottom - frame.band(0)[1] - frame.gap
    if bottom > zone.y:
        area = Rect(zone.x, zone.y, zone.w, bottom - zone.y)
        out.append((area, _panel(frame, Arrangement((), 0, zone.x, zone.y, area))))
    for em in STACK_EMS:
        width = em * frame.body
        if frame.stack_height(0, count, width) <= zone.h:
            beside = Arrangement((("top right", 0, count, width),), count, zone.x, zone.y, zone)
            out.append((Rect(zone.x, zone.y, zone.w - width - frame.gap, zone.h),
                        _panel(frame, beside)))
            break
    return out


# --- quick refusals ---------------------------------------------------------------------


def _depth(spec) -> int:
    deepest, stack = 0, [(spec.root, 0)]
    while stack:
        node, d = stack.pop()
        deepest = max(deepest, d)
        stack.extend((c, d + 1) for c in spec.children.get(node, ()))
    return deepest


@lru_cache(maxsize=64)
def _smallest_level(direction: str, size: float, measure: Measure) -> tuple[float, float]:
    """Along the depth axis: the least a level (question box and its arrows) and an outcome
    box can take, from boxes with the least possible text."""
    x = Para("x")
    spec = TreeSpec(1, {1: (2, 3)}, {1: BoxSpec("question", "1", (x,)),
                                     2: BoxSpec("outcome", "2", (x, x), Para("LOW", True)),
                                     3: BoxSpec("outcome", "3", (x, x), Para("LOW", True))},
                    {(1, 2): (Para("YES", True),), (1, 3): (Para("NO", True),)})
    layout = layout_tree(spec, LayoutStyle(size, direction), measure)
    root, child = layout.boxes[1].rect, layout.boxes[2].rect
    if direction == "down":
        return child.y - root.y, child.h
    return child.x - root.x, child.w


def _too_deep(spec, direction: str, size: float, measure: Measure, area: Rect) -> bool:
    """A cheap refusal: even the smallest boxes, one level after another along the tree's
    deepest path, would not fit ``area``."""
    level, outcome = _smallest_level(direction, size, measure)
    need = _depth(spec) * level + outcome
    return need > (area.h if direction == "down" else area.w) + 1e-6


def deepest_possible(text: ChartText, options: ChartOptions, measure: Measure) -> int:
    """The greatest tree depth that any page arrangement could hold (a cheap bound: a deeper
    tree is refused by :func:`_too_deep` everywhere). Three body lines of slack allow for
    panels whose wording differs a little from ``text``'s."""
    floor, deepest = options.min_text, 0
    slack = 3 * floor * LEADING
    for frame in frames(text, options, measure):
        zone = frame.zone
        for direction in _directions(options):
            level, outcome = _smallest_level(direction, floor, measure)
            room = (zone.h if direction == "down" else zone.w) + slack
            deepest = max(deepest, int((room - outcome) // level))
    return deepest


def _directions(options: ChartOptions) -> tuple[str, ...]:
    """Top-down unless left to right is asked for: on the capacity benchmark's trees
    (tests/benchmarks/bench_chart_capacity.py) left to right never held a tree that one of
    the top-down drawings could not, so trying it would only slow the planning."""
    return ("down",) if options.direction == "auto" else (options.direction,)


def _styles(options: ChartOptions):
    """The layouts tried, at the minimum text size, each with how far it departs from the
    calmest drawing (0): top-down ones with questions widened over their children, on one
    line or wrapped, outcome boxes below or beside their question; and left-to-right ones;
    each with question and outcome text wrapped wider or narrower, outcome boxes of one width
    or of their own."""
    for direction in _directions(options):
        down = direction == "down"
        for question_em, outcome_em, widths, beside, questions in itertools.product(
                QUESTION_EMS[::-1], OUTCOME_EMS[::-1], ("shared", "own"),
                (False, True) if down else (False,),
                ("widened", "one line", "wrapped") if down else ("wrapped",)):
            departs = (0.5 * (len(QUESTION_EMS) - 1 - QUESTION_EMS.index(question_em))
                       + (outcome_em != OUTCOME_EMS[-1])
                       + (widths == "own") + beside
                       + {"widened": 0, "one line": 1, "wrapped": 2}[questions] * down)
            yield departs, LayoutStyle(options.min_text, direction, question_em, outcome_em,
                                       leaves_beside=beside, questions=questions,
                                       outcome_widths=widths)


# --- the search -------------------------------------------------------------------------


def plan_page(text: ChartText, options: ChartOptions, measure: Measure,
              quick: bool = False) -> ChartPlan | None:
    """The best arrangement of ``text`` on the page, or None when the tree fits nowhere at
    the minimum text size. ``quick`` takes the first arrangement that fits at the minimum
    (no enlarging, no spreading): enough to tell whether the tree fits."""
    floor = options.min_text
    steps = int(floor * (MAX_TREE_SCALE - 1) / STEP + 1e-6)
    pages = frames(text, options, measure)
    best, best_key = None, None
    drawn = set()
    # Text sizes within one twentieth of the minimum count as equal, so that a calmer
    # drawing is not given up for text a hair larger.
    bucket = max(1, round(floor * 0.05 / STEP))
    for departs, style in _styles(options):
        fitting = [f for f in pages if not _too_deep(text.tree, style.direction, floor, measure,
                                                      f.zone)]
        if not fitting:
            continue
        # Styles whose boxes come out the same draw the same tree: laid out once.
        shape = (style.direction, style.leaves_beside, style.questions,
                 style.question_em if style.questions == "widened" else None,
                 tuple((k, b.w, b.h) for k, b in size_boxes(text.tree, style, measure).items()))
        if shape in drawn:
            continue
        drawn.add(shape)
        layout = layout_tree(text.tree, style, measure)
        outline = Outline(layout)
        for frame in fitting:
            # Only what could match the best so far is tried further: one check at its size.
            need = best_key[0] * bucket if best_key else 0
            if _arrange(frame, outline, (floor + need * STEP) / floor, calmest=False) is None:
                continue
            if quick:
                return _finish(text, options, frame, layout, measure, stretch=False)
            lo, hi = need, steps
            while lo < hi:  # what fits shrinks as the tree grows: bisect on the grid
                mid = (lo + hi + 1) // 2
                if _arrange(frame, outline, (floor + mid * STEP) / floor, calmest=False) is None:
                    hi = mid - 1
                else:
                    lo = mid
            scale = (floor + lo * STEP) / floor
            calm = _arrange(frame, outline, scale, calmest=True)
            used = (outline.width * outline.height * scale ** 2) / (frame.zone.w * frame.zone.h)
            key = (lo // bucket, style.direction == "down", -calm.groups(len(frame.sections)),
                   -departs, lo, round(used, 3), frame.width < frame.height)
            if best_key is None or key > best_key:
                best_key, best = key, (frame, style, scale)
    if best is None:
        return None
    frame, style, scale = best
    layout = layout_tree(text.tree, replace(style, size=round(floor * scale, 2)), measure)
    return _finish(text, options, frame, layout, measure, stretch=True)


def _largest(make, fits, low: float, high: float, step: float):
    """The largest value in [low, high] (on a ``step`` grid) whose layout ``fits``."""
    best = make(low)
    lo, hi = 0, int((high - low) / step + 1e-9)
    while lo < hi:  # layouts grow with the value; bisect on the grid
        mid = (lo + hi + 1) // 2
        trial = make(low + mid * step)
        if fits(trial):
            lo, best = mid, trial
        else:
            hi = mid - 1
    return best


def _finish(text: ChartText, options: ChartOptions, frame: Frame, layout: TreeLayout,
            measure: Measure, stretch: bool) -> ChartPlan:
    groups = _arrange(frame, Outline(layout), 1.0, calmest=True).groups(len(frame.sections))

    def fits(trial: TreeLayout) -> bool:  # as calm as before stretching
        found = _arrange(frame, Outline(trial), 1.0, calmest=True)
        return found is not None and found.groups(len(frame.sections)) <= groups

    if stretch:  # spread the tree into spare room; the tidy properties all survive stretching
        style, reach = layout.style, layout.depth_stretch
        layout = _largest(lambda f: layout_tree(text.tree, style, measure, f, reach), fits,
                          1.0, 1.6, 0.05)
        wide = layout.breadth_stretch
        layout = _largest(lambda d: layout_tree(text.tree, style, measure, wide, reach + d),
                          fits, 0.0, 1.0, 0.05)
    arr = _arrange(frame, Outline(layout), 1.0, calmest=True)
    tree = layout.moved(arr.x, arr.y)
    return finished_plan(text, options, frame, arr.area, _panel(frame, arr), tree, (),
                         layout.size)
