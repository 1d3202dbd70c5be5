"""Tidy layout of a decision tree: box sizes from wrapped text, positions without overlaps.

Shared by the PDF chart and the app's tree view, so it draws nothing and imports neither
reportlab's drawing nor Qt: it takes a text-measuring function ``measure(text, bold, size)``
(the default uses reportlab's font metrics for the embedded DejaVu fonts; the app can pass
its own). Coordinates are points, origin top-left, y downwards.

Placement along the breadth axis (x when the tree grows down, y when it grows right) follows
the tidy drawing of Reingold & Tilford (1981), with per-level contours so boxes may have any
size: each subtree is laid out on its own, siblings are pushed together until their contours
are one gap apart, and a parent is centred over its first and last child. A subtree's drawing
therefore depends only on the subtree, so identical subtrees are drawn identically; every
level has the same pitch along the depth axis so this holds across depths too.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import lru_cache
from typing import Callable, Mapping

Measure = Callable[[str, bool, float], float]

LEADING = 1.25  # line height / text size
CAP = 0.36  # half the cap height of DejaVu Sans, in em: centres capitals on a line


def reportlab_measure(text: str, bold: bool, size: float) -> float:
    """Width in points of ``text`` in the embedded DejaVu Sans (bold or regular)."""
    return _unit_width(text, bold) * size


@lru_cache(maxsize=1 << 16)
def _unit_width(text: str, bold: bool) -> float:
    # A TrueType string's width is the sum of its glyph advances, so it scales exactly with
    # the size: one measurement per string serves every size the planner tries.
    from reportlab.pdfbase import pdfmetrics

    from .style import font_name, register_fonts

    register_fonts()
    return pdfmetrics.stringWidth(text, font_name(bold), 1000.0) / 1000.0


def wrap(text: str, width: float, bold: bool, size: float, measure: Measure) -> list[str]:
    """Greedy word wrap to ``width``; a word longer than the width keeps a line of its own."""
    return list(_wrap(text, width, bold, size, measure))


@lru_cache(maxsize=1 << 15)
def _wrap(text: str, width: float, bold: bool, size: float, measure: Measure) -> tuple[str, ...]:
    lines: list[str] = []
    for paragraph in text.split("\n"):
        current = ""
        for word in paragraph.split():
            trial = f"{current} {word}" if current else word
            if current and measure(trial, bold, size) > width:
                lines.append(current)
                current = word
            else:
                current = trial
        lines.append(current)
    return tuple(lines)


# --- what goes in -----------------------------------------------------------------------


@dataclass(frozen=True)
class Para:
    """A paragraph of box text; ``scale`` multiplies the tree text size."""

    text: str
    bold: bool = False
    scale: float = 1.0


@dataclass(frozen=True)
class BoxSpec:
    """One box: a question (decision) or an outcome with a band word in its strip."""

    kind: str  # "question" or "outcome"
    number: str
    body: tuple[Para, ...]
    heading: Para | None = None  # outcome boxes: the band word


@dataclass(frozen=True)
class TreeSpec:
    """The tree to lay out: children (YES first), box contents, arrow labels."""

    root: int
    children: Mapping[int, tuple[int, ...]]
    boxes: Mapping[int, BoxSpec]
    labels: Mapping[tuple[int, int], tuple[Para, ...]]


@dataclass(frozen=True)
class LayoutStyle:
    """Sizes that shape the layout."""

    size: float  # tree text in points
    direction: str = "down"  # "down" (top-down) or "right" (left-to-right)
    question_em: float = 16.0  # wrap width of question text, in units of the text size
    outcome_em: float = 14.0


# --- what comes out ---------------------------------------------------------------------


@dataclass(frozen=True)
class Rect:
    x: float
    y: float
    w: float
    h: float

    @property
    def right(self) -> float:
        return self.x + self.w

    @property
    def bottom(self) -> float:
        return self.y + self.h

    @property
    def cx(self) -> float:
        return self.x + self.w / 2

    @property
    def cy(self) -> float:
        return self.y + self.h / 2

    def overlaps(self, other: "Rect", tolerance: float = 1e-6) -> bool:
        return (self.x < other.right - tolerance and other.x < self.right - tolerance and
                self.y < other.bottom - tolerance and other.y < self.bottom - tolerance)

    def inside(self, other: "Rect", tolerance: float = 1e-6) -> bool:
        return (self.x >= other.x - tolerance and self.y >= other.y - tolerance and
                self.right <= other.right + tolerance and self.bottom <= other.bottom + tolerance)

    def moved(self, dx: float, dy: float) -> "Rect":
        return Rect(self.x + dx, self.y + dy, self.w, self.h)


@dataclass(frozen=True)
class Line:
    """One line of text: anchored at x (left edge or centre), on its baseline."""

    text: str
    bold: bool
    size: float
    x: float
    baseline: float
    centred: bool = True

    def moved(self, dx: float, dy: float) -> "Line":
        return replace(self, x=self.x + dx, baseline=self.baseline + dy)


@dataclass(frozen=True)
class PlacedBox:
    id: int
    kind: str
    rect: Rect
    lines: tuple[Line, ...]  # text, including the badge number (first) and the band word
    badge: tuple[float, float, float]  # centre x, centre y, radius of the number's circle
    strip: float  # height of the outcome box's band strip (0 for questions)
    point: float  # depth of a question box's pointed ends (hexagon), 0 for outcomes

    def moved(self, dx: float, dy: float) -> "PlacedBox":
        bx, by, r = self.badge
        return replace(self, rect=self.rect.moved(dx, dy),
                       lines=tuple(ln.moved(dx, dy) for ln in self.lines),
                       badge=(bx + dx, by + dy, r))


@dataclass(frozen=True)
class PlacedArrow:
    parent: int
    child: int
    branch: int  # 0 = YES, 1 = NO
    points: tuple[tuple[float, float], ...]  # polyline, the last point touches the child
    label: Rect
    label_lines: tuple[Line, ...]

    def moved(self, dx: float, dy: float) -> "PlacedArrow":
        return replace(self, points=tuple((x + dx, y + dy) for x, y in self.points),
                       label=self.label.moved(dx, dy),
                       label_lines=tuple(ln.moved(dx, dy) for ln in self.label_lines))


@dataclass(frozen=True)
class TreeLayout:
    boxes: Mapping[int, PlacedBox]
    arrows: tuple[PlacedArrow, ...]
    width: float
    height: float
    style: LayoutStyle
    breadth_stretch: float = 1.0
    depth_stretch: float = 1.0

    @property
    def direction(self) -> str:
        return self.style.direction

    @property
    def size(self) -> float:
        return self.style.size

    def moved(self, dx: float, dy: float) -> "TreeLayout":
        return replace(self, boxes={k: b.moved(dx, dy) for k, b in self.boxes.items()},
                       arrows=tuple(a.moved(dx, dy) for a in self.arrows))

    def rects(self) -> list[Rect]:
        """Every box and every arrow label: nothing of these may overlap."""
        return [b.rect for b in self.boxes.values()] + [a.label for a in self.arrows]


# --- box geometry ----------------------------------------------------------------------


@dataclass(frozen=True)
class _Sized:
    kind: str
    w: float
    h: float
    lines: tuple[Line, ...]  # relative to the box's top-left
    badge: tuple[float, float, float]
    strip: float
    point: float


def balanced_wrap(text: str, width: float, bold: bool, size: float, measure: Measure,
                  stretch: float = 1.0) -> list[str]:
    """Wrap within ``width`` (or up to ``stretch`` × it when that saves a line), then narrow
    the lines as far as the line count allows, so they come out of even length."""
    lines = wrap(text, width, bold, size, measure)
    if stretch > 1 and len(lines) > 1:
        wider = wrap(text, width * stretch, bold, size, measure)
        if len(wider) < len(lines):
            lines, width = wider, width * stretch
    if len(lines) > 1:
        lo, hi = 0.0, max(measure(t, bold, size) for t in lines)
        for _ in range(12):
            mid = (lo + hi) / 2
            if len(wrap(text, mid, bold, size, measure)) <= len(lines):
                hi = mid
            else:
                lo = mid
        lines = wrap(text, hi, bold, size, measure)
    return lines


def _wrapped(paras: tuple[Para, ...], width_em: float, s: float, measure: Measure,
             stretch: float) -> list[tuple[Para, list[str], float]]:
    out = []
    for para in paras:
        size = s * para.scale
        lines = balanced_wrap(para.text, width_em * s, para.bold, size, measure, stretch)
        out.append((para, lines, max((measure(t, para.bold, size) for t in lines), default=0)))
    return out


def _size_boxes(spec: TreeSpec, style: LayoutStyle, measure: Measure) -> dict[int, _Sized]:
    s = style.size
    pad_x, pad_y, gap = 0.6 * s, 0.45 * s, 0.45 * s
    # Questions may widen by half to save a line (a shorter level pitch for the whole tree).
    wrapped = {i: _wrapped(b.body, style.question_em, s, measure, 1.5) if b.kind == "question"
               else _wrapped(b.body, style.outcome_em, s, measure, 1.0)
               for i, b in spec.boxes.items()}

    def badge_radius(box: BoxSpec) -> float:
        return max(0.78 * s, measure(box.number, True, 0.95 * s) / 2 + 0.25 * s)

    # Outcome boxes share one width (a calm row of cards); a question box is as wide as its
    # own wrapped text. Either way a box's size depends only on its own content.
    text_w = {"question": 0.0, "outcome": 0.0}
    own_w = {i: max((w for _, _, w in wrapped[i]), default=0.0) for i in spec.boxes}
    for i, box in spec.boxes.items():
        width = max((w for _, _, w in wrapped[i]), default=0.0)
        if box.kind == "outcome" and box.heading is not None:
            r = badge_radius(box)
            heading = measure(box.heading.text, box.heading.bold, s * box.heading.scale)
            width = max(width, 2 * r + gap + heading - 0.4 * pad_x)  # band word after the badge
        text_w[box.kind] = max(text_w[box.kind], width)
    # Outcome text re-wrapped to the shared width: a line that no longer needs breaking isn't.
    for i, box in spec.boxes.items():
        if box.kind == "outcome":
            wrapped[i] = _wrapped(box.body, text_w["outcome"] / s, s, measure, 1.0)

    sized: dict[int, _Sized] = {}
    for i, box in spec.boxes.items():
        r = badge_radius(box)
        paras = wrapped[i]
        block = sum(len(lines) * p.scale * s * LEADING for p, lines, _ in paras)
        if box.kind == "question":
            point = 0.6 * s
            text_left = point + 0.3 * pad_x + 2 * r + gap
            w = text_left + own_w[i] + pad_x + point
            h = max(2 * r + 2 * 0.4 * s, block + 2 * pad_y)
            badge = (point + 0.3 * pad_x + r, h / 2, r)
            centre = text_left + own_w[i] / 2
            top = (h - block) / 2
            strip = 0.0
        else:
            point = 0.0
            strip = 2 * r + 0.4 * s
            w = 2 * pad_x + text_w["outcome"]
            h = strip + block + 2 * pad_y
            badge = (pad_x * 0.6 + r, strip / 2, r)
            centre = w / 2
            top = strip + pad_y
        lines = [Line(box.number, True, round(0.95 * s, 3), badge[0], badge[1] + CAP * 0.95 * s)]
        if box.heading is not None:
            hs = s * box.heading.scale
            lines.append(Line(box.heading.text, box.heading.bold, hs, badge[0] + r + gap,
                              strip / 2 + CAP * hs, False))
        y = top
        for para, texts, _ in paras:
            size = para.scale * s
            for text in texts:
                lines.append(Line(text, para.bold, size, centre, y + size * LEADING / 2 + CAP * size))
                y += size * LEADING
        sized[i] = _Sized(box.kind, w, h, tuple(lines), badge, strip, point)
    return sized


def _label(paras: tuple[Para, ...], s: float, measure: Measure,
           one_line: bool) -> tuple[float, float, list]:
    """An arrow label: its paragraphs on one line (top-down) or stacked (left-to-right)."""
    pad_x, pad_y = 0.35 * s, 0.1 * s
    if one_line:
        space = measure(" ", False, s)
        widths = [measure(p.text, p.bold, s * p.scale) for p in paras]
        w = sum(widths) + space * (len(paras) - 1) + 2 * pad_x
        size = max(s * p.scale for p in paras)
        h = size * LEADING + 2 * pad_y
        lines, x = [], pad_x
        for para, width in zip(paras, widths):
            lines.append(Line(para.text, para.bold, s * para.scale, x,
                              pad_y + size * LEADING / 2 + CAP * size, False))
            x += width + space
        return w, h, lines
    widths = [measure(p.text, p.bold, s * p.scale) for p in paras]
    h = sum(s * p.scale * LEADING for p in paras) + 2 * pad_y
    lines, y = [], pad_y
    w = max(widths, default=0) + 2 * pad_x
    for para in paras:
        size = s * para.scale
        lines.append(Line(para.text, para.bold, size, w / 2, y + size * LEADING / 2 + CAP * size))
        y += size * LEADING
    return w, h, lines


# --- tidy placement ----------------------------------------------------------------------

# A profile is one side of a subtree's outline: (start, end, edge) pieces along the depth
# axis, sorted and disjoint, where ``edge`` is the outermost breadth coordinate there.
Profile = list[tuple[float, float, float]]


def _combine(a: Profile, b: Profile, outer) -> Profile:
    """The outline of two profiles together: ``outer`` (min or max) wherever both are; a
    sweep over both sorted piece lists."""
    cuts = sorted({t for piece in a for t in piece[:2]} | {t for piece in b for t in piece[:2]})
    out: Profile = []
    i = j = 0
    for t0, t1 in zip(cuts, cuts[1:]):
        while i < len(a) and a[i][1] <= t0:
            i += 1
        while j < len(b) and b[j][1] <= t0:
            j += 1
        edges = []
        if i < len(a) and a[i][0] <= t0:
            edges.append(a[i][2])
        if j < len(b) and b[j][0] <= t0:
            edges.append(b[j][2])
        if not edges:
            continue
        edge = outer(edges)
        if out and out[-1][1] == t0 and out[-1][2] == edge:
            out[-1] = (out[-1][0], t1, edge)
        else:
            out.append((t0, t1, edge))
    return out


def _shifted(profile: Profile, along: float, across: float) -> Profile:
    return [(lo + along, hi + along, e + across) for lo, hi, e in profile]


def _separation(right: Profile, left: Profile, gap: float) -> float:
    """How far the subtree with ``left`` outline must move across to keep ``gap`` from
    everything on the ``right`` outline wherever their depth ranges meet."""
    need = -float("inf")
    i = j = 0
    while i < len(right) and j < len(left):
        lo, hi, edge = right[i]
        lo2, hi2, edge2 = left[j]
        if lo < hi2 and lo2 < hi:
            need = max(need, edge - edge2 + gap)
        if hi <= hi2:
            i += 1
        else:
            j += 1
    return need


def _tidy(spec: TreeSpec, across: Mapping[int, float], along: Mapping[int, float],
          connector: float, gap: float, margin: float) -> tuple[dict[int, float], dict[int, float]]:
    """Breadth centre and depth start of every box, relative to the root.

    Non-layered tidy drawing (van der Ploeg 2014, after Reingold & Tilford 1981 and Walker
    1990): children start one connector length beyond their parent's far side, so a long box
    only pushes aside what lies beside it; outlines are compared along the depth axis."""

    def place(node: int):
        half, size = across[node] / 2, along[node]
        own_left: Profile = [(-margin, size + margin, -half)]
        own_right: Profile = [(-margin, size + margin, half)]
        kids = spec.children.get(node, ())
        if not kids:
            return {node: 0.0}, {node: 0.0}, own_left, own_right
        start = size + connector
        centres: dict[int, float] = {}
        depths: dict[int, float] = {}
        left: Profile = []
        right: Profile = []
        offsets = []
        for child in kids:
            c, d, cl, cr = place(child)
            shift = _separation(right, _shifted(cl, start, 0.0), gap) if right else 0.0
            offsets.append(shift)
            centres.update({k: v + shift for k, v in c.items()})
            depths.update({k: v + start for k, v in d.items()})
            left = _combine(left, _shifted(cl, start, shift), min)
            right = _combine(right, _shifted(cr, start, shift), max)
        mid = (offsets[0] + offsets[-1]) / 2
        centres = {k: v - mid for k, v in centres.items()}
        centres[node], depths[node] = 0.0, 0.0
        # The arrows between the parent and its children: nothing else may come into them.
        reach_lo = min(centres[k] - across[k] / 2 for k in kids)
        reach_hi = max(centres[k] + across[k] / 2 for k in kids)
        zone = (size, start)
        left = _combine(_combine(own_left, [(zone[0], zone[1], reach_lo)], min),
                        _shifted(left, 0.0, -mid), min)
        right = _combine(_combine(own_right, [(zone[0], zone[1], reach_hi)], max),
                         _shifted(right, 0.0, -mid), max)
        return centres, depths, left, right

    centres, depths, _, _ = place(spec.root)
    return centres, depths


def layout_tree(spec: TreeSpec, style: LayoutStyle, measure: Measure = reportlab_measure,
                breadth_stretch: float = 1.0, depth_stretch: float = 1.0) -> TreeLayout:
    """Lay out ``spec``: every box sized to its wrapped text, positions tidy, origin (0, 0).

    ``breadth_stretch`` ≥ 1 spreads the box centres along the breadth axis and
    ``depth_stretch`` ≥ 1 lengthens the arrows between a box and its children, to use spare
    page space without changing any of the tidy properties."""
    if style.direction not in ("down", "right"):
        raise ValueError("direction must be 'down' or 'right'")
    s, down = style.size, style.direction == "down"
    sized = _size_boxes(spec, style, measure)
    labels = {key: _label(paras, s, measure, down) for key, paras in spec.labels.items()}
    parent_of = {c: p for p, kids in spec.children.items() for c in kids}
    across, along = {}, {}
    for i, box in sized.items():
        own = box.w if down else box.h
        if i in parent_of:  # a box's arrow label lies in its breadth, just before it
            lw, lh, _ = labels[(parent_of[i], i)]
            own = max(own, lw if down else lh)
        across[i], along[i] = own, (box.h if down else box.w)
    stem, arrow, label_pad = 0.6 * s, 0.9 * s, 0.2 * s
    label_depth = max(((lh if down else lw) for lw, lh, _ in labels.values()), default=0.0)
    connector = (stem + label_depth + 2 * label_pad + arrow) * depth_stretch
    centres, depths = _tidy(spec, across, along, connector, 1.25 * s, 0.4 * s)
    centres = {k: v * breadth_stretch for k, v in centres.items()}

    boxes: dict[int, PlacedBox] = {}
    for i, box in sized.items():
        if down:
            x, y = centres[i] - box.w / 2, depths[i]
        else:
            x, y = depths[i], centres[i] - box.h / 2
        boxes[i] = PlacedBox(i, box.kind, Rect(x, y, box.w, box.h),
                             tuple(ln.moved(x, y) for ln in box.lines),
                             (box.badge[0] + x, box.badge[1] + y, box.badge[2]),
                             box.strip, box.point)

    arrows = []
    for parent, kids in spec.children.items():
        pb = boxes[parent]
        bus = depths[parent] + along[parent] + stem
        for k, child in enumerate(kids):
            cb = boxes[child]
            lw, lh, llines = labels[(parent, child)]
            if down:
                points = ((pb.rect.cx, pb.rect.bottom), (pb.rect.cx, bus), (cb.rect.cx, bus),
                          (cb.rect.cx, cb.rect.y))
                zone = (bus + cb.rect.y - arrow) / 2
                lx, ly = cb.rect.cx - lw / 2, zone - lh / 2
            else:
                points = ((pb.rect.right, pb.rect.cy), (bus, pb.rect.cy), (bus, cb.rect.cy),
                          (cb.rect.x, cb.rect.cy))
                zone = (bus + cb.rect.x - arrow) / 2
                lx, ly = zone - lw / 2, cb.rect.cy - lh / 2
            arrows.append(PlacedArrow(parent, child, k, points, Rect(lx, ly, lw, lh),
                                      tuple(ln.moved(lx, ly) for ln in llines)))
    rects = [b.rect for b in boxes.values()] + [a.label for a in arrows]
    x0, y0 = min(r.x for r in rects), min(r.y for r in rects)
    layout = TreeLayout(boxes, tuple(arrows), max(r.right for r in rects) - x0,
                        max(r.bottom for r in rects) - y0, style, breadth_stretch, depth_stretch)
    return layout.moved(-x0, -y0)
