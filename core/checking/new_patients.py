"""Checking a chosen tree on patients it never saw.

Two sources of separate patients: the part of the derivation file set aside before growing
(core/sizing/derivation.py sets it aside when ``DerivationRequest.holdout`` is set and checks
its chosen tree here), or an external spreadsheet from another campus or period. An external
file's columns are matched to the model by name, with an account of what is missing or extra;
its outcome is read with the model's own outcome definition; levels the tree never saw at
derivation are routed as not recorded and counted.

The result is a plain dataclass with every measure (core/checking/metrics.py);
``to_model_record`` gives the short record that the model file, the chart and the app share
(``model.extra["validation"]``).
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, replace
from pathlib import Path

import numpy as np
import pandas as pd

from ..data.cells import is_missing_text, level_text
from ..data.table import LoadedTable
from ..design.analysis import AnalysisData
from ..dictionary.columns import ColumnSpec
from ..dictionary.typed_columns import typed_column
from ..errors import InputError
from ..messages.message import say, severity_of
from ..phrases import patients_among, plural, rows_and_patients, rows_word
from ..model.column_names import find_columns, near_name, refuse_absent
from ..model.scoring import needs_counts, needs_warning
from .overlap import overlapping_rows
from ..model.tree import TreeModel, column_values
from .intervals import share_text
from .metrics import (
    ClassificationMeasures, DerivationBox, Measures, RegressionMeasures, auc_text,
    classification_measures, regression_measures, several_class_summary, two_class_summary,
)


@dataclass(frozen=True)
class ColumnReport:
    """How an external file's columns were matched to the model's."""

    matched: tuple[str, ...]  # model columns found under the same name
    renamed: tuple[tuple[str, str], ...]  # (file column, model column): same name but for case/spaces
    missing_offered: tuple[str, ...]  # offered to the grower but not asked by the tree: harmless
    extra: tuple[str, ...]  # file columns the model does not use

    def lines(self) -> list[str]:
        """The account in words, one sentence per point."""
        lines = [say("check.columns_found", n=len(self.matched) + len(self.renamed))]
        for found, wanted in self.renamed:
            lines.append(say("check.column_renamed", found=found, wanted=wanted))
        if self.missing_offered:
            lines.append(say("check.not_asked_missing", columns=", ".join(self.missing_offered)))
        if self.extra:
            shown = ", ".join(self.extra[:12]) + (" ..." if len(self.extra) > 12 else "")
            lines.append(say("check.columns_unused", n=len(self.extra), columns=shown))
        return lines


@dataclass(frozen=True)
class CheckResult:
    """A chosen tree checked on separate patients."""

    source: str  # where the patients came from, in words
    kind: str  # "held-out" or "external"
    n: int  # visits with a recorded outcome that were checked
    n_rows: int  # rows offered (in the file, or set aside)
    n_excluded: int  # rows left out because the outcome was not recorded or not a known class
    patients: int | None  # distinct patients among the checked visits, when an identifier is known
    measures: Measures
    columns: ColumnReport | None  # external files only
    unseen_levels: tuple[tuple[str, int], ...]  # (column, cells routed as not recorded)
    warnings: tuple[str, ...]
    model_fingerprint: str
    data_sha256: str | None = None
    # (column, rows left out): a value not recorded where no derivation patient lacked it
    needs_value: tuple[tuple[str, int], ...] = ()
    # Patients of an external file who were among the derivation patients (by the model's
    # digests of the patient identifiers), their rows, and whether those rows were left out.
    overlap_patients: int = 0
    overlap_rows: int = 0
    overlap_left_out: bool = False
    # False where the overlap cannot be told on this computer (the tree was grown on another,
    # or by a Prunella whose digests are not used): the check is then neither called
    # separate nor not separate (core/checking/overlap.py).
    overlap_known: bool = True
    # The file's name, kept apart from ``source``: a name may hold a patient's name, a date
    # of birth or a record number, so the chart prints it only when asked (issue 15.10).
    file: str | None = None

    @property
    def source_and_file(self) -> str:
        """Where the patients came from with the file's name, for the user's own screen and
        the command line (not the wall chart)."""
        return f"{self.source} ({self.file})" if self.file else self.source

    def names(self, model: TreeModel) -> bool:
        """Whether this check was made on ``model``: its fingerprint is the tree's (without
        the tree's own recorded check). A check of another tree says nothing of this one."""
        return self.model_fingerprint == model.fingerprint

    @property
    def separate(self) -> bool | None:
        """Whether the patients checked are separate from the derivation patients; None
        where that is not known on this computer."""
        if not self.overlap_known:
            return None
        return self.overlap_patients == 0 or self.overlap_left_out

    @property
    def rows_word(self) -> str:
        """What a checked row is: "visits" where some patients came more than once, else
        "patients" (core/phrases.py)."""
        return rows_word(self.n, self.patients)

    @property
    def counted(self) -> str:
        """'412 visits of 300 patients', or '100 patients' where every row is a patient."""
        return rows_and_patients(self.n, self.patients)

    @property
    def summary(self) -> str:
        """One printable line, e.g. 'Sensitivity 84% (79–88%), specificity 71% (68–74%), ...'."""
        return self.measures.summary()

    @property
    def calibration_outside(self) -> tuple[int, ...]:
        """Boxes whose derivation rate or mean lies outside the new patients' 95% interval."""
        return tuple(sorted({r.box for r in self.measures.calibration if r.agrees is False}))

    def to_model_record(self) -> dict:
        """The shared record for ``model.extra["validation"]`` (JSON-safe)."""
        m = self.measures
        record = {"source": self.source, "n": self.n, "summary": self.summary, "kind": self.kind,
                  "patients": self.patients, "model_fingerprint": self.model_fingerprint,
                  "calibration_outside": list(self.calibration_outside)}
        if self.data_sha256:
            record["data_sha256"] = self.data_sha256
        if self.file:
            record["file"] = self.file
        if self.overlap_known:
            record["overlap_patients"] = self.overlap_patients
            record["separate"] = self.separate
        else:  # neither separate nor not: a count of 0 would say more than is known
            record["overlap_known"] = False
        # Plain numbers under the keys the first held-out check used (accuracy, risk,
        # mean_squared_error); [value, low, high] triples for the measures with intervals.
        if isinstance(m, RegressionMeasures):
            record.update(mean_squared_error=m.rmse ** 2, rmse=m.rmse, mae=m.mae, r2=m.r2,
                          mean_error=m.mean_error, rmse_interval=_pair(m.rmse_interval),
                          mae_interval=_pair(m.mae_interval), r2_interval=_pair(m.r2_interval))
        else:
            record.update(accuracy=m.accuracy.value, accuracy_interval=[m.accuracy.low,
                                                                        m.accuracy.high],
                          risk=m.cost, risk_se=m.cost_se, brier=m.brier,
                          brier_interval=_pair(m.brier_interval))
            if m.headline is not None:
                head = m.headline
                record.update(sensitivity=_triple(head.sensitivity),
                              specificity=_triple(head.specificity), ppv=_triple(head.ppv),
                              npv=_triple(head.npv))
                if head.roc is not None:
                    record["auc"] = [head.roc.auc, head.roc.low, head.roc.high]
                    record["auc_method"] = head.roc.method
            elif m.auc_macro is not None:
                record["auc_macro"] = m.auc_macro
        if m.intervals is not None:  # how the Brier score's or the errors' intervals were drawn
            record["bootstrap"] = m.intervals.record()
        if self.warnings:
            record["warnings"] = list(self.warnings)
        return _json_safe(record)

    def to_dict(self) -> dict:
        """Everything, JSON-safe (for ``prunella check --out``)."""
        data = asdict(self)
        data["summary"] = self.summary
        data["calibration_outside"] = list(self.calibration_outside)
        data["separate"] = self.separate
        if not self.overlap_known:
            data["overlap_patients"] = data["overlap_rows"] = None
        return _json_safe(data)

    def text(self) -> str:
        """A printable account: source, columns, warnings, measures, calibration by box."""
        m = self.measures
        lines = [f"Checked on: {self.source_and_file}", f"Checked: {self.counted}"]
        if self.n_excluded:
            lines.append(f"Left out: {self.n_excluded} of {self.n_rows} rows (outcome not "
                         "recorded or not a class the tree knows).")
        if self.needs_value:
            lines.append("Left out, a value to measure first: " + ", ".join(
                f"{c} {k}" for c, k in self.needs_value) + ".")
        if self.columns is not None:
            lines += self.columns.lines()
        # A note (overlapping rows left out) is said as one; anything else as a warning.
        lines += [f"{'Note' if severity_of(w, 'warning') == 'note' else 'Warning'}: {w}"
                  for w in self.warnings]
        lines += ["", f"{'measure':<40} value (95% interval)"]
        lines += [f"{name:<40} {value}" for name, value in m.rows()]
        if isinstance(m, ClassificationMeasures):
            lines += ["", "Confusion matrix (rows: observed, columns: tree's prediction)"]
            width = max(len(c) for c in m.classes) + 2
            lines.append(" " * width + "".join(f"{c:>{width}}" for c in m.classes))
            for label, row in zip(m.classes, m.confusion):
                lines.append(f"{label:<{width}}" + "".join(f"{v:>{width}}" for v in row))
        if m.calibration:
            percent = isinstance(m, ClassificationMeasures)
            what = "rate" if percent else "mean"
            lines += ["", f"Calibration by outcome box (derivation {what} against the observed "
                      f"{what} with its 95% interval)"]
            for r in m.calibration:
                places = getattr(m, "decimals", None)
                derived = r.derivation_text(percent, places)
                flag = {True: "", False: "  <- outside", None: ""}[r.agrees]
                # The class whose share is shown, said so: a bare "yes" read as the box's answer.
                label = f"share {r.label}" if percent else r.label
                lines.append(f"  box {r.box:>3} {label:<14} derivation {derived:>6} of "
                             f"{r.derivation_n:<5} new {r.observed_text(percent, places)} of {r.n}{flag}")
        return "\n".join(lines)


def record_summary(record: dict, model: TreeModel) -> str | None:
    """The summary line of a recorded check (``model.extra["validation"]``) built from the
    numbers it records, worded as :attr:`CheckResult.summary` words them, so a chart never
    prints words that say other than its numbers; None when the record lacks the numbers (a
    hand-made or early record)."""
    n, patients = record.get("n"), record.get("patients")
    if not _numbers(n) or (patients is not None and not _numbers(patients)):
        return None
    if model.task == "regression":
        if not _numbers(record.get("rmse"), record.get("mae"), record.get("r2")):
            return None
        measures = RegressionMeasures(
            n=int(n), rmse=float(record["rmse"]), mae=float(record["mae"]),
            r2=float(record["r2"]), mean_error=float("nan"), calibration=(),
            unit=model.outcome.unit, rmse_interval=_interval(record.get("rmse_interval")),
            mae_interval=_interval(record.get("mae_interval")),
            r2_interval=_interval(record.get("r2_interval")), decimals=model.outcome_decimals,
            patients=None if patients is None else int(patients))
        return measures.summary()
    sensitivity, specificity, auc = (record.get(k) for k in ("sensitivity", "specificity",
                                                             "auc"))
    if _shares(sensitivity) and _shares(specificity):
        return two_class_summary(share_text(*sensitivity), share_text(*specificity),
                                 auc_text(*auc) if _shares(auc) and _numbers(*auc) else None)
    accuracy, interval = record.get("accuracy"), _interval(record.get("accuracy_interval"))
    macro, cost = record.get("auc_macro"), record.get("risk")
    if _numbers(accuracy, cost) and interval is not None and \
            (macro is None or _numbers(macro)):
        row = rows_word(int(n), None if patients is None else int(patients))[:-1]
        return several_class_summary(share_text(accuracy, *interval), macro, cost, row)
    return None


def _numbers(*values) -> bool:
    return all(isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v)
               for v in values)


def _shares(triple) -> bool:
    """[value, low, high], each a number or null (not estimable)."""
    return isinstance(triple, list) and len(triple) == 3 and \
        all(v is None or _numbers(v) for v in triple)


def _interval(pair) -> tuple[float, float] | None:
    return (float(pair[0]), float(pair[1])) if isinstance(pair, list) and len(pair) == 2 \
        and _numbers(*pair) else None


def _pair(interval) -> list | None:
    return None if interval is None else [interval[0], interval[1]]


def _triple(p) -> list:
    return [p.value, p.low, p.high]


def _json_safe(value):
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, dict):
        return {k: _json_safe(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_json_safe(v) for v in value]
    if isinstance(value, np.generic):
        return _json_safe(value.item())
    return value


# --- measuring a model ------------------------------------------------------------------------


def boxes_of(model: TreeModel) -> tuple[DerivationBox, ...]:
    """Each outcome box as it stood at derivation."""
    return tuple(DerivationBox(leaf.id, leaf.n, tuple(leaf.counts), leaf.mean, leaf.sd)
                 for leaf in model.leaves)


def case_weights(model: TreeModel) -> tuple[np.ndarray | None, np.ndarray | None]:
    """Loss matrix and per-class case weight (prior × N / N_j of the derivation patients),
    the weighting core/sizing/cross_validated_path.py uses, so a checked cost compares with the
    CV risk."""
    costs = model.extra.get("costs")
    if not costs or model.task != "classification":
        return None, None
    counts = np.asarray(model.root.counts, dtype=float)
    priors = np.asarray(costs["priors"], dtype=float)
    weight = np.where(counts > 0, priors * counts.sum() / np.maximum(counts, 1), 0.0)
    return np.asarray(costs["loss"], dtype=float), weight


def measure_model(model: TreeModel, y: np.ndarray, leaves: np.ndarray,
                  groups: np.ndarray | None = None) -> Measures:
    """Measures of ``model`` for outcomes ``y`` (class index or value) and reached boxes;
    ``groups`` (patient codes) makes the bootstrap intervals draw whole patients."""
    leaves = np.asarray(leaves)
    boxes = boxes_of(model)
    if model.task == "regression":
        return regression_measures(y, model.predictions(leaves), leaves, boxes,
                                   label=model.outcome.display, unit=model.outcome.unit,
                                   groups=groups, decimals=model.outcome_decimals)
    k = len(model.classes)
    share = np.zeros((len(model.nodes) + 1, k))
    label = np.zeros(len(model.nodes) + 1, dtype=np.int64)
    for leaf in model.leaves:
        share[leaf.id] = np.asarray(leaf.counts, dtype=float) / max(leaf.n, 1)
        label[leaf.id] = model.classes.index(leaf.prediction)
    loss, weight = case_weights(model)
    return classification_measures(y, label[leaves], share[leaves], model.classes, loss=loss,
                                   case_weight=weight, leaves=leaves, boxes=boxes,
                                   groups=groups)


def _seen_levels(model: TreeModel) -> dict[str, set[str]]:
    seen: dict[str, set[str]] = {}
    for node in model.nodes:
        q = node.question
        if q is not None and q.kind == "in":
            seen.setdefault(q.column, set()).update(q.yes_levels + q.no_levels)
    return seen


def _route(model: TreeModel, values: dict[str, np.ndarray], n: int,
           unknown: dict[str, dict[str, int]]) -> tuple[np.ndarray, tuple[tuple[str, int], ...],
                                                        tuple[tuple[str, int], ...], dict]:
    """Boxes reached (0 = none: a value must be measured), per column how many cells hold a
    level the tree never saw, per column how many rows wait for its value, and per column the
    unseen levels themselves with their counts (``unknown``: those already found, by text)."""
    found = {column: dict(levels) for column, levels in unknown.items()}
    for column, levels in _seen_levels(model).items():
        cells = values[column]
        present = ~pd.isna(cells)
        never = present & ~np.isin(cells.astype(object), list(levels))
        if never.any():
            texts, counts = np.unique(cells[never].astype(str), return_counts=True)
            into = found.setdefault(column, {})
            for text, count in zip(texts, counts):
                into[text] = into.get(text, 0) + int(count)
    totals = tuple((c, sum(levels.values())) for c, levels in sorted(found.items())
                   if sum(levels.values()))
    leaves, waiting = model.route_waiting(values, n)
    return leaves, totals, needs_counts(model, waiting), found


_LEVELS_NAMED = 8  # unseen levels named per column; the rest are counted together


def _unseen_warning(found: dict[str, dict[str, int]], model: TreeModel) -> list[str]:
    """The unseen levels by name, with how many rows hold each, per column:
    "Institution: 12 (7 rows), 13 (11 rows)"."""
    parts = []
    for column, levels in sorted(found.items()):
        if not levels:
            continue
        ordered = sorted(levels.items(), key=lambda tk: (-tk[1], tk[0]))
        named = [f"{text} ({plural(k, 'row', 'rows')})" for text, k in ordered[:_LEVELS_NAMED]]
        rest = ordered[_LEVELS_NAMED:]
        if rest:
            more = plural(sum(k for _, k in rest), "row", "rows")
            named.append(f"{len(rest)} more levels ({more})")
        parts.append(f"{model.spec(column).display}: {', '.join(named)}")
    if not parts:
        return []
    total = sum(sum(levels.values()) for levels in found.values())
    return [say("check.unseen_levels", total=total, parts="; ".join(parts))]


# --- the held-out part ------------------------------------------------------------------------


def check_heldout(model: TreeModel, heldout: AnalysisData | None, share: float,
                  data_sha256: str | None) -> CheckResult:
    """Check ``model`` on ``heldout``, the rows set aside before growing (``share`` of the
    patients of the derivation file whose SHA-256 is ``data_sha256``)."""
    if heldout is None:
        raise InputError(say("check.no_heldout"))
    values = model.asked_values(heldout.predictors)
    leaves, unseen, needs, unseen_found = _route(model, values, heldout.n, {})
    routed = leaves > 0
    source = f"held-out part of the derivation file ({share:.0%} of patients set aside before growing)"
    patients = (int(np.unique(heldout.groups[routed]).size) if heldout.groups is not None
                else None)
    warnings = _unseen_warning(unseen_found, model) + needs_warning("check.needs_value", needs, model)
    return CheckResult(
        source=source, kind="held-out", n=int(routed.sum()), n_rows=heldout.n, n_excluded=0,
        patients=patients,
        measures=measure_model(model, heldout.y[routed], leaves[routed],
                               None if heldout.groups is None else heldout.groups[routed]),
        columns=None, unseen_levels=unseen, warnings=tuple(warnings),
        model_fingerprint=model.fingerprint, data_sha256=data_sha256,
        needs_value=needs, file=model.extra.get("data", {}).get("file"))


# --- an external file -------------------------------------------------------------------------


def match_columns(model: TreeModel, columns) -> tuple[ColumnReport, dict[str, str]]:
    """Match a file's columns to the model's by name (then ignoring case and spaces:
    core/model/column_names.py, as ``prunella score`` does).

    Returns the account and the mapping file column → model column. Raises InputError naming
    every column the tree asks about that the file lacks, and the file's column that looks
    meant for it.
    """
    columns = [str(c) for c in columns]
    settings = model.extra.get("settings", {}).get("design", {})
    wanted = [model.outcome.name] + [p.name for p in model.predictors]
    wanted += [c for c in (settings.get("patient_id"), settings.get("site")) if c]
    mapping, matched, renamed, absent = find_columns(wanted, columns)
    asked = set(model.columns_asked())
    missing_asked = [c for c in absent if c in asked]
    if model.outcome.name in absent:
        near = near_name(model.outcome.name, columns, mapping)
        if near is not None:
            raise InputError(say("check.no_outcome_near", name=model.outcome.name,
                                 label=model.outcome.display, near=near))
        raise InputError(say("check.no_outcome", name=model.outcome.name,
                             label=model.outcome.display))
    if missing_asked:
        refuse_absent(model, missing_asked, columns, mapping)
    offered = [c for c in absent if c not in asked and c != model.outcome.name
               and c in {p.name for p in model.predictors}]
    extra = tuple(c for c in columns if c not in mapping)
    return ColumnReport(tuple(matched), tuple(renamed), tuple(offered), extra), mapping


def outcome_values(model: TreeModel, cells: pd.Series) -> tuple[np.ndarray, np.ndarray, list[str]]:
    """The outcome read with the model's own definition: values, rows kept, notes."""
    spec = model.outcome
    notes: list[str] = []
    if model.task == "regression":
        numeric = spec if spec.kind == "numeric" else ColumnSpec(spec.name, kind="numeric",
                                                                 label=spec.label)
        y = typed_column(cells, numeric).numbers
        keep = ~np.isnan(y)
    else:
        if spec.kind not in ("binary", "ordinal", "nominal") or not spec.levels:
            spec = replace(spec, kind="nominal", levels=tuple(model.classes))
        typed = typed_column(cells, spec)
        names = np.array(list(spec.levels) + [None], dtype=object)[typed.codes]
        index = {c: i for i, c in enumerate(model.classes)}
        y = np.array([index.get(v, -1) for v in names], dtype=np.int64)
        present = ~is_missing_text(cells, spec.missing_codes)
        strange = present & (y < 0)
        if strange.any():
            examples = ", ".join(repr(v) for v in pd.unique(cells[strange].astype(str))[:3])
            notes.append(say("check.unknown_classes", n=int(strange.sum()),
                             classes=", ".join(model.classes), examples=examples))
        keep = y >= 0
    return y[keep], keep, notes


def check_table(model: TreeModel, table: LoadedTable, source: str | None = None,
                leave_out_overlap: bool = False) -> CheckResult:
    """Check ``model`` on the rows of an external table (another campus or period).

    Patients the table shares with the derivation data (core/checking/overlap.py) are
    counted, and the check is not called separate; ``leave_out_overlap`` leaves their rows
    out instead."""
    frame = table.frame
    report, mapping = match_columns(model, frame.columns)
    frame = frame.rename(columns=mapping)[[c for c in mapping.values()]].reset_index(drop=True)
    overlap = overlapping_rows(model.extra.get("derivation_ids"), frame)
    shared, overlap_patients = overlap.rows, overlap.patients
    overlap_rows = int(shared.sum())
    if leave_out_overlap and overlap_rows:
        frame = frame.loc[~shared].reset_index(drop=True)
    y, keep, notes = outcome_values(model, frame[model.outcome.name])
    n_rows = len(frame)
    if not keep.any():
        raise InputError(say("check.no_outcome_rows", label=model.outcome.display))
    no_outcome = int((~keep).sum())
    if no_outcome:
        notes.insert(0, say("check.rows_without_outcome", n=no_outcome, total=n_rows))
    rows = frame.loc[keep].reset_index(drop=True)
    values, unknown = {}, {}
    for column in model.columns_asked():
        spec = model.spec(column)
        typed = typed_column(rows[column], spec)
        values[column] = column_values(typed.numbers, typed.codes, spec)
        if typed.codes is not None:
            present = ~is_missing_text(rows[column], spec.missing_codes)
            never = present & (typed.codes < 0)
            if never.any():
                texts, counts = np.unique(level_text(rows[column][never]).astype(str),
                                          return_counts=True)
                unknown[column] = {t: int(k) for t, k in zip(texts, counts)}
        else:
            notes.extend(typed.notes)
    leaves, unseen, needs, unseen_found = _route(model, values, len(rows), unknown)
    notes.extend(_unseen_warning(unseen_found, model))
    notes.extend(needs_warning("check.needs_value", needs, model))
    if overlap_patients:  # said first: it decides what kind of check this is
        notes.insert(0, say("check.overlap_left_out" if leave_out_overlap else "check.overlap",
                            patients=overlap_patients, rows=overlap_rows))
    elif not overlap.known:  # said once, first, and the check goes on
        notes.insert(0, overlap.not_known)
    notes = list(table.provenance.warnings) + notes
    routed = leaves > 0
    y, leaves, rows = y[routed], leaves[routed], rows.loc[routed].reset_index(drop=True)
    design = model.extra.get("settings", {}).get("design", {})
    patient = design.get("patient_id")
    patients = groups = None
    if patient and patient in rows.columns:
        ids = rows[patient].astype("string").str.strip()
        # A row without an identifier is its own patient (in the count and the bootstrap).
        groups = ids.fillna(pd.Series([f"\0row{i}" for i in range(len(ids))],
                                      index=ids.index, dtype="string")).to_numpy(dtype=str)
        patients = patients_among(groups)
    name = Path(table.provenance.path).name
    sheet = f", sheet {table.provenance.sheet}" if table.provenance.sheet else ""
    if source is None:
        source = "an external file"
    return CheckResult(
        source=source, kind="external", n=len(rows), n_rows=n_rows, n_excluded=no_outcome,
        patients=patients, measures=measure_model(model, y, leaves, groups), columns=report,
        unseen_levels=unseen, warnings=tuple(notes),
        model_fingerprint=model.fingerprint,
        data_sha256=table.provenance.sha256, needs_value=needs,
        overlap_patients=overlap_patients, overlap_rows=overlap_rows,
        overlap_left_out=bool(leave_out_overlap and overlap_rows), overlap_known=overlap.known,
        file=f"{name}{sheet}")


def with_check(model: TreeModel, result: CheckResult) -> TreeModel:
    """The same model with ``extra["validation"]`` recording this check, named by the tree's
    fingerprint (the chart prints it instead of the 'not yet checked' banner)."""
    if not result.names(model):
        raise InputError(say("check.other_tree"))
    extra = dict(model.extra)
    extra["validation"] = result.to_model_record()
    return replace(model, extra=extra)


def training_measures(model: TreeModel, data: AnalysisData) -> Measures:
    """``model`` measured on ``data``, the very patients it was grown on (resubstitution).

    Optimistic by construction: show it only beside the cross-validated and checked measures.
    """
    leaves = model.route(model.asked_values(data.predictors), data.n)
    routed = leaves > 0  # every derivation patient is, unless an older file is read the safe way
    return measure_model(model, data.y[routed], leaves[routed],
                         None if data.groups is None else data.groups[routed])
