"""What goes into the tree layout, and how big each box is: wrapped text, badge, band strip.

A box's size depends only on its own text (and, for outcome boxes, the shared width of all
outcome boxes), measured with the given ``measure`` function; every length is a multiple of
the tree text size, so a layout scales exactly with it.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping

from .text import CAP, LEADING, Line, Measure, balanced_wrap

QUESTION_STRETCH = 1.25  # a question may widen by a quarter to save a line


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
    stacked_labels: bool = False  # top-down: "YES" above "or not recorded", not beside it
    leaves_beside: bool = False  # top-down: a question's one outcome box drawn beside it


# --- box geometry ----------------------------------------------------------------------


@dataclass(frozen=True)
class SizedBox:
    """A box's size and its text, relative to its top-left corner."""

    kind: str
    w: float
    h: float
    lines: tuple[Line, ...]  # relative to the box's top-left
    badge: tuple[float, float, float]
    strip: float
    point: float


def _wrapped(paras: tuple[Para, ...], width_em: float, s: float, measure: Measure,
             stretch: float) -> list[tuple[Para, list[str], float]]:
    out = []
    for para in paras:
        size = s * para.scale
        lines = balanced_wrap(para.text, width_em * s, para.bold, size, measure, stretch)
        out.append((para, lines, max((measure(t, para.bold, size) for t in lines), default=0)))
    return out


def size_boxes(spec: TreeSpec, style: LayoutStyle, measure: Measure) -> dict[int, SizedBox]:
    s = style.size
    pad_x, pad_y, gap = 0.6 * s, 0.45 * s, 0.45 * s
    wrapped = {i: _wrapped(b.body, style.question_em, s, measure, QUESTION_STRETCH)
               if b.kind == "question"
               else _wrapped(b.body, style.outcome_em, s, measure, 1.0)
               for i, b in spec.boxes.items()}

    def badge_radius(box: BoxSpec) -> float:
        return max(0.78 * s, measure(box.number, True, s) / 2 + 0.22 * s)

    # Outcome boxes share one width (a calm row of cards); a question box is as wide as its
    # own wrapped text. Either way a box's size depends only on its own content.
    text_w = {"question": 0.0, "outcome": 0.0}
    own_w = {i: max((w for _, _, w in wrapped[i]), default=0.0) for i in spec.boxes}
    for i, box in spec.boxes.items():
        width = own_w[i]
        if box.kind == "outcome" and box.heading is not None:
            r = badge_radius(box)
            heading = measure(box.heading.text, box.heading.bold, s * box.heading.scale)
            width = max(width, 2 * r + gap + heading - 0.4 * pad_x)  # band word after the badge
        text_w[box.kind] = max(text_w[box.kind], width)
    # Outcome text re-wrapped to the shared width: a line that no longer needs breaking isn't.
    for i, box in spec.boxes.items():
        if box.kind == "outcome":
            wrapped[i] = _wrapped(box.body, text_w["outcome"] / s, s, measure, 1.0)

    sized: dict[int, SizedBox] = {}
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
        # The number is tree text too: never below the tree's size (the legibility floor).
        lines = [Line(box.number, True, s, badge[0], badge[1] + CAP * s)]
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
        sized[i] = SizedBox(box.kind, w, h, tuple(lines), badge, strip, point)
    return sized


def size_label(paras: tuple[Para, ...], s: float, measure: Measure,
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
