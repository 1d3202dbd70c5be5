"""What goes into the tree layout, and how big each box is: wrapped text, badge, band strip.

A box's size depends only on its own text (and, for outcome boxes, the width they share: all
of them, or two under one question), measured with the given ``measure`` function, and for a
question on the width the layout gives it; every length is a multiple of the tree text size,
so a layout scales exactly with it.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Mapping

from .text import CAP, LEADING, Line, Measure, balanced_wrap

QUESTION_STRETCH = 1.25  # a question may widen by a quarter to save a line


@dataclass(frozen=True)
class Para:
    """A paragraph of box text; ``scale`` multiplies the tree text size. A paragraph that
    must read as one piece ("74% of 241", "CI 68–79%") is never broken (``keep``)."""

    text: str
    bold: bool = False
    scale: float = 1.0
    keep: bool = False


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
    # Top-down, a question over children spread wide may take their width ("widened"), and
    # then runs its note on the same line when that fits; with "one line" every question
    # does so wherever its text fits WIDEST_QUESTION_EM; "wrapped" keeps every question at
    # question_em.
    questions: str = "widened"
    # Outcome boxes all as wide as the widest ("shared": a calm row of cards), or each as
    # wide as its own text, two side by side under one question as wide as the wider ("own").
    outcome_widths: str = "shared"


# --- box geometry ----------------------------------------------------------------------


def badge_radius(box: BoxSpec, s: float, measure: Measure) -> float:
    """The radius of the circle holding a box's number."""
    return max(0.78 * s, measure(box.number, True, s) / 2 + 0.22 * s)


def question_frame(box: BoxSpec, s: float, measure: Measure) -> float:
    """How much wider a question box is than its text: its pointed ends, padding and badge."""
    pad_x, gap, point = 0.6 * s, 0.45 * s, 0.6 * s
    return 2 * point + 1.3 * pad_x + 2 * badge_radius(box, s, measure) + gap


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
        lines = [para.text] if para.keep else balanced_wrap(para.text, width_em * s, para.bold,
                                                             size, measure, stretch)
        out.append((para, lines, max((measure(t, para.bold, size) for t in lines), default=0)))
    return out


WIDEST_QUESTION_EM = 26.0  # a question on one line still reads as one phrase


def size_boxes(spec: TreeSpec, style: LayoutStyle, measure: Measure,
               wider: Mapping[int, float] | None = None) -> dict[int, SizedBox]:
    """Every box's size and text. A question wraps at the style's width, or at its own
    (in units of the text size) where ``wider`` gives one; a question given its own width
    runs its paragraphs on one line when they fit it ("Age above 68 years?  If not
    recorded: NO"), and with the style's "one line" questions every question does where
    they fit WIDEST_QUESTION_EM."""
    s = style.size
    wider = wider or {}
    everywhere = style.questions == "one line" and style.direction == "down"

    def one_line_em(i: int) -> float:
        return WIDEST_QUESTION_EM if everywhere else wider.get(i, 0.0)

    widths = {i: _outcome_width(b, style.outcome_em, s, measure)
              for i, b in spec.boxes.items() if b.kind == "outcome"}
    if style.outcome_widths == "shared":
        widths = dict.fromkeys(widths, max(widths.values(), default=0.0))
    else:
        for kids in spec.children.values():
            pair = [k for k in kids if k in widths]
            if len(pair) > 1:
                widths.update(dict.fromkeys(pair, max(widths[k] for k in pair)))
    return {i: _question_box(b, wider.get(i, style.question_em), one_line_em(i), s, measure)
            if b.kind == "question" else _outcome_box(b, widths[i], s, measure)
            for i, b in spec.boxes.items()}


# The same boxes are sized again and again while a page is planned (every layout tried,
# every stretch): a box's size is a function of its content and these numbers alone.


@lru_cache(maxsize=1 << 14)
def _outcome_width(box: BoxSpec, wrap_em: float, s: float, measure: Measure) -> float:
    """The text width an outcome box needs with its text wrapped at ``wrap_em``, its band
    word after its badge."""
    width = max((w for _, _, w in _wrapped(box.body, wrap_em, s, measure, 1.0)), default=0.0)
    if box.heading is not None:
        heading = measure(box.heading.text, box.heading.bold, s * box.heading.scale)
        width = max(width, 2 * badge_radius(box, s, measure) + 0.45 * s + heading - 0.24 * s)
    return width


@lru_cache(maxsize=1 << 14)
def _outcome_box(box: BoxSpec, text_w: float, s: float, measure: Measure) -> SizedBox:
    pad_x, pad_y, gap = 0.6 * s, 0.45 * s, 0.45 * s
    r = badge_radius(box, s, measure)
    # The text re-wrapped to the shared width: a line that no longer needs breaking isn't.
    paras = _wrapped(box.body, text_w / s, s, measure, 1.0)
    block = sum(len(lines) * p.scale * s * LEADING for p, lines, _ in paras)
    strip = 2 * r + 0.4 * s
    w, h = 2 * pad_x + text_w, strip + block + 2 * pad_y
    badge = (pad_x * 0.6 + r, strip / 2, r)
    lines = [Line(box.number, True, s, badge[0], badge[1] + CAP * s)]
    if box.heading is not None:
        hs = s * box.heading.scale
        lines.append(Line(box.heading.text, box.heading.bold, hs, badge[0] + r + gap,
                          strip / 2 + CAP * hs, False))
    lines += _stacked(paras, w / 2, strip + pad_y, s)
    return SizedBox(box.kind, w, h, tuple(lines), badge, strip, 0.0)


@lru_cache(maxsize=1 << 14)
def _question_box(box: BoxSpec, wrap_em: float, one_line_em: float, s: float,
                  measure: Measure) -> SizedBox:
    pad_x, pad_y, gap, point = 0.6 * s, 0.45 * s, 0.45 * s, 0.6 * s
    r = badge_radius(box, s, measure)
    text_left = point + 0.3 * pad_x + 2 * r + gap
    space = 0.6 * s  # between paragraphs run on one line
    widths = [measure(p.text, p.bold, s * p.scale) for p in box.body]
    one_line = len(box.body) > 1 and (
        sum(widths) + space * (len(widths) - 1) <= one_line_em * s + 1e-9)
    if one_line:
        text_w = sum(widths) + space * (len(widths) - 1)
        block = max(p.scale for p in box.body) * s * LEADING
    else:
        paras = _wrapped(box.body, wrap_em, s, measure, QUESTION_STRETCH)
        text_w = max((w for _, _, w in paras), default=0.0)
        block = sum(len(lines) * p.scale * s * LEADING for p, lines, _ in paras)
    w = text_w + question_frame(box, s, measure)
    h = max(2 * r + 2 * 0.4 * s, block + 2 * pad_y)
    badge = (point + 0.3 * pad_x + r, h / 2, r)
    # The number is tree text too: never below the tree's size (the legibility floor).
    lines = [Line(box.number, True, s, badge[0], badge[1] + CAP * s)]
    top = (h - block) / 2
    if one_line:
        x, size = text_left, max(p.scale for p in box.body) * s
        for para, width in zip(box.body, widths):
            lines.append(Line(para.text, para.bold, s * para.scale, x,
                              top + size * LEADING / 2 + CAP * size, False))
            x += width + space
    else:
        lines += _stacked(paras, text_left + text_w / 2, top, s)
    return SizedBox(box.kind, w, h, tuple(lines), badge, 0.0, point)


def _stacked(paras, centre: float, top: float, s: float) -> list[Line]:
    """Wrapped paragraphs one line under another, each line centred on ``centre``."""
    lines, y = [], top
    for para, texts, _ in paras:
        size = para.scale * s
        for text in texts:
            lines.append(Line(text, para.bold, size, centre, y + size * LEADING / 2 + CAP * size))
            y += size * LEADING
    return lines


@lru_cache(maxsize=1 << 12)
def size_label(paras: tuple[Para, ...], s: float, measure: Measure,
               one_line: bool) -> tuple[float, float, tuple[Line, ...]]:
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
        return w, h, tuple(lines)
    widths = [measure(p.text, p.bold, s * p.scale) for p in paras]
    h = sum(s * p.scale * LEADING for p in paras) + 2 * pad_y
    lines, y = [], pad_y
    w = max(widths, default=0) + 2 * pad_x
    for para in paras:
        size = s * para.scale
        lines.append(Line(para.text, para.bold, size, w / 2, y + size * LEADING / 2 + CAP * size))
        y += size * LEADING
    return w, h, tuple(lines)
