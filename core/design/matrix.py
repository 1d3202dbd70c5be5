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
from ..dictionary.typed_columns import TypedColumn
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

    def values(self, taken: np.ndarray) -> np.ndarray:
        """This column's matrix values from its predictor's numbers (a measurement) or level
        codes (a category, -1 = not recorded) for some rows; NaN = missing."""
        if self.kind == "numeric":
            return taken if self.edges is None else quantile_levels(taken, self.edges)
        return np.append(self.value_of_code, np.nan)[taken]  # code -1 -> NaN

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
            out[:, j] = col.values(_taken(data.predictors[col.predictor], rows))
        return out


def _taken(column: TypedColumn, rows: np.ndarray | None) -> np.ndarray:
    """A predictor's numbers (a measurement) or level codes (a category) for some rows."""
    source = column.numbers if column.spec.kind == "numeric" else column.codes
    return source if rows is None else source[rows]


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


_BUCKETS = 1 << 16  # equal-width buckets between the first and last edge (quantile_levels)


def quantile_levels(values: np.ndarray, edges: np.ndarray) -> np.ndarray:
    """Each value's quantile level, the number of edges below it (0 up to len(edges)), exactly
    as ``np.searchsorted(edges, values, side="left")``; NaN stays NaN (not recorded).

    Why not searchsorted alone: a binary search per value costs most of a fold's matrix on a
    million rows (many cache misses per value). Here each value first falls in one of 65,536
    equal-width buckets; the bucket map is monotone (a clip, a subtraction, a multiplication
    by a positive number and a truncation never reverse the order of two numbers), so a value
    whose bucket holds no edge has exactly the edges of the lower buckets below it, read from
    a small table. Only values sharing a bucket with an edge (a few per cent) are searched."""
    edges = np.asarray(edges, dtype=np.float64)
    values = np.asarray(values, dtype=np.float64)
    missing = np.isnan(values)
    low, high = (float(edges[0]), float(edges[-1])) if edges.size else (0.0, 0.0)
    span = high - low
    scale = (_BUCKETS - 2) / span if span > 0 else np.inf
    if not (np.isfinite(span) and np.isfinite(scale)) or values.size < _BUCKETS:
        # One edge, edges too close or too far apart for the buckets, or too few values to
        # pay for the table: the binary search for every value.
        levels = np.searchsorted(edges, values, side="left").astype(np.float32)
        levels[missing] = np.nan
        return levels
    position = np.clip(values, low, high)  # below the first edge: bucket 0; above the last: last
    position -= low
    position *= scale
    position[missing] = 0.0
    bucket = position.astype(np.int32)
    edge_bucket = ((edges - low) * scale).astype(np.int32)
    below = np.searchsorted(edge_bucket, np.arange(_BUCKETS), side="left").astype(np.float32)
    holds_edge = np.zeros(_BUCKETS, dtype=bool)
    holds_edge[edge_bucket] = True
    levels = below[bucket]
    search = np.flatnonzero(holds_edge[bucket] & ~missing)
    levels[search] = np.searchsorted(edges, values[search], side="left")
    levels[missing] = np.nan
    return levels


def fit_encoding(data: AnalysisData, train_rows: np.ndarray | None = None,
                 coarsen: int | None = None) -> Encoding:
    """Matrix columns for every predictor, nominal orderings (and, with ``coarsen``, the
    numeric columns' quantile levels) learnt from ``train_rows`` only."""
    y = data.y if train_rows is None else data.y[train_rows]
    return Encoding(tuple(col for index, column in enumerate(data.predictors)
                          for col in _fit_predictor(data, index, _taken(column, train_rows), y,
                                                    coarsen)))


def training_matrix(data: AnalysisData, rows: np.ndarray,
                    coarsen: int | None = None) -> tuple[Encoding, np.ndarray]:
    """``fit_encoding(data, rows, coarsen)`` and its matrix of the same rows, in one pass: each
    predictor's training values are taken from its column once, not once for learning and
    again for the matrix (on a fold of a million rows, a second of copying saved per fold)."""
    y = data.y[rows]
    # One matrix column per predictor, unless a nominal's levels are split (several classes).
    width = sum(_width(data, column) for column in data.predictors)
    out = np.empty((len(rows), width), dtype=np.float32)
    columns: list[MatrixColumn] = []
    for index, column in enumerate(data.predictors):
        taken = _taken(column, rows)
        for col in _fit_predictor(data, index, taken, y, coarsen):
            out[:, len(columns)] = col.values(taken)
            columns.append(col)
    return Encoding(tuple(columns)), out


def _width(data: AnalysisData, column: TypedColumn) -> int:
    """How many matrix columns a predictor becomes (see _fit_predictor)."""
    return len(column.spec.levels) if _levels_apart(data, column.spec) else 1


def _levels_apart(data: AnalysisData, spec: ColumnSpec) -> bool:
    """Whether a category's levels become one yes/no column each: an unordered category when
    there are several classes, where no ordering of its levels is optimal."""
    return spec.kind == "nominal" and data.task == "classification" and len(data.classes) > 2


def _fit_predictor(data: AnalysisData, index: int, taken: np.ndarray, y: np.ndarray,
                   coarsen: int | None) -> list[MatrixColumn]:
    """The matrix column(s) of one predictor, learnt from its training values ``taken``
    (numbers or level codes) and the training outcomes ``y``."""
    spec = data.predictors[index].spec
    if spec.kind == "numeric":
        edges = quantile_edges(taken, int(coarsen)) if coarsen is not None else None
        return [MatrixColumn(index, spec, "numeric", edges=edges)]
    levels = spec.levels
    if spec.kind in ("ordinal", "binary"):
        return [MatrixColumn(index, spec, spec.kind, order=levels,
                             value_of_code=np.arange(len(levels), dtype=np.float32))]
    if _levels_apart(data, spec):  # each level its own yes/no question
        columns = []
        for code, level in enumerate(levels):
            value = np.full(len(levels), 0.0, dtype=np.float32)
            value[code] = 1.0
            columns.append(MatrixColumn(index, spec, "level", order=(level,), level=level,
                                        value_of_code=value))
        return columns
    return [_ranked_nominal(index, spec, taken, y, data.task)]


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
