"""Cross-validated counts of a two-class outcome at every size of the pruning path.

While a fold's held-out cases are routed down its tree (one pass, every size at once), their
predictions are also counted: how many of each true class were called each class (giving the
pooled cross-validated sensitivity and specificity of every size), and how many of each class
sit in a box whose share of the positive class is at least each threshold probability (giving
net benefit, Vickers & Elkin 2006). Counts are pooled over every held-out prediction, so
repeated k-fold counts each case once per repeat.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..checking.net_benefit import THRESHOLDS, NetBenefitPoint, net_benefit_from_counts


@dataclass(frozen=True)
class PathCounts:
    """Pooled held-out counts for every size of the path (two-class outcomes only).

    ``confusion[k, true, predicted]`` counts held-out predictions at size k;
    ``treated[k, t, true]`` counts held-out predictions at size k whose box's positive share
    (among the fold's growing patients) is at least ``THRESHOLDS[t]``.
    """

    confusion: np.ndarray = field(repr=False)  # (sizes, 2, 2)
    treated: np.ndarray = field(repr=False)  # (sizes, thresholds, 2)
    class_cases: tuple[int, int] = (0, 0)  # distinct (negative, positive) cases held out

    def __add__(self, other: "PathCounts") -> "PathCounts":
        return PathCounts(self.confusion + other.confusion, self.treated + other.treated,
                          self.class_cases)

    @property
    def positives(self) -> np.ndarray:
        """Held-out predictions of positive patients, per size (the same at every size)."""
        return self.confusion[:, 1, :].sum(axis=1)

    @property
    def negatives(self) -> np.ndarray:
        return self.confusion[:, 0, :].sum(axis=1)

    @property
    def sensitivity(self) -> np.ndarray:
        """Pooled cross-validated sensitivity per size: positives called positive / positives."""
        return self.confusion[:, 1, 1] / np.maximum(self.positives, 1)

    @property
    def specificity(self) -> np.ndarray:
        """Pooled cross-validated specificity per size: negatives called negative / negatives."""
        return self.confusion[:, 0, 0] / np.maximum(self.negatives, 1)


    def measures_at(self, index: int) -> dict:
        """Cross-validated sensitivity and specificity of one size with Wilson intervals over
        the distinct patients held out (repeated folds hold each out more than once, and
        must not narrow the intervals)."""
        from ..checking.intervals import wilson_interval

        out = {}
        for name, value, total, cases in (
                ("cv_sensitivity", self.sensitivity[index], self.positives[index],
                 self.class_cases[1]),
                ("cv_specificity", self.specificity[index], self.negatives[index],
                 self.class_cases[0])):
            n = int(min(round(total), cases))
            low, high = wilson_interval(int(round(value * n)), n)
            out[name] = float(value)
            out[name + "_interval"] = [low, high]
        return out


    def measures_by_size(self) -> dict[str, np.ndarray]:
        """:meth:`measures_at` for every size of the path, as arrays (for the curve): the
        cross-validated sensitivity and specificity and their 95% Wilson intervals."""
        rows = [self.measures_at(k) for k in range(self.confusion.shape[0])]
        out = {}
        for name in ("cv_sensitivity", "cv_specificity"):
            out[name] = np.array([r[name] for r in rows])
            out[name + "_interval"] = np.array([r[name + "_interval"] for r in rows])
        return out

    def net_benefit_at(self, index: int) -> tuple[NetBenefitPoint, ...]:
        """Net benefit of size ``index`` from the held-out predictions (Vickers & Elkin 2006)."""
        return net_benefit_from_counts(self.treated[index, :, 1], self.treated[index, :, 0],
                                       float(self.positives[index]),
                                       float(self.negatives[index]))


def empty_counts(sizes: int) -> PathCounts:
    return PathCounts(np.zeros((sizes, 2, 2)), np.zeros((sizes, len(THRESHOLDS), 2)))


def fold_counts(predicted: np.ndarray, positive_share: np.ndarray, y: np.ndarray) -> PathCounts:
    """Counts for held-out cases: ``predicted`` (cases, sizes) class codes, ``positive_share``
    (cases, sizes) their box's positive share in the fold's tree, ``y`` their true codes."""
    n, g = predicted.shape
    if n == 0:
        return empty_counts(g)
    column = np.arange(g)[None, :]
    truth = y.astype(np.int64)[:, None]
    cells = (column * 4 + truth * 2 + predicted.astype(np.int64)).ravel()
    confusion = np.bincount(cells, minlength=g * 4).reshape(g, 2, 2).astype(float)
    # Thresholds at or below each case's share: the case is "treated" at each of them.
    reached = np.searchsorted(THRESHOLDS, positive_share, side="right")
    t = len(THRESHOLDS) + 1
    cells = ((column * 2 + truth) * t + reached).ravel()
    per_level = np.bincount(cells, minlength=g * 2 * t).reshape(g, 2, t)
    # treated at threshold j = cases whose reached count exceeds j.
    above = per_level[:, :, ::-1].cumsum(axis=2)[:, :, ::-1][:, :, 1:]
    return PathCounts(confusion, above.transpose(0, 2, 1).astype(float))
