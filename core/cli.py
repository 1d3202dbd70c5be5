"""The ``prunella`` subcommands. Bad input prints one sentence with the fix and exits with 2.

The entry point lives in gui/launch.py, which hands subcommands here without importing Qt.
"""

from __future__ import annotations

import argparse
import sys
from dataclasses import replace
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from . import __version__
from .design import DesignSpec
from .errors import Cancelled, InputError
from .messages import distinct_messages, explain
from .model import TreeModel
from .safe_files import write_csv_safely, write_text_atomic
from .table import read_table
from .variables import DataDictionary, infer_dictionary, merge_dictionary

if TYPE_CHECKING:  # scikit-learn loads only when a tree is grown, so bad input is refused fast
    from .derive import Derivation, DerivationRequest

SUBCOMMANDS = ("fit", "score", "check", "report", "chart")
EXIT_BAD_INPUT = 2


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # one sentence, exit 2, like every other bad input
        self.exit(EXIT_BAD_INPUT, f"prunella: {message}; see 'prunella {self.prog.split()[-1]} --help'.\n")


def _csv_list(text: str | None) -> tuple[str, ...]:
    return tuple(part.strip() for part in text.split(",") if part.strip()) if text else ()


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="prunella", description="Cross-validated, cost-complexity-pruned "
                     "decision trees for clinical spreadsheets. Run without a command to open the app.")
    parser.add_argument("--version", action="version", version=f"prunella {__version__}")
    sub = parser.add_subparsers(dest="command", parser_class=_Parser)

    fit = sub.add_parser("fit", help="grow, prune and cross-validate a tree from a spreadsheet")
    fit.add_argument("data", help="CSV, TSV or XLSX file, one row per visit")
    fit.add_argument("--outcome", required=True, help="column to predict")
    fit.add_argument("--sheet", help="XLSX sheet name (default: the first sheet)")
    fit.add_argument("--task", choices=("classification", "regression"),
                     help="default: classification for categories, regression for numbers")
    fit.add_argument("--positive", help="positive class of a two-class outcome (default: yes/1)")
    fit.add_argument("--predictors", help="comma-separated columns to ask about "
                     "(default: every predictor in the data dictionary)")
    fit.add_argument("--exclude", help="comma-separated columns to leave out")
    fit.add_argument("--dictionary", help="data dictionary (JSON or CSV) with roles, kinds, labels, units")
    fit.add_argument("--patient-id", help="patient identifier column: repeat visits stay in one fold")
    fit.add_argument("--site", help="site column: cross-validate by leaving one site out at a time")
    fit.add_argument("--folds", type=int, default=10, help="number of folds (default 10)")
    fit.add_argument("--repeats", type=int, default=1, help="repeat the k-fold split R times")
    fit.add_argument("--loo", action="store_true", help="leave-one-out cross-validation")
    fit.add_argument("--holdout", type=float, help="share of patients set aside before growing, "
                     "to check the tree on (e.g. 0.25)")
    fit.add_argument("--min-leaf", type=int, default=5, help="minimum patients per leaf (default 5)")
    fit.add_argument("--max-depth", type=int, help="maximum depth of the grown tree")
    fit.add_argument("--criterion", help="split criterion: gini or entropy (classification), "
                     "squared_error or friedman_mse (regression)")
    fit.add_argument("--priors", default="observed", help="class priors: observed, equal, or "
                     "comma-separated numbers in class order")
    fit.add_argument("--miss-cost", type=float, help="two classes: missing a positive is X times "
                     "as bad as a needless alarm")
    fit.add_argument("--risk", choices=("cost", "impurity"), default="cost",
                     help="node risk for pruning a classification tree (default cost)")
    fit.add_argument("--size", default="1se", help="tree size: 1se (default), min, or a number of leaves")
    fit.add_argument("--seed", type=int, default=0, help="random seed (default 0)")
    fit.add_argument("--jobs", type=int, default=1, help="parallel folds (default 1; -1 = all cores)")
    fit.add_argument("--model", required=True, help="where to write the model JSON")
    fit.add_argument("--curve", help="write the pruning curve as CSV")
    fit.add_argument("--rules", help="write the tree as plain-text rules")
    fit.add_argument("--quiet", action="store_true", help="print only warnings")
    _add_fit_chart_options(fit)

    score = sub.add_parser("score", help="route rows of a spreadsheet through a saved model")
    score.add_argument("model", help="model JSON written by 'prunella fit'")
    score.add_argument("data", help="CSV, TSV or XLSX file")
    score.add_argument("--sheet", help="XLSX sheet name (default: the first sheet)")
    score.add_argument("--out", required=True, help="where to write the scored CSV")
    _add_checking_parsers(sub)
    _add_chart_parser(sub)
    return parser


def main(argv: list[str] | None = None) -> int:
    """Run a subcommand; returns the exit status."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return EXIT_BAD_INPUT
    try:
        if args.command == "fit":
            return _fit(args)
        if args.command == "score":
            return _score(args)
        if args.command == "check":
            return _check(args)
        if args.command == "report":
            return _report(args)
        if args.command == "chart":
            return _chart(args)
    except InputError as exc:
        print(f"prunella: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except Cancelled as exc:
        print(f"prunella: {exc}", file=sys.stderr)
        return 130
    except KeyboardInterrupt:
        print("prunella: interrupted.", file=sys.stderr)
        return 130
    return 0


def _refuse_overwrite(target: str | None, *sources: str) -> None:
    if target is None:
        return
    for source in sources:
        if Path(source).exists() and Path(target).resolve() == Path(source).resolve():
            raise InputError(f"{target} is an input file; choose another name for the output "
                             "so the input stays unchanged.")


def load_dictionary(table, dictionary_path: str | None) -> tuple[DataDictionary, list[str]]:
    """Inferred dictionary, overridden by the saved one if given."""
    inferred, notes = infer_dictionary(table.frame, table.row_numbers)
    if dictionary_path:
        merged, more = merge_dictionary(inferred, DataDictionary.load(dictionary_path))
        return merged, notes + more
    return inferred, notes


def request_from_args(args, dictionary: DataDictionary) -> DerivationRequest:
    """The derivation request described by ``prunella fit`` options."""
    from .derive import DerivationRequest
    from .grow import TreeSettings
    from .resample import CVSettings

    if args.outcome not in dictionary:
        dictionary.get(args.outcome)  # raises the "no such column" message
    patient = args.patient_id or next((c.name for c in dictionary.by_role("patient_id")), None)
    excluded = set(_csv_list(args.exclude)) | {args.outcome, patient, args.site}
    for name in _csv_list(args.exclude):
        dictionary.get(name)
    if args.predictors:
        predictors = tuple(p for p in _csv_list(args.predictors) if p not in excluded)
    else:
        predictors = tuple(c.name for c in dictionary.by_role("predictor") if c.name not in excluded)
    design = DesignSpec(outcome=args.outcome, predictors=predictors, task=args.task,
                        positive=args.positive, patient_id=patient, site=args.site)
    priors: str | tuple[float, ...] = args.priors
    if priors not in ("observed", "equal"):
        try:
            priors = tuple(float(p) for p in _csv_list(args.priors))
        except ValueError:
            raise InputError("--priors must be observed, equal, or numbers separated by commas "
                             "(one per class).") from None
    tree = TreeSettings(min_leaf=args.min_leaf, max_depth=args.max_depth, criterion=args.criterion,
                        priors=priors, miss_cost=args.miss_cost, risk=args.risk, seed=args.seed)
    plan = "loo" if args.loo else ("site" if args.site else "kfold")
    cv = CVSettings(plan=plan, folds=args.folds, repeats=args.repeats, seed=args.seed)
    size: str | int = args.size
    if size not in ("1se", "min"):
        try:
            size = int(size)
        except ValueError:
            raise InputError("--size must be 1se, min or a number of leaves.") from None
    return DerivationRequest(design=design, tree=tree, cv=cv, holdout=args.holdout, size=size)


def curve_frame(derivation: Derivation) -> pd.DataFrame:
    """The pruning curve as a table: size, α, training risk, CV risk and its SE."""
    path = derivation.path
    return pd.DataFrame({
        "leaves": path.leaves, "alpha": path.alpha, "grid_alpha": path.grid,
        "train_risk": path.train_risk, "cv_risk": path.cv_risk, "cv_se": path.cv_se,
        "is_min": np.arange(len(path.leaves)) == path.min_index,
        "is_1se": np.arange(len(path.leaves)) == path.one_se_index,
    })


def _fit(args) -> int:
    _refuse_overwrite(args.model, args.data)
    _refuse_overwrite(args.curve, args.data)
    _refuse_overwrite(args.rules, args.data)
    _refuse_overwrite(args.chart, args.data)
    table = read_table(args.data, sheet=args.sheet)
    dictionary, notes = load_dictionary(table, args.dictionary)
    shown = _print_notes(list(table.provenance.warnings) + notes)
    request = request_from_args(args, dictionary)
    request = _guarded(args, table, dictionary, request)
    from .derive import derive

    derivation = derive(table, dictionary, request, jobs=args.jobs)
    model = derivation.model
    model.save(args.model)
    if args.curve:
        write_csv_safely(curve_frame(derivation), args.curve)
    if args.rules:
        write_text_atomic(args.rules, model.rules())
    if args.chart:
        _fit_chart(args, derivation)
    _print_notes(list(derivation.notes), shown)
    if not args.quiet:
        print(summary_text(derivation))
    return 0


def _print_notes(notes: list[str], already: list[str] | None = None) -> list[str]:
    """Print each note once on stderr as 'warning:' or 'note:' (core/message_catalogue.py);
    a finding already shown with its rows is not repeated."""
    already = list(already or [])
    fresh = [n for n in distinct_messages(already + notes) if n not in already]
    for note in fresh:
        kind = explain(note)
        prefix = "warning" if kind is not None and kind.severity == "warning" else "note"
        print(f"{prefix}: {note}", file=sys.stderr)
    return already + fresh


def _guarded(args, table, dictionary: DataDictionary, request: DerivationRequest) -> DerivationRequest:
    """Run the identity, leakage, repeat-visit and rare-class guards; print their findings.

    Identity columns are left out unless named in --predictors."""
    from .guards import guard_design

    report = guard_design(table.frame, dictionary, request.design,
                          keep=_csv_list(args.predictors), grouped=request.cv.grouped,
                          seed=args.seed, min_leaf=args.min_leaf)
    for finding in report.findings:
        print(f"{finding.severity}: {finding.message}", file=sys.stderr)
    return replace(request, design=report.design)


def summary_text(derivation: Derivation) -> str:
    """What a fit found: the pruning path with CV beside training risk, and the chosen tree."""
    path, model = derivation.path, derivation.model
    lines = [f"Prunella {__version__}: {model.outcome.display} ({model.task}), {model.n_rows} rows, "
             f"{path.description}.",
             f"Risk: {model.path['risk_measure']}.", "",
             f"{'leaves':>7} {'training':>9} {'cross-validated':>16} {'± SE':>7}"]
    for k in range(len(path.leaves)):
        mark = ""
        if k == path.min_index:
            mark += "  minimum"
        if k == path.one_se_index:
            mark += "  1-SE choice"
        lines.append(f"{path.leaves[k]:>7} {path.train_risk[k]:>9.4f} {path.cv_risk[k]:>16.4f} "
                     f"{path.cv_se[k]:>7.4f}{mark}")
    chosen = model.chosen
    lines += ["", f"Chosen: {chosen['leaves']} leaves ({chosen['rule']}), cross-validated risk "
              f"{chosen['cv_risk']:.4f} ± {chosen['cv_se']:.4f} (training {chosen['train_risk']:.4f}).",
              f"Model fingerprint: {model.fingerprint[:12]}"]
    check = model.extra.get("validation")
    if check:
        lines.append(f"Checked on {check['source']} ({check['n']} visits): {check['summary']}.")
    lines += ["", model.rules(), "Decision support only: it supports and does not replace clinical "
              "judgment. Validate locally before use."]
    return "\n".join(lines)


def _score(args) -> int:
    _refuse_overwrite(args.out, args.data, args.model)
    model = TreeModel.load(args.model)
    table = read_table(args.data, sheet=args.sheet)
    from .scoring import scored_table

    out, notes = scored_table(model, table.frame)
    write_csv_safely(out, args.out)
    for warning in list(table.provenance.warnings) + list(notes):
        print(f"note: {warning}", file=sys.stderr)
    print(f"Scored {len(out)} rows into {args.out}.")
    return 0


# --- checking a tree and the methods report (prunella check / prunella report) ---------------


def _add_checking_parsers(sub) -> None:
    check = sub.add_parser("check", help="check a saved tree on separate patients and print "
                           "the measures with 95%% intervals")
    check.add_argument("model", help="model JSON written by 'prunella fit'")
    check.add_argument("data", help="CSV, TSV or XLSX file of patients the tree never saw")
    check.add_argument("--sheet", help="XLSX sheet name (default: the first sheet)")
    check.add_argument("--source", help="where these patients come from, in words, as the chart "
                       "and report should name them (default: the file name)")
    check.add_argument("--out", help="write every measure as JSON")
    check.add_argument("--checked-model", help="write the model with this check recorded, so the "
                       "chart shows it instead of the 'not yet checked' banner")

    report = sub.add_parser("report", help="write the methods and validation report (PDF)")
    report.add_argument("model", help="model JSON written by 'prunella fit'")
    report.add_argument("data", help="the derivation data the model was fitted on")
    report.add_argument("--sheet", help="XLSX sheet name of DATA")
    report.add_argument("--dictionary", help="data dictionary (JSON or CSV) for labels of columns "
                        "the model does not describe (patient identifier, site, dates)")
    report.add_argument("--external", help="a file of patients from elsewhere to check the tree on")
    report.add_argument("--external-sheet", help="XLSX sheet name of the external file")
    report.add_argument("--external-source", help="where the external patients come from, in words")
    report.add_argument("--bootstrap", type=int, default=200,
                        help="bootstrap resamples for stability (default 200; 0 = none)")
    report.add_argument("--outer-folds", type=int, default=5,
                        help="outer folds of the nested cross-validation (default 5)")
    report.add_argument("--no-nested", action="store_true", help="skip nested cross-validation")
    report.add_argument("--jobs", type=int, default=1, help="parallel work (default 1; -1 = all cores)")
    report.add_argument("--out", required=True, help="where to write the PDF")


def _check(args) -> int:
    import json

    from .validate import check_table, with_validation

    _refuse_overwrite(args.out, args.data, args.model)
    _refuse_overwrite(args.checked_model, args.data, args.model)
    model = TreeModel.load(args.model)
    table = read_table(args.data, sheet=args.sheet)
    result = check_table(model, table, source=args.source)
    print(result.text())
    if args.out:
        write_text_atomic(args.out, json.dumps(result.to_dict(), indent=1, ensure_ascii=False,
                                               allow_nan=False) + "\n")
    if args.checked_model:
        with_validation(model, result).save(args.checked_model)
    return 0


def model_dictionary(table, model: TreeModel, dictionary_path: str | None) -> DataDictionary:
    """The dictionary a report re-derivation uses: inferred, then the given file, then the
    model's own definitions of its outcome and predictors (those made the tree)."""
    dictionary, _ = load_dictionary(table, dictionary_path)
    known = [s for s in (model.outcome,) + model.predictors if s.name in dictionary]
    merged, _ = merge_dictionary(dictionary, DataDictionary(tuple(known)))
    return merged


def _report(args) -> int:
    import datetime as dt

    from .derive import DerivationRequest, choose_model, derive
    from .report import prepare_report, write_report
    from .validate import check_table

    inputs = [args.data, args.model] + ([args.external] if args.external else [])
    _refuse_overwrite(args.out, *inputs)
    if not str(args.out).lower().endswith(".pdf"):
        raise InputError("--out must name a PDF file (ending in .pdf).")
    if args.bootstrap < 0:
        raise InputError("--bootstrap must be 0 (none) or a positive number of resamples.")
    model = TreeModel.load(args.model)
    settings = model.extra.get("settings")
    if not settings:
        raise InputError("The model file holds no derivation settings, so the derivation cannot "
                         "be rerun for the report; fit the model again with Prunella.")
    request = DerivationRequest.from_dict(settings)
    table = read_table(args.data, sheet=args.sheet)
    notes = []
    expected = model.extra.get("data", {}).get("sha256")
    if expected and expected != table.provenance.sha256:
        notes.append(f"The data file's SHA-256 ({table.provenance.sha256[:12]}...) differs from "
                     f"the one the model was fitted on ({expected[:12]}...): this report "
                     "re-derives the tree from the data given, which is not the model's data.")
        print(f"prunella: warning: {notes[-1]}", file=sys.stderr)
    derivation = derive(table, model_dictionary(table, model, args.dictionary), request,
                        jobs=args.jobs)
    rule = model.chosen.get("rule")
    derivation = choose_model(derivation, rule if rule in ("1se", "min") else model.chosen["leaves"])
    if derivation.model.nodes != model.nodes:
        notes.append("The tree re-derived from the data differs from the tree in the model file; "
                     "the report describes the re-derived tree.")
        print(f"prunella: warning: {notes[-1]}", file=sys.stderr)
    external = ()
    if args.external:
        external_table = read_table(args.external, sheet=args.external_sheet)
        external = (check_table(derivation.model, external_table, source=args.external_source),)
    work = []
    if not args.no_nested:
        work.append(f"nested cross-validation ({args.outer_folds} outer folds)")
    if args.bootstrap:
        work.append(f"{args.bootstrap} bootstrap resamples")
    if work:
        print("Running " + " and ".join(work) + "...", file=sys.stderr)
    contents = prepare_report(derivation, external=external, nested=not args.no_nested,
                              outer_folds=args.outer_folds, bootstrap=args.bootstrap,
                              jobs=args.jobs, notes=tuple(notes),
                              printed=dt.date.today().isoformat())
    write_report(contents, args.out)
    print(f"Wrote the methods and validation report to {args.out}.")
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())

# --- the chart (prunella chart, prunella fit --chart) ----------------------------------------


def _add_paper_options(parser) -> None:
    parser.add_argument("--paper", default="a4", choices=("a4", "letter", "a3", "tabloid"),
                        help="paper size (default a4)")
    parser.add_argument("--orientation", default="auto", choices=("auto", "portrait", "landscape"),
                        help="page orientation (default: chosen for the tree's shape)")
    parser.add_argument("--title", help="chart title (default: the outcome)")


def _add_fit_chart_options(fit) -> None:
    fit.add_argument("--chart", help="also print the chosen tree as a one-page PDF chart")
    _add_paper_options(fit)


def _add_chart_parser(sub) -> None:
    chart = sub.add_parser("chart", help="print a saved model as a one-page PDF decision chart")
    chart.add_argument("model", help="model JSON written by 'prunella fit'")
    chart.add_argument("--out", required=True, help="where to write the PDF")
    _add_paper_options(chart)
    chart.add_argument("--subtitle", help="subtitle: the population and outcome definition "
                       "(default: the outcome and the derivation cohort)")
    chart.add_argument("--min-text", type=float, help="smallest text size in points "
                       "(default 9 on A4/Letter, 10.5 on A3/Tabloid)")
    chart.add_argument("--small-cell", type=int, default=10, help="flag outcome boxes resting on "
                       "fewer patients than N (default 10; 0 = never)")
    chart.add_argument("--hide-counts", action="store_true",
                       help="print rates and intervals without patient counts")
    chart.add_argument("--bands", help="absolute risk-band cut-points, e.g. 10,30 (percent for "
                       "rates, outcome units for means); default: relative to the cohort")
    chart.add_argument("--date", help="date printed on the chart, YYYY-MM-DD (default: today)")


def chart_options_from_args(args):
    """The chart options that ``prunella chart`` / ``fit --chart`` arguments describe."""
    import datetime as dt

    from .chart import ChartOptions

    printed = None
    if getattr(args, "date", None):
        try:
            printed = dt.date.fromisoformat(args.date)
        except ValueError:
            raise InputError(f"--date must be a date written YYYY-MM-DD, not {args.date!r}.") from None
    cuts = None
    if getattr(args, "bands", None):
        try:
            cuts = tuple(float(c) for c in _csv_list(args.bands))
        except ValueError:
            raise InputError("--bands must be one or two numbers separated by a comma, "
                             "e.g. 10,30.") from None
    return ChartOptions(paper=args.paper, orientation=args.orientation, title=args.title,
                        subtitle=getattr(args, "subtitle", None),
                        min_text=getattr(args, "min_text", None),
                        small_cell=getattr(args, "small_cell", 10),
                        hide_counts=getattr(args, "hide_counts", False), band_cuts=cuts,
                        printed=printed).checked()


def _chart_note(plan, path: str) -> str:
    return (f"Wrote the chart to {path} ({plan.options.paper_name} "
            f"{'landscape' if plan.landscape else 'portrait'}, tree text {plan.tree.size:g} pt).")


def _chart(args) -> int:
    from .chart import write_chart

    _refuse_overwrite(args.out, args.model)
    options = chart_options_from_args(args)  # bad options are told before any reading
    model = TreeModel.load(args.model)
    plan = write_chart(model, args.out, options)
    print(_chart_note(plan, args.out))
    return 0


def _fit_chart(args, derivation: Derivation) -> None:
    from .chart import ChartTooLarge, sizes_that_fit, write_chart
    from .chart.fitting import too_large_message

    options = chart_options_from_args(args)
    try:
        plan = write_chart(derivation.model, args.chart, options)
    except ChartTooLarge:
        sizes = sizes_that_fit(derivation, options.paper, options.orientation, options.min_text,
                               options=options)
        message = too_large_message(len(derivation.model.leaves), max(sizes, default=None), options)
        raise InputError(f"The model was saved to {args.model}, but no chart was printed. "
                         + message) from None
    if not args.quiet:
        print(_chart_note(plan, args.chart), file=sys.stderr)
