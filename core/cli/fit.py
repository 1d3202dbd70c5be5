"""``prunella fit`` and ``prunella score``: grow, prune and cross-validate a tree from a
spreadsheet; route the rows of a spreadsheet through a saved tree."""

from __future__ import annotations


import sys
from dataclasses import replace
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from .. import __version__
from ..cautions import CAUTION_TITLE, caution_text
from ..data.table import read_table
from ..dictionary.columns import DataDictionary
from ..dictionary.for_table import dictionary_for
from ..errors import InputError
from ..messages.message import distinct_messages, say, severity_of
from ..model.path_table import error_text, path_rows, root_text
from ..model.tree import TreeModel
from ..phrases import plural, rows_and_patients
from ..safe_files import check_outputs, write_csv_safely, write_text_atomic
from ..option_limits import check_setting, option_type
from .arguments import (DICTIONARY_HELP, add_work_options, csv_list, dictionary_path, size_option,
                        work_place)
from .chart import add_fit_chart_options, fit_chart

if TYPE_CHECKING:  # scikit-learn loads only when a tree is grown, so bad input is refused fast
    from ..sizing.derivation import Derivation
    from ..sizing.request import DerivationRequest


def add_parsers(sub) -> None:
    fit = sub.add_parser("fit", help="grow, prune and cross-validate a tree from a spreadsheet")
    fit.add_argument("data", help="CSV, TSV or XLSX file, one row per visit")
    fit.add_argument("--outcome", required=True, help="column to predict")
    fit.add_argument("--sheet", help="XLSX sheet name (default: the first sheet)")
    fit.add_argument("--task", choices=("classification", "regression"),
                     help="default: classification for categories, regression for numbers")
    fit.add_argument("--positive", help="the level of a two-class outcome to catch (default: the "
                     "event, e.g. 'fell' over 'no fall', 'yes' over 'no'; else the rarer level)")
    fit.add_argument("--predictors", help="comma-separated columns to ask about "
                     "(default: every predictor in the data dictionary)")
    fit.add_argument("--exclude", help="comma-separated columns to leave out")
    fit.add_argument("--dictionary", help=DICTIONARY_HELP)
    fit.add_argument("--patient-id", help="patient identifier column: repeat visits stay in one fold")
    fit.add_argument("--site", help="site column: cross-validate by leaving one site out at a time")
    fit.add_argument("--folds", type=option_type("folds"),
                     default=10, help="number of folds (default 10)")
    fit.add_argument("--repeats", type=option_type("repeats"),
                     default=1, help="repeat the k-fold split R times")
    fit.add_argument("--loo", action="store_true", help="leave-one-out cross-validation")
    fit.add_argument("--holdout", type=option_type("holdout"),
                     help="share of patients set aside before growing, "
                     "to check the tree on (e.g. 0.25)")
    fit.add_argument("--min-leaf", type=option_type("min_leaf"),
                     default=5, help="fewest rows an outcome box may hold: visits, or patients where each came once (default 5)")
    fit.add_argument("--max-depth", type=option_type("max_depth"),
                     help="maximum depth of the grown tree")
    fit.add_argument("--coarsen", type=option_type("coarsen"), metavar="N",
                     help="grow on N quantile levels of each measurement with more than N "
                     "different values (faster on large files; default off; e.g. 256)")
    fit.add_argument("--criterion", help="how the grower judges a question: for a class outcome gini (default: how "
                     "mixed the classes are) or entropy (the same idea as information); for a "
                     "measured outcome squared_error (default: the spread about each side's "
                     "mean) or friedman_mse (the same, favouring even splits)")
    fit.add_argument("--priors", default="observed", help="class priors: observed, equal, or "
                     "comma-separated numbers in class order")
    fit.add_argument("--miss-cost", type=option_type("miss_cost"),
                     help="two classes: missing a positive is X times "
                     "as bad as a needless alarm")
    fit.add_argument("--min-sensitivity", type=option_type("goal"), metavar="S",
                     help="two classes: the smallest tree whose cross-validated sensitivity is "
                     "at least S (e.g. 0.95, to rule out); the miss cost is searched")
    fit.add_argument("--min-specificity", type=option_type("goal"), metavar="S",
                     help="two classes: the smallest tree whose cross-validated specificity is "
                     "at least S (e.g. 0.95, to rule in); the miss cost is searched")
    fit.add_argument("--risk", choices=("cost", "impurity"), default="cost",
                     help="what pruning a classification tree weighs: cost (expected misclassification cost, the usual) or impurity (how mixed the boxes are); default cost")
    fit.add_argument("--size", default="1se", type=size_option,
                     help="tree size: 1se (default: the smallest tree within one SE of the lowest cross-validated error), min (the lowest error), or a number of outcome boxes")
    fit.add_argument("--seed", type=option_type("seed"),
                     default=0, help="random seed (default 0)")
    add_work_options(fit)
    fit.add_argument("--model", required=True, help="where to write the model JSON")
    fit.add_argument("--curve", help="write the pruning curve as CSV")
    fit.add_argument("--rules", help="write the tree as plain-text rules")
    fit.add_argument("--quiet", action="store_true", help="leave out the pruning table and the tree (notes and warnings still go to stderr)")
    add_fit_chart_options(fit)

    score = sub.add_parser("score", help="route rows of a spreadsheet through a saved model")
    score.add_argument("model", help="model JSON written by 'prunella fit'")
    score.add_argument("data", help="CSV, TSV or XLSX file")
    score.add_argument("--sheet", help="XLSX sheet name (default: the first sheet)")
    score.add_argument("--out", required=True, help="where to write the scored CSV")


def request_from_args(args, dictionary: DataDictionary) -> DerivationRequest:
    """The derivation request described by ``prunella fit`` options."""
    from ..sizing.folds import CVSettings
    from ..sizing.grow import TreeSettings
    from ..sizing.request import DerivationRequest

    from ..design.analysis import default_design

    design = default_design(dictionary, args.outcome, predictors=csv_list(args.predictors) or None,
                            exclude=csv_list(args.exclude), patient_id=args.patient_id,
                            site=args.site, task=args.task, positive=args.positive)
    priors = priors_option(args.priors)
    tree = TreeSettings(min_leaf=args.min_leaf, max_depth=args.max_depth, criterion=args.criterion,
                        priors=priors, miss_cost=args.miss_cost, risk=args.risk, seed=args.seed,
                        coarsen=args.coarsen)
    plan = "loo" if args.loo else ("site" if args.site else "kfold")
    cv = CVSettings(plan=plan, folds=args.folds, repeats=args.repeats, seed=args.seed)
    return DerivationRequest(design=design, tree=tree, cv=cv, holdout=args.holdout, size=args.size,
                             goal=_goal(args))


def _goal(args):
    """The goal named by --min-sensitivity or --min-specificity (one at most), or None."""
    from ..sizing.goal import Goal

    given = [(m, getattr(args, f"min_{m}", None)) for m in ("sensitivity", "specificity")]
    given = [(m, v) for m, v in given if v is not None]
    if not given:
        return None
    if len(given) > 1:
        raise InputError(say("goal.one_goal"))
    if args.miss_cost is not None:
        raise InputError(say("goal.with_cost"))
    return Goal(*given[0])


def priors_option(text: str) -> str | tuple[float, ...]:
    """--priors: 'observed', 'equal' or one number per class, each inside the limits."""
    if text in ("observed", "equal"):
        return text
    try:
        priors = tuple(float(p) for p in csv_list(text))
    except ValueError:
        raise InputError(say("cli.priors")) from None
    if not priors:
        raise InputError(say("cli.priors"))
    for value in priors:
        check_setting("prior", value)
    return priors


def curve_frame(derivation: Derivation) -> pd.DataFrame:
    """The pruning curve as a table: size, α, training risk, CV risk and its SE."""
    path = derivation.path
    return pd.DataFrame({
        "leaves": path.leaves, "alpha": path.alpha, "grid_alpha": path.grid,
        "train_risk": path.train_risk, "cv_risk": path.cv_risk, "cv_se": path.cv_se,
        "is_min": np.arange(len(path.leaves)) == path.min_index,
        "is_1se": np.arange(len(path.leaves)) == path.one_se_index,
    })


def run_fit(args) -> int:
    priors_option(args.priors)  # told before any reading
    place = work_place(args)
    with place.active():  # a cluster is reached (or refused) before any file is read
        return _fit(args, place)


def _fit(args, place) -> int:
    check_outputs({"--model": args.model, "--curve": args.curve, "--rules": args.rules,
                   "--chart": args.chart},
                  [args.data, dictionary_path(args.dictionary, args.data)])
    table = read_table(args.data, sheet=args.sheet)
    dictionary, notes = dictionary_for(table, dictionary_path(args.dictionary, args.data))
    shown = _print_notes(list(table.provenance.warnings) + notes)
    request = request_from_args(args, dictionary)
    request, findings = _guarded(args, table, dictionary, request)
    from ..design.guards import findings_from_notes
    from ..sizing.derivation import derive

    findings = findings_from_notes(notes) + findings

    derivation = derive(table, dictionary, request, jobs=place.n_jobs, findings=findings)
    model = derivation.model
    model.save(args.model)
    if args.curve:
        write_csv_safely(curve_frame(derivation), args.curve)
    if args.rules:
        write_text_atomic(args.rules, model.rules())
    # The summary says a tree is no better than no tree itself; --quiet, which leaves the
    # summary out, still gets that warning on stderr.
    no_better = model.no_better_warning() if args.quiet else None
    _print_notes(list(derivation.notes) + list(derivation.told_once)
                 + ([no_better] if no_better else []), shown)
    if not args.quiet:
        # Printed before the chart, so a chart refused (one box, too large) still leaves the
        # pruning table and the chosen size on screen.
        print(summary_text(derivation), flush=True)
    if args.chart:
        fit_chart(args, derivation)
    return 0


def _print_notes(notes: list[str], already: list[str] | None = None) -> list[str]:
    """Print each note once on stderr as 'warning:' or 'note:', as its catalogue entry says;
    a finding already shown with its rows is not repeated."""
    already = list(already or [])
    fresh = [n for n in distinct_messages(already + notes) if n not in already]
    for note in fresh:
        prefix = "warning" if severity_of(note) == "warning" else "note"
        print(f"{prefix}: {note}", file=sys.stderr)
    return already + fresh


def _guarded(args, table, dictionary: DataDictionary, request: DerivationRequest,
             ) -> tuple[DerivationRequest, tuple[dict, ...]]:
    """Run the identity, leakage, repeat-visit and rare-class guards; print their findings,
    and return them as the model file records them.

    Identity columns are left out unless named in --predictors."""
    from ..design.guards import findings_record, guard_design

    report = guard_design(table.frame, dictionary, request.design,
                          keep=csv_list(args.predictors), grouped=request.cv.grouped,
                          seed=args.seed, min_leaf=args.min_leaf)
    for finding in report.findings:
        print(f"{finding.severity}: {finding.message}", file=sys.stderr)
    return replace(request, design=report.design), findings_record(report.findings)


RULE_WORDS = {"1se": "1-SE rule", "min": "lowest cross-validated error", "user": "size chosen",
              "goal": "built for a goal"}


def summary_text(derivation: Derivation) -> str:
    """What a fit found: the pruning path with CV beside training risk, and the chosen tree."""
    path, model = derivation.path, derivation.model
    counts = path.counts
    lines = [f"Prunella {__version__}: {model.outcome.display} ({model.task}), "
             f"{model.rows_counted}, "
             f"{path.description}.",
             f"Error: {model.error_measure}"
             + (f" (in {model.outcome.unit} squared)" if model.task == "regression"
                and model.outcome.unit else "")
             + "; the cross-validated error is the honest "
             "one, the training error is optimistic.", ""]
    # Cross-validated error first, its root in the outcome's unit beside it (regression),
    # then the training error; each column to one precision (core/model/path_table.py).
    rows = path_rows(model)
    regression = model.task == "regression"
    root_head = f"CV root ({model.outcome.unit})" if model.outcome.unit else "CV root"
    wide = {name: max([len(head)] + [len(getattr(r, name) or "") for r in rows])
            for name, head in (("cv", "CV error"), ("se", "± SE"), ("cv_root", root_head),
                               ("train", "training"))}
    lines.append(f"{'boxes':>7} {'CV error':>{wide['cv']}} {'± SE':>{wide['se']}}"
                 + (f" {root_head:>{wide['cv_root']}}" if regression else "")
                 + f" {'training':>{wide['train']}}"
                 + (f" {'CV sens.':>9} {'CV spec.':>9}" if counts is not None else ""))
    chosen = model.chosen
    for k, row in enumerate(rows):
        mark = ""
        if k == path.min_index:
            mark += "  minimum"
        if k == path.one_se_index:
            mark += "  1-SE choice"
        if chosen["rule"] == "goal" and path.leaves[k] == chosen["leaves"]:
            mark += "  goal choice"
        beside = (f" {counts.sensitivity[k]:>9.1%} {counts.specificity[k]:>9.1%}"
                  if counts is not None else "")
        root = f" {row.cv_root:>{wide['cv_root']}}" if regression else ""
        lines.append(f"{row.leaves:>7} {row.cv:>{wide['cv']}} {row.se:>{wide['se']}}{root} "
                     f"{row.train:>{wide['train']}}{beside}{mark}")
    boxes = plural(chosen["leaves"], "outcome box", "outcome boxes")
    in_unit = ""
    if regression:
        # A mean squared error is in the unit squared: its root reads in the outcome's unit,
        # as a held-out RMSE does.
        in_unit = (f" Root of the cross-validated error: {root_text(model, chosen['cv_risk'])} "
                   f"(training {root_text(model, chosen['train_risk'])}), comparable with a "
                   "held-out RMSE.")

    def error(value: float) -> str:
        return error_text(model, value, class_decimals=4)

    lines += ["", f"Chosen: {boxes} ({RULE_WORDS.get(chosen['rule'], chosen['rule'])}), "
              f"cross-validated error {error(chosen['cv_risk'])} ± {error(chosen['cv_se'])} "
              f"(training error {error(chosen['train_risk'])}, optimistic).{in_unit}",
              f"Model fingerprint: {model.short_fingerprint}"]
    if chosen["rule"] == "goal":
        from ..sizing.goal_words import goal_text

        lines[-1:-1] = [goal_text(chosen)]
    if model.no_better_warning():
        lines.append(f"Warning: {model.no_better_warning()}")
    check = model.recorded_check
    if check:
        counted = rows_and_patients(int(check["n"]), check.get("patients"))
        lines.append(f"Checked on {check['source']} ({counted}): {check['summary']}.")
    lines += ["", model.rules(), f"{CAUTION_TITLE}. {caution_text()}"]
    return "\n".join(lines)


def run_score(args) -> int:
    check_outputs({"--out": args.out}, [args.data, args.model])
    model = TreeModel.load(args.model)
    table = read_table(args.data, sheet=args.sheet)
    from ..model.scoring import scored_table

    out, notes = scored_table(model, table.frame)
    write_csv_safely(out, args.out)
    for warning in list(table.provenance.warnings) + list(notes):
        print(f"note: {warning}", file=sys.stderr)
    print(f"Scored {len(out)} rows into {args.out}.")
    return 0
