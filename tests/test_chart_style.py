"""Colours, contrast, fonts and paper of the chart, against their published definitions."""

from __future__ import annotations

import os

import pytest

from core.chart.options import PAPER_SIZES, ChartOptions, default_min_text, page_size
from core.chart.style import (
    BADGE_FILL, CAUTION_FILL, CHECKED_FILL, INK, OKABE_ITO, SOFT_INK, UNCHECKED_FILL, WHITE,
    band_style, class_style, contrast_ratio, font_directory, ink_for, mix, register_fonts,
    relative_luminance,
)
from core.errors import InputError


def test_palette_is_okabe_ito() -> None:
    """Okabe & Ito (2008), Color Universal Design (from memory, as docs/references.md lists it)."""
    assert sorted(OKABE_ITO.values()) == sorted(
        ["#E69F00", "#56B4E9", "#009E73", "#F0E442", "#0072B2", "#D55E00", "#CC79A7", "#000000"])


def test_relative_luminance_and_contrast_follow_wcag_21() -> None:
    """W3C WCAG 2.1, definitions of relative luminance and contrast ratio: black 0, white 1,
    black on white 21:1; sRGB channels below 0.03928 are linear (÷ 12.92) (from memory)."""
    assert relative_luminance("#000000") == 0.0
    assert relative_luminance("#FFFFFF") == pytest.approx(1.0)
    assert contrast_ratio("#000000", "#FFFFFF") == pytest.approx(21.0)
    assert contrast_ratio("#FFFFFF", "#000000") == contrast_ratio("#000000", "#FFFFFF")
    assert contrast_ratio("#123456", "#123456") == pytest.approx(1.0)
    # Pure primaries, from the formula's coefficients 0.2126, 0.7152, 0.0722 (WCAG 2.1,
    # from memory).
    assert relative_luminance("#FF0000") == pytest.approx(0.2126)
    assert relative_luminance("#00FF00") == pytest.approx(0.7152)
    assert relative_luminance("#0000FF") == pytest.approx(0.0722)
    # A channel of 10/255 ≈ 0.0392 is on the linear part: (10/255)/12.92.
    assert relative_luminance("#0A0A0A") == pytest.approx(10 / 255 / 12.92)
    # Grey #767676 is the lightest grey that still passes 4.5:1 on white; #777777 just fails
    # (from memory; common practice among accessibility checkers).
    assert contrast_ratio("#767676", WHITE) >= 4.5 > contrast_ratio("#777777", WHITE)


def test_every_fixed_text_pair_meets_aa() -> None:
    """WCAG 2.1 SC 1.4.3 (AA): text at least 4.5:1 against its background."""
    pairs = [(INK, WHITE), (SOFT_INK, WHITE), (WHITE, BADGE_FILL), (INK, CAUTION_FILL),
             (INK, UNCHECKED_FILL), (INK, CHECKED_FILL)]
    for count in (2, 3):
        for k in range(count):
            band = band_style(k, count)
            pairs += [(band.strip_ink, band.strip), (band.body_ink, band.body)]
    for k in range(8):
        band = class_style(k)
        pairs += [(band.strip_ink, band.strip), (band.body_ink, band.body)]
    for ink, fill in pairs:
        assert contrast_ratio(ink, fill) >= 4.5, (ink, fill)


def test_bands_read_in_grey_scale() -> None:
    """Colour is never the only carrier: bands grow darker and their borders heavier from low
    to high, so a grey-scale copy keeps the order (besides the printed word)."""
    bands = [band_style(k, 3) for k in range(3)]
    grey = [relative_luminance(b.strip) for b in bands]
    assert grey[0] > grey[1] > grey[2]
    for lighter, darker in zip(bands, bands[1:]):
        assert contrast_ratio(lighter.strip, darker.strip) >= 1.5
        assert darker.edge_width > lighter.edge_width
    assert band_style(0, 2).strip == bands[0].strip and band_style(1, 2).strip == bands[2].strip


def test_mixing_and_ink_choice() -> None:
    assert mix("#000000", 0.5) == "#808080"
    assert mix("#D55E00", 1.0) == "#D55E00" and mix("#D55E00", 0.0) == WHITE
    assert ink_for("#FFFFFF") == INK and ink_for("#0072B2") == WHITE
    assert contrast_ratio(ink_for("#D55E00"), "#D55E00") >= 4.5


def test_fonts_are_matplotlibs_dejavu() -> None:
    folder = font_directory()
    assert os.path.exists(os.path.join(folder, "DejaVuSans.ttf"))
    assert os.path.exists(os.path.join(folder, "DejaVuSans-Bold.ttf"))
    assert register_fonts() == ("DejaVuSans", "DejaVuSans-Bold")
    from reportlab.pdfbase import pdfmetrics

    font = pdfmetrics.getFont("DejaVuSans")
    for char in "≤≥°₂é–":  # the glyphs a clinical chart needs
        assert ord(char) in font.face.charToGlyph


def test_paper_sizes_are_the_standard_ones() -> None:
    """ISO 216 (A4 210 × 297 mm, A3 297 × 420 mm) and ANSI/ASME Y14.1 (Letter 8.5 × 11 in,
    Tabloid 11 × 17 in), in points of 1/72 in."""
    mm = 72 / 25.4
    assert PAPER_SIZES["a4"] == pytest.approx((210 * mm, 297 * mm), abs=0.005)
    assert PAPER_SIZES["a3"] == pytest.approx((297 * mm, 420 * mm), abs=0.005)
    assert PAPER_SIZES["letter"] == (8.5 * 72, 11 * 72)
    assert PAPER_SIZES["tabloid"] == (11 * 72, 17 * 72)
    assert page_size("a4", True) == (PAPER_SIZES["a4"][1], PAPER_SIZES["a4"][0])


def test_minimum_text_rises_with_the_paper() -> None:
    assert default_min_text("a4") == default_min_text("letter") == 9.0
    assert default_min_text("a3") == default_min_text("tabloid") == 10.5
    assert ChartOptions(paper="A3").checked().min_text == 10.5
    assert ChartOptions(min_text=12).checked().min_text == 12


@pytest.mark.parametrize("changes", [
    {"paper": "b5"}, {"orientation": "sideways"}, {"direction": "up"}, {"min_text": 4},
    {"small_cell": -1}, {"band_ratio": 1.0}, {"band_cuts": (30, 10)}, {"band_cuts": (1, 2, 3)},
])
def test_bad_options_are_refused_with_a_message(changes) -> None:
    with pytest.raises(InputError) as refused:
        ChartOptions(**changes).checked()
    assert str(refused.value).endswith(".")
