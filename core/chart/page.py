"""Planning one page: header, tree, side panel and footer, at the largest legible text size.

The planner tries portrait and landscape (unless fixed), the side panel below the tree or
beside it, the tree growing down or to the right, and a few wrap widths; it keeps the
arrangement whose tree text is largest (never below the minimum, at most 1.5 × it), then
top-down over left-to-right, then the one the tree fills best. The cautions always run across
the page above the footer. A tree that fits no arrangement at the minimum size gets None (the
caller refuses it), and spare room is shared out by spreading the tree.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, replace
from functools import lru_cache

from .content import ChartText, PanelItem, PanelSection
from .layout import BoxSpec, LayoutStyle, Para, TreeLayout, TreeSpec, layout_tree
from .text import CAP, LEADING, Line, Measure, Rect, wrap
from .options import ChartOptions, margin_for, page_size
from .style import TypeScale

MAX_TREE_SCALE = 1.5  # tree text up to 1.5 × the minimum when the tree leaves room
WRAPS = ((12.0, 11.0), (14.0, 13.0), (18.0, 15.0))  # (question, outcome) wrap widths in em
QR_EM = 4.2  # QR code side in units of the body size (about 13 mm at 9 pt)


@dataclass(frozen=True)
class PanelBlock:
    """One section of the side panel, placed."""

    section: PanelSection
    rect: Rect
    lines: tuple[Line, ...]
    swatches: tuple[tuple[PanelItem, Rect], ...]  # key items' band swatches


@dataclass(frozen=True)
class ChartPlan:
    """Where everything goes on the page (points, origin top-left, y downwards)."""

    text: ChartText
    options: ChartOptions
    width: float
    height: float
    landscape: bool
    placement: str  # "bottom" or "side": where the panel goes
    printable: Rect  # inside the margins: nothing is drawn outside
    scale: TypeScale
    header: tuple[Line, ...]
    banner: Rect | None
    banner_lines: tuple[Line, ...]
    tree_area: Rect  # where the tree (or the rows of the rules form) goes
    tree: TreeLayout | None  # None for the rules form
    rules: tuple  # the rules form's rows (core/chart/rules.py), () for a tree
    text_size: float  # the size of the tree's (or the rows') text
    panel: tuple[PanelBlock, ...]
    footer: tuple[Line, ...]
    qr: Rect

    @property
    def direction(self) -> str | None:
        return None if self.tree is None else self.tree.direction


class _Frame:
    """Header, panel and footer for one orientation and panel placement, the cautions across
    the page or among the other sections."""

    def __init__(self, text: ChartText, options: ChartOptions, landscape: bool, placement: str,
                 cautions_across: bool, measure: Measure):
        self.width, self.height = page_size(options.paper, landscape)
        m = margin_for(options.paper)
        self.printable = Rect(m, m, self.width - 2 * m, self.height - 2 * m)
        self.scale = scale = TypeScale(body=options.min_text)
        self.measure, self.placement = measure, placement
        b, cw = scale.body, self.printable.w

        header: list[Line] = []
        # On a wide page the banner stands beside the title, not below it: the tree keeps
        # the height, which a wide page has least of.
        beside = landscape and text.banner is not None
        title_w = 0.55 * cw if beside else cw
        y = self._lines(header, text.title, m, m, title_w, True, scale.title) + 0.2 * b
        if text.subtitle:
            y = self._lines(header, text.subtitle, m, y, title_w, False, scale.subtitle)
        y += 0.5 * b
        self.banner, self.banner_lines = None, ()
        if text.banner:
            pad, inner = 0.45 * b, []
            runs = [(text.banner[0] + ".", True), (text.banner[1], False)]
            left, top, width = (m + title_w + b, m, cw - title_w - b) if beside else (m, y, cw)
            bottom = self.runs(inner, runs, left + pad, top + pad, width - 2 * pad, b)
            self.banner = Rect(left, top, width, bottom + pad - top)
            self.banner_lines = tuple(inner)
            if not beside:
                y = self.banner.bottom + 0.5 * b
        y = self._lines(header, text.how_to_read, m, y, title_w, True, b)
        if beside:
            y = max(y, self.banner.bottom)
        self.header = tuple(header)
        self.header_bottom = y + 0.9 * b

        qr = QR_EM * b
        footer: list[Line] = []
        text_h = 0.0
        for k, t in enumerate(text.footer):
            text_h = self._lines(footer, t, m, text_h, cw - qr - b, k == 0, b)
        foot_h = max(qr, text_h)
        footer_top = self.height - m - foot_h
        self.footer = tuple(ln.moved(0, footer_top + (foot_h - text_h) / 2) for ln in footer)
        self.qr = Rect(m + cw - qr, footer_top + (foot_h - qr) / 2, qr, qr)

        gap = 1.2 * b
        column_em = 15 * b
        # The cautions run across the whole page just above the footer, or join the other
        # sections: in columns below the tree, or in one column beside it.
        cautions = [sec for sec in text.sections if sec.kind == "caution"]
        others = [sec for sec in text.sections if sec.kind != "caution"]
        if not cautions_across:
            others, cautions = others + cautions, []
        bottom = footer_top - gap
        self.panel = ()
        for sec in cautions:
            block = self._section(sec, cw, joined=True)
            bottom -= block.rect.h
            self.panel += (_moved_block(block, m, bottom),)
            bottom -= gap
        if placement == "bottom":
            k = max(1, min(4, len(others), int((cw + gap) // (column_em + gap))))
            col_w = (cw - (k - 1) * gap) / k
            blocks = self._columns(others, k, col_w, gap)
            panel_top = bottom - max((blk.rect.bottom for blk in blocks), default=0)
            self.panel = tuple(_moved_block(blk, m, panel_top) for blk in blocks) + self.panel
            self.tree_area = Rect(m, self.header_bottom, cw,
                                  panel_top - 1.5 * gap - self.header_bottom)
            self.panel_overflows = self.tree_area.h <= 0
        else:
            col_w = min(max(0.28 * cw, column_em), 22 * b)
            top = self.header_bottom
            blocks = self._columns(others, 1, col_w, gap)
            self.panel = tuple(_moved_block(blk, m + cw - col_w, top) for blk in blocks) + self.panel
            lowest = max((blk.rect.bottom for blk in blocks), default=0) + top
            self.panel_overflows = lowest > bottom + 1e-6
            self.tree_area = Rect(m, top, cw - col_w - 2 * gap, bottom - 0.5 * gap - top)

    def runs(self, out: list[Line], runs: list[tuple[str, bool]], x: float, y: float,
              width: float, size: float) -> float:
        """Wrap a paragraph whose words are bold or not (a bold headline running into its
        explanation); returns the y below the last line."""
        words = [(w, bold) for text, bold in runs for w in text.split()]
        space = self.measure(" ", False, size)
        lines: list[list[tuple[str, bool]]] = [[]]
        used = 0.0
        for word, bold in words:
            w = self.measure(word, bold, size)
            if lines[-1] and used + space + w > width:
                lines.append([])
                used = 0.0
            used += (space if lines[-1] else 0.0) + w
            lines[-1].append((word, bold))
        for line in lines:
            left = x
            baseline = y + size * LEADING / 2 + CAP * size
            # consecutive words of one weight become one piece of text
            pieces: list[tuple[str, bool]] = []
            for word, bold in line:
                if pieces and pieces[-1][1] == bold:
                    pieces[-1] = (pieces[-1][0] + " " + word, bold)
                else:
                    pieces.append((word, bold))
            for text, bold in pieces:
                out.append(Line(text, bold, size, left, baseline, False))
                left += self.measure(text, bold, size) + space
            y += size * LEADING
        return y

    def _lines(self, out: list[Line], text: str, x: float, y: float, width: float, bold: bool,
               size: float) -> float:
        """Wrap ``text`` into ``out`` from top ``y``; returns the y below the last line."""
        for piece in wrap(text, width, bold, size, self.measure):
            out.append(Line(piece, bold, size, x, y + size * LEADING / 2 + CAP * size, False))
            y += size * LEADING
        return y

    def _section(self, section: PanelSection, width: float, joined: bool = False) -> PanelBlock:
        """A section laid out at (0, 0); ``joined`` runs its items on as one paragraph."""
        if joined:
            section = PanelSection(section.title, (PanelItem(" ".join(
                i.text for i in section.items)),), section.kind)
        b, heading = self.scale.body, self.scale.heading
        boxed = section.kind in ("caution", "checked")
        pad = 0.6 * b if boxed else 0.0
        inner = width - 2 * pad
        lines: list[Line] = []
        swatches = []
        y = pad
        for t in wrap(section.title, inner, True, heading, self.measure):
            lines.append(Line(t, True, heading, pad, y + heading * LEADING / 2 + CAP * heading, False))
            y += heading * LEADING
        y += 0.25 * b
        for item in section.items:
            indent = 2.6 * b if (item.band is not None or item.dashed) else 0.0
            texts = wrap(item.text, inner - indent, item.bold, b, self.measure)
            if indent:
                swatches.append((item, Rect(pad, y + 0.1 * b, 2.0 * b, 1.05 * b)))
            for t in texts:
                lines.append(Line(t, item.bold, b, pad + indent, y + b * LEADING / 2 + CAP * b, False))
                y += b * LEADING
            y += 0.3 * b
        return PanelBlock(section, Rect(0, 0, width, y - 0.3 * b + pad), tuple(lines),
                          tuple(swatches))

    def _columns(self, sections, k: int, width: float, gap: float) -> list[PanelBlock]:
        """Sections in order, split into ``k`` columns so the tallest column is shortest."""
        blocks = [self._section(s, width) for s in sections]
        spacing = 0.9 * self.scale.body
        heights = [blk.rect.h for blk in blocks]
        n = len(blocks)
        k = min(k, n)
        best, best_cuts = math.inf, ()
        for cuts in itertools.combinations(range(1, n), k - 1):
            bounds = (0,) + cuts + (n,)
            tallest = max(sum(heights[a:b]) + spacing * (b - a - 1) for a, b in zip(bounds, bounds[1:]))
            if tallest < best - 1e-9:
                best, best_cuts = tallest, bounds
        placed = []
        for column, (a, z) in enumerate(zip(best_cuts, best_cuts[1:])):
            y = 0.0
            for blk in blocks[a:z]:
                placed.append(_moved_block(blk, column * (width + gap), y))
                y += blk.rect.h + spacing
        return placed


def _moved_block(block: PanelBlock, dx: float, dy: float) -> PanelBlock:
    return PanelBlock(block.section, block.rect.moved(dx, dy),
                      tuple(ln.moved(dx, dy) for ln in block.lines),
                      tuple((item, r.moved(dx, dy)) for item, r in block.swatches))


def _fits(layout: TreeLayout, area: Rect) -> bool:
    return layout.width <= area.w + 1e-6 and layout.height <= area.h + 1e-6


def _largest(make, area: Rect, low: float, high: float, step: float):
    """The largest value in [low, high] (on a ``step`` grid) whose layout fits ``area``."""
    best = make(low)
    if not _fits(best, area):
        return None
    lo, hi = 0, int(math.floor((high - low) / step + 1e-9))
    while lo < hi:  # layouts grow with the value; bisect on the grid
        mid = (lo + hi + 1) // 2
        trial = make(low + mid * step)
        if _fits(trial, area):
            lo, best = mid, trial
        else:
            hi = mid - 1
    return best


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
        area = frame.tree_area
        for direction in _directions(options):
            level, outcome = _smallest_level(direction, floor, measure)
            room = (area.h if direction == "down" else area.w) + slack
            deepest = max(deepest, int((room - outcome) // level))
    return deepest


def frames(text: ChartText, options: ChartOptions, measure: Measure) -> list[_Frame]:
    """Every arrangement of the page around the tree."""
    return [_Frame(text, options, landscape, placement, across, measure)
            for landscape, placement, across in itertools.product(
                _orientations(options), ("bottom", "side"), (True, False))]


def _orientations(options: ChartOptions) -> tuple[bool, ...]:
    return {"portrait": (False,), "landscape": (True,)}.get(options.orientation, (False, True))


def _directions(options: ChartOptions) -> tuple[str, ...]:
    return ("down", "right") if options.direction == "auto" else (options.direction,)


def plan_page(text: ChartText, options: ChartOptions, measure: Measure,
              quick: bool = False) -> ChartPlan | None:
    """The best arrangement of ``text`` on the page, or None when the tree fits nowhere at
    the minimum text size. ``quick`` only answers whether it fits (no enlarging).

    A layout is exactly proportional to its text size (every length is a multiple of it,
    wrap widths included), so one layout at the minimum tells the largest size that fits."""
    floor = options.min_text
    candidates = [frame for frame in frames(text, options, measure) if not frame.panel_overflows]
    best, best_key = None, None
    for direction, wraps, beside in itertools.product(_directions(options), WRAPS, (False, True)):
        if beside and direction != "down":
            continue
        # The tree's layout does not depend on the page around it: one per direction and wrap.
        fitting = [f for f in candidates if not _too_deep(text.tree, direction, floor, measure,
                                                       f.tree_area)]
        if not fitting:
            continue
        style = LayoutStyle(floor, direction, *wraps, leaves_beside=beside)
        layout = layout_tree(text.tree, style, measure)
        for frame in fitting:
            area = frame.tree_area
            room = min(area.w / layout.width, area.h / layout.height)
            if room < 1 - 1e-9:
                continue
            if quick:
                return _finish(text, options, frame, layout, measure, stretch=False)
            size = math.floor(floor * min(room, MAX_TREE_SCALE) * 20 + 1e-6) / 20
            grown = layout_tree(text.tree, replace(style, size=max(size, floor)), measure)
            while not _fits(grown, area) and grown.size > floor:  # rounding only
                grown = layout_tree(text.tree, replace(style, size=max(floor, grown.size - 0.05)),
                                    measure)
            used = (grown.width * grown.height) / (area.w * area.h)
            # Largest text first; then top-down (how flowcharts are read), then the
            # arrangement the tree fills best.
            key = (round(grown.size, 2), direction == "down", round(used, 3),
                   frame.width < frame.height)
            if best_key is None or key > best_key:
                best_key, best = key, (frame, grown)
    if best is None:
        return None
    frame, layout = best
    return _finish(text, options, frame, layout, measure, stretch=True)


def _finish(text: ChartText, options: ChartOptions, frame: _Frame, layout: TreeLayout,
            measure: Measure, stretch: bool) -> ChartPlan:
    area = frame.tree_area
    if stretch:  # spread the tree into spare room; the tidy properties all survive stretching
        style, reach = layout.style, layout.depth_stretch
        layout = _largest(lambda f: layout_tree(text.tree, style, measure, f, reach), area,
                          1.0, 1.6, 0.05) or layout
        wide = layout.breadth_stretch
        layout = _largest(lambda d: layout_tree(text.tree, style, measure, wide, reach + d), area,
                          0.0, 1.0, 0.05) or layout
    placed = layout.moved(area.x + (area.w - layout.width) / 2,
                          area.y + (area.h - layout.height) / 2)
    return finished_plan(text, options, frame, placed, (), layout.size)


def finished_plan(text: ChartText, options: ChartOptions, frame: _Frame,
                  tree: TreeLayout | None, rules: tuple, size: float) -> ChartPlan:
    """The page of ``frame`` holding a placed tree, or the rows of the rules form."""
    return ChartPlan(text=text, options=options, width=frame.width, height=frame.height,
                     landscape=frame.width > frame.height, placement=frame.placement,
                     printable=frame.printable, scale=TypeScale(body=options.min_text),
                     header=frame.header, banner=frame.banner, banner_lines=frame.banner_lines,
                     tree_area=frame.tree_area, tree=tree, rules=rules, text_size=size,
                     panel=frame.panel, footer=frame.footer, qr=frame.qr)
