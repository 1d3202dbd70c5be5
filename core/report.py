"""The multi-page methods and validation report (PDF) of a derived and checked tree.

``prepare_report`` runs what the report needs beyond the derivation (nested cross-validation,
bootstrap stability, the held-out check) with progress and cancel; ``render_report`` lays the
result out with reportlab; ``write_report`` saves it atomically. The sections follow what a
methods section or a governance committee asks for, and the closing table maps the TRIPOD
items (Collins, Reitsma, Altman & Moons 2015) that apply to the section answering each.
"""

from __future__ import annotations

import platform
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd
import sklearn
from reportlab.platypus import KeepTogether, Paragraph

from . import __version__
from .cautions import CAUTION_TITLE, CAUTIONS, UNCHECKED_BANNER, UNCHECKED_DETAIL
from .derive import Derivation
from .errors import Cancelled
from .intervals import mean_interval, wilson_interval
from .metrics import ClassificationMeasures, Measures
from .nested import DEFAULT_OUTER_FOLDS, NestedResult, nested_cross_validate
from .pathcv import CancelFlag, Progress
from .report_figures import (
    calibration_figure, pruning_curve_figure, roc_figure, stability_figure,
)
from .report_style import (
    Styles, build_pdf, caution_box, figure, figures_side_by_side, para, table, text,
)
from .report_tripod import tripod_rows
from .safe_files import write_bytes_atomic
from .stability import DEFAULT_RESAMPLES, Stability, bootstrap_stability
from .validate import ValidationResult, check_heldout, training_measures

SMALL_BOX = 10  # outcome boxes resting on fewer patients are flagged (common practice: 5 or 10)

SECTIONS = ("Data source", "Participants", "Outcome and predictors", "Missing values",
            "Model building", "Pruning path and the choice of size", "The chosen tree",
            "Performance", "Stability", "Limitations and cautions", "TRIPOD checklist")


def section(name: str) -> int:
    """The number of a report section (the TRIPOD table refers to these)."""
    return SECTIONS.index(name) + 1


@dataclass(frozen=True)
class ReportContents:
    """Everything the report shows: the derivation and the checks made on it."""

    derivation: Derivation = field(repr=False)
    checks: tuple[ValidationResult, ...] = ()
    nested: NestedResult | None = None
    stability: Stability | None = None
    notes: tuple[str, ...] = ()  # e.g. "the data file differs from the model's"
    printed: str | None = None  # date printed, as it should appear

    @property
    def model(self):
        return self.derivation.model


def prepare_report(derivation: Derivation, external: tuple[ValidationResult, ...] = (),
                   nested: bool = True, outer_folds: int = DEFAULT_OUTER_FOLDS,
                   bootstrap: int = DEFAULT_RESAMPLES, jobs: int = 1,
                   progress: Progress | None = None, cancel: CancelFlag | None = None,
                   notes: tuple[str, ...] = (), printed: str | None = None) -> ReportContents:
    """Run nested cross-validation and ``bootstrap`` stability resamples (0 = none) and collect
    the held-out and ``external`` checks. ``progress(done, total)`` counts outer folds plus
    resamples; ``cancel()`` returning True raises :class:`Cancelled`."""
    total = (outer_folds if nested else 0) + max(bootstrap, 0)
    done_before = 0

    def step(done: int, _total: int) -> None:
        if progress:
            progress(done_before + done, total)

    if cancel is not None and cancel():
        raise Cancelled()
    nested_result = None
    if nested:
        nested_result = nested_cross_validate(derivation.data, derivation.request,
                                              outer_folds=outer_folds, jobs=jobs,
                                              progress=step, cancel=cancel)
        done_before = outer_folds
    stability = None
    if bootstrap > 0:
        stability = bootstrap_stability(derivation.data, derivation.request, derivation.model,
                                        resamples=bootstrap, jobs=jobs, progress=step,
                                        cancel=cancel)
    checks = ((check_heldout(derivation),) if derivation.heldout is not None else ()) + tuple(external)
    return ReportContents(derivation, checks, nested_result, stability, tuple(notes), printed)


def render_report(contents: ReportContents) -> bytes:
    """The report as PDF bytes (deterministic for the same contents)."""
    s = Styles()
    model = contents.model
    title = f"Decision tree for {model.outcome.display.lower()}: methods and validation report"
    story = _title_page(contents, title, s)
    for number, name in enumerate(SECTIONS, 1):
        story.append(para(f"{number}. {name}", s.h1))
        story += _SECTION_WRITERS[name](contents, s)
    footer = (f"Prunella {__version__} · model {model.fingerprint[:12]} · decision support only "
              f"(section {section('Limitations and cautions')})")
    return build_pdf(story, header=title, footer=footer, title=title, author="Prunella")


def write_report(contents: ReportContents, path: str | Path) -> None:
    """Render and save the report (written atomically; never over an input file)."""
    write_bytes_atomic(path, render_report(contents))


# --- helpers ----------------------------------------------------------------------------------


def _grouped(digest: str) -> str:
    """A long hexadecimal fingerprint in groups of 16, so it wraps between groups."""
    return " ".join(digest[i:i + 16] for i in range(0, len(digest), 16))


def _risk(value: float, task: str) -> str:
    """A risk as printed: 3 decimals for costs per patient, 4 significant digits for errors."""
    if task == "classification":
        return f"{value:.3f}"
    return f"{value:.0f}" if abs(value) >= 1000 else f"{value:.4g}"


def _pct(k: int, n: int) -> str:
    return f"{k / n:.0%}" if n else "–"


def _count_pct(k: int, n: int) -> str:
    return f"{k} ({100 * k / n:.1f}%)" if n else str(k)


def _measures_checked(contents: ReportContents) -> list[tuple[str, Measures, str]]:
    return [(c.source, c.measures, c.kind) for c in contents.checks]


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


def _title_page(c: ReportContents, title: str, s: Styles) -> list:
    model, der = c.model, c.derivation
    data = model.extra.get("data", {})
    printed = f" · printed {c.printed}" if c.printed else ""
    story = [para(title, s.title),
             para(f"Prepared with Prunella {__version__} · model fingerprint "
                  f"{model.fingerprint[:16]} · data SHA-256 {str(data.get('sha256', ''))[:16]}"
                  f"{printed}", s.subtitle)]
    story.append(para("", s.body))
    cohort = model.extra.get("cohort", {})
    patients = f" from {cohort['patients']} patients" if cohort.get("patients") else ""
    asked = ", ".join(model.spec(col).display for col in model.columns_asked()) or "no question"
    summary = (f"A classification and regression tree (CART) for <b>{text(model.outcome.display)}"
               f"</b> was grown on {model.n_rows} visits{patients} "
               f"({text(data.get('file', 'the data file'))}), pruned by weakest-link "
               f"cost-complexity pruning, and sized by {text(model.path.get('cv', 'cross-validation'))}. "
               f"The chosen tree has {len(model.leaves)} outcome boxes and asks about {text(asked)}. "
               f"Its cross-validated risk is {model.chosen['cv_risk']:.3f} ± "
               f"{model.chosen['cv_se']:.3f} ({text(model.path.get('risk_measure', 'risk'))}; "
               f"training risk {model.chosen['train_risk']:.3f}).")
    story.append(para(summary, s.body, markup=True))
    lines = []
    if c.nested is not None:
        lines.append(f"Honest error of the whole procedure: {c.nested.summary()}.")
    for check in c.checks:
        lines.append(f"Checked on {check.source} ({check.n} visits): {check.summary}.")
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
             ["Rows and columns in the file", f"{p.n_rows} rows, {p.n_columns} columns"]]
    if p.encoding:
        rows.append(["Text encoding, delimiter, decimal mark",
                     f"{p.encoding}, {p.delimiter!r}, {p.decimal!r}"])
    rows.append(["Model fingerprint (SHA-256 of the model file's content)",
                 _grouped(model.fingerprint)])
    story = [para("The tree was derived from the file below. The fingerprint identifies its exact "
                  "bytes: a file with another fingerprint is other data.", s.body),
             table(rows, [0.36, 0.64], s)]
    for warning in p.warnings:
        story.append(para(f"Reading note: {warning}", s.bullet))
    return story


def _participants(c: ReportContents, s: Styles) -> list:
    der, model = c.derivation, c.model
    cohort = model.extra.get("cohort", {})
    rows = [["Item", "Derivation"]]
    rows.append(["Visits (rows with a recorded outcome, used for growing)", str(cohort.get("visits", model.n_rows))])
    if cohort.get("patients"):
        rows.append(["Patients", str(cohort["patients"])])
    for site, n in _site_counts(c).items():
        rows.append([f"Visits at {site}", _count_pct(n, model.n_rows)])
    if cohort.get("first_date"):
        rows.append([f"Dates ({cohort.get('date_column', 'date')})",
                     f"{cohort['first_date']} to {cohort['last_date']}"])
    if "outcome_counts" in cohort:
        for label, n in cohort["outcome_counts"].items():
            rows.append([f"{model.outcome.display}: {label}", _count_pct(n, model.n_rows)])
    elif "outcome_mean" in cohort:
        unit = f" {model.outcome.unit}" if model.outcome.unit else ""
        rows.append([f"Mean {model.outcome.display}", f"{cohort['outcome_mean']:.3g}{unit}"])
    if der.heldout is not None:
        held = der.heldout
        patients = f" ({np.unique(held.groups).size} patients)" if held.groups is not None else ""
        rows.append(["Set aside before growing (held-out check)", f"{held.n} visits{patients}"])
    story = [para("Eligible were all rows of the file with a recorded outcome. Repeat visits of "
                  "one patient are kept together in every fold when a patient identifier is set.",
                  s.body), table(rows, [0.62, 0.38], s)]
    story += [para(note, s.bullet) for note in der.notes]
    for check in c.checks:
        if check.kind == "external":
            patients = f" ({check.patients} patients)" if check.patients else ""
            story.append(para(f"External check: {check.source}: {check.n} visits{patients} with a "
                              f"usable outcome, of {check.n_rows} rows.", s.bullet))
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
        story.append(para(f"Other roles: {text_roles}.", s.body))
    return story


def _missing(c: ReportContents, s: Styles) -> list:
    der, model = c.derivation, c.model
    n = der.data.n
    routing = {}
    for node in model.nodes:
        if node.question is not None and node.question.kind != "missing":
            routing.setdefault(node.question.column, []).append(
                f"box {node.id}: {node.question.missing_goes.upper()}")
    rows = [["Predictor", "Not recorded (derivation visits)", "Where the tree sends them"]]
    for column in der.data.predictors:
        k = int(column.missing.sum())
        rows.append([column.spec.display, _count_pct(k, n),
                     "; ".join(routing.get(column.spec.name, [])) or "–"])
    return [para("Values not recorded are not imputed. At every question the grower learns which "
                 "branch such patients follow (the larger branch when the derivation patients "
                 "at that box had none), and the chart prints that branch. A level the tree "
                 "never saw at derivation is treated as not recorded.", s.body),
            table(rows, [0.36, 0.3, 0.34], s)]


def _settings(c: ReportContents, s: Styles) -> list:
    req, model = c.derivation.request, c.model
    t, cv = req.tree, req.cv
    criterion = t.criterion or ("gini" if model.task == "classification" else "squared_error")
    rows = [["Setting", "Value"],
            ["Task", model.task],
            ["Grower", f"scikit-learn {sklearn.__version__} decision tree, split criterion "
                       f"{criterion}, best splitter"],
            ["Minimum patients per outcome box", str(t.min_leaf)],
            ["Maximum depth", str(t.max_depth) if t.max_depth else "none (grown to the minimum box size)"]]
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
        rows.append(["Node risk used for pruning",
                     "expected misclassification cost (CART)" if t.risk == "cost"
                     else "impurity of the split criterion"])
    rows += [["Pruning", "weakest-link cost-complexity pruning (Breiman et al. 1984)"],
             ["Cross-validation", model.path.get("cv", cv.describe(cv.grouped))],
             ["CV grid", "geometric midpoints of the pruning sequence's α values"],
             ["Size rule", {"1se": "1-SE rule: the smallest tree within one standard error of "
                                   "the minimum cross-validated risk",
                            "min": "minimum cross-validated risk"}.get(
                 model.chosen["rule"], f"chosen by the user ({model.chosen['leaves']} boxes)")],
             ["Held-out share set aside before growing",
              f"{req.holdout:.0%}" if req.holdout else "none"],
             ["Random seed", str(t.seed)]]
    if c.nested is not None:
        rows.append(["Nested cross-validation", c.nested.description])
    if c.stability is not None:
        st = c.stability
        rows.append(["Bootstrap stability", f"{st.resamples} resamples of "
                     f"{'patients' if st.patient_level else 'visits'}, seed {st.seed}"])
    rows.append(["Software", f"Prunella {__version__}, Python {platform.python_version()}, "
                             f"scikit-learn {sklearn.__version__}, NumPy {np.__version__}, "
                             f"pandas {pd.__version__}"])
    return [para("How the tree was grown, pruned and sized. Every step is seeded, so the same "
                 "data and settings give the same tree.", s.body),
            table(rows, [0.34, 0.66], s)]


def _pruning(c: ReportContents, s: Styles) -> list:
    path = c.model.path
    story = [figure(pruning_curve_figure(path),
                    f"Figure {s.next_figure()}. Cross-validated risk (±1 SE) and training risk for each size on "
                    f"the pruning path. Diamond: minimum cross-validated risk "
                    f"({path['min_leaves']} boxes); square: the 1-SE choice "
                    f"({path['one_se_leaves']} boxes). Training risk always falls as the tree "
                    "grows; only the cross-validated risk says how it does on new patients.", s)]
    leaves = path["leaves"]
    order = sorted(range(len(leaves)), key=lambda k: leaves[k])
    keep = set(order[:14]) | {leaves.index(path["min_leaves"]), leaves.index(path["one_se_leaves"]),
                              leaves.index(c.model.chosen["leaves"])}
    rows = [["Boxes", "Mark", "Training risk", "Cross-validated risk", "SE"]]
    for k in sorted(keep, key=lambda k: leaves[k]):
        marks = []
        if leaves[k] == path["min_leaves"]:
            marks.append("minimum")
        if leaves[k] == path["one_se_leaves"]:
            marks.append("1-SE")
        if leaves[k] == c.model.chosen["leaves"]:
            marks.append("chosen")
        digits = (lambda v: f"{v:.4f}") if c.model.task == "classification" else (
            lambda v: _risk(v, "regression"))
        rows.append([str(leaves[k]), ", ".join(marks), digits(path["train_risk"][k]),
                     digits(path["cv_risk"][k]), digits(path["cv_se"][k])])
    shown = "" if len(keep) == len(leaves) else (f" ({len(keep)} of the {len(leaves)} sizes "
                                                 "shown: the smallest trees and the marked ones)")
    story.append(KeepTogether([para(f"Risk: {path.get('risk_measure', 'risk')}{shown}.", s.body),
                               table(rows, [0.1, 0.24, 0.2, 0.24, 0.16], s,
                                     align_right=(0, 2, 3, 4), keep=False)]))
    return story


def _leaf_paths(model) -> dict[int, list[str]]:
    parents = {child: (node, i) for node in model.nodes for i, child in enumerate(node.children)}
    paths = {}
    for leaf in model.leaves:
        steps, current = [], leaf.id
        while current in parents:
            node, branch = parents[current]
            answer = "yes" if branch == 0 else "no"
            missing = node.question.missing_goes == answer and node.question.kind != "missing"
            steps.append(f"{node.text} {answer.upper()}" + (" (or not recorded)" if missing else ""))
            current = node.id
        paths[leaf.id] = list(reversed(steps))
    return paths


def _tree(c: ReportContents, s: Styles) -> list:
    model = c.model
    story = [para("The tree as numbered rules: each outcome box, the answers that lead to it, and "
                  "what the derivation patients in it showed (95% interval). Boxes are numbered "
                  "as on the chart.", s.body)]
    if model.task == "classification":
        head = f"Share with {model.positive} (95% CI)" if model.positive else "Share of the expected class (95% CI)"
    else:
        unit = f" ({model.outcome.unit})" if model.outcome.unit else ""
        head = f"Mean{unit} (95% CI)"
    rows = [["Box", "Route to the box", "Expected outcome", "Patients", head]]
    small = []
    for leaf_id, steps in _leaf_paths(model).items():
        leaf = model.node(leaf_id)
        if model.task == "classification":
            k = leaf.counts[1] if model.positive else leaf.counts[model.classes.index(leaf.prediction)]
            lo, hi = wilson_interval(k, leaf.n)
            rate = f"{k / max(leaf.n, 1):.0%} ({lo:.0%}–{hi:.0%})"
            expected = str(leaf.prediction)
        else:
            lo, hi = mean_interval(leaf.mean, leaf.sd or float("nan"), leaf.n)
            rate = f"{leaf.mean:.3g} ({lo:.3g}–{hi:.3g})"
            expected = f"mean {leaf.mean:.3g}"
        mark = " †" if leaf.n < SMALL_BOX else ""
        if mark:
            small.append(leaf_id)
        route = " → ".join(steps) if steps else "every patient"
        rows.append([f"{leaf_id}{mark}", route, expected, str(leaf.n), rate])
    story.append(table(rows, [0.07, 0.48, 0.13, 0.1, 0.22], s, align_right=(3,)))
    if small:
        story.append(para(f"† rests on fewer than {SMALL_BOX} derivation patients: the rate is "
                          "uncertain and may identify individuals; consider suppressing it before "
                          "sharing.", s.caption))
    return story


def _perf_row(name: str, basis: str, n: int, m: Measures | None, risk: str, s: Styles) -> list:
    first = Paragraph(f"<b>{text(name)}</b><br/>{text(basis)}", s.cell)
    if m is None:
        return [first, str(n), risk, "–", "–", "–", "–"]
    if isinstance(m, ClassificationMeasures):
        head = m.headline
        if head is not None:
            auc = head.roc.text() if head.roc is not None else "–"
            return [first, str(n), risk, m.accuracy.text(), head.sensitivity.text(),
                    head.specificity.text(), auc]
        return [first, str(n), risk, m.accuracy.text(),
                f"{m.auc_macro:.2f}" if m.auc_macro is not None else "–"]
    return [first, str(n), risk, f"{m.rmse:.3g}", f"{m.mae:.3g}", f"{m.r2:.2f}"]


def _performance(c: ReportContents, s: Styles) -> list:
    model, der = c.model, c.derivation
    classification = model.task == "classification"
    binary = classification and model.positive is not None
    if binary:
        head = ["Estimate (patients used)", "Visits", "Cost per patient (± SE)", "Accuracy",
                "Sensitivity", "Specificity", "ROC area"]
        widths = [0.25, 0.07, 0.13, 0.13, 0.14, 0.14, 0.14]
    elif classification:
        head = ["Estimate (patients used)", "Visits", "Cost per patient (± SE)", "Accuracy",
                "Mean one-vs-rest ROC area"]
        widths = [0.36, 0.1, 0.18, 0.18, 0.18]
    else:
        head = ["Estimate (patients used)", "Visits", "Mean squared error (± SE)", "RMSE", "MAE", "R²"]
        widths = [0.36, 0.1, 0.18, 0.12, 0.12, 0.12]
    width = len(head)
    ch, task = model.chosen, model.task
    rows = [head,
            _perf_row("Training (optimistic)", "the derivation patients themselves", model.n_rows,
                      training_measures(der), _risk(ch["train_risk"], task), s),
            _perf_row("Cross-validated", model.path.get("cv", "cross-validation"), model.n_rows,
                      None, f"{_risk(ch['cv_risk'], task)} ± {_risk(ch['cv_se'], task)}", s)[:width]]
    if c.nested is not None:
        rows.append(_perf_row("Nested cross-validation (honest)",
                              "outer folds never used for growing or sizing", c.nested.n,
                              c.nested.measures, f"{_risk(c.nested.risk, task)} ± "
                              f"{_risk(c.nested.risk_se, task)}", s))
    for check in c.checks:
        m = check.measures
        risk = (f"{m.cost:.3f} ± {m.cost_se:.3f}" if isinstance(m, ClassificationMeasures)
                else _risk(m.rmse ** 2, task))
        rows.append(_perf_row("Held-out check" if check.kind == "held-out" else "External check",
                              check.source, check.n, m, risk, s))
    story = [para("Performance of the chosen tree, from the most optimistic estimate (the "
                  "patients it was grown on) to the most honest (patients it never saw). "
                  "Intervals are 95%: Wilson for proportions, DeLong for the ROC area; ± is one "
                  "standard error. " + ("Cost is the expected misclassification cost per "
                  "patient under the costs and priors of section 5, comparable across rows."
                  if classification else "Errors are in the outcome's unit."), s.body),
             KeepTogether([para("8.1 Overview", s.h2),
                           table(rows, widths, s, align_right=(1,), keep=False)])]
    if c.nested is not None:
        story += _nested_detail(c.nested, s)
    for i, check in enumerate(c.checks, 2 + (c.nested is not None)):
        story += _check_detail(check, f"8.{i}", s)
    if not c.checks:
        story.append(para(f"{UNCHECKED_BANNER}. {UNCHECKED_DETAIL}", s.body))
    return story


def _nested_detail(nested: NestedResult, s: Styles) -> list:
    task = "regression" if nested.risk_measure == "mean squared error" else "classification"
    rows = [["Outer fold", "Growing patients", "Test visits", "Boxes chosen inside",
             "Inner CV risk", "Outer test risk"]]
    for f in nested.folds:
        rows.append([str(f.fold), str(f.n_train), str(f.n_test), str(f.leaves),
                     _risk(f.inner_cv_risk, task), _risk(f.test_risk, task)])
    return [para("8.2 Nested cross-validation", s.h2),
            para(f"{nested.description}. Inside every outer fold the whole procedure ran again "
                 f"(growing, cross-validating the pruning path, choosing the size by the "
                 f"{nested.size_rule}); the chosen tree was then measured on the outer fold. "
                 "The spread of the chosen sizes shows how firmly the data fix the size.", s.body),
            table(rows, [0.13, 0.18, 0.15, 0.2, 0.17, 0.17], s, align_right=(1, 2, 3, 4, 5))]


def _measure_tables(m: Measures, s: Styles) -> list:
    if not isinstance(m, ClassificationMeasures) or m.positive is not None:
        return [table([["Measure", "Value (95% interval)"]] + [list(r) for r in m.rows()],
                      [0.5, 0.5], s)]
    overall = [["Measure", "Value (95% interval)"], ["Patients", str(m.n)],
               ["Accuracy", m.accuracy.text()],
               ["Misclassification cost per patient", f"{m.cost:.3f} (SE {m.cost_se:.3f})"],
               ["Brier score (summed over classes)", f"{m.brier:.3f}"]]
    if m.auc_macro is not None:
        overall.append(["Mean one-vs-rest ROC area", f"{m.auc_macro:.2f}"])
    per_class = [["Class (against the rest)", "Patients", "Sensitivity", "Specificity", "PPV",
                  "NPV", "ROC area (DeLong)"]]
    for r in m.per_class:
        per_class.append([r.label, str(r.n_with), r.sensitivity.text(), r.specificity.text(),
                          r.ppv.text(), r.npv.text(), r.roc.text() if r.roc else "–"])
    return [table(overall, [0.5, 0.5], s),
            table(per_class, [0.19, 0.1, 0.14, 0.14, 0.14, 0.14, 0.15], s, align_right=(1,))]


def _check_detail(check: ValidationResult, number: str, s: Styles) -> list:
    m = check.measures
    patients = f" ({check.patients} patients)" if check.patients else ""
    story = [para(f"{number} {'Held-out' if check.kind == 'held-out' else 'External'} check: "
                  f"{check.source}", s.h2),
             para(f"{check.n} visits{patients} checked.", s.body)]
    if check.columns is not None:
        story += [para(line, s.bullet) for line in check.columns.lines()]
    story += [para(f"Warning: {w}", s.bullet) for w in check.warnings]
    story += _measure_tables(m, s)
    if isinstance(m, ClassificationMeasures):
        header = ["Observed \\ predicted"] + list(m.classes)
        rows = [header] + [[label] + [str(v) for v in row] for label, row in zip(m.classes, m.confusion)]
        share = 0.7 / (len(m.classes) + 1)
        story.append(KeepTogether([
            para("Confusion matrix (rows: observed outcome; columns: the tree's prediction).",
                 s.body),
            table(rows, [share] * (len(m.classes) + 1), s,
                  align_right=tuple(range(1, len(m.classes) + 1)), keep=False)]))
    if m.calibration:
        percent = isinstance(m, ClassificationMeasures)
        what = "rate" if percent else "mean"
        rows = [["Box", "Rate of" if percent else "Outcome", f"Derivation {what}",
                 "Derivation patients", f"Observed {what} (95% CI)", "New patients", "Agrees"]]
        for r in m.calibration:
            derived = f"{r.derivation_value:.0%}" if percent else f"{r.derivation_value:.3g}"
            rows.append([str(r.box), r.label, derived, str(r.derivation_n),
                         r.observed_text(percent), str(r.n),
                         {True: "yes", False: "NO: outside", None: "–"}[r.agrees]])
        intro = para(f"Calibration by outcome box: the derivation {what} against the {what} "
                     f"observed in the new patients. 'Agrees' means the derivation {what} lies "
                     "inside the observed 95% interval.", s.body)
        calibration = table(rows, [0.07, 0.15, 0.13, 0.13, 0.22, 0.12, 0.18], s,
                            align_right=(2, 3, 5), keep=False)
        story += [KeepTogether([intro, calibration])] if len(rows) <= 20 else [intro, calibration]
    figures = []
    if isinstance(m, ClassificationMeasures) and any(r.roc for r in m.per_class):
        figures.append(roc_figure(m))
    if m.calibration:
        figures.append(calibration_figure(m))
    if figures:
        fig = s.next_figure()
        names = " (left) and calibration by box (right)" if len(figures) == 2 else ""
        caption = (f"Figure {fig}. {check.source}: ROC curve of the box rates{names}. "
                   if len(figures) == 2 else f"Figure {fig}. {check.source}. ")
        caption += ("Open markers: boxes whose derivation value lies outside the observed "
                    "interval." if m.calibration else "")
        story.append(figures_side_by_side(figures, caption, s) if len(figures) > 1
                     else figure(figures[0], caption, s, width=0.6))
    return story


def _stability(c: ReportContents, s: Styles) -> list:
    st = c.stability
    if st is None:
        return [para("Not assessed in this report (bootstrap resamples were switched off).", s.body)]
    unit = "patients (all their visits together)" if st.patient_level else "visits"
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
        f"{k} boxes ({v} resample{'s' if v > 1 else ''})" for k, v in sizes.items()) + ".", s.body))
    return story


def _limitations(c: ReportContents, s: Styles) -> list:
    model, der = c.model, c.derivation
    items = []
    sites = _site_counts(c)
    where = f" ({', '.join(sites)})" if sites else ""
    items.append(f"The tree comes from one cohort{where}; it is valid only for patients like "
                 "those it was derived from.")
    if not any(ch.kind == "external" for ch in c.checks):
        items.append("It has not been checked on patients from another site or period in this "
                     "report; that check is needed before use elsewhere.")
    for check in c.checks:
        outside = check.calibration_outside
        if outside:
            items.append(f"In {check.source}, the derivation rate of box(es) "
                         f"{', '.join(map(str, outside))} lies outside the observed interval: "
                         "the tree is miscalibrated there and should be recalibrated or "
                         "rederived locally.")
    small = [leaf.id for leaf in model.leaves if leaf.n < SMALL_BOX]
    if small:
        items.append(f"Box(es) {', '.join(map(str, small))} rest on fewer than {SMALL_BOX} patients.")
    heavy = [t.spec.display for t in der.data.predictors if t.missing.mean() > 0.2]
    if heavy:
        items.append("Often not recorded (over 20% of visits): " + ", ".join(heavy) + "; where "
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
        items.append("Nested cross-validation was not run; the cross-validated risk of the "
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


_SECTION_WRITERS = {
    "Data source": _data_source, "Participants": _participants,
    "Outcome and predictors": _definitions, "Missing values": _missing,
    "Model building": _settings, "Pruning path and the choice of size": _pruning,
    "The chosen tree": _tree, "Performance": _performance, "Stability": _stability,
    "Limitations and cautions": _limitations, "TRIPOD checklist": _tripod,
}
