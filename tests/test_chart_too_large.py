"""A chart too large for its page searches for the largest tree that fits only when asked.

Invented demo data (tests/_chart_demo.py)."""

from __future__ import annotations

import datetime as dt

import pytest

import _chart_demo as demo
import core.chart.fitting as fitting
from core.chart import ChartOptions, ChartTooLarge, plan_chart


def test_the_search_runs_only_when_the_message_or_size_is_asked_for(monkeypatch) -> None:
    calls = []
    real = fitting.smaller_trees

    def counted(model, *most):
        calls.append(model)
        return real(model, *most)

    monkeypatch.setattr(fitting, "smaller_trees", counted)
    big = demo.admitted_size(40).model
    with pytest.raises(ChartTooLarge) as refused:
        plan_chart(big, ChartOptions(printed=dt.date(2026, 1, 2)))
    assert calls == []  # refusing alone searches nothing
    message = str(refused.value)
    assert len(calls) == 1
    assert refused.value.largest_fitting is not None
    assert f"that fits has {refused.value.largest_fitting} outcome boxes" in message
    assert str(refused.value) == message and len(calls) == 1  # searched once, then kept


def test_trying_one_paper_after_another_searches_nothing(monkeypatch) -> None:
    """As the report's chart figure does (A4, then A3): a refusal it never shows costs no search."""
    calls = []
    monkeypatch.setattr(fitting, "smaller_trees", lambda model, *most: calls.append(model) or [])
    big = demo.admitted_size(40).model
    for paper in ("a4", "a3"):
        with pytest.raises(ChartTooLarge):
            plan_chart(big, ChartOptions(paper=paper, printed=dt.date(2026, 1, 2)))
    assert calls == []


def test_sizes_that_fit_take_the_whole_chart_options() -> None:
    """What the shading promises is what the chart then does, with every option set."""
    from core.chart import sizes_that_fit
    from core.chart.fitting import tree_fits

    derivation = demo.admitted()
    chart = ChartOptions(paper="a4", title="Breathless adults in the emergency department: "
                         "who is admitted", subtitle="Invented demo cohort " * 8,
                         hide_counts=True, small_cell=20, band_cuts=(10.0, 30.0),
                         printed=dt.date(2026, 1, 2))
    sizes = sizes_that_fit(derivation, chart)
    for n in sorted({int(v) for v in derivation.path.leaves})[:8]:
        assert (n in sizes) == tree_fits(demo.admitted_size(n).model, chart)
    with pytest.raises(TypeError, match="ChartOptions"):
        sizes_that_fit(derivation, "a4")
