"""Measuring and wrapping text, and the plain geometry (rectangles, placed lines) of a chart.

Nothing here draws: a ``measure(text, bold, size)`` function gives widths, by default from
reportlab's metrics for the embedded DejaVu fonts (loaded on first use); the app can pass its
own. Coordinates are points, origin top-left, y downwards.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Callable

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


def balanced_wrap(text: str, width: float, bold: bool, size: float, measure: Measure,
                  stretch: float = 1.0) -> list[str]:
    """Wrap within ``width`` (or up to ``stretch`` × it when that saves a line), then narrow
    the lines as far as the line count allows, so they come out of even length."""
    return list(_balanced(text, width, bold, size, measure, stretch))


@lru_cache(maxsize=1 << 14)
def _balanced(text: str, width: float, bold: bool, size: float, measure: Measure,
              stretch: float) -> tuple[str, ...]:
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
    return tuple(lines)



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
        return Line(self.text, self.bold, self.size, self.x + dx, self.baseline + dy, self.centred)
