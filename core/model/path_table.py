"""The pruning path as a table: for each size its cross-validated error ± SE first, then the
training error (optimistic), each printed once for the command line, the report and the app.

A regression error is a mean squared error, in the outcome's unit squared: it is printed to
the squares' precision (core/precision.py: at most one decimal more than the squared data),
and its root beside it in the outcome's own unit, comparable with a held-out RMSE. A
classification error (an error rate or a misclassification cost) keeps its fixed decimals.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..precision import column_decimals, error_number, summary_number
from .tree import TreeModel


@dataclass(frozen=True)
class PathRow:
    """One size of the pruning path, its numbers as printed."""

    leaves: int
    cv: str  # the cross-validated error
    se: str  # its standard error
    cv_root: str | None  # regression: the root of the cross-validated error, in the outcome's
    # unit (which the column's heading names)
    train: str  # the training error (optimistic: the same patients)


def _root(value: float) -> float:
    return math.sqrt(max(float(value), 0.0))


def path_rows(model: TreeModel, class_decimals: int = 4) -> tuple[PathRow, ...]:
    """Every size of ``model``'s pruning path, in path order, each column to one precision."""
    path = model.path
    cv, se, train = path["cv_risk"], path["cv_se"], path["train_risk"]
    if model.task != "regression":
        return tuple(PathRow(int(n), f"{c:.{class_decimals}f}", f"{s:.{class_decimals}f}",
                             None, f"{t:.{class_decimals}f}")
                     for n, c, s, t in zip(path["leaves"], cv, se, train))
    data = model.outcome_decimals
    squared = column_decimals(list(cv) + list(train), data, power=2)
    spread = column_decimals(se, data, power=2)
    roots = [_root(c) for c in cv]
    root = column_decimals(roots, data)
    return tuple(PathRow(int(n), summary_number(c, data, decimals=squared),
                         summary_number(s, data, decimals=spread),
                         summary_number(r, data, decimals=root),
                         summary_number(t, data, decimals=squared))
                 for n, c, s, r, t in zip(path["leaves"], cv, se, roots, train))


def error_text(model: TreeModel, value: float, class_decimals: int = 3) -> str:
    """One error of ``model``'s kind as printed: a mean squared error to the squares'
    precision, a classification error to ``class_decimals`` decimals."""
    decimals = model.outcome_decimals if model.task == "regression" else None
    return error_number(value, model.task, decimals, class_decimals)


def root_text(model: TreeModel, value: float) -> str:
    """The root of a mean squared error, in the outcome's unit ('1.5 days')."""
    return summary_number(_root(value), model.outcome_decimals, model.outcome.unit)
