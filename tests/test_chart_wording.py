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


def _with_box(model, box: int, counts: tuple[int, int], prediction: str):
    from dataclasses import replace

    nodes = tuple(replace(n, counts=counts, prediction=prediction) if n.id == box else n
                  for n in model.nodes)
    return replace(model, nodes=nodes)


def _box_lines(model, box: int) -> list[str]:
    from core.chart.bands import banding
    from core.chart.content import tree_spec

    spec, bands = tree_spec(model, ChartOptions().checked(), banding(model))
    return [p.text for p in (spec.boxes[box].heading,) + spec.boxes[box].body]


def test_an_answer_fewer_than_half_have_is_treat_as_and_the_key_says_why() -> None:
    """Under costs or a goal a box may answer "yes" though most of its visits had "no": it
    says "Treat as yes" (a decision), never "Expect yes" (a likelihood), on the chart and in
    the rules text, and the key explains it."""
    model = demo.admitted_size(7).model
    leaf = next(n for n in model.leaves if n.prediction == "no")
    n = leaf.n
    changed = _with_box(model, leaf.id, (n - n // 5, n // 5), "yes")  # 20% yes, answer yes
    lines = _box_lines(changed, leaf.id)
    assert "Treat as yes" in lines and "Expect yes" not in lines
    assert changed.expected_outcome(changed.node(leaf.id)).endswith(": treat as yes")
    assert "“Treat as”" in " ".join(_panel_lines(changed))
    assert "“Treat as”" not in " ".join(_panel_lines(model))


def test_a_box_of_the_higher_band_never_says_expect_no() -> None:
    """A box whose rate is in the higher band but below one half expects "no": printing
    "HIGHER" over "Expect no" reads as an error, so such a box says its rate first instead."""
    model = demo.admitted_size(7).model
    leaf = next(n for n in model.leaves if n.prediction == "no")
    n = leaf.n
    yes = int(0.45 * n)
    changed = _with_box(model, leaf.id, (n - yes, yes), "no")
    lines = _box_lines(changed, leaf.id)
    assert lines[0] == "HIGHER" and not any(line.startswith("Expect") for line in lines)
    assert lines[1] == f"{round(100 * yes / n)}% yes"
