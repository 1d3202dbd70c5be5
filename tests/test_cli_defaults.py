"""The command line's defaults are the library's own: a changed default reaches both."""

from __future__ import annotations

from core.chart.options import ORIENTATIONS, PAPER_SIZES, ChartOptions, default_min_text
from core.checking import DEFAULT_OUTER_FOLDS, DEFAULT_RESAMPLES
from core.cli import build_parser
from core.cli.chart import chart_options_from_args


def _sub(name: str):
    parser = build_parser()
    sub = next(a for a in parser._actions if a.dest == "command")
    return sub.choices[name]


def test_chart_command_defaults_are_the_charts() -> None:
    args = build_parser().parse_args(["chart", "model.json", "--out", "chart.pdf"])
    assert chart_options_from_args(args) == ChartOptions().checked()
    chart = _sub("chart")
    actions = {a.dest: a for a in chart._actions}
    assert tuple(actions["paper"].choices) == tuple(PAPER_SIZES)
    assert tuple(actions["orientation"].choices) == ORIENTATIONS
    help_text = chart.format_help()
    assert f"default {default_min_text('a4'):g} on A4/Letter" in help_text
    assert f"{default_min_text('a3'):g} on A3/Tabloid" in help_text
    assert f"(default {ChartOptions().small_cell}; 0 = never)" in " ".join(help_text.split())


def test_report_command_defaults_are_the_reports() -> None:
    args = build_parser().parse_args(["report", "model.json", "data.csv", "--out", "r.pdf"])
    assert args.bootstrap == DEFAULT_RESAMPLES
    assert args.outer_folds == DEFAULT_OUTER_FOLDS
