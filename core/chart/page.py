"""The page around the tree: header, the side panel's sections, cautions, footer and QR code.

A frame is one orientation of the page: the header across the top (the banner beside the title
on a wide page), the cautions with the footer and the QR code across the bottom, and between
them the zone that the tree and the panel's other sections share. Where the sections go in
that zone (in the tree's empty top corners, beside it, or in columns below it) is decided for
each tree by core/chart/arrange.py; the frame lays out a section at any width it is asked for.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

from .content import ChartText, PanelItem, PanelSection
from .layout import TreeLayout
from .options import ChartOptions, margin_for, page_size
from .style import TypeScale
from .text import CAP, LEADING, Line, Measure, Rect, wrap

QR_EM = 4.2  # QR code side in units of the body size (about 13 mm at 9 pt)
COLUMN_EM = 15.0  # the narrowest column a panel section is set in, in units of the body size
SECTION_GAP = 0.9  # between sections of one column, in units of the body size
GAP = 1.2  # between the panel and the tree, and between columns, in units of the body size


@dataclass(frozen=True)
class PanelBlock:
    """One section of the side panel, placed."""

    section: PanelSection
    rect: Rect
    lines: tuple[Line, ...]
    swatches: tuple[tuple[PanelItem, Rect], ...]  # key items' band swatches

    def moved(self, dx: float, dy: float) -> "PanelBlock":
        return PanelBlock(self.section, self.rect.moved(dx, dy),
                          tuple(ln.moved(dx, dy) for ln in self.lines),
                          tuple((item, r.moved(dx, dy)) for item, r in self.swatches))


@dataclass(frozen=True)
class ChartPlan:
    """Where everything goes on the page (points, origin top-left, y downwards)."""

    text: ChartText
    options: ChartOptions
    width: float
    height: float
    landscape: bool
    printable: Rect  # inside the margins: nothing is drawn outside
    scale: TypeScale
    header: tuple[Line, ...]
    banner: Rect | None
    banner_lines: tuple[Line, ...]
    tree_area: Rect  # where the tree (or the rows of the rules form) may go
    tree: TreeLayout | None  # None for the rules form
    rules: tuple  # the rules form's rows (core/chart/rules.py), () for a tree
    text_size: float  # the size of the tree's (or the rows') text
    panel: tuple[PanelBlock, ...]  # the cautions first, then the other sections
    footer: tuple[Line, ...]
    qr: Rect
    dividers: tuple[tuple[float, float, float, float], ...]  # thin lines (x0, y0, x1, y1)

    @property
    def direction(self) -> str | None:
        return None if self.tree is None else self.tree.direction


class Frame:
    """Header, cautions, footer and QR code of one orientation; the zone between them; the
    other panel sections, laid out at whatever width they are given."""

    def __init__(self, text: ChartText, options: ChartOptions, landscape: bool,
                 measure: Measure):
        self.width, self.height = page_size(options.paper, landscape)
        m = margin_for(options.paper)
        self.printable = Rect(m, m, self.width - 2 * m, self.height - 2 * m)
        self.scale = TypeScale(body=options.min_text)
        self.measure = measure
        self.body = self.scale.body
        self.gap = GAP * self.body
        top = self._header(text, landscape)
        bottom = self._bottom(text)
        self.zone = Rect(m, top, self.printable.w, bottom - self.gap - top)

        self.sections = tuple(sec for sec in text.sections if sec.kind != "caution")
        self._blocks: dict[tuple[int, float], PanelBlock] = {}
        self._bands: dict[tuple[int, int], tuple[tuple[PanelBlock, ...], float]] = {}
        self._sums: dict[float, list[float]] = {}  # running heights of a stack, per width

    def _header(self, text: ChartText, landscape: bool) -> float:
        """Title, subtitle, banner and how to read, from the top margin; returns where the
        zone below them starts."""
        m, b, scale, cw = self.printable.x, self.body, self.scale, self.printable.w
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
        lead, colon, rest = text.how_to_read.partition(": ")  # "How to read:" in bold
        if not colon:  # a statement in its place (a tree no better than no tree): its first
            lead, _, rest = text.how_to_read.partition(". ")  # sentence in bold
            lead, colon = lead.rstrip(".") + ".", ""
        y = self.runs(header, [(lead + (":" if colon else ""), True), (rest, False)], m, y,
                      title_w, b)
        if beside:
            y = max(y, self.banner.bottom)
        self.header = tuple(header)
        return y + 0.9 * b

    def _bottom(self, text: ChartText) -> float:
        """The cautions across the page, the footer lines under them, the QR code to their
        right, up from the bottom margin; returns where they start."""
        m, b, cw = self.printable.x, self.body, self.printable.w
        measure = self.measure
        qr = QR_EM * b
        left_w = cw - qr - b
        cautions = [sec for sec in text.sections if sec.kind == "caution"]
        blocks = [self._section(sec, left_w) for sec in cautions]
        # The fingerprints in bold, what they are run on after them when all fits one line,
        # else on lines of their own.
        footer: list[Line] = []
        first, *rest = text.footer
        runs = [(first, True)] + [(t, False) for t in rest]
        whole = sum(measure(t, bold, b) for t, bold in runs) + measure(" ", False, b) * len(rest)
        if whole <= left_w:
            text_h = self.runs(footer, runs, m, 0.0, left_w, b)
        else:
            text_h = 0.0
            for t, bold in runs:
                text_h = self.runs(footer, [(t, bold)], m, text_h, left_w, b)
        stacked = sum(blk.rect.h for blk in blocks) + 0.6 * b * len(blocks) + text_h
        bottom_h = max(qr, stacked)
        y = self.printable.bottom - bottom_h
        self.cautions = []
        for blk in blocks:
            self.cautions.append(blk.moved(m, y))
            y += blk.rect.h + 0.6 * b
        self.footer = tuple(ln.moved(0, y) for ln in footer)
        self.qr = Rect(m + cw - qr, self.printable.bottom - qr, qr, qr)
        return self.printable.bottom - bottom_h

    # --- text --------------------------------------------------------------------------

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
            for k, (text, bold) in enumerate(pieces):
                # a piece followed by another on its line keeps the space, for copied text
                tail = " " if k < len(pieces) - 1 else ""
                out.append(Line(text + tail, bold, size, left, baseline, False))
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

    def _section(self, section: PanelSection, width: float) -> PanelBlock:
        """A section laid out at (0, 0). The cautions run on as one paragraph after their
        title, in bold; the other sections have a heading line."""
        b, heading = self.scale.body, self.scale.heading
        boxed = section.kind in ("caution", "checked")
        pad = 0.6 * b if boxed else 0.0
        inner = width - 2 * pad
        lines: list[Line] = []
        swatches = []
        if section.kind == "caution":
            runs = [(section.title + ".", True), (" ".join(i.text for i in section.items), False)]
            y = self.runs(lines, runs, pad, pad, inner, b)
            return PanelBlock(section, Rect(0, 0, width, y + pad), tuple(lines), ())
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

    # --- the panel's other sections ------------------------------------------------------

    def block(self, index: int, width: float) -> PanelBlock:
        """Section ``index`` laid out at ``width``, at (0, 0); kept, as the planner asks for
        the same widths again and again."""
        key = (index, round(width, 3))
        if key not in self._blocks:
            self._blocks[key] = self._section(self.sections[index], width)
        return self._blocks[key]

    def stack(self, first: int, last: int, width: float) -> tuple[list[PanelBlock], float]:
        """Sections ``first`` to ``last`` (exclusive) one under another at ``width``, from
        (0, 0); and their height."""
        placed, y = [], 0.0
        for k in range(first, last):
            blk = self.block(k, width)
            placed.append(blk.moved(0, y))
            y += blk.rect.h + SECTION_GAP * self.body
        return placed, max(0.0, y - SECTION_GAP * self.body)

    def stack_height(self, first: int, last: int, width: float) -> float:
        """The height of :meth:`stack` without placing it."""
        key = round(width, 3)
        if key not in self._sums:
            sums = [0.0]
            for k in range(len(self.sections)):
                sums.append(sums[-1] + self.block(k, width).rect.h + SECTION_GAP * self.body)
            self._sums[key] = sums
        sums = self._sums[key]
        return max(0.0, sums[last] - sums[first] - SECTION_GAP * self.body)

    def columns_below(self, first: int) -> int:
        """How many columns the sections from ``first`` on take across the page."""
        wide = int((self.zone.w + self.gap) // (COLUMN_EM * self.body + self.gap))
        return max(1, min(4, len(self.sections) - first, wide))

    def band(self, first: int) -> tuple[tuple[PanelBlock, ...], float]:
        """Sections ``first`` to the end in columns across the zone's width, from (0, 0),
        split in order so that the tallest column is shortest; and the tallest's height."""
        columns = self.columns_below(first)
        key = (first, columns)
        if key not in self._bands:
            self._bands[key] = self._columns(first, columns)
        return self._bands[key]

    def _columns(self, first: int, k: int) -> tuple[tuple[PanelBlock, ...], float]:
        n = len(self.sections)
        if first >= n:
            return (), 0.0
        width = (self.zone.w - (k - 1) * self.gap) / k
        spacing = SECTION_GAP * self.body
        heights = [self.block(i, width).rect.h for i in range(first, n)]
        best, best_cuts = math.inf, ()
        for cuts in itertools.combinations(range(1, len(heights)), k - 1):
            bounds = (0,) + cuts + (len(heights),)
            tallest = max(sum(heights[a:z]) + spacing * (z - a - 1)
                          for a, z in zip(bounds, bounds[1:]))
            if tallest < best - 1e-9:
                best, best_cuts = tallest, bounds
        placed = []
        for column, (a, z) in enumerate(zip(best_cuts, best_cuts[1:])):
            blocks, _ = self.stack(first + a, first + z, width)
            placed += [blk.moved(column * (width + self.gap), 0) for blk in blocks]
        return tuple(placed), best


def frames(text: ChartText, options: ChartOptions, measure: Measure) -> list[Frame]:
    """The page in each orientation the options allow."""
    return [Frame(text, options, landscape, measure) for landscape in orientations(options)]


def orientations(options: ChartOptions) -> tuple[bool, ...]:
    return {"portrait": (False,), "landscape": (True,)}.get(options.orientation, (False, True))


def finished_plan(text: ChartText, options: ChartOptions, frame: Frame, area: Rect,
                  panel: tuple[PanelBlock, ...], tree: TreeLayout | None, rules: tuple,
                  size: float) -> ChartPlan:
    """The page of ``frame`` with the panel's other sections placed as ``panel`` and the
    tree (placed) or the rows of the rules form in ``area``."""
    b, pr = frame.body, frame.printable
    dividers = []
    below = [blk.rect.y for blk in panel if blk.rect.y > area.bottom - 1e-6]
    if below:  # a thin rule between the tree and the sections below it
        y = min(below) - 0.5 * frame.gap
        dividers.append((pr.x, y, pr.right, y))
    return ChartPlan(text=text, options=options, width=frame.width, height=frame.height,
                     landscape=frame.width > frame.height, printable=pr,
                     scale=frame.scale, header=frame.header, banner=frame.banner,
                     banner_lines=frame.banner_lines, tree_area=area, tree=tree, rules=rules,
                     text_size=size, panel=tuple(frame.cautions) + panel, footer=frame.footer,
                     qr=frame.qr, dividers=tuple(dividers))
