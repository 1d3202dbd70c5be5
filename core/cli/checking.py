"""``prunella check`` and ``prunella report``: a saved tree checked on separate patients, and
the methods and validation report."""

from __future__ import annotations

import sys

from ..checking.nested import DEFAULT_OUTER_FOLDS
from ..checking.stability import DEFAULT_RESAMPLES
from ..data.table import read_table
from ..dictionary.columns import DataDictionary
from ..dictionary.for_table import dictionary_for, merge_dictionary
from ..errors import InputError
from ..messages.message import say
from ..model.tree import TreeModel
from ..option_limits import option_type
from ..phrases import short_fingerprint
from ..safe_files import check_outputs, write_text_atomic
from .arguments import add_work_options, dictionary_path, work_place


def add_parsers(sub) -> None:
    check = sub.add_parser("check", help="check a saved tree on separate patients and print "
                           "the measures with 95%% intervals")
    check.add_argument("model", help="model JSON written by 'prunella fit'")
    check.add_argument("data", help="CSV, TSV or XLSX file of patients the tree never saw")
    check.add_argument("--sheet", help="XLSX sheet name (default: the first sheet)")
    check.add_argument("--source", help="where these patients come from, in words, as the chart "
                       "and report should name them (default: the file name)")
    check.add_argument("--leave-out-overlap", action="store_true", help="leave out the rows "
                       "of patients who were among the derivation patients (found by the "
                       "model's digests of the patient identifiers), so the check is on "
                       "separate patients")
    check.add_argument("--out", help="write every measure as JSON")
    check.add_argument("--checked-model", help="write the model with this check recorded, so the "
                       "chart shows it instead of the 'not yet checked' banner")

    report = sub.add_parser("report", help="write the methods and validation report (PDF)")
    report.add_argument("model", help="model JSON written by 'prunella fit'")
    report.add_argument("data", help="the derivation data the model was fitted on")
    report.add_argument("--sheet", help="XLSX sheet name of DATA")
    report.add_argument("--dictionary", help="data dictionary (JSON or CSV) for labels of columns "
                        "the model does not describe (patient identifier, site, dates); default: "
                        "the one beside the data, if any; 'none' guesses them from the data")
    report.add_argument("--external", help="a file of patients from elsewhere to check the tree on")
    report.add_argument("--external-sheet", help="XLSX sheet name of the external file")
    report.add_argument("--external-source", help="where the external patients come from, in words")
    report.add_argument("--bootstrap", type=option_type("bootstrap"), default=DEFAULT_RESAMPLES,
                        help=f"bootstrap resamples for stability (default {DEFAULT_RESAMPLES}; "
                        "0 = none)")
    report.add_argument("--outer-folds", type=option_type("outer_folds"),
                        default=DEFAULT_OUTER_FOLDS,
                        help="outer folds of the nested cross-validation "
                        f"(default {DEFAULT_OUTER_FOLDS})")
    report.add_argument("--no-nested", action="store_true", help="skip nested cross-validation")
    add_work_options(report)
    report.add_argument("--out", required=True, help="where to write the PDF")
    report.add_argument("--date", help="date printed on the report and its chart, YYYY-MM-DD "
                        "(default: today); the same date gives the same bytes")


def run_check(args) -> int:
    import json

    from ..checking.new_patients import check_table, with_check

    check_outputs({"--out": args.out, "--checked-model": args.checked_model},
                  [args.data, args.model])
    model = TreeModel.load(args.model)
    table = read_table(args.data, sheet=args.sheet)
    result = check_table(model, table, source=args.source,
                         leave_out_overlap=args.leave_out_overlap)
    print(result.text())
    if args.out:
        write_text_atomic(args.out, json.dumps(result.to_dict(), indent=1, ensure_ascii=False,
                                               allow_nan=False) + "\n")
    if args.checked_model:
        with_check(model, result).save(args.checked_model)
    return 0


def model_dictionary(table, model: TreeModel, dictionary_file: str | None) -> DataDictionary:
    """The dictionary a report re-derivation uses: inferred, then the given file, then the
    model's own definitions of its outcome and predictors (those made the tree)."""
    dictionary, _ = dictionary_for(table, dictionary_file)
    known = [s for s in (model.outcome,) + model.predictors if s.name in dictionary]
    merged, _ = merge_dictionary(dictionary, DataDictionary(tuple(known)))
    return merged


def run_report(args) -> int:
    place = work_place(args)
    with place.active():  # a cluster is reached (or refused) before any file is read
        return _report(args, place)


def _report(args, place) -> int:
    import datetime as dt

    from ..checking.new_patients import check_table
    from .chart import printed_date
    from ..report.contents import prepare_report
    from ..report.rendering import write_report
    from ..sizing.derivation import choose_model, derive
    from ..sizing.request import DerivationRequest

    inputs = [args.data, args.model, dictionary_path(args.dictionary, args.data)] + (
        [args.external] if args.external else [])
    check_outputs({"--out": args.out}, inputs)
    if not str(args.out).lower().endswith(".pdf"):
        raise InputError(say("cli.report_needs_pdf"))
    printed = printed_date(args.date) or dt.date.today()  # told before any reading
    model = TreeModel.load(args.model)
    settings = model.extra.get("settings")
    # Without its design (outcome and predictors) the derivation cannot be rerun either.
    if not isinstance(settings, dict) or not isinstance(settings.get("design"), dict):
        raise InputError(say("cli.report_no_settings"))
    request = DerivationRequest.from_dict(settings)
    table = read_table(args.data, sheet=args.sheet)
    notes = []
    expected = model.extra.get("data", {}).get("sha256")
    if expected and expected != table.provenance.sha256:
        notes.append(say("cli.report_data_differs", found=table.provenance.short_fingerprint,
                         expected=short_fingerprint(expected)))
        print(f"prunella: warning: {notes[-1]}", file=sys.stderr)
    dictionary = model_dictionary(table, model, dictionary_path(args.dictionary, args.data))
    derivation = derive(table, dictionary, request, jobs=place.n_jobs)
    rule = model.chosen.get("rule")
    derivation = choose_model(derivation,
                              rule if rule in ("1se", "min", "goal") else model.chosen["leaves"])
    if derivation.model.nodes != model.nodes:
        notes.append(say("cli.report_tree_differs"))
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
                              jobs=place.n_jobs, notes=tuple(notes),
                              printed=printed.isoformat())
    write_report(contents, args.out)
    print(f"Wrote the methods and validation report to {args.out}.")
    return 0
