"""``prunella chart`` and ``prunella fit --chart``: the one-page PDF decision chart."""

from __future__ import annotations

import sys
from typing import TYPE_CHECKING

from ..chart.options import FORMS, ORIENTATIONS, PAPER_SIZES, ChartOptions, default_min_text
from ..errors import InputError
from ..messages.message import say
from ..model.tree import TreeModel
from ..option_limits import option_type
from ..safe_files import check_outputs
from .arguments import csv_list

if TYPE_CHECKING:
    from ..sizing.derivation import Derivation

_DEFAULTS = ChartOptions()  # the command line's defaults are the chart's own


def add_paper_options(parser) -> None:
    parser.add_argument("--paper", default=_DEFAULTS.paper, choices=tuple(PAPER_SIZES),
                        help=f"paper size (default {_DEFAULTS.paper})")
    parser.add_argument("--orientation", default=_DEFAULTS.orientation, choices=ORIENTATIONS,
                        help="page orientation (default: chosen for the tree's shape)")
    parser.add_argument("--title", help="chart title (default: the outcome)")
    parser.add_argument("--form", default=_DEFAULTS.form, choices=FORMS,
                        help="tree: boxes and arrows (default); rules: one row per outcome box "
                        "with its route in words, for a tree too large to draw legibly")


def add_fit_chart_options(fit) -> None:
    fit.add_argument("--chart", help="also print the chosen tree as a one-page PDF chart")
    add_paper_options(fit)


def add_parsers(sub) -> None:
    chart = sub.add_parser("chart", help="print a saved model as a one-page PDF decision chart")
    chart.add_argument("model", help="model JSON written by 'prunella fit'")
    chart.add_argument("--out", required=True, help="where to write the PDF")
    add_paper_options(chart)
    chart.add_argument("--subtitle", help="subtitle: the population and outcome definition "
                       "(default: the outcome and the derivation cohort)")
    chart.add_argument("--min-text", type=float, help="smallest text size in points "
                       f"(default {default_min_text('a4'):g} on A4/Letter, "
                       f"{default_min_text('a3'):g} on A3/Tabloid)")
    chart.add_argument("--small-cell", type=option_type("small_cell"),
                       default=_DEFAULTS.small_cell,
                       help="flag outcome boxes resting on fewer patients than N "
                       f"(default {_DEFAULTS.small_cell}; 0 = never)")
    chart.add_argument("--show-file-name", action="store_true",
                       help="print the data file's name on the chart (off by default: a file "
                            "name may identify a patient; the data's fingerprint is always "
                            "printed)")
    chart.add_argument("--hide-counts", action="store_true",
                       help="print rates and intervals without patient counts")
    chart.add_argument("--bands", help="fixed band cut-points, e.g. 10,30 (percent for "
                       "rates, outcome units for means); default: relative to the cohort")
    chart.add_argument("--date", help="date printed on the chart, YYYY-MM-DD (default: today)")


def printed_date(given: str | None):
    """The date a ``--date YYYY-MM-DD`` option names (None when it is not given)."""
    import datetime as dt

    if not given:
        return None
    try:
        return dt.date.fromisoformat(given)
    except ValueError:
        raise InputError(say("cli.chart_date", given=given)) from None


def chart_options_from_args(args):
    """The chart options that ``prunella chart`` / ``fit --chart`` arguments describe."""
    printed = printed_date(getattr(args, "date", None))
    cuts = None
    if getattr(args, "bands", None):
        try:
            cuts = tuple(float(c) for c in csv_list(args.bands))
        except ValueError:
            raise InputError(say("cli.chart_bands")) from None
    return ChartOptions(paper=args.paper, orientation=args.orientation, title=args.title,
                        subtitle=getattr(args, "subtitle", None),
                        min_text=getattr(args, "min_text", None),
                        small_cell=getattr(args, "small_cell", _DEFAULTS.small_cell),
                        hide_counts=getattr(args, "hide_counts", False), band_cuts=cuts,
                        printed=printed, form=getattr(args, "form", _DEFAULTS.form),
                        show_file_name=getattr(args, "show_file_name", False)).checked()


def _chart_note(plan, path: str) -> str:
    what = "rows" if plan.tree is None else "tree"
    return (f"Wrote the chart to {path} ({plan.options.paper_name} "
            f"{'landscape' if plan.landscape else 'portrait'}, {what} text {plan.text_size:g} pt).")


def run_chart(args) -> int:
    from ..chart import write_chart

    check_outputs({"--out": args.out}, [args.model])
    options = chart_options_from_args(args)  # bad options are told before any reading
    model = TreeModel.load(args.model)
    refused = model.stored_check_refused
    if refused:  # the chart prints the banner instead: say why
        print(f"prunella: warning: {refused}", file=sys.stderr)
    plan = write_chart(model, args.out, options)
    print(_chart_note(plan, args.out))
    return 0


def fit_chart(args, derivation: Derivation) -> None:
    from ..chart import ChartTooLarge, sizes_that_fit, write_chart
    from ..chart.fitting import too_large_message

    options = chart_options_from_args(args)
    if len(derivation.model.leaves) <= 1:  # never printed as if it were a decision chart
        raise InputError(say("cli.chart_not_printed", model=args.model,
                             reason=say("chart.one_box",
                                        statement=derivation.model.no_tree_statement)))
    try:
        plan = write_chart(derivation.model, args.chart, options)
    except ChartTooLarge as refused:
        sizes = sizes_that_fit(derivation, options)
        message = too_large_message(len(derivation.model.leaves), max(sizes, default=None), options,
                                    rules=refused.rules_fit)
        raise InputError(say("cli.chart_not_printed", model=args.model, reason=message)) from None
    if not args.quiet:
        print(_chart_note(plan, args.chart), file=sys.stderr)
