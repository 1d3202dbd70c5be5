"""The sections of the methods report, each a function from the report's contents to
flowables. core/report/rendering.py puts them in order; the TRIPOD table refers to their numbers."""

from __future__ import annotations

import platform
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd
import sklearn
from reportlab.platypus import KeepTogether, Paragraph

from .. import __version__
from ..cautions import CAUTION_TITLE, CAUTIONS, UNCHECKED_BANNER, UNCHECKED_DETAIL
from ..chart.options import SMALL_GROUP  # the chart dashes the boxes the report flags
from ..messages.message import say
from ..phrases import (
    METHOD_NAME, patients_among, plural, rows_and_patients, shared_patients, short_fingerprint,
)
from ..model.path_table import path_rows
from ..precision import summary_number
from .figures import pruning_curve_figure, stability_figure
from .performance import performance_section, risk_text
from .section_numbers import section
from .style import Styles, caution_box, chart_figure, figure, para, table, text
from .tripod import tripod_rows

if TYPE_CHECKING:
    from .contents import ReportContents


# --- helpers ----------------------------------------------------------------------------------


def _grouped(digest: str) -> str:
    """A long hexadecimal fingerprint in groups of 16, so it wraps between groups."""
    return " ".join(digest[i:i + 16] for i in range(0, len(digest), 16))


def _count_pct(k: int, n: int) -> str:
    return f"{k:,} ({100 * k / n:.1f}%)" if n else f"{k:,}"


def _site_counts(contents: ReportContents) -> dict[str, int]:
    der = contents.derivation
    cohort = der.model.extra.get("cohort", {})
    if cohort.get("sites"):
        return dict(cohort["sites"])
    site = der.request.design.site or next(
        (c.name for c in der.dictionary.by_role("site") if c.name in der.table.frame.columns), None)
    if site is None:
        return {}
    values = der.table.frame[site].iloc[der.data.rows].astype("string").str.strip()
    return {str(k): int(v) for k, v in values.value_counts().sort_index().items()}


# --- title page -------------------------------------------------------------------------------


def title_page(c: ReportContents, title: str, s: Styles) -> list:
    model = c.model
    data = model.extra.get("data", {})
    story = [para(title, s.title),
             para(f"Prepared with Prunella {__version__} · model fingerprint "
                  f"{model.short_fingerprint} · data SHA-256 {short_fingerprint(data.get('sha256', ''))}"
                  f" · printed {c.printed_on.isoformat()}", s.subtitle)]
    story.append(para("", s.body))
    cohort = model.extra.get("cohort", {})
    asked = ", ".join(model.spec(col).display for col in model.columns_asked()) or "no question"
    boxes = plural(len(model.leaves), "outcome box", "outcome boxes")

    def risk(value: float) -> str:
        return risk_text(value, model.task, model.outcome_decimals)

    summary = (f"A tree for <b>{text(model.outcome.display)}</b>, by the method of "
               f"{METHOD_NAME}, was grown on {_derivation_rows(model)} "
               f"({text(data.get('file', 'the data file'))}), pruned by weakest-link "
               f"cost-complexity pruning, and sized by {text(model.path.get('cv', 'cross-validation'))}. "
               f"The chosen tree has {boxes} and asks about {text(asked)}. "
               f"Its cross-validated error is {risk(model.chosen['cv_risk'])} ± "
               f"{risk(model.chosen['cv_se'])} ({text(model.error_measure)}; "
               f"training error {risk(model.chosen['train_risk'])}).")
    story.append(para(summary, s.body, markup=True))
    lines = []
    if c.nested is not None:
        lines.append(f"Honest error of the whole procedure: {c.nested.summary()}.")
    for check in c.checks:
        if check.separate is None:  # checked away from the computer the tree was grown on
            unknown = say("check.overlap_not_known").rstrip(".")
            shared = "; " + unknown[0].lower() + unknown[1:]
        else:
            shared = ("" if check.separate else f"; {shared_patients(check.overlap_patients)}, "
                      "so this is not a check on separate patients")
        lines.append(f"Checked on {check.source} ({check.counted}{shared}): {check.summary}.")
    if c.stability is not None:
        lines.append(f"Stability: {c.stability.summary()}.")
    story += [Paragraph(text(line), s.bullet, bulletText="•") for line in lines]
    for note in c.notes:
        story.append(para(f"<b>Note:</b> {text(note)}", s.body, markup=True))
    story.append(para("", s.body))
    banner = None if c.checks else UNCHECKED_BANNER
    extra = [] if c.checks else [UNCHECKED_DETAIL]
    story.append(caution_box(CAUTION_TITLE, extra + list(CAUTIONS), s, banner=banner))
    return story


# --- sections ---------------------------------------------------------------------------------


def _data_source(c: ReportContents, s: Styles) -> list:
    der, model = c.derivation, c.model
    p = der.table.provenance
    rows = [["Item", "Value"], ["File", Path(p.path).name]]
    if p.sheet:
        rows.append(["Sheet", p.sheet])
    rows += [["SHA-256 fingerprint of the file", _grouped(p.sha256)],
             ["Rows and columns in the file", f"{p.n_rows:,} rows, {p.n_columns:,} columns"]]
    if p.encoding:
        rows.append(["Text encoding, delimiter, decimal mark",
                     f"{p.encoding}, {p.delimiter!r}, {p.decimal!r}"])
    rows.append(["Model fingerprint (SHA-256 of the model's canonical JSON without its "
                 "recorded check and identifier digests: keys sorted, no spaces; a check "
                 "names the tree by it)",
                 _grouped(model.fingerprint)])
    story = [para("The tree was derived from the file below. The fingerprint identifies its exact "
                  "bytes: a file with another fingerprint is other data.", s.body),
             table(rows, [0.36, 0.64], s)]
    for warning in p.warnings:
        story.append(para(f"Reading note: {warning}", s.bullet))
    return story


def _derivation_rows(model) -> str:
    """'412 visits of 300 patients', or '300 patients' where every row is a patient."""
    return model.rows_counted


def _resampled(st, model, together: bool = False) -> str:
    """What the bootstrap drew: whole patients (with all their visits) or single rows."""
    if model.rows_word == "visits" and st.patient_level:
        return "patients (all their visits together)" if together else "patients"
    return "patients" if model.rows_word == "patients" else "visits"


def _participants(c: ReportContents, s: Styles) -> list:
    der, model = c.derivation, c.model
    cohort = model.extra.get("cohort", {})
    rows = [["Item", "Derivation"]]
    word = model.rows_word.capitalize()
    rows.append([f"{word} (rows with a recorded outcome, used for growing)",
                 f"{cohort.get('visits', model.n_rows):,}"])
    if word == "Visits":
        rows.append(["Patients", f"{cohort['patients']:,}"])
    for site, n in _site_counts(c).items():
        rows.append([f"{word} at {site}", _count_pct(n, model.n_rows)])
    if cohort.get("first_date"):
        rows.append([f"Dates ({cohort.get('date_column', 'date')})",
                     f"{cohort['first_date']} to {cohort['last_date']}"])
    if "outcome_counts" in cohort:
        for label, n in cohort["outcome_counts"].items():
            rows.append([f"{model.outcome.display}: {label}", _count_pct(n, model.n_rows)])
    elif "outcome_mean" in cohort:
        rows.append([f"Mean {model.outcome.display}",
                     summary_number(cohort['outcome_mean'], model.outcome_decimals,
                                    model.outcome.unit)])
    if der.heldout is not None:
        held = der.heldout
        rows.append(["Set aside before growing (held-out check)",
                     rows_and_patients(held.n, patients_among(held.groups))])
    story = [para("Eligible were all rows of the file with a recorded outcome. Repeat visits of "
                  "one patient are kept together in every fold when a patient identifier is set.",
                  s.body), table(rows, [0.62, 0.38], s)]
    story += [para(note, s.bullet) for note in der.notes]
    for check in c.checks:
        if check.kind == "external":
            story.append(para(f"External check: {check.source}: {check.counted} with a "
                              f"usable outcome, of {check.n_rows:,} rows.", s.bullet))
    return story


def _kind_text(spec) -> str:
    if spec.kind == "numeric":
        return "number" + (f" ({spec.unit})" if spec.unit else "")
    levels = ", ".join(spec.levels)
    return f"{spec.kind}: {levels}" if levels else spec.kind


def _definitions(c: ReportContents, s: Styles) -> list:
    model, der = c.model, c.derivation
    o = model.outcome
    outcome = f"<b>{text(o.display)}</b> (column {text(o.name)}; {text(_kind_text(o))})"
    if model.positive:
        outcome += f"; positive class: <b>{text(model.positive)}</b>"
    if o.note:
        outcome += f". {text(o.note.rstrip('. '))}"
    story = [para("Outcome: " + outcome + ".", s.body, markup=True),
             para("Predictors offered to the tree, as defined in the data dictionary. "
                  "The tree itself chose which to ask (marked 'asked').", s.body)]
    asked = set(model.columns_asked())
    rows = [["Column", "Label", "Kind and levels", "Missing codes", "Note", "Asked"]]
    for spec in model.predictors:
        rows.append([spec.name, spec.display, _kind_text(spec), ", ".join(spec.missing_codes),
                     spec.note, "asked" if spec.name in asked else ""])
    story.append(table(rows, [0.15, 0.2, 0.27, 0.1, 0.2, 0.08], s))
    design = der.request.design
    roles = [("Patient identifier", design.patient_id), ("Site", design.site)]
    text_roles = "; ".join(f"{name}: {col}" for name, col in roles if col)
    if text_roles:
        # A column name may end in its own full stop ("Hospital no.").
        story.append(para(f"Other roles: {text_roles.rstrip('.')}.", s.body))
    return story


def _missing(c: ReportContents, s: Styles) -> list:
    der, model = c.derivation, c.model
    n = der.data.n
    routing = {}
    for node in model.nodes:
        if node.question is not None and node.question.kind != "missing":
            q = node.question
            where = q.missing_goes.upper() if q.routes_missing else "none seen, measured first"
            routing.setdefault(q.column, []).append(f"box {node.id}: {where}")
    rows = [["Predictor", "Not recorded (derivation visits)", "Where the tree sends them"]]
    for column in der.data.predictors:
        k = int(column.missing.sum())
        rows.append([column.spec.display, _count_pct(k, n),
                     "; ".join(routing.get(column.spec.name, [])) or "–"])
    return [para("Values not recorded are not imputed. At every question where some derivation "
                 "patients lacked the value, the grower learns which branch such patients follow, "
                 "and the chart prints that branch. Where none at that box lacked it, the tree "
                 "has no evidence for either branch: the chart prints none and says to measure "
                 "the value first, and scoring leaves such a patient without a box. A level the "
                 "tree never saw at derivation is treated as not recorded.", s.body),
            table(rows, [0.36, 0.3, 0.34], s)]


def _settings(c: ReportContents, s: Styles) -> list:
    req, model = c.derivation.request, c.model
    t, cv = req.tree, req.cv
    criterion = t.criterion or ("gini" if model.task == "classification" else "squared_error")
    rows = [["Setting", "Value"],
            ["Task", model.task],
            ["Grower", f"scikit-learn {sklearn.__version__} decision tree, split criterion "
                       f"{criterion}, best splitter"],
            [f"Minimum {model.rows_word} per outcome box", f"{t.min_leaf:,}"],
            ["Maximum depth", str(t.max_depth) if t.max_depth else "none (grown to the minimum box size)"],
            ["Measurements coarsened", model.coarsening() or "no (every observed value was "
             "a possible threshold)"]]
    costs = model.extra.get("costs")
    if model.task == "classification":
        priors = t.priors if isinstance(t.priors, str) else ", ".join(f"{p:g}" for p in t.priors)
        if costs:
            priors += " (" + ", ".join(f"{k}: {p:.3f}" for k, p in
                                       zip(model.classes, costs["priors"])) + ")"
        rows.append(["Class priors", priors])
        if costs:
            loss = costs["loss"]
            mistakes = [f"true {model.classes[i]} called {model.classes[j]}: {loss[i][j]:g}"
                        for i in range(len(loss)) for j in range(len(loss)) if i != j]
            rows.append(["Misclassification costs", "; ".join(mistakes)])
        rows.append(["What pruning weighs",
                     "expected misclassification cost (Breiman et al. 1984)" if t.risk == "cost"
                     else "impurity of the split criterion"])
    rows += [["Pruning", "weakest-link cost-complexity pruning (Breiman et al. 1984)"],
             ["Cross-validation", model.path.get("cv", cv.describe(cv.grouped))],
             ["CV grid", "geometric midpoints of the pruning sequence's α values"],
             ["Size rule", _size_rule_words(model.chosen)],
             ["Held-out share set aside before growing",
              f"{req.holdout:.0%}" if req.holdout else "none"],
             ["Random seed", str(t.seed)]]
    if c.nested is not None:
        rows.append(["Nested cross-validation", c.nested.description])
    if c.stability is not None:
        st = c.stability
        rows.append(["Bootstrap stability", f"{st.resamples} resamples of "
                     f"{_resampled(st, model)}, seed {st.seed}"])
    rows.append(["Software", f"Prunella {__version__}, Python {platform.python_version()}, "
                             f"scikit-learn {sklearn.__version__}, NumPy {np.__version__}, "
                             f"pandas {pd.__version__}"])
    return [para("How the tree was grown, pruned and sized. Every step is seeded, so the same "
                 "data and settings give the same tree.", s.body),
            table(rows, [0.34, 0.66], s)]


def _pruning(c: ReportContents, s: Styles) -> list:
    path = c.model.path
    story = [figure(pruning_curve_figure(path, c.model.error_measure),
                    f"Figure {s.next_figure()}. Cross-validated error (±1 SE) and training error for each size on "
                    f"the pruning path. Triangle: lowest cross-validated error "
                    f"({plural(int(path['min_leaves']), 'box', 'boxes')}); diamond: the 1-SE choice "
                    f"({plural(int(path['one_se_leaves']), 'box', 'boxes')}). Training error always falls as the tree "
                    "grows; only the cross-validated error says how it does on new patients.", s)]
    leaves = path["leaves"]
    order = sorted(range(len(leaves)), key=lambda k: leaves[k])
    keep = set(order[:14]) | {leaves.index(path["min_leaves"]), leaves.index(path["one_se_leaves"]),
                              leaves.index(c.model.chosen["leaves"])}
    # The cross-validated error first (and, for a measured outcome, its root in the outcome's
    # unit), the optimistic training error last; each column to one precision.
    model = c.model
    regression = model.task == "regression"
    unit = f" ({model.outcome.unit})" if model.outcome.unit else ""
    rows = [["Boxes", "Mark", "Cross-validated error", "SE"]
            + ([f"Root of the cross-validated error{unit}"] if regression else [])
            + ["Training error (optimistic)"]]
    printed = path_rows(model)
    for k in sorted(keep, key=lambda k: leaves[k]):
        marks = []
        if leaves[k] == path["min_leaves"]:
            marks.append("minimum")
        if leaves[k] == path["one_se_leaves"]:
            marks.append("1-SE")
        if leaves[k] == c.model.chosen["leaves"]:
            marks.append("chosen")
        row = printed[k]
        rows.append([str(leaves[k]), ", ".join(marks), row.cv, row.se]
                    + ([row.cv_root] if regression else []) + [row.train])
    shown = "" if len(keep) == len(leaves) else (f" ({len(keep)} of the {len(leaves)} sizes "
                                                 "shown: the smallest trees and the marked ones)")
    story.append(KeepTogether([para(f"Error: {c.model.error_measure}{shown}.", s.body),
                               table(rows, ([0.08, 0.2, 0.19, 0.1, 0.23, 0.2] if regression
                                            else [0.1, 0.24, 0.24, 0.16, 0.26]), s,
                                     align_right=tuple(range(2, len(rows[0]))) + (0,),
                                     keep=False)]))
    return story


def _leaf_paths(model) -> dict[int, list[str]]:
    return {leaf.id: [step.phrase() for step in model.steps_to(leaf.id)] for leaf in model.leaves}


def _chart(c: ReportContents, s: Styles) -> list:
    """The wall chart as it prints (A4, else A3), reduced; nothing if it fits neither."""
    from ..chart.fitting import plan_chart
    from ..chart.options import ChartOptions
    from ..errors import InputError

    if len(c.model.leaves) <= 1:  # one box for everyone: no decision chart (never drawn as one)
        return [para(f"{c.model.no_better_statement or ''} The chosen tree has one outcome box, "
                     "so no decision chart is printed.", s.body)]
    # The chart in the report carries the report's own check (an external file's first, as
    # the stronger one), so the figure never says "Not yet checked" above a section that
    # reports a check; a check that shares derivation patients is printed as such.
    from ..checking.new_patients import with_check

    model, recorded = c.model, ""
    checks = sorted(c.checks, key=lambda ch: ch.kind != "external")
    if checks and checks[0].names(model):
        model = with_check(model, checks[0])
        recorded = (", with the check on " + text(checks[0].source) + " of section "
                    f"{section('Performance')}")  # the caption is paragraph markup
    for paper in ("a4", "a3"):
        try:
            plan = plan_chart(model, ChartOptions(paper=paper, printed=c.printed_on))
        except InputError:
            continue
        return [chart_figure(plan, f"Figure {s.next_figure()}. The one-page wall chart of the "
                             f"chosen tree as it prints on {paper.upper()} paper (reduced)"
                             f"{recorded}.", s)]
    return [para("The chosen tree is too large for a legible one-page chart on A4 or A3; it is "
                 "given as rules only.", s.body)]


def _tree(c: ReportContents, s: Styles) -> list:
    model = c.model
    story = _chart(c, s)
    story += [para("The tree as numbered rules: each outcome box, the answers that lead to it, and "
                  "what the derivation patients in it showed (95% interval). Boxes are numbered "
                  "as on the chart.", s.body)]
    if model.task == "classification":
        head = f"Share with {model.positive} (95% CI)" if model.positive else "Share of the expected class (95% CI)"
    else:
        unit = f" ({model.outcome.unit})" if model.outcome.unit else ""
        head = f"Mean{unit} (95% CI); middle half"
    rows = [["Box", "Route to the box", "Expected outcome", model.rows_word.capitalize(), head]]
    small = []
    for leaf_id, steps in _leaf_paths(model).items():
        leaf = model.node(leaf_id)
        if model.task == "classification":
            rate = model.box_share(leaf).text()
            expected = str(leaf.prediction)
        else:
            lo, hi = model.mean_interval(leaf)
            places = model.outcome_decimals  # no more precise than the outcome was recorded
            mean = summary_number(leaf.mean, places)
            rate = f"{mean} ({summary_number(lo, places)}–{summary_number(hi, places)})"
            if leaf.quartiles is not None:  # the spread of patients, not of the mean
                rate += (f"; {summary_number(leaf.quartiles[0], places)}–"
                         f"{summary_number(leaf.quartiles[1], places)}")
            expected = f"mean {mean}"
        mark = " †" if leaf.n < SMALL_GROUP else ""
        if mark:
            small.append(leaf_id)
        route = " → ".join(steps) if steps else "every patient"
        rows.append([f"{leaf_id}{mark}", route, expected, f"{leaf.n:,}", rate])
    story.append(table(rows, [0.07, 0.48, 0.13, 0.1, 0.22], s, align_right=(3,)))
    if model.task == "regression" and any(leaf.quartiles is not None for leaf in model.leaves):
        story.append(para("The 95% CI is that of the box's mean; the middle half (25th to "
                          "75th percentile of the box's derivation patients) is the spread one "
                          "patient may expect.", s.caption))
    if small:
        story.append(para(f"† rests on fewer than {SMALL_GROUP} derivation patients: the rate is "
                          "uncertain and may identify individuals; consider suppressing it before "
                          "sharing.", s.caption))
    return story


def _stability(c: ReportContents, s: Styles) -> list:
    st = c.stability
    if st is None:
        return [para("Not assessed in this report (bootstrap resamples were switched off).", s.body)]
    unit = _resampled(st, c.model, together=True)
    story = [para(f"The whole procedure (growing, cross-validating, choosing the size) was rerun "
                  f"on {st.resamples} bootstrap resamples of {unit}. {st.summary()}."
                  + (f" {st.no_question} resample(s) chose a tree without any question."
                     if st.no_question else ""), s.body),
             figure(stability_figure(st), f"Figure {s.next_figure()}. Share of resamples in which each predictor "
                    "was the first question (solid) or was asked anywhere (hatched).", s)]
    rows = [["Predictor", "First question", "Asked anywhere"]]
    for u in st.predictors:
        if u.anywhere:
            rows.append([u.label, _count_pct(u.first, st.resamples),
                         _count_pct(u.anywhere, st.resamples)])
    story.append(table(rows, [0.5, 0.25, 0.25], s, align_right=(1, 2)))
    never = [u.label for u in st.predictors if not u.anywhere]
    if never:
        story.append(para("Never asked in any resample: " + ", ".join(never) + ".", s.body))
    if st.questions:
        rows = [["Box", "Question of the chosen tree", "Recurs anywhere", "Recurs in place"]]
        for q in st.questions:
            rows.append([str(q.box), q.text, _count_pct(q.anywhere, st.resamples),
                         _count_pct(q.in_place, st.resamples)])
        story += [para("How often each question of the chosen tree came back. A question recurs "
                       "when a resample's tree asks about the same column with a threshold within "
                       f"{st.tolerance * 100:.0f} percentile points of the derivation patients' "
                       "values (numbers), or splits the levels the same way (categories). "
                       "'In place': also every question above it recurred, on the same branch.",
                       s.body), table(rows, [0.08, 0.52, 0.2, 0.2], s, align_right=(2, 3))]
    sizes = pd.Series(st.leaves).value_counts().sort_index()
    story.append(para("Sizes chosen in the resamples: " + ", ".join(
        f"{plural(int(k), 'box', 'boxes')} ({plural(int(v), 'resample', 'resamples')})" for k, v in sizes.items()) + ".", s.body))
    return story


def _limitations(c: ReportContents, s: Styles) -> list:
    model, der = c.model, c.derivation
    items = []
    if model.no_better_warning():  # first: it outweighs every other limitation
        items.append(model.no_better_warning())
    sites = _site_counts(c)
    where = f" ({', '.join(sites)})" if sites else ""
    items.append(f"The tree comes from one cohort{where}; it is valid only for patients like "
                 "those it was derived from.")
    for check in c.checks:
        if check.separate is None:
            items.append(f"The check on {check.source}: {say('check.overlap_not_known')}")
        elif not check.separate:
            items.append(f"The check on {check.source} is not a check on separate patients: "
                         f"{shared_patients(check.overlap_patients)}.")
    if not any(ch.kind == "external" and ch.separate for ch in c.checks):
        # An external check that shares derivation patients is a check, but not a separate one.
        separate = ("separate " if any(ch.kind == "external" for ch in c.checks) else "")
        if any(ch.kind == "external" and ch.separate is None for ch in c.checks):
            separate = "known separate "  # an overlap not known here is not called separate
        items.append(f"It has not been checked on {separate}patients from another site or "
                     "period in this report; that check is needed before use elsewhere.")
    for check in c.checks:
        outside = check.calibration_outside
        if outside:
            what = "rate" if model.task == "classification" else "mean"
            items.append(f"In {check.source}, the derivation {what} of box(es) "
                         f"{', '.join(map(str, outside))} lies outside the observed interval: "
                         "the tree is miscalibrated there and should be recalibrated or "
                         "rederived locally.")
    small = [leaf.id for leaf in model.leaves if leaf.n < SMALL_GROUP]
    if small:
        items.append(f"Box(es) {', '.join(map(str, small))} rest on fewer than {SMALL_GROUP} {model.rows_word}.")
    heavy = [t.spec.display for t in der.data.predictors if t.missing.mean() > 0.2]
    if heavy:
        items.append(f"Often not recorded (over 20% of {model.rows_word}): " + ", ".join(heavy) + "; where "
                     "such patients go follows the derivation's recording habits, which may "
                     "differ elsewhere.")
    cohort = model.extra.get("cohort", {})
    if cohort.get("patients") and cohort["patients"] < model.n_rows:
        items.append("Some patients have several visits. Folds keep them together, but the "
                     "intervals treat visits as independent and may be somewhat too narrow.")
    if c.stability is not None:
        weak = [q for q in c.stability.questions if q.anywhere < 0.5 * c.stability.resamples]
        if weak:
            items.append("Question(s) of box(es) " + ", ".join(str(q.box) for q in weak)
                         + " recur in fewer than half of the bootstrap resamples: they may "
                         "not be found again in new data.")
    if c.nested is None:
        items.append("Nested cross-validation was not run; the cross-validated error of the "
                     "chosen size is slightly optimistic because the same folds chose the size.")
    items.append("Thresholds are printed as round numbers inside the gap between neighbouring "
                 "derivation values, so the chart routes every derivation patient as the "
                 "grown tree did; values that fall in the gap are routed by the printed number.")
    return ([Paragraph(text(item), s.bullet, bulletText="•") for item in items]
            + [para("Cautions", s.h2), caution_box(CAUTION_TITLE, list(CAUTIONS), s)])


def _tripod(c: ReportContents, s: Styles) -> list:
    rows = [["Item", "Topic", "Where answered"]]
    for item, topic, where in tripod_rows(c, section):
        rows.append([item, topic, where])
    return [para("Items of the TRIPOD statement (Collins, Reitsma, Altman & Moons 2015) that "
                 "apply to a derived and validated tree, and where this report answers them. "
                 "Items a report generated from data cannot answer (background, objectives, "
                 "blinding, funding, interpretation) are for the authors to complete.", s.body),
            table(rows, [0.08, 0.5, 0.42], s)]


SECTION_WRITERS = {
    "Data source": _data_source, "Participants": _participants,
    "Outcome and predictors": _definitions, "Missing values": _missing,
    "Model building": _settings, "Pruning path and the choice of size": _pruning,
    "The chosen tree": _tree, "Performance": performance_section, "Stability": _stability,
    "Limitations and cautions": _limitations, "TRIPOD checklist": _tripod,
}


def _size_rule_words(chosen: dict) -> str:
    """How the size was chosen, in the methods table's words."""
    rule = chosen.get("rule")
    if rule == "1se":
        return ("1-SE rule: the smallest tree within one standard error of the minimum "
                "cross-validated error")
    if rule == "min":
        return "minimum cross-validated error"
    goal = chosen.get("goal")
    if rule == "goal" and isinstance(goal, dict):
        return (f"clinical goal: the smallest tree whose cross-validated {goal.get('measure')} "
                f"is at least {float(goal.get('at_least', 0)):.0%} (a search over miss costs, "
                f"{chosen.get('grid_description', 'stated in the model file')})")
    return f"chosen by the user ({plural(int(chosen['leaves']), 'outcome box', 'outcome boxes')})"
