"""What the user can choose about a chart, and the paper it goes on.

Paper sizes in PostScript points (1/72 inch): ISO 216 for A4 and A3 (210 × 297 mm,
297 × 420 mm), ANSI/ASME Y14.1 for US Letter (8.5 × 11 in) and Tabloid (11 × 17 in).
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass, replace

from ..errors import InputError
from ..messages.message import say

_MM = 72 / 25.4

PAPER_SIZES: dict[str, tuple[float, float]] = {  # portrait width, height in points
    "a4": (round(210 * _MM, 2), round(297 * _MM, 2)),
    "letter": (612.0, 792.0),
    "a3": (round(297 * _MM, 2), round(420 * _MM, 2)),
    "tabloid": (792.0, 1224.0),
}
PAPER_NAMES = {"a4": "A4", "letter": "US Letter", "a3": "A3", "tabloid": "Tabloid"}
LARGER_PAPER = {"a4": "a3", "letter": "tabloid"}
_BASE_PAPER = {"a4": "a4", "letter": "letter", "a3": "a4", "tabloid": "letter"}

BASE_MIN_TEXT = 9.0  # points, on A4 and Letter: the legibility floor at arm's length
ORIENTATIONS = ("auto", "portrait", "landscape")
DIRECTIONS = ("auto", "down", "right")
FORMS = ("tree", "rules")  # the tree drawn as boxes and arrows, or as numbered rows
# Outcome boxes resting on fewer patients are flagged on the chart and in the report
# (common practice: 5 or 10).
SMALL_GROUP = 10


LARGE_PAPER_SCALE = 7 / 6


def default_min_text(paper: str) -> float:
    """The smallest text size for ``paper``: 9 pt on A4/Letter, 10.5 pt (7/6 of that) on
    A3/Tabloid. A bigger chart is read from a little further away, so its floor rises; but it
    rises much less than the sheet (each side √2 ≈ 1.41 × its half-size sheet), or a larger
    sheet would hold no larger tree and suggesting one would be empty advice."""
    paper = check_paper(paper)
    return round(BASE_MIN_TEXT * (1.0 if _BASE_PAPER[paper] == paper else LARGE_PAPER_SCALE), 2)


def margin_for(paper: str) -> float:
    """Page margin in points: 10 mm, 12 mm on the larger sheets: wider than any office
    printer's unprintable edge (about 5 mm, common practice)."""
    return (12 if check_paper(paper) in ("a3", "tabloid") else 10) * _MM


def check_paper(paper: str) -> str:
    key = str(paper).strip().lower().replace(" ", "").replace("us", "", 1) if paper else ""
    if key not in PAPER_SIZES:
        raise InputError(say("chart.paper", paper=paper))
    return key


@dataclass(frozen=True)
class ChartOptions:
    """Everything a user may set about a chart. ``None`` means the sensible default."""

    paper: str = "a4"
    orientation: str = "auto"  # auto | portrait | landscape
    direction: str = "auto"  # auto (top-down: see core/chart/arrange.py) | down | right
    title: str | None = None
    subtitle: str | None = None
    min_text: float | None = None  # points; default from the paper
    small_cell: int = SMALL_GROUP  # outcome boxes resting on fewer patients are flagged
    hide_counts: bool = False  # print rates and intervals without patient counts
    band_cuts: tuple[float, ...] | None = None  # absolute cut-points (percent, or outcome units)
    band_ratio: float = 1.25  # relative bands: HIGHER at ≥ ratio × the cohort's rate
    printed: dt.date | None = None  # the date printed on the chart (default: today)
    form: str = "tree"  # tree | rules: each outcome box as a row with its route in words
    # A file's name may hold a patient's name, a date of birth or a record number: the chart
    # on the wall prints the data's fingerprint, and the name only when asked.
    show_file_name: bool = False

    def checked(self) -> "ChartOptions":
        """The options with defaults filled in, or one clear InputError."""
        paper = check_paper(self.paper)
        if self.orientation not in ORIENTATIONS:
            raise InputError(say("chart.orientation", given=self.orientation,
                                 choices=", ".join(ORIENTATIONS)))
        if self.direction not in DIRECTIONS:
            raise InputError(say("chart.direction", given=self.direction,
                                 choices=", ".join(DIRECTIONS)))
        if self.form not in FORMS:
            raise InputError(say("chart.form", given=self.form, choices=", ".join(FORMS)))
        floor = default_min_text(paper)
        min_text = floor if self.min_text is None else float(self.min_text)
        if not 6 <= min_text <= 40:
            raise InputError(say("chart.min_text", given=f"{min_text:g}", default=f"{floor:g}",
                                 paper=PAPER_NAMES[paper]))
        if self.small_cell < 0:
            raise InputError(say("chart.small_cell"))
        if not self.band_ratio > 1:
            raise InputError(say("chart.band_ratio"))
        cuts = self.band_cuts
        if cuts is not None:
            cuts = tuple(float(c) for c in cuts)
            if not 1 <= len(cuts) <= 2 or list(cuts) != sorted(set(cuts)) or not all(
                    math.isfinite(c) for c in cuts):
                raise InputError(say("chart.band_cuts"))
        printed = self.printed or dt.date.today()
        return replace(self, paper=paper, min_text=min_text, band_cuts=cuts, printed=printed)

    @property
    def paper_name(self) -> str:
        return PAPER_NAMES[check_paper(self.paper)]


def page_size(paper: str, landscape: bool) -> tuple[float, float]:
    """Width and height in points of ``paper`` in the given orientation."""
    w, h = PAPER_SIZES[check_paper(paper)]
    return (h, w) if landscape else (w, h)
