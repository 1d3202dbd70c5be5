"""Wording of counts on the chart and in the report: singular for one, plural otherwise.

Invented demo data (tests/_chart_demo.py) — these check our own wording, not a reference.
"""

from __future__ import annotations

import _chart_demo as demo

from core.chart import ChartOptions
from core.chart.content import chart_text
from core.phrases import plural


def test_plural_takes_both_forms() -> None:
    assert plural(1, "outcome box", "outcome boxes") == "1 outcome box"
    assert plural(0, "outcome box", "outcome boxes") == "0 outcome boxes"
    assert plural(2, "box", "boxes") == "2 boxes"
    assert plural(1234, "patient", "patients") == "1,234 patients"


def _panel_lines(model) -> list[str]:
    text = chart_text(model, ChartOptions().checked())
    return [item.text for section in text.sections for item in section.items]


def test_a_one_box_tree_says_one_outcome_box() -> None:
    model = demo.admitted_size(1).model
    assert len(model.leaves) == 1
    size = [line for line in _panel_lines(model) if line.startswith("Size:")]
    assert len(size) == 1 and size[0].startswith(("Size: 1 outcome box ", "Size: 1 outcome box,")), size
    assert "boxe " not in size[0] and "boxe," not in size[0] and "boxes" not in size[0]


def test_a_larger_tree_says_outcome_boxes() -> None:
    model = demo.admitted().model
    size = [line for line in _panel_lines(model) if line.startswith("Size:")]
    assert size[0].startswith(f"Size: {len(model.leaves)} outcome boxes"), size


def test_one_short_fingerprint_everywhere() -> None:
    from core.phrases import short_fingerprint

    model = demo.admitted().model
    assert model.short_fingerprint == model.fingerprint[:12] == short_fingerprint(model.fingerprint)
    provenance = demo.admitted().table.provenance
    assert provenance.short_fingerprint == provenance.sha256[:12]
    footer = chart_text(model, ChartOptions().checked()).footer[0]
    assert footer.startswith(f"Model {model.short_fingerprint}  ·  Data "
                             f"{short_fingerprint(model.extra['data']['sha256'])}  ·")
