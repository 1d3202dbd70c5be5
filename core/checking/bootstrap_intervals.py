"""95% intervals of the Brier score, RMSE, MAE and R² by bootstrapping patients.

These measures have no simple closed-form interval that allows for a tree's few distinct
predictions, so the checked patients are resampled with replacement (Efron & Tibshirani 1993,
*An Introduction to the Bootstrap*, ch. 13: the percentile interval). When a patient
identifier is known, whole patients are drawn with all their visits, so repeat visits do not
make the interval look narrower than the number of patients allows. The draws are seeded:
the same patients give the same interval on every run and every computer.

Each resample's measure is computed from per-patient sums (squared errors, absolute errors,
outcome values and their squares) weighted by how often the patient was drawn, so a
resample costs one matrix product, not a refit.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .intervals import LEVEL

INTERVAL_RESAMPLES = 1000  # common practice for a 95% percentile interval
INTERVAL_SEED = 20240610  # fixed, so an interval is reproducible
_CHUNK = 100  # resamples drawn at once (keeps the count matrix small for large files)


@dataclass(frozen=True)
class BootstrapPlan:
    """How the intervals were drawn: stated beside them wherever they are printed."""

    resamples: int
    seed: int
    whole_patients: bool  # True: whole patients drawn (an identifier is known); else rows

    def text(self) -> str:
        """E.g. 'bootstrap, 1000 resamples of whole patients, seed 20240610'."""
        unit = "whole patients" if self.whole_patients else "visits"
        return f"bootstrap, {self.resamples} resamples of {unit}, seed {self.seed}"

    def record(self) -> dict:
        """The plan for JSON files."""
        return {"resamples": self.resamples, "seed": self.seed,
                "whole_patients": self.whole_patients, "level": LEVEL,
                "method": "percentile bootstrap"}


Interval = tuple[float, float] | None


def _group_codes(n: int, groups: np.ndarray | None) -> tuple[np.ndarray, int]:
    if groups is None:
        return np.arange(n), n
    _, codes = np.unique(np.asarray(groups).astype(str), return_inverse=True)
    return codes.ravel(), int(codes.max()) + 1 if n else 0


def _weights(rng: np.random.Generator, k: int, resamples: int):
    """Counts of each patient in each resample, ``_CHUNK`` resamples at a time."""
    done = 0
    while done < resamples:
        size = min(_CHUNK, resamples - done)
        # k draws with replacement per resample, counted per patient (faster than multinomial)
        drawn = rng.integers(0, k, (size, k)) + (np.arange(size) * k)[:, None]
        yield np.bincount(drawn.ravel(), minlength=size * k).reshape(size, k).astype(float)
        done += size


def _percentile(values: np.ndarray) -> Interval:
    values = values[np.isfinite(values)]
    if values.size < 2:
        return None
    tail = 100 * (1 - LEVEL) / 2
    low, high = np.percentile(values, [tail, 100 - tail])
    return (float(low), float(high))


def plan_for(groups: np.ndarray | None, resamples: int = INTERVAL_RESAMPLES,
             seed: int = INTERVAL_SEED) -> BootstrapPlan:
    """The plan for patients identified by ``groups`` (None: each row its own patient)."""
    return BootstrapPlan(resamples, seed, groups is not None)


def brier_interval(squared: np.ndarray, groups: np.ndarray | None,
                   plan: BootstrapPlan) -> Interval:
    """Interval of the Brier score from each row's squared probability error (summed over
    classes for several classes)."""
    squared = np.asarray(squared, dtype=float)
    codes, k = _group_codes(len(squared), groups)
    if k < 2:
        return None
    per_sum = np.bincount(codes, squared, k)
    per_n = np.bincount(codes, None, k).astype(float)
    rng = np.random.default_rng(plan.seed)
    values = [w @ per_sum / (w @ per_n) for w in _weights(rng, k, plan.resamples)]
    return _percentile(np.concatenate(values))


@dataclass(frozen=True)
class ErrorIntervals:
    """Bootstrap intervals of the regression errors, in the outcome's unit (R² has none)."""

    rmse: Interval
    mae: Interval
    r2: Interval


def regression_intervals(y: np.ndarray, predicted: np.ndarray, groups: np.ndarray | None,
                         plan: BootstrapPlan) -> ErrorIntervals:
    """Intervals of RMSE, MAE and R² for outcomes ``y`` and the tree's ``predicted`` values."""
    y = np.asarray(y, dtype=float)
    error = y - np.asarray(predicted, dtype=float)
    codes, k = _group_codes(len(y), groups)
    if k < 2:
        return ErrorIntervals(None, None, None)
    sums = {name: np.bincount(codes, values, k) for name, values in
            (("sq", error ** 2), ("abs", np.abs(error)), ("y", y), ("y2", y ** 2))}
    per_n = np.bincount(codes, None, k).astype(float)
    rng = np.random.default_rng(plan.seed)
    rmse, mae, r2 = [], [], []
    with np.errstate(divide="ignore", invalid="ignore"):
        for w in _weights(rng, k, plan.resamples):
            n = w @ per_n
            sse = w @ sums["sq"]
            total = w @ sums["y2"] - (w @ sums["y"]) ** 2 / n  # spread about the resample's mean
            rmse.append(np.sqrt(sse / n))
            mae.append(w @ sums["abs"] / n)
            r2.append(np.where(total > 0, 1 - sse / total, np.nan))
    return ErrorIntervals(_percentile(np.concatenate(rmse)), _percentile(np.concatenate(mae)),
                          _percentile(np.concatenate(r2)))


def interval_text(interval: Interval, form: str) -> str:
    """' (low–high)' in the format ``form`` (e.g. '.3f'), or '' when there is none."""
    if interval is None:
        return ""
    low, high = interval
    dash = " to " if low < 0 or high < 0 else "–"  # a dash beside a minus sign misreads
    return f" ({low:{form}}{dash}{high:{form}})"
