"""One rule for a box's share, its expected outcome in words and its branch labels.

Invented demo data (tests/_chart_demo.py). Wilson (1927) score interval: checked against
core/checking/intervals.py, which tests/test_metrics.py checks against published values.
"""

from __future__ import annotations

import datetime as dt

import pytest

import _chart_demo as demo
from core.chart.bands import box_value
from core.checking.intervals import wilson_interval
from core.model.tree import ANSWERS, Question


def test_a_yes_no_box_shares_the_positive_class() -> None:
    model = demo.admitted().model
    for leaf in model.leaves:
        share = model.box_share(leaf)
        assert (share.k, share.n) == (leaf.counts[1], leaf.n)
        assert (share.low, share.high) == pytest.approx(wilson_interval(leaf.counts[1], leaf.n))
        assert box_value(model, leaf) == pytest.approx(leaf.counts[1] / leaf.n)


def test_a_box_of_several_classes_shares_its_expected_class() -> None:
    model = demo.three_classes().model
    assert len(model.classes) > 2
    for leaf in model.leaves:
        k = leaf.counts[model.classes.index(str(leaf.prediction))]
        assert model.box_share(leaf).k == k
        assert k == max(leaf.counts) or model.extra.get("costs")  # expected = most, at equal costs


def test_a_regression_box_has_no_share() -> None:
    model = demo.length_of_stay().model
    with pytest.raises(ValueError, match="classification"):
        model.box_share(model.leaves[0])


@pytest.mark.parametrize("which", ["admitted", "length_of_stay", "three_classes"])
def test_derived_outcome_text_is_the_shared_phrase_with_counts(which: str) -> None:
    model = getattr(demo, which)().model
    for leaf in model.leaves:
        assert leaf.text.startswith(model.expected_outcome(leaf) + " ("), leaf.text
        # The demo's patients came more than once, so its rows are counted as visits.
        word = "visits" if model.extra["cohort"].get("patients") not in (None, model.n_rows) \
            else "patients"
        assert f"{leaf.n:,} {word}" in leaf.text


def test_which_branch_takes_a_value_not_recorded() -> None:
    above = Question("age", "above", threshold=70, missing_goes="yes", missing_in_derivation=4)
    assert [above.takes_missing(b) for b in (0, 1)] == [True, False]
    levels = Question("sex", "in", yes_levels=("F",), no_levels=("M",), missing_goes="no",
                      missing_in_derivation=1)
    assert [levels.takes_missing(b) for b in (0, 1)] == [False, True]
    # No derivation patient lacked the value (or an older file that did not count them): no
    # branch takes it (issue 10 item 1).
    for count in (0, None):
        unseen = Question("age", "above", threshold=70, missing_goes="yes",
                          missing_in_derivation=count)
        assert [unseen.takes_missing(b) for b in (0, 1)] == [False, False]
        assert not unseen.routes_missing
    asks = Question("age", "missing", missing_goes="yes")
    assert [asks.takes_missing(b) for b in (0, 1)] == [False, False]
    assert ANSWERS == ("YES", "NO")


def test_rules_and_chart_agree_on_branch_labels() -> None:
    """The arrows say YES or NO as the rules do; the question box says which answer a value
    that is not recorded takes, as the rules' "(or not recorded)" does."""
    from core.chart import ChartOptions
    from core.chart.content import NOT_RECORDED, chart_text

    model = demo.admitted().model
    spec = chart_text(model, ChartOptions().checked()).tree
    for leaf in model.leaves:
        for step in model.steps_to(leaf.id):
            assert [p.text for p in spec.labels[(step.box, step.to)]] == [step.answer]
            notes = [p.text for p in spec.boxes[step.box].body[1:]]
            assert (f"{NOT_RECORDED}: {step.answer}" in notes) == step.includes_missing


def test_the_reporttitle_page_prints_risks_and_fingerprints_as_elsewhere() -> None:
    from core.report.performance import risk_text
    from core.report.sections import title_page
    from core.report.style import Styles

    for which in ("admitted", "length_of_stay"):
        model = getattr(demo, which)().model

        class Contents:  # just what the title page reads
            nested, checks, stability, notes = None, [], None, []
            printed_on = dt.date(2026, 1, 2)

        Contents.model = model
        story = title_page(Contents, "Report", Styles())
        words = " ".join(getattr(f, "text", "") for f in story)
        assert f"model fingerprint {model.short_fingerprint} ·" in words
        assert model.fingerprint[:13] not in words
        chosen = model.chosen
        assert (f"Its cross-validated error is {risk_text(chosen['cv_risk'], model.task)} ± "
                f"{risk_text(chosen['cv_se'], model.task)}") in words
