"""Section 8 of the methods report: performance from training to external patients."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from reportlab.platypus import KeepTogether, Paragraph

from ..cautions import UNCHECKED_BANNER, UNCHECKED_DETAIL
from ..checking.bootstrap_intervals import interval_text
from ..checking.intervals import as_percent
from ..checking.metrics import ClassificationMeasures, Measures
from ..checking.nested import NestedResult
from ..checking.new_patients import CheckResult, training_measures
from ..precision import summary_number
from .figures import (DECISION_CURVE_READING, calibration_figure, decision_curve_figure,
                      roc_figure)
from .section_numbers import section
from .style import Styles, figure, figures_side_by_side, para, table, text

if TYPE_CHECKING:
    from .contents import ReportContents


def risk_text(value: float, task: str, data_decimals: int | None = None) -> str:
    """An error as printed: 3 decimals for costs per patient; a mean squared error to the
    squares' precision (at most one decimal more than the squared outcome, core/precision.py)."""
    if task == "classification":
        return f"{value:.3f}"
    return summary_number(value, data_decimals, power=2)


def _perf_row(name: str, basis: str, n: int, m: Measures | None, risk: str, s: Styles) -> list:
    first = Paragraph(f"<b>{text(name)}</b><br/>{text(basis)}", s.cell)
    if m is None:
        return [first, f"{n:,}", risk, "–", "–", "–", "–"]
    if isinstance(m, ClassificationMeasures):
        head = m.headline
        if head is not None:
            auc = head.roc.text() if head.roc is not None else "–"
            return [first, f"{n:,}", risk, m.accuracy.text(), head.sensitivity.text(),
                    head.specificity.text(), auc]
        return [first, f"{n:,}", risk, m.accuracy.text(),
                f"{m.auc_macro:.2f}" if m.auc_macro is not None else "–"]
    return [first, f"{n:,}", risk, m.number(m.rmse), m.number(m.mae), f"{m.r2:.2f}"]


def _cv_row(model, risk: str, s: Styles) -> list:
    """The cross-validated row, with every measure the one-pass CV counted for this size
    (pooled sensitivity and specificity with Wilson intervals; the root of the error in the
    outcome's unit), so the honest row is never emptier than the optimistic one."""
    first = Paragraph(f"<b>Cross-validated</b><br/>{text(model.path.get('cv', 'cross-validation'))}",
                      s.cell)
    row = [first, f"{model.n_rows:,}", risk, "–", "–", "–", "–"]
    path, leaves = model.path, model.chosen.get("leaves")
    k = path["leaves"].index(leaves) if leaves in path.get("leaves", ()) else None
    if model.task == "regression":
        row[3] = summary_number(math.sqrt(max(model.chosen['cv_risk'], 0.0)),
                                model.outcome_decimals)
        return row
    if k is None or "cv_sensitivity" not in path:
        return row
    for column, name in ((4, "cv_sensitivity"), (5, "cv_specificity")):
        value, (low, high) = path[name][k], path[name + "_interval"][k]
        if value is not None and low is not None:
            row[column] = (f"{as_percent(value)} ({as_percent(low, sign=False)}–"
                           f"{as_percent(high)})")
    return row


def performance_section(c: ReportContents, s: Styles) -> list:
    model, der = c.model, c.derivation
    number = section("Performance")
    classification = model.task == "classification"
    binary = classification and model.positive is not None
    word = model.rows_word  # the rows counted: visits, or patients where each came once
    per = f"Cost per {word[:-1]} (± SE)"
    if binary:
        head = ["Estimate (patients used)", word.capitalize(), per, "Accuracy",
                "Sensitivity", "Specificity", "ROC area"]
        widths = [0.25, 0.07, 0.13, 0.13, 0.14, 0.14, 0.14]
    elif classification:
        head = ["Estimate (patients used)", word.capitalize(), per, "Accuracy",
                "Mean one-vs-rest ROC area"]
        widths = [0.36, 0.1, 0.18, 0.18, 0.18]
    else:
        head = ["Estimate (patients used)", word.capitalize(), "Mean squared error (± SE)", "RMSE",
                "MAE", "R²"]
        widths = [0.36, 0.1, 0.18, 0.12, 0.12, 0.12]
    width = len(head)
    ch, task = model.chosen, model.task
    places = model.outcome_decimals  # a measured outcome's errors follow its precision
    # The honest estimates first; the training row, always the best-looking, comes last.
    rows = [head,
            _cv_row(model, f"{risk_text(ch['cv_risk'], task, places)} ± {risk_text(ch['cv_se'], task, places)}",
                    s)[:width]]
    if c.nested is not None:
        rows.append(_perf_row("Nested cross-validation (honest)",
                              "outer folds never used for growing or sizing", c.nested.n,
                              c.nested.measures, f"{risk_text(c.nested.risk, task, places)} ± "
                              f"{risk_text(c.nested.risk_se, task, places)}", s))
    for check in c.checks:
        m = check.measures
        risk = (f"{m.cost:.3f} ± {m.cost_se:.3f}" if isinstance(m, ClassificationMeasures)
                else risk_text(m.rmse ** 2, task, places))
        rows.append(_perf_row("Held-out check" if check.kind == "held-out" else "External check",
                              check.source, check.n, m, risk, s))
    rows.append(_perf_row("Training (optimistic)", "the derivation patients themselves",
                          model.n_rows, training_measures(model, der.data),
                          risk_text(ch["train_risk"], task, places), s))
    story = [para("Performance of the chosen tree: cross-validated, then on patients it never "
                  "saw where it was checked, and last, for comparison only, on the patients it "
                  "was grown on (always optimistic). "
                  "Intervals are 95%: Wilson for proportions, DeLong for the ROC area, a "
                  "percentile bootstrap over patients for the Brier score and the errors (the "
                  "resample count is given with each check); ± is one standard error. " + ("Cost is the expected misclassification cost per "
                  f"{word[:-1]} under the costs and priors of section {section('Model building')}, "
                  "comparable across rows."
                  if classification else "Errors are in the outcome's unit."), s.body),
             KeepTogether([para(f"{number}.1 Overview", s.h2),
                           table(rows, widths, s, align_right=(1,), keep=False)])]
    if c.nested is not None:
        story += _nested_detail(c.nested, f"{number}.2", s, word, model.outcome_decimals)
    for i, check in enumerate(c.checks, 2 + (c.nested is not None)):
        story += _check_detail(check, f"{number}.{i}", s, word)
    if not c.checks:
        story.append(para(f"{UNCHECKED_BANNER}. {UNCHECKED_DETAIL}", s.body))
        cv_points = model.chosen.get("cv_net_benefit")
        if cv_points:
            fig = s.next_figure()
            story.append(figure(decision_curve_figure(cv_points),
                                f"Figure {fig}. Decision curve from the cross-validated "
                                "predictions on the derivation patients (no patients were set "
                                f"aside). {DECISION_CURVE_READING}", s, width=0.6))
    return story


def _nested_detail(nested: NestedResult, number: str, s: Styles, word: str = "visits",
                   places: int | None = None) -> list:
    task = "regression" if nested.risk_measure == "mean squared error" else "classification"
    rows = [["Outer fold", f"Growing {word}", f"Test {word}", "Boxes chosen inside",
             "Inner cross-validated error", "Error on the outer part"]]
    for f in nested.folds:
        rows.append([str(f.fold), f"{f.n_train:,}", f"{f.n_test:,}", str(f.leaves),
                     risk_text(f.inner_cv_risk, task, places), risk_text(f.test_risk, task, places)])
    return [para(f"{number} Nested cross-validation", s.h2),
            para(f"{nested.description}. Inside every outer fold the whole procedure ran again "
                 f"(growing, cross-validating the pruning path, choosing the size "
                 f"{nested.size_rule}); the chosen tree was then measured on the outer fold. "
                 "The spread of the chosen sizes shows how firmly the data fix the size.", s.body),
            table(rows, [0.13, 0.18, 0.15, 0.2, 0.17, 0.17], s, align_right=(1, 2, 3, 4, 5))]


def _measure_tables(m: Measures, s: Styles) -> list:
    if not isinstance(m, ClassificationMeasures) or m.positive is not None:
        return [table([["Measure", "Value (95% interval)"]] + [list(r) for r in m.rows()],
                      [0.5, 0.5], s)]
    counted = [list(r) for r in m.rows()[:2] if r[0] in ("Visits", "Patients")]
    overall = [["Measure", "Value (95% interval)"]] + counted + [
               ["Accuracy", m.accuracy.text()],
               [f"Misclassification cost per {m.rows_word[:-1]}",
                f"{m.cost:.3f} (SE {m.cost_se:.3f})"],
               ["Brier score (summed over classes)",
                f"{m.brier:.3f}{interval_text(m.brier_interval, '.3f')}"]]
    if m.auc_macro is not None:
        overall.append(["Mean one-vs-rest ROC area", f"{m.auc_macro:.2f}"])
    if m.intervals is not None:
        overall.append(["Interval of the Brier score", m.intervals.text()])
    per_class = [["Class (against the rest)", m.rows_word.capitalize(), "Sensitivity", "Specificity", "PPV",
                  "NPV", "ROC area (DeLong)"]]
    for r in m.per_class:
        per_class.append([r.label, f"{r.n_with:,}", r.sensitivity.text(), r.specificity.text(),
                          r.ppv.text(), r.npv.text(), r.roc.text() if r.roc else "–"])
    return [table(overall, [0.5, 0.5], s),
            table(per_class, [0.19, 0.1, 0.14, 0.14, 0.14, 0.14, 0.15], s, align_right=(1,))]


def _check_detail(check: CheckResult, number: str, s: Styles, word: str = "patients") -> list:
    """One check in full; ``word`` counts the derivation rows (visits or patients)."""
    m = check.measures
    story = [para(f"{number} {'Held-out' if check.kind == 'held-out' else 'External'} check: "
                  f"{check.source}", s.h2),
             para(f"{check.counted[0].upper()}{check.counted[1:]} checked.", s.body)]
    if check.columns is not None:
        story += [para(line, s.bullet) for line in check.columns.lines()]
    story += [para(f"Warning: {w}", s.bullet) for w in check.warnings]
    story += _measure_tables(m, s)
    if isinstance(m, ClassificationMeasures):
        header = ["Observed \\ predicted"] + list(m.classes)
        rows = [header] + [[label] + [f"{int(v):,}" for v in row]
                           for label, row in zip(m.classes, m.confusion)]
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
                 f"Derivation {word}", f"Observed {what} (95% CI)", f"New {check.rows_word}",
                 "Agrees"]]
        for r in m.calibration:
            places = getattr(m, "decimals", None)
            rows.append([str(r.box), r.label, r.derivation_text(percent, places),
                         f"{r.derivation_n:,}", r.observed_text(percent, places), f"{r.n:,}",
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
    if isinstance(m, ClassificationMeasures) and m.net_benefit:
        fig = s.next_figure()
        source = text(check.source[:1].upper() + check.source[1:])  # data, not markup
        story.append(figure(decision_curve_figure(m.net_benefit),
                            f"Figure {fig}. {source}: decision curve. {DECISION_CURVE_READING}",
                            s, width=0.6))
    if figures:
        fig = s.next_figure()
        names = " (left) and calibration by box (right)" if len(figures) == 2 else ""
        source = text(check.source[:1].upper() + check.source[1:])  # opens a sentence; not markup
        caption = (f"Figure {fig}. {source}: ROC curve of the box rates{names}. "
                   if len(figures) == 2 else f"Figure {fig}. {source}. ")
        caption += ("Open markers: boxes whose derivation value lies outside the observed "
                    "interval." if m.calibration else "")
        story.append(figures_side_by_side(figures, caption, s) if len(figures) > 1
                     else figure(figures[0], caption, s, width=0.6))
    return story


