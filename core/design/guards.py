"""Guards against trees that look good for the wrong reasons, or that would print identities.

Four checks run before a tree is grown; each returns plain findings the app and the command
line show as they are:

* **Identity** — a predictor that identifies patients (names, record numbers, dates of birth,
  addresses, phone numbers, e-mail, identifiers unique to each row; judged by header and by
  contents, see core/dictionary/identity.py) is left out of the predictors unless the user names it.
* **Leakage** — each predictor on its own grows a small tree (depth ≤ 4) that is
  cross-validated with the same grouping as the real run (5 folds). It is flagged as probable
  leakage when it separates the outcome almost perfectly:
  two classes — cross-validated ROC area ≥ 0.97, or cross-validated error ≤ 10 % of the error
  of always predicting the commonest class; more classes — the error rule; regression — the
  same error rule on the outcome's ranks (cross-validated R² of the ranks ≥ 0.90), so that a
  few very long stays cannot hide a perfect predictor. Real clinical predictors rarely reach
  this on their own; values recorded after or because of the outcome (a booked bed, a length
  of stay) do.
* **Repeat visits** — several rows of one patient are reported; with a patient identifier,
  cross-validation keeps each patient's rows in one fold (grouped, the default); without one, a
  column that looks like a patient identifier and repeats is recommended.
* **Rare classes** — an outcome class with fewer than 10 patients is flagged.
* **Dates and periods** — a predictor whose header names a date or a calendar period is
  flagged: its question would sort patients by when they came, not by anything about them.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from ..data.cells import is_missing_text, level_text, parse_numbers
from ..dictionary.columns import ColumnSpec, DataDictionary
from ..dictionary.dates import holds_dates, names_a_date
from ..dictionary.identity import (
    IdentityHint, identity_by_header, identity_hint, looks_like_record_numbers,
    may_group_patients,
)
from ..errors import InputError
from ..messages.message import message_kinds, say
from ..progress import stop_if_cancelled
from .analysis import AnalysisData, DesignSpec, prepare_analysis
from .matrix import fit_encoding

LEAKAGE_AUC = 0.97
# Measures that do not depend on the outcome's prevalence, so rare outcomes are judged alike:
# balanced accuracy (the mean of the classes' recalls; for two classes the mean of sensitivity
# and specificity), or a column that is almost never wrong one way (sensitivity or specificity
# at least LEAKAGE_ONE_WAY) while catching most of the other (at least LEAKAGE_OTHER_WAY).
LEAKAGE_BALANCED_ACCURACY = 0.95
LEAKAGE_ONE_WAY = 0.98
LEAKAGE_OTHER_WAY = 0.80
LEAKAGE_ERROR_SHARE = 0.10  # kept for callers; leakage is no longer judged on the error share
LEAKAGE_R2 = 0.90  # regression: R² of the outcome's ranks = 1 − 10 % error share
SCREEN_FOLDS = 5
SCREEN_DEPTH = 4
RARE_CLASS = 10
# An outcome value held by one or two rows beside common ones is most often a slip (a stray
# space, an invisible mark, "Yes?"), not a real class: said loudly, on its own.
STRAY_VALUE_ROWS = 2
_PATIENT_WORDS = ("names", "record numbers")


@dataclass(frozen=True)
class GuardFinding:
    """One finding: what kind, which column, the message, and whether the column is left out."""

    kind: str  # "identity" | "leakage" | "repeat_visits" | "rare_class" | "period"
    column: str | None
    message: str
    leave_out: bool = False
    measures: dict = field(default_factory=dict)
    severity: str = "warning"  # "warning" (check this) or "note" (for the record)
    code: str = ""  # the message's code in core/messages/catalogue.py


def findings_record(findings: Iterable[GuardFinding]) -> tuple[dict, ...]:
    """The guards' findings as the model file records them (``findings``): each one's kind
    ("identity", "leakage", "repeat_visits", "rare_class", …), column and message, once."""
    seen, out = set(), []
    for f in findings:
        record = {"kind": f.kind, "column": f.column, "message": str(f.message),
                  "severity": f.severity}
        key = (f.kind, f.column, record["message"])
        if key not in seen:
            seen.add(key)
            out.append(record)
    return tuple(out)


# Notes of reading and of the dictionary that are guards' findings too (code → kind).
_NOTE_FINDINGS = {"infer.identity": "identity"}


def findings_from_notes(notes: Iterable[str]) -> tuple[dict, ...]:
    """The reading notes that are findings (a column left out because it identifies
    patients, …), as the model file records them."""
    out = []
    for note in notes:
        kind = _NOTE_FINDINGS.get(getattr(note, "code", ""))
        if kind is not None:
            out.append({"kind": kind, "column": note.fields.get("column"), "message": str(note),
                        "severity": message_kinds()[note.code].severity})
    return tuple(out)


def _finding(kind: str, column, code: str, /, leave_out: bool = False, measures=None,
             **fields) -> GuardFinding:
    return GuardFinding(kind, None if column is None else str(column), say(code, **fields),
                        leave_out=leave_out, measures=dict(measures or {}),
                        severity=message_kinds()[code].severity, code=code)


@dataclass(frozen=True)
class GuardReport:
    """The design with identity columns left out, and every finding."""

    design: DesignSpec
    findings: tuple[GuardFinding, ...]
    left_out: tuple[str, ...] = ()

    @property
    def messages(self) -> tuple[str, ...]:
        return tuple(f.message for f in self.findings)

    def of_kind(self, kind: str) -> tuple[GuardFinding, ...]:
        return tuple(f for f in self.findings if f.kind == kind)

    @property
    def leakage_columns(self) -> tuple[str, ...]:
        return tuple(f.column for f in self.of_kind("leakage"))


# --- identity -------------------------------------------------------------------------------


def identity_of(frame: pd.DataFrame, dictionary: DataDictionary, name: str) -> IdentityHint | None:
    """Why column ``name`` identifies patients, or None."""
    values = frame[name]
    spec = dictionary.get(name) if name in dictionary else None
    hint = identity_hint(name, values)
    if hint is not None:
        return hint
    if spec is not None and spec.kind == "identifier":
        return IdentityHint("an identifier", "dictionary")
    missing = is_missing_text(values)
    n_present = int((~missing).sum())
    if n_present < 20:
        return None
    if pd.api.types.is_numeric_dtype(values.dtype) and not pd.api.types.is_bool_dtype(values.dtype):
        numbers = parse_numbers(values).values
        if looks_like_record_numbers(numbers, n_present, hinted=False):
            return IdentityHint("record numbers", "contents")
        return None
    if spec is not None and spec.kind == "numeric":
        return None
    if level_text(values[~missing]).nunique() == n_present:
        return IdentityHint("an identifier unique to each row", "contents")
    return None


def identity_findings(frame: pd.DataFrame, dictionary: DataDictionary,
                      columns: Iterable[str]) -> tuple[GuardFinding, ...]:
    """A finding for every column among ``columns`` that identifies patients."""
    found = []
    for name in columns:
        if name not in frame.columns:
            continue
        hint = identity_of(frame, dictionary, name)
        if hint is not None:
            reason = "the data dictionary marks it as an identifier" if hint.basis == \
                "dictionary" else hint.reason
            found.append(_finding("identity", name, "guard.identity", leave_out=True,
                                  measures={"what": hint.what}, column=name, reason=reason))
    return tuple(found)


def leave_out_identity(design: DesignSpec, findings: Iterable[GuardFinding],
                       keep: Iterable[str] = ()) -> tuple[DesignSpec, tuple[str, ...]]:
    """The design without the identity columns the user did not name in ``keep``."""
    drop = {f.column for f in findings if f.leave_out} - set(keep)
    left_out = tuple(p for p in design.predictors if p in drop)
    return replace(design, predictors=tuple(p for p in design.predictors if p not in drop)), left_out


def kept_on_purpose(kept: Iterable[str], ticked: Iterable[str], offered: Iterable[str],
                    left_out: Iterable[str], many_at_once: bool = False) -> frozenset[str]:
    """The identity-like columns a user keeps as predictors although the identity guard
    would leave them out (the app's "Keep it anyway"; on the command line, naming them in
    --predictors): a column the guard left out that the user ticks back, one at a time, is
    kept; a kept column the user unticks is left out again; ticking many columns at once
    (All) keeps none that identify patients."""
    ticked, offered = set(ticked), set(offered)
    chosen = set(kept)
    if not many_at_once:
        chosen |= set(left_out) & ticked
    return frozenset(c for c in chosen if c in ticked or c not in offered)


# --- dates and periods ----------------------------------------------------------------------


def period_findings(frame: pd.DataFrame, dictionary: DataDictionary,
                    columns: Iterable[str]) -> tuple[GuardFinding, ...]:
    """A warning for every predictor among ``columns`` that is a date or a calendar period, by
    its header ("Arrival date", "Admission year", "Seen on") or its cells (dates set to another
    kind): its question would sort patients by when they came."""
    found = []
    for name in columns:
        if name not in frame.columns:
            continue
        spec = dictionary.get(name) if name in dictionary else ColumnSpec(name)
        # A column of kind date is refused as a predictor by prepare_analysis, in one sentence.
        if spec.kind != "date" and (names_a_date(spec.label) or holds_dates(name, frame[name])):
            found.append(_finding("period", name, "guard.date_as_question", column=name))
    return tuple(found)


# --- leakage --------------------------------------------------------------------------------


def leakage_findings(data: AnalysisData, grouped: bool = True, seed: int = 0,
                     min_leaf: int = 5, cancel: Callable[[], bool] | None = None,
                     ) -> tuple[GuardFinding, ...]:
    """Predictors that on their own separate the outcome almost perfectly under CV.

    ``cancel()`` is asked before each predictor; when it returns True, Cancelled is raised."""
    from sklearn.metrics import roc_auc_score
    from sklearn.tree import DecisionTreeClassifier, DecisionTreeRegressor

    from ..sizing.folds import CVSettings, fold_plan

    if data.n < 4 * SCREEN_FOLDS:
        return ()
    classification = data.task == "classification"
    strat = data.y if classification else None
    # Regression is judged on the outcome's ranks (0..1): a skewed outcome's tail cannot
    # drown the evidence, and the screen asks only whether the order is reproduced.
    target = data.y if classification else pd.Series(data.y).rank(pct=True).to_numpy()
    try:
        folds = fold_plan(CVSettings(folds=SCREEN_FOLDS, grouped=grouped, seed=seed), data.n,
                          y=strat, groups=data.groups)
    except InputError:
        return ()
    n_classes = len(data.classes)
    found = []
    for column in data.predictors:
        stop_if_cancelled(cancel)
        single = replace(data, predictors=(column,))
        scores = np.zeros((data.n, n_classes)) if classification else np.zeros(data.n)
        for fold in folds:
            encoding = fit_encoding(single, fold.train)
            X_train, X_test = encoding.matrix(single, fold.train), encoding.matrix(single, fold.test)
            if classification:
                tree = DecisionTreeClassifier(max_depth=SCREEN_DEPTH, min_samples_leaf=min_leaf,
                                              random_state=seed).fit(X_train, data.y[fold.train])
                scores[np.ix_(fold.test, tree.classes_)] = tree.predict_proba(X_test)
            else:
                tree = DecisionTreeRegressor(max_depth=SCREEN_DEPTH, min_samples_leaf=min_leaf,
                                             random_state=seed).fit(X_train, target[fold.train])
                scores[fold.test] = tree.predict(X_test)
        measures = _separation(data, target, scores, roc_auc_score)
        if measures["flagged"]:
            found.append(_finding("leakage", column.spec.name, "guard.leakage",
                                  measures=measures, column=column.spec.name,
                                  outcome=data.outcome.name, evidence=measures["evidence"]))
    return tuple(found)


def _separation(data: AnalysisData, target: np.ndarray, scores: np.ndarray,
                roc_auc_score) -> dict:
    """How well one column alone separates the outcome under cross-validation, on measures
    that do not depend on how common the outcome is: the ROC area and, deciding for the class
    whose share in a box is highest relative to its share in the cohort (equal priors), the
    sensitivity and specificity (the recall of each class). A column agreeing with an 11%
    outcome 98% of the time is caught as surely as one agreeing with a 33% outcome."""
    if data.task == "regression":
        variance = float(np.var(target))
        mse = float(np.mean((scores - target) ** 2))
        r2 = 1.0 - mse / variance if variance > 0 else 0.0
        return {"cv_rank_r2": r2, "flagged": bool(r2 >= LEAKAGE_R2),
                "evidence": f"cross-validated R² {r2:.2f} on the outcome's ranks"}
    counts = np.bincount(data.y, minlength=len(data.classes))
    shares = counts / data.n
    present = counts > 0
    # The decision with equal priors: a box's share of each class over its cohort share.
    lifted = np.where(present, scores / np.where(present, shares, 1.0), -np.inf)
    predicted = np.argmax(lifted, axis=1)
    recall = np.array([float(np.mean(predicted[data.y == k] == k)) if present[k] else np.nan
                       for k in range(len(data.classes))])
    balanced = float(np.nanmean(recall))
    error = float(np.mean(np.argmax(scores, axis=1) != data.y))
    baseline = float(1.0 - shares.max())
    measures = {"cv_error": error, "baseline_error": baseline,
                "cv_balanced_accuracy": balanced}
    flagged = balanced >= LEAKAGE_BALANCED_ACCURACY
    if len(data.classes) == 2:
        auc = float(roc_auc_score(data.y, scores[:, 1]))
        sensitivity, specificity = float(recall[1]), float(recall[0])
        measures.update(cv_auc=auc, cv_sensitivity=sensitivity, cv_specificity=specificity)
        one_way = max(sensitivity, specificity) >= LEAKAGE_ONE_WAY and \
            min(sensitivity, specificity) >= LEAKAGE_OTHER_WAY
        flagged = flagged or one_way or auc >= LEAKAGE_AUC
        evidence = (f"cross-validated ROC area {auc:.2f}, sensitivity {sensitivity:.0%} and "
                    f"specificity {specificity:.0%} for {data.classes[1]!r}")
    else:
        evidence = f"cross-validated balanced accuracy {balanced:.0%} over the classes"
    measures.update(flagged=bool(flagged), evidence=evidence)
    return measures


# --- repeat visits and rare classes ---------------------------------------------------------


def repeat_visit_findings(frame: pd.DataFrame, dictionary: DataDictionary, design: DesignSpec,
                          grouped: bool = True) -> tuple[GuardFinding, ...]:
    """Patients with several rows: how cross-validation handles them, or what to set."""
    if design.patient_id and design.patient_id in frame.columns:
        counts = _repeat_counts(frame[design.patient_id])
        repeats = counts[counts > 1]
        if repeats.empty:
            return ()
        key = "guard.repeats_grouped" if grouped else "guard.repeats_not_grouped"
        return (_finding("repeat_visits", design.patient_id, key,
                         measures={"patients_with_repeats": len(repeats)},
                         column=design.patient_id, patients=len(repeats),
                         n_rows=int(repeats.sum()), most=int(repeats.max())),)
    found = []
    for name in frame.columns:
        spec = dictionary.get(name) if name in dictionary else None
        hint = identity_by_header(str(name))
        # Marked as a patient number, or as an identifier: a repeating one is the likeliest.
        named = spec is not None and (spec.role == "patient_id" or spec.kind == "identifier")
        if not named and (hint is None or hint.what not in _PATIENT_WORDS):
            continue
        counts = _repeat_counts(frame[name])
        repeats = counts[counts > 1]
        if len(repeats) >= 2:
            # A repeating name hints at repeat visits but must not become the identifier:
            # only record numbers may be proposed as the patient number.
            by_name = not may_group_patients(spec if spec is not None else ColumnSpec(name))
            code = "guard.repeats_by_name" if by_name else "guard.repeats_no_id"
            found.append(_finding("repeat_visits", name, code,
                                  measures={"patients_with_repeats": len(repeats)},
                                  column=name, patients=len(repeats), n_rows=int(repeats.sum())))
    return tuple(found[:1])


def _repeat_counts(values: pd.Series) -> pd.Series:
    text = level_text(values[~is_missing_text(values)])
    return text.value_counts()


def outcome_findings(data: AnalysisData) -> tuple[GuardFinding, ...]:
    """Outcome classes with fewer than RARE_CLASS patients."""
    if data.task != "classification":
        return ()
    counts = np.bincount(data.y, minlength=len(data.classes))
    found = []
    for label, count in zip(data.classes, counts):
        others = [c for c, k in zip(data.classes, counts) if c != label and k >= RARE_CLASS]
        if 0 < count <= STRAY_VALUE_ROWS and others:
            found.append(_finding("rare_class", data.outcome.name, "guard.stray_outcome_value",
                                  measures={"class": label, "n": int(count)}, n=int(count),
                                  label=label, outcome=data.outcome.name,
                                  others=" and ".join(repr(c) for c in others),
                                  classes=len(data.classes)))
        elif 0 < count < RARE_CLASS:
            found.append(_finding("rare_class", data.outcome.name, "guard.rare_class",
                                  measures={"class": label, "n": int(count)}, n=int(count),
                                  label=label, outcome=data.outcome.name, limit=RARE_CLASS))
    return tuple(found)


# --- all together ---------------------------------------------------------------------------


def guard_design(frame: pd.DataFrame, dictionary: DataDictionary, design: DesignSpec,
                 keep: Iterable[str] = (), grouped: bool = True, seed: int = 0, min_leaf: int = 5,
                 leakage: bool = True, cancel: Callable[[], bool] | None = None) -> GuardReport:
    """Run every guard on a design. Identity columns not named in ``keep`` are left out.

    ``cancel()`` (optional) is asked between the leakage screens of the predictors; when it
    returns True, core.errors.Cancelled is raised (the app restarts the guards when the design
    changes).

    Problems that make the design unusable (no outcome, one class, …) are left for
    :func:`core.design.analysis.prepare_analysis` to report, so the user meets one message for them.
    """
    findings = list(identity_findings(frame, dictionary, design.predictors))
    guarded, left_out = leave_out_identity(design, findings, keep)
    if design.predictors and not guarded.predictors:
        raise InputError(say("guard.nothing_left", columns=", ".join(repr(c) for c in left_out)))
    findings = [f for f in findings if f.column in left_out]
    findings.extend(period_findings(frame, dictionary, guarded.predictors))
    findings.extend(repeat_visit_findings(frame, dictionary, guarded, grouped))
    try:
        data = prepare_analysis(frame, dictionary, guarded)
    except InputError:
        return GuardReport(guarded, tuple(findings), left_out)
    findings.extend(outcome_findings(data))
    if leakage:
        findings.extend(leakage_findings(data, grouped=grouped, seed=seed, min_leaf=min_leaf,
                                         cancel=cancel))
    return GuardReport(guarded, tuple(findings), left_out)


__all__ = [
    "GuardFinding", "GuardReport", "findings_from_notes", "findings_record", "guard_design", "identity_findings", "identity_of",
    "leakage_findings", "leave_out_identity", "outcome_findings", "period_findings",
    "repeat_visit_findings",
    "LEAKAGE_AUC", "LEAKAGE_BALANCED_ACCURACY", "LEAKAGE_ERROR_SHARE", "LEAKAGE_ONE_WAY",
    "LEAKAGE_OTHER_WAY", "LEAKAGE_R2", "RARE_CLASS", "SCREEN_FOLDS",
    "SCREEN_DEPTH",
]
