"""How well a tree does on a set of patients: measures with 95% intervals.

Point values come from scikit-learn's metrics; only the intervals and standard errors are
written here: Wilson score intervals for proportions (core/checking/intervals.py), the Hanley
& McNeil (1982) and DeLong, DeLong & Clarke-Pearson (1988) standard errors of the ROC area,
and Student-t intervals for box means; the Brier score, RMSE, MAE and R² get percentile bootstrap
intervals over patients (core/checking/bootstrap_intervals.py). Everything is returned as plain frozen dataclasses so
the app, the command line and the report show the same numbers. scikit-learn and SciPy are
imported on first use, so a command that refuses bad input starts without them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .bootstrap_intervals import (
    BootstrapPlan, Interval, brier_interval, interval_text, plan_for, regression_intervals,
)
from .intervals import LEVEL, Proportion, as_percent, mean_interval, normal_quantile, proportion
from ..precision import summary_number
from ..phrases import patients_among, rows_and_patients, rows_word
from .net_benefit import NetBenefitPoint, net_benefit

NET_BENEFIT_ROWS = (0.05, 0.1, 0.2)  # the thresholds listed among the measures' rows

# --- building blocks --------------------------------------------------------------------------


@dataclass(frozen=True)
class RocCurve:
    """ROC curve of a score and its area with a 95% interval."""

    fpr: tuple[float, ...]  # 1 - specificity at each cut
    tpr: tuple[float, ...]  # sensitivity at each cut
    cuts: tuple[float, ...]  # score at or above which a patient counts as positive
    auc: float
    se_hanley_mcneil: float
    se_delong: float
    low: float
    high: float
    method: str  # which SE the interval uses
    n_positive: int
    n_negative: int

    def text(self) -> str:
        return auc_text(self.auc, self.low, self.high)


def auc_text(auc: float, low: float, high: float) -> str:
    """An area under the ROC curve with its interval as printed, '0.82 (0.79–0.85)'."""
    return f"{auc:.2f} ({low:.2f}–{high:.2f})"


def two_class_summary(sensitivity: str, specificity: str, auc: str | None) -> str:
    """The summary line of a two-class check from its printed measures."""
    parts = [f"Sensitivity {sensitivity}", f"specificity {specificity}"]
    if auc is not None:
        parts.append(f"AUC {auc}")
    return ", ".join(parts)


def several_class_summary(accuracy: str, auc_macro: float | None, cost: float,
                          row: str) -> str:
    """The summary line of a check of three or more classes from its measures (``row``:
    "visit" or "patient", what the cost is per)."""
    parts = [f"Accuracy {accuracy}"]
    if auc_macro is not None:
        parts.append(f"mean one-vs-rest AUC {auc_macro:.2f}")
    parts.append(f"cost {cost:.3f} per {row}")
    return ", ".join(parts)


def hanley_mcneil_se(auc: float, n_positive: int, n_negative: int) -> float:
    """SE of the ROC area (Hanley & McNeil 1982, Radiology 143:29–36, their equation 2)."""
    q1 = auc / (2 - auc)
    q2 = 2 * auc * auc / (1 + auc)
    var = (auc * (1 - auc) + (n_positive - 1) * (q1 - auc * auc)
           + (n_negative - 1) * (q2 - auc * auc)) / (n_positive * n_negative)
    return float(math.sqrt(max(var, 0.0)))


def delong_se(truth: np.ndarray, score: np.ndarray) -> float:
    """SE of the empirical ROC area by DeLong, DeLong & Clarke-Pearson (1988), ties counted half.

    Uses midranks (Sun & Xu 2014): each positive's placement is the share of negatives it
    outscores, each negative's the share of positives that outscore it.
    """
    truth = np.asarray(truth, dtype=bool)
    pos, neg = score[truth], score[~truth]
    m, n = len(pos), len(neg)
    if m < 2 or n < 2:
        return float("nan")
    from scipy.stats import rankdata

    ranks = rankdata(np.concatenate([pos, neg]))
    v10 = (ranks[:m] - rankdata(pos)) / n
    v01 = 1 - (ranks[m:] - rankdata(neg)) / m
    return float(math.sqrt(np.var(v10, ddof=1) / m + np.var(v01, ddof=1) / n))


def roc(truth: np.ndarray, score: np.ndarray) -> RocCurve | None:
    """ROC curve and area of ``score`` for the yes/no ``truth``; None if one group is empty.

    The interval is AUC ± 1.96 SE (clipped to 0–1) with DeLong's SE, which allows for the
    many ties a tree's few leaf probabilities make; Hanley & McNeil's SE is kept beside it
    (and used when a group has fewer than two patients).
    """
    truth = np.asarray(truth, dtype=bool)
    score = np.asarray(score, dtype=float)
    m, n = int(truth.sum()), int((~truth).sum())
    if m == 0 or n == 0:
        return None
    from sklearn.metrics import roc_auc_score, roc_curve

    auc = float(roc_auc_score(truth, score))
    fpr, tpr, cuts = roc_curve(truth, score, drop_intermediate=False)
    se_hm = hanley_mcneil_se(auc, m, n)
    se_dl = delong_se(truth, score)
    method, se = ("DeLong", se_dl) if math.isfinite(se_dl) else ("Hanley-McNeil", se_hm)
    z = normal_quantile(0.5 + LEVEL / 2)
    cuts = np.where(np.isfinite(cuts), cuts, np.nan)
    return RocCurve(tuple(fpr.tolist()), tuple(tpr.tolist()), tuple(cuts.tolist()), auc, se_hm,
                    se_dl, max(0.0, auc - z * se), min(1.0, auc + z * se), method, m, n)


@dataclass(frozen=True)
class DerivationBox:
    """What an outcome box said at derivation: patients, class counts or mean and SD."""

    box: int
    n: int
    counts: tuple[int, ...] = ()
    mean: float | None = None
    sd: float | None = None


@dataclass(frozen=True)
class CalibrationRow:
    """One outcome box: the derivation rate (or mean) against what the new patients showed."""

    box: int
    label: str  # the class whose rate is compared, or the outcome for regression
    derivation_n: int
    derivation_value: float  # rate of ``label`` or mean at derivation
    n: int  # new patients in the box
    observed: float | None  # their rate or mean (None when nobody reached the box)
    low: float | None
    high: float | None
    agrees: bool | None  # derivation value inside the observed interval

    def observed_text(self, percent: bool = True, decimals: int | None = None) -> str:
        """The new patients' rate (or mean, to the precision of an outcome recorded with
        ``decimals`` decimals) with its 95% interval."""
        if self.observed is None:
            return "no patients"
        if percent:
            return f"{as_percent(self.observed)} ({as_percent(self.low, False)}–{as_percent(self.high)})"
        if self.low is None:
            return f"{summary_number(self.observed, decimals)} (one patient)"
        return (f"{summary_number(self.observed, decimals)} ({summary_number(self.low, decimals)}"
                f" to {summary_number(self.high, decimals)})")

    def derivation_text(self, percent: bool = True, decimals: int | None = None) -> str:
        """The derivation rate (whole percent) or mean (to the outcome's precision)."""
        if percent:
            return f"{self.derivation_value:.0%}"
        return summary_number(self.derivation_value, decimals)


# --- classification ---------------------------------------------------------------------------


@dataclass(frozen=True)
class ClassResult:
    """One class against the rest."""

    label: str
    n_with: int  # patients who had this class
    sensitivity: Proportion
    specificity: Proportion
    ppv: Proportion
    npv: Proportion
    roc: RocCurve | None
    brier: float


@dataclass(frozen=True)
class ClassificationMeasures:
    """Classification performance on a set of patients."""

    n: int
    classes: tuple[str, ...]
    positive: str | None
    confusion: tuple[tuple[int, ...], ...]  # rows: true class, columns: predicted class
    accuracy: Proportion
    cost: float  # mean misclassification cost per patient (loss × prior weight)
    cost_se: float
    brier: float  # two classes: of the positive probability; more: summed over classes
    per_class: tuple[ClassResult, ...]  # two classes: the positive class only
    auc_macro: float | None  # several classes: mean of the one-vs-rest areas
    calibration: tuple[CalibrationRow, ...]
    task: str = "classification"
    # Two classes: net benefit at thresholds 1%–50% (Vickers & Elkin 2006), from box shares.
    net_benefit: tuple[NetBenefitPoint, ...] = ()
    brier_interval: Interval = None  # 95% percentile bootstrap over patients
    intervals: BootstrapPlan | None = None  # how the bootstrap intervals were drawn
    patients: int | None = None  # distinct patients among the rows, when their codes are known

    @property
    def rows_word(self) -> str:
        """"visits" where some patients came more than once, else "patients"."""
        return rows_word(self.n, self.patients)

    @property
    def headline(self) -> ClassResult | None:
        return self.per_class[0] if self.positive is not None and self.per_class else None

    def summary(self) -> str:
        """One printable line of the main measures with their intervals."""
        head = self.headline
        if head is not None:
            return two_class_summary(head.sensitivity.text(), head.specificity.text(),
                                     None if head.roc is None else head.roc.text())
        return several_class_summary(self.accuracy.text(), self.auc_macro, self.cost,
                                     self.rows_word[:-1])

    def rows(self) -> list[tuple[str, str]]:
        """(measure, value with interval) lines for a table."""
        lines = _counted(self.n, self.patients) + [
                 ("Accuracy", self.accuracy.text()),
                 (f"Misclassification cost per {self.rows_word[:-1]}",
                  f"{self.cost:.3f} (SE {self.cost_se:.3f})"),
                 ("Brier score", f"{self.brier:.3f}{interval_text(self.brier_interval, '.3f')}")]
        for result in self.per_class:
            name = f" ({result.label})" if self.positive is None or len(self.per_class) > 1 else ""
            lines += [(f"Sensitivity{name}", result.sensitivity.text()),
                      (f"Specificity{name}", result.specificity.text()),
                      (f"Positive predictive value{name}", result.ppv.text()),
                      (f"Negative predictive value{name}", result.npv.text())]
            if result.roc is not None:
                lines.append((f"ROC area{name}", f"{result.roc.text()} ({result.roc.method})"))
        if self.auc_macro is not None:
            lines.append(("Mean one-vs-rest ROC area", f"{self.auc_macro:.2f}"))
        for point in self.net_benefit:
            if round(point.threshold, 2) in NET_BENEFIT_ROWS:
                lines.append((f"Net benefit at a {point.threshold:.0%} threshold",
                              f"{point.tree:.3f} (treating all {point.treat_all:.3f}, "
                              "treating none 0)"))
        if self.intervals is not None:
            lines.append(("Interval of the Brier score", self.intervals.text()))
        return lines


def classification_measures(y: np.ndarray, predicted: np.ndarray, probabilities: np.ndarray,
                            classes: tuple[str, ...], loss: np.ndarray | None = None,
                            case_weight: np.ndarray | None = None,
                            leaves: np.ndarray | None = None,
                            boxes: tuple[DerivationBox, ...] = (),
                            groups: np.ndarray | None = None) -> ClassificationMeasures:
    """Measures for true classes ``y`` and predicted classes (both class indices).

    ``probabilities`` (patients × classes) are the derivation shares of each class in the box
    each patient reached; they make the ROC curves and the Brier score. ``loss`` and
    ``case_weight`` give the cost of each mistake as in core/sizing/cross_validated_path.py
    (loss × prior weight; 0-1 loss by default). With ``leaves`` and ``boxes``, each box is
    checked for calibration. ``groups`` (patient codes, one per row) makes the Brier score's
    bootstrap draw whole patients; without it each row is drawn alone.
    """
    from sklearn.metrics import brier_score_loss, confusion_matrix

    y = np.asarray(y, dtype=np.int64)
    predicted = np.asarray(predicted, dtype=np.int64)
    probabilities = np.asarray(probabilities, dtype=float)
    k = len(classes)
    labels = list(range(k))
    n = len(y)
    matrix = confusion_matrix(y, predicted, labels=labels) if n else np.zeros((k, k), int)
    correct = int(np.trace(matrix))
    accuracy = proportion(correct, n)
    loss = 1.0 - np.eye(k) if loss is None else np.asarray(loss, dtype=float)
    case_weight = np.ones(k) if case_weight is None else np.asarray(case_weight, dtype=float)
    per_case = loss[y, predicted] * case_weight[y]
    cost = float(per_case.mean()) if n else float("nan")
    cost_se = float(per_case.std() / math.sqrt(n)) if n else float("nan")
    two = k == 2
    if n == 0:
        brier = float("nan")
    elif two:
        brier = float(brier_score_loss(y == 1, probabilities[:, 1]))
    else:
        brier = float(brier_score_loss(y, probabilities, labels=labels))
    results = []
    for c in ([1] if two else labels):
        results.append(_one_class(classes[c], y == c, predicted == c, probabilities[:, c]))
    auc_macro = None
    if not two and n:
        present = [r.roc.auc for r in results if r.roc is not None]
        auc_macro = float(np.mean(present)) if present else None
    calibration = ()
    if leaves is not None and boxes:
        calibration = _class_calibration(y, np.asarray(leaves), boxes, classes)
    benefit = net_benefit(y, probabilities[:, 1]) if two and n else ()
    plan = plan_for(groups)
    # The Brier score's own terms: squared error of the event's share (two classes) or
    # summed over classes (several), as scikit-learn's brier_score_loss counts them.
    squared = ((probabilities[:, 1] - (y == 1)) ** 2 if two
               else ((probabilities - np.eye(k)[y]) ** 2).sum(axis=1)) if n else np.zeros(0)
    return ClassificationMeasures(
        n=n, classes=tuple(classes), positive=classes[1] if two else None,
        confusion=tuple(tuple(int(v) for v in row) for row in matrix), accuracy=accuracy,
        cost=cost, cost_se=cost_se, brier=brier, per_class=tuple(results), auc_macro=auc_macro,
        calibration=calibration, net_benefit=benefit,
        brier_interval=brier_interval(squared, groups, plan), intervals=plan,
        patients=patients_among(groups))


def _one_class(label: str, truth: np.ndarray, said: np.ndarray, score: np.ndarray) -> ClassResult:
    tp = int((truth & said).sum())
    fn = int((truth & ~said).sum())
    fp = int((~truth & said).sum())
    tn = int((~truth & ~said).sum())
    brier = float(np.mean((score - truth) ** 2)) if truth.size else float("nan")
    return ClassResult(label=label, n_with=tp + fn, sensitivity=proportion(tp, tp + fn),
                       specificity=proportion(tn, tn + fp), ppv=proportion(tp, tp + fp),
                       npv=proportion(tn, tn + fn), roc=roc(truth, score), brier=brier)


def _class_calibration(y, leaves, boxes, classes) -> tuple[CalibrationRow, ...]:
    rows = []
    compared = [1] if len(classes) == 2 else range(len(classes))
    for c in compared:
        for box in boxes:
            here = leaves == box.box
            m = int(here.sum())
            rate = box.counts[c] / max(box.n, 1)
            k = int((y[here] == c).sum())
            p = proportion(k, m)
            agrees = None if p.value is None else bool(p.low <= rate <= p.high)
            rows.append(CalibrationRow(box.box, classes[c], box.n, rate, m, p.value, p.low,
                                       p.high, agrees))
    return tuple(rows)


# --- regression -------------------------------------------------------------------------------


@dataclass(frozen=True)
class RegressionMeasures:
    """Regression performance on a set of patients."""

    n: int
    rmse: float
    mae: float
    r2: float
    mean_error: float  # observed minus predicted, on average (positive: the tree predicts low)
    calibration: tuple[CalibrationRow, ...]
    unit: str = ""
    task: str = "regression"
    # 95% percentile bootstrap intervals over patients, and how they were drawn
    rmse_interval: Interval = None
    mae_interval: Interval = None
    r2_interval: Interval = None
    intervals: BootstrapPlan | None = None
    decimals: int | None = None  # the outcome's recorded decimals, which the errors follow
    patients: int | None = None  # distinct patients among the rows, when their codes are known

    @property
    def rows_word(self) -> str:
        """"visits" where some patients came more than once, else "patients"."""
        return rows_word(self.n, self.patients)

    def number(self, value: float, with_unit: bool = False) -> str:
        """An error in the outcome's unit, to the outcome's precision (core/precision.py)."""
        return summary_number(value, self.decimals, self.unit if with_unit else "")

    def _error(self, value: float, interval: Interval) -> str:
        text = self.number(value, with_unit=True)
        if interval is None:
            return text
        low, high = interval
        dash = " to " if low < 0 or high < 0 else "–"  # a dash beside a minus sign misreads
        return f"{text} ({self.number(low)}{dash}{self.number(high)})"

    def summary(self) -> str:
        return (f"RMSE {self._error(self.rmse, self.rmse_interval)}, "
                f"MAE {self._error(self.mae, self.mae_interval)}, "
                f"R² {self.r2:.2f}{interval_text(self.r2_interval, '.2f')} "
                f"({rows_and_patients(self.n, self.patients)})")

    def rows(self) -> list[tuple[str, str]]:
        lines = _counted(self.n, self.patients) + [
                 ("Root mean squared error", self._error(self.rmse, self.rmse_interval)),
                 ("Mean absolute error", self._error(self.mae, self.mae_interval)),
                 ("R²", f"{self.r2:.3f}{interval_text(self.r2_interval, '.3f')}"),
                 ("Mean of observed − predicted", self.number(self.mean_error, with_unit=True))]
        if self.intervals is not None:
            lines.append(("Intervals of RMSE, MAE and R²", self.intervals.text()))
        return lines


def regression_measures(y: np.ndarray, predicted: np.ndarray, leaves: np.ndarray | None = None,
                        boxes: tuple[DerivationBox, ...] = (), label: str = "",
                        unit: str = "", groups: np.ndarray | None = None,
                        decimals: int | None = None) -> RegressionMeasures:
    """RMSE, MAE and R² (scikit-learn) with bootstrap intervals (whole patients when
    ``groups`` gives their codes), and per box the derivation mean against the observed mean
    with its Student-t 95% interval; the errors print to ``decimals``, the outcome's recorded
    decimals (core/precision.py)."""
    from sklearn.metrics import mean_absolute_error, mean_squared_error, r2_score

    y = np.asarray(y, dtype=float)
    predicted = np.asarray(predicted, dtype=float)
    n = len(y)
    if n:
        rmse = float(math.sqrt(mean_squared_error(y, predicted)))
        mae = float(mean_absolute_error(y, predicted))
        r2 = float(r2_score(y, predicted)) if n > 1 else float("nan")
        bias = float(np.mean(y - predicted))
    else:
        rmse = mae = r2 = bias = float("nan")
    rows = []
    if leaves is not None:
        leaves = np.asarray(leaves)
        for box in boxes:
            values = y[leaves == box.box]
            m = len(values)
            if m == 0:
                rows.append(CalibrationRow(box.box, label, box.n, box.mean, 0, None, None, None, None))
                continue
            mean = float(values.mean())
            sd = float(values.std(ddof=1)) if m > 1 else float("nan")
            low, high = mean_interval(mean, sd, m, LEVEL, within=(float(y.min()), float(y.max())))
            agrees = bool(low <= box.mean <= high) if m > 1 else None
            rows.append(CalibrationRow(box.box, label, box.n, box.mean, m, mean,
                                       low if m > 1 else None, high if m > 1 else None, agrees))
    plan = plan_for(groups)
    spread = regression_intervals(y, predicted, groups, plan)
    return RegressionMeasures(n, rmse, mae, r2, bias, tuple(rows), unit,
                              rmse_interval=spread.rmse, mae_interval=spread.mae,
                              r2_interval=spread.r2, intervals=plan, decimals=decimals,
                              patients=patients_among(groups))


def _counted(n: int, patients: int | None) -> list[tuple[str, str]]:
    """The first rows of a measures table: how many visits (and patients) or patients."""
    word = rows_word(n, patients)
    lines = [(word.capitalize(), f"{n:,}")]
    if word == "visits":
        lines.append(("Patients", f"{patients:,}"))
    return lines


Measures = ClassificationMeasures | RegressionMeasures
