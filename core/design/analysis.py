"""From a typed table to the numeric matrix the grower needs, and back to words.

Every matrix column remembers what it is (a number, an ordered level, a ranked nominal level
or one level of a nominal with several classes), so a split on it can be said as a question
about levels and units rather than as ``x_3 <= 0.5``.

Nominal predictors are ordered by the outcome (Breiman's ordering for two classes and for
regression) using the training rows only: ``fit_encoding`` is called once per fold, so the
held-out rows never inform the order and cross-validation cannot leak through it.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..dictionary.columns import (
    CATEGORY_KINDS, PREDICTOR_KINDS, ColumnSpec, DataDictionary, TypedColumn, positive_level,
    typed_column,
)
from ..errors import InputError

TASKS = ("classification", "regression")


@dataclass(frozen=True)
class DesignSpec:
    """What is predicted from what: the user's choices on the outcome step."""

    outcome: str
    predictors: tuple[str, ...]
    task: str | None = None  # None: suggest from the outcome
    positive: str | None = None  # positive class of a two-class outcome
    patient_id: str | None = None
    site: str | None = None


@dataclass(frozen=True)
class AnalysisData:
    """Rows with a recorded outcome, ready for growing and cross-validation."""

    task: str
    outcome: ColumnSpec
    y: np.ndarray = field(repr=False)  # class index (int) or value (float)
    classes: tuple[str, ...]  # class labels; for two classes (negative, positive)
    predictors: tuple[TypedColumn, ...] = field(repr=False)
    rows: np.ndarray = field(repr=False)  # positions of these rows in the source table
    groups: np.ndarray | None = field(default=None, repr=False)  # patient codes
    sites: np.ndarray | None = field(default=None, repr=False)  # site codes
    site_levels: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()

    @property
    def n(self) -> int:
        return len(self.y)

    @property
    def positive(self) -> str | None:
        return self.classes[1] if self.task == "classification" and len(self.classes) == 2 else None

    def subset(self, rows: np.ndarray) -> "AnalysisData":
        """The same analysis restricted to some of its rows (positions into ``y``)."""
        rows = np.asarray(rows)
        return AnalysisData(
            task=self.task, outcome=self.outcome, y=self.y[rows], classes=self.classes,
            predictors=tuple(_take(p, rows) for p in self.predictors), rows=self.rows[rows],
            groups=None if self.groups is None else self.groups[rows],
            sites=None if self.sites is None else self.sites[rows], site_levels=self.site_levels,
            notes=self.notes,
        )


def _take(column: TypedColumn, rows: np.ndarray) -> TypedColumn:
    return TypedColumn(column.spec,
                       numbers=None if column.numbers is None else column.numbers[rows],
                       codes=None if column.codes is None else column.codes[rows],
                       notes=column.notes)


def suggest_task(spec: ColumnSpec) -> str:
    """Classification for categories, regression for numbers."""
    return "classification" if spec.kind in CATEGORY_KINDS else "regression"


def prepare_analysis(frame: pd.DataFrame, dictionary: DataDictionary,
                     design: DesignSpec) -> AnalysisData:
    """Check the user's choices against the data and parse the columns they name."""
    if design.outcome not in frame.columns:
        raise InputError(f"There is no column called {design.outcome!r} to use as the outcome; "
                         "choose one of: " + ", ".join(repr(c) for c in list(frame.columns)[:20]) + ".")
    outcome = dictionary.get(design.outcome)
    task = design.task or suggest_task(outcome)
    if task not in TASKS:
        raise InputError(f"The task must be classification or regression, not {task!r}.")
    notes: list[str] = []
    if not design.predictors:
        raise InputError("No predictors are chosen; choose at least one column to ask about.")
    for name in design.predictors:
        if name not in frame.columns:
            raise InputError(f"There is no column called {name!r} to use as a predictor; check "
                             "the spelling (column names are case-sensitive).")
        if name == design.outcome:
            raise InputError(f"{name!r} is the outcome and cannot also be a predictor; take it "
                             "out of the predictors.")
    for role, name in (("patient identifier", design.patient_id), ("site", design.site)):
        if name is not None and name not in frame.columns:
            raise InputError(f"There is no column called {name!r} to use as the {role}; check "
                             "the spelling.")

    y, classes, keep = _outcome_values(frame[design.outcome], outcome, task, design.positive)
    n_dropped = int((~keep).sum())
    if n_dropped:
        notes.append(f"{n_dropped} row(s) without a recorded outcome were left out.")
    rows = np.flatnonzero(keep)
    predictors = []
    for name in design.predictors:
        spec = dictionary.get(name)
        if spec.kind not in PREDICTOR_KINDS:
            raise InputError(f"{spec.display!r} is marked as {spec.kind}, which a tree cannot ask "
                             "about; set its kind to numeric, binary, ordinal or nominal, or "
                             "take it out of the predictors.")
        column = typed_column(frame[name].iloc[rows].reset_index(drop=True), spec)
        notes.extend(column.notes)
        if column.missing.all():
            raise InputError(f"{spec.display!r} is not recorded for any patient with an outcome; "
                             "take it out of the predictors.")
        predictors.append(column)
    groups = _codes(frame[design.patient_id].iloc[rows]) if design.patient_id else None
    sites, site_levels = (None, ())
    if design.site:
        site_values = frame[design.site].iloc[rows]
        cat = pd.Categorical(site_values.astype("string").str.strip())
        sites = np.asarray(cat.codes, dtype=np.int64)
        site_levels = tuple(str(c) for c in cat.categories)
    return AnalysisData(task=task, outcome=outcome, y=y, classes=classes,
                        predictors=tuple(predictors), rows=rows, groups=groups, sites=sites,
                        site_levels=site_levels, notes=tuple(notes))


def _codes(values: pd.Series) -> np.ndarray:
    text = values.astype("string").str.strip()
    codes, _ = pd.factorize(text, use_na_sentinel=True)
    # A visit without a patient identifier is its own group.
    missing = codes < 0
    codes = codes.astype(np.int64)
    codes[missing] = codes.max(initial=-1) + 1 + np.arange(int(missing.sum()))
    return codes


def _outcome_values(values: pd.Series, spec: ColumnSpec, task: str, positive: str | None):
    name = spec.display
    if task == "regression":
        if spec.kind in CATEGORY_KINDS and spec.kind != "ordinal":
            raise InputError(f"{name!r} holds categories, so it needs a classification tree; "
                             "choose the task 'classification'.")
        numeric_spec = spec if spec.kind == "numeric" else ColumnSpec(spec.name, kind="numeric",
                                                                      label=spec.label)
        parsed = typed_column(values, numeric_spec).numbers
        keep = ~np.isnan(parsed)
        if not keep.any():
            raise InputError(f"The outcome {name!r} is not recorded for any row; choose another "
                             "outcome column.")
        if np.unique(parsed[keep]).size < 2:
            raise InputError(f"The outcome {name!r} has the same value for every patient, so "
                             "there is nothing to predict; choose another outcome.")
        return parsed[keep], (), keep
    if spec.kind == "numeric":
        spec = ColumnSpec(spec.name, kind="nominal", label=spec.label, role=spec.role,
                          missing_codes=spec.missing_codes)
    column = typed_column(values, spec)
    spec = column.spec
    keep = column.codes >= 0
    if not keep.any():
        raise InputError(f"The outcome {name!r} is not recorded for any row; choose another "
                         "outcome column.")
    present = np.unique(column.codes[keep])
    if present.size < 2:
        only = spec.levels[present[0]]
        raise InputError(f"The outcome {name!r} has only one class ({only!r}) among the rows, so "
                         "there is nothing to predict; check the outcome column or choose another.")
    levels = [spec.levels[i] for i in present]
    codes = column.codes[keep]
    remap = np.full(len(spec.levels), -1, dtype=np.int64)
    if len(levels) == 2:
        pos = positive or (spec.positive if spec.positive in levels else None) or \
            positive_level(ColumnSpec(spec.name, kind="binary", levels=tuple(levels)))
        if pos not in levels:
            raise InputError(f"The positive class {pos!r} is not a level of {name!r}; its levels "
                             f"are {', '.join(map(repr, levels))}.")
        neg = levels[0] if levels[1] == pos else levels[1]
        classes = (neg, pos)
    else:
        classes = tuple(levels)
    for index, label in enumerate(classes):
        remap[spec.levels.index(label)] = index
    return remap[codes], classes, keep


# --- the matrix -----------------------------------------------------------------------------


@dataclass(frozen=True)
class MatrixColumn:
    """One column of the grower's matrix and how to say a split on it in words."""

    predictor: int  # index into AnalysisData.predictors
    spec: ColumnSpec
    kind: str  # numeric | ordinal | binary | nominal (ranked) | level (one nominal level)
    order: tuple[str, ...] = ()  # levels in the order of their encoded value
    level: str | None = None  # for kind "level"
    value_of_code: np.ndarray | None = field(default=None, repr=False)

    def yes_levels(self, threshold: float) -> tuple[str, ...]:
        """Levels that go to the YES side (encoded value above the threshold)."""
        if self.kind == "level":
            return (self.level,)
        values = np.arange(len(self.order))
        return tuple(lv for lv, v in zip(self.order, values) if v > threshold)

    def no_levels(self, threshold: float) -> tuple[str, ...]:
        if self.kind == "level":
            return tuple(lv for lv in self.spec.levels if lv != self.level)
        yes = set(self.yes_levels(threshold))
        return tuple(lv for lv in self.order if lv not in yes)


@dataclass(frozen=True)
class Encoding:
    """How a fold's training rows turned predictors into matrix columns."""

    columns: tuple[MatrixColumn, ...]

    def matrix(self, data: AnalysisData, rows: np.ndarray | None = None) -> np.ndarray:
        """The float32 matrix (NaN = missing) for some rows of ``data`` (all by default)."""
        n = data.n if rows is None else len(rows)
        out = np.empty((n, len(self.columns)), dtype=np.float32)
        for j, col in enumerate(self.columns):
            source = data.predictors[col.predictor]
            if col.kind == "numeric":
                values = source.numbers if rows is None else source.numbers[rows]
                out[:, j] = values
            else:
                codes = source.codes if rows is None else source.codes[rows]
                lookup = np.append(col.value_of_code, np.nan)  # code -1 -> NaN
                out[:, j] = lookup[codes]
        return out


def fit_encoding(data: AnalysisData, train_rows: np.ndarray | None = None) -> Encoding:
    """Matrix columns for every predictor, nominal orderings learnt from ``train_rows`` only."""
    y = data.y if train_rows is None else data.y[train_rows]
    columns: list[MatrixColumn] = []
    for index, column in enumerate(data.predictors):
        spec = column.spec
        if spec.kind == "numeric":
            columns.append(MatrixColumn(index, spec, "numeric"))
            continue
        levels = spec.levels
        if spec.kind in ("ordinal", "binary"):
            columns.append(MatrixColumn(index, spec, spec.kind, order=levels,
                                        value_of_code=np.arange(len(levels), dtype=np.float32)))
            continue
        codes = column.codes if train_rows is None else column.codes[train_rows]
        if data.task == "classification" and len(data.classes) > 2:
            # Several classes: no ordering is optimal, so each level is its own yes/no question.
            for code, level in enumerate(levels):
                value = np.full(len(levels), 0.0, dtype=np.float32)
                value[code] = 1.0
                columns.append(MatrixColumn(index, spec, "level", order=(level,), level=level,
                                            value_of_code=value))
            continue
        columns.append(_ranked_nominal(index, spec, codes, y, data.task))
    return Encoding(tuple(columns))


def _ranked_nominal(index: int, spec: ColumnSpec, codes: np.ndarray, y: np.ndarray,
                    task: str) -> MatrixColumn:
    """Order levels by their mean outcome in the training rows (Breiman et al. 1984, §4.2.2)."""
    levels = spec.levels
    present = codes >= 0
    counts = np.bincount(codes[present], minlength=len(levels)).astype(float)
    target = y[present].astype(float) if task == "regression" else (y[present] == 1).astype(float)
    sums = np.bincount(codes[present], weights=target, minlength=len(levels))
    seen = counts > 0
    means = np.where(seen, sums / np.maximum(counts, 1), np.inf)
    # Ties are broken by the dictionary's level order so the ordering is deterministic.
    order_codes = [c for c in np.lexsort((np.arange(len(levels)), means)) if seen[c]]
    value = np.full(len(levels), np.nan, dtype=np.float32)  # unseen in training -> missing
    value[order_codes] = np.arange(len(order_codes), dtype=np.float32)
    return MatrixColumn(index, spec, "nominal", order=tuple(levels[c] for c in order_codes),
                        value_of_code=value)
