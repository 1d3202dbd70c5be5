"""From the analysis rows to the numeric matrix the grower needs, and back to words.

Every matrix column remembers what it is (a number, an ordered level, a ranked nominal level
or one level of a nominal with several classes), so a split on it can be said as a question
about levels and units rather than as ``x_3 <= 0.5``.

A numeric column may be coarsened (``coarsen=N``): with more than N distinct values among the
training rows it is grown on as N quantile levels (level k holds the values above edge k-1 up
to edge k, the edges being observed values), which makes each split search cheaper on large
cohorts. A column with at most N distinct values is left as it is, so nothing is lost there.
Thresholds are still said from the observed values either side of the split (chosen_tree.py).

Nominal predictors are ordered by the outcome (Breiman's ordering for two classes and for
regression) using the training rows only: ``fit_encoding`` is called once per fold, so the
held-out rows never inform the order and cross-validation cannot leak through it.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..dictionary.columns import ColumnSpec
from .analysis import AnalysisData


@dataclass(frozen=True)
class MatrixColumn:
    """One column of the grower's matrix and how to say a split on it in words."""

    predictor: int  # index into AnalysisData.predictors
    spec: ColumnSpec
    kind: str  # numeric | ordinal | binary | nominal (ranked) | level (one nominal level)
    order: tuple[str, ...] = ()  # levels in the order of their encoded value
    level: str | None = None  # for kind "level"
    value_of_code: np.ndarray | None = field(default=None, repr=False)
    # Coarsened numeric column: the upper edge of each quantile level (observed values).
    edges: np.ndarray | None = field(default=None, repr=False)

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
                out[:, j] = values if col.edges is None else quantile_levels(values, col.edges)
            else:
                codes = source.codes if rows is None else source.codes[rows]
                lookup = np.append(col.value_of_code, np.nan)  # code -1 -> NaN
                out[:, j] = lookup[codes]
        return out


def quantile_edges(values: np.ndarray, levels: int) -> np.ndarray | None:
    """The upper edges of ``levels`` quantile levels of the recorded ``values`` (observed
    values, the inverted-CDF quantiles), or None when they have at most ``levels`` distinct
    values (then the column is kept as it is: coarsening it could only lose)."""
    recorded = np.sort(values[~np.isnan(values)])
    if recorded.size == 0:
        return None
    distinct = 1 + int(np.count_nonzero(recorded[1:] != recorded[:-1]))
    if distinct <= levels:
        return None
    # Level k ends at the value below which a share (k+1)/levels of the rows lie; ties may
    # merge levels, so a column can end with fewer than ``levels``.
    share = np.arange(1, levels) / levels
    at = np.ceil(share * recorded.size).astype(np.int64) - 1
    return np.unique(recorded[np.clip(at, 0, recorded.size - 1)])


def quantile_levels(values: np.ndarray, edges: np.ndarray) -> np.ndarray:
    """Each value's quantile level (0 up to len(edges)); NaN stays NaN (not recorded)."""
    levels = np.searchsorted(edges, values, side="left").astype(np.float32)
    levels[np.isnan(values)] = np.nan
    return levels


def fit_encoding(data: AnalysisData, train_rows: np.ndarray | None = None,
                 coarsen: int | None = None) -> Encoding:
    """Matrix columns for every predictor, nominal orderings (and, with ``coarsen``, the
    numeric columns' quantile levels) learnt from ``train_rows`` only."""
    y = data.y if train_rows is None else data.y[train_rows]
    columns: list[MatrixColumn] = []
    for index, column in enumerate(data.predictors):
        spec = column.spec
        if spec.kind == "numeric":
            edges = None
            if coarsen is not None:
                numbers = column.numbers if train_rows is None else column.numbers[train_rows]
                edges = quantile_edges(numbers, int(coarsen))
            columns.append(MatrixColumn(index, spec, "numeric", edges=edges))
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
