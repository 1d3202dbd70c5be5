"""The chart's colours (and the pruning curve's), fonts and type scale; WCAG 2.1 contrast
arithmetic.

Colours come from the Okabe–Ito colour-blind-safe palette. Colour never carries meaning alone:
every risk band also has a printed word and its own border weight, and the band fills are
spaced in lightness so that a grey-scale copy still orders them. Text colours are checked
against their fills with the WCAG 2.1 contrast ratio (success criterion 1.4.3, level AA).

Fonts: DejaVu Sans and DejaVu Sans Bold, the Unicode fonts matplotlib ships in
``mpl-data/fonts/ttf``, so ≤, ≥, °, ₂ and accented letters print without a font file of ours.
"""

from __future__ import annotations

import importlib.util
import os
from dataclasses import dataclass

# Okabe & Ito (2008), Color Universal Design.
OKABE_ITO: dict[str, str] = {
    "orange": "#E69F00",
    "sky blue": "#56B4E9",
    "bluish green": "#009E73",
    "yellow": "#F0E442",
    "blue": "#0072B2",
    "vermillion": "#D55E00",
    "reddish purple": "#CC79A7",
    "black": "#000000",
}

WHITE = "#FFFFFF"
INK = "#1A1A1A"  # body text: near-black reads calmer than pure black on white
SOFT_INK = "#4D4D4D"  # secondary text on white (still far above 4.5:1)
RULE = "#808080"  # thin lines that carry no text
DECISION_EDGE = OKABE_ITO["blue"]
BADGE_FILL = OKABE_ITO["blue"]
ARROW = "#333333"
CAUTION_FILL = "#FCF8D8"  # pale tint of Okabe–Ito yellow
CAUTION_EDGE = "#8A7A00"
UNCHECKED_FILL = "#FBE3D3"  # pale tint of vermillion
UNCHECKED_EDGE = OKABE_ITO["vermillion"]
CHECKED_FILL = "#DDF2EB"  # pale tint of bluish green
CHECKED_EDGE = OKABE_ITO["bluish green"]

# The pruning curve, one look wherever it is drawn: the app's size step (gui/widgets/curve.py)
# and the report (core/report/figures.py). Each series also has its own marker and line.
CURVE = {
    "cross-validated": OKABE_ITO["blue"],  # error ± 1 SE, circles on a solid line
    "training": OKABE_ITO["vermillion"],  # squares on a dashed line
    "limit": "#555555",  # the lowest error + 1 SE, dotted
    "chosen": OKABE_ITO["black"],  # the size chosen
    "fits": OKABE_ITO["bluish green"],  # the sizes that fit the paper (the app's shading)
}

REGULAR_FONT = "DejaVuSans"
BOLD_FONT = "DejaVuSans-Bold"


def mix(colour: str, share: float, base: str = WHITE) -> str:
    """``share`` of ``colour`` mixed into ``base`` (both #RRGGBB), in sRGB as printers do."""
    a, b = _rgb(colour), _rgb(base)
    mixed = [round(share * x + (1 - share) * y) for x, y in zip(a, b)]
    return "#" + "".join(f"{v:02X}" for v in mixed)


def _rgb(colour: str) -> tuple[int, int, int]:
    text = colour.lstrip("#")
    if len(text) != 6:
        raise ValueError(f"colours are #RRGGBB, not {colour!r}")
    return int(text[0:2], 16), int(text[2:4], 16), int(text[4:6], 16)


def relative_luminance(colour: str) -> float:
    """WCAG 2.1 relative luminance of an sRGB colour (0 = black, 1 = white)."""
    def linear(channel: int) -> float:
        c = channel / 255
        return c / 12.92 if c <= 0.03928 else ((c + 0.055) / 1.055) ** 2.4
    r, g, b = (linear(v) for v in _rgb(colour))
    return 0.2126 * r + 0.7152 * g + 0.0722 * b


def contrast_ratio(first: str, second: str) -> float:
    """WCAG 2.1 contrast ratio (L1 + 0.05) / (L2 + 0.05), lighter over darker: 1 to 21."""
    a, b = relative_luminance(first), relative_luminance(second)
    hi, lo = max(a, b), min(a, b)
    return (hi + 0.05) / (lo + 0.05)


def ink_for(fill: str) -> str:
    """Text colour for ``fill``: near-black when it contrasts well (≥ 7:1, WCAG AAA), else
    whichever of black and white contrasts more."""
    if contrast_ratio(INK, fill) >= 7:
        return INK
    black = OKABE_ITO["black"]
    return black if contrast_ratio(black, fill) >= contrast_ratio(WHITE, fill) else WHITE


@dataclass(frozen=True)
class BandStyle:
    """How one risk band looks: a strip with the word, a tinted body, a border weight."""

    strip: str  # fill behind the band word
    body: str  # fill behind the outcome text
    edge: str  # border colour
    edge_width: float  # border weight in points: heavier for higher bands (reads in grey)

    @property
    def strip_ink(self) -> str:
        return ink_for(self.strip)

    @property
    def body_ink(self) -> str:
        return ink_for(self.body)


# Ordered bands, lightest to darkest, so grey-scale copies keep the order.
_BAND_BASE = (
    BandStyle(strip=mix(OKABE_ITO["sky blue"], 0.45), body=mix(OKABE_ITO["sky blue"], 0.10),
              edge=OKABE_ITO["blue"], edge_width=0.8),
    BandStyle(strip=OKABE_ITO["orange"], body=mix(OKABE_ITO["orange"], 0.12),
              edge="#9A6A00", edge_width=1.4),
    BandStyle(strip=OKABE_ITO["vermillion"], body=mix(OKABE_ITO["vermillion"], 0.12),
              edge="#8F3F00", edge_width=2.6),
)

# Several classes: one palette colour per class (the word, the class name, carries meaning).
_CLASS_COLOURS = ("sky blue", "orange", "bluish green", "reddish purple", "yellow", "blue",
                  "vermillion")


def band_style(position: int, count: int) -> BandStyle:
    """Style of band ``position`` of ``count`` ordered bands (low to high)."""
    if count <= 1:
        return _BAND_BASE[1]
    if count == 2:
        return _BAND_BASE[0] if position == 0 else _BAND_BASE[2]
    if count == 3:
        return _BAND_BASE[position]
    raise ValueError("ordered bands come in two or three")


def class_style(position: int) -> BandStyle:
    """Style of the band of one class of a several-class outcome."""
    colour = OKABE_ITO[_CLASS_COLOURS[position % len(_CLASS_COLOURS)]]
    return BandStyle(strip=colour, body=mix(colour, 0.12), edge=RULE, edge_width=1.2)


# --- fonts -------------------------------------------------------------------------------


def font_directory() -> str:
    """matplotlib's bundled TrueType folder (DejaVu fonts), found without importing
    matplotlib (which takes a second)."""
    spec = importlib.util.find_spec("matplotlib")
    if spec is None or not spec.submodule_search_locations:
        raise RuntimeError("matplotlib is not installed; Prunella prints with its DejaVu fonts")
    return os.path.join(list(spec.submodule_search_locations)[0], "mpl-data", "fonts", "ttf")


_REGISTERED: list[bool] = []


def register_fonts() -> tuple[str, str]:
    """Register DejaVu Sans (regular, bold) with reportlab once; return their names."""
    if _REGISTERED:
        return REGULAR_FONT, BOLD_FONT
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    registered = pdfmetrics.getRegisteredFontNames()
    for name, file in ((REGULAR_FONT, "DejaVuSans.ttf"), (BOLD_FONT, "DejaVuSans-Bold.ttf")):
        if name not in registered:
            path = os.path.join(font_directory(), file)
            if not os.path.exists(path):
                raise RuntimeError(f"matplotlib's font {file} is missing at {path}; reinstall "
                                   "matplotlib")
            pdfmetrics.registerFont(TTFont(name, path))
    _REGISTERED.append(True)
    return REGULAR_FONT, BOLD_FONT


def font_name(bold: bool) -> str:
    return BOLD_FONT if bold else REGULAR_FONT


# --- type scale --------------------------------------------------------------------------


@dataclass(frozen=True)
class TypeScale:
    """Text sizes in points for one chart; every size is at least ``body``."""

    body: float  # the legibility floor: side panel, footer, smallest tree text

    @property
    def title(self) -> float:
        return round(self.body * 1.7, 2)

    @property
    def subtitle(self) -> float:
        return self.body

    @property
    def heading(self) -> float:
        return round(self.body * 1.1, 2)

