"""Confidence intervals shared by the chart, the checks and the report."""

from __future__ import annotations

import math

from scipy import stats


def wilson_interval(successes: int, n: int, level: float = 0.95) -> tuple[float, float]:
    """Wilson score interval for a proportion (Wilson 1927; Newcombe 1998, method 3)."""
    if n <= 0:
        return (0.0, 1.0)
    if not 0 <= successes <= n:
        raise ValueError("successes must lie between 0 and n")
    z = stats.norm.ppf(0.5 + level / 2)
    p = successes / n
    denominator = 1 + z * z / n
    centre = (p + z * z / (2 * n)) / denominator
    half = z * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n)) / denominator
    # Exact ends at 0 and n: the formula gives them up to rounding only.
    low = 0.0 if successes == 0 else max(0.0, centre - half)
    high = 1.0 if successes == n else min(1.0, centre + half)
    return (float(low), float(high))


def mean_interval(mean: float, sd: float, n: int, level: float = 0.95,
                  within: tuple[float, float] | None = None) -> tuple[float, float]:
    """Student-t interval for a mean from its SD and count (n ≥ 2; else the point itself).

    ``within`` (the range the outcome can take, e.g. the observed range of a length of stay)
    keeps a small, skewed box from showing an impossible end such as a negative stay."""
    if n < 2 or not math.isfinite(sd):
        return (mean, mean)
    half = stats.t.ppf(0.5 + level / 2, n - 1) * sd / math.sqrt(n)
    low, high = float(mean - half), float(mean + half)
    if within is not None:
        low, high = max(low, within[0]), min(high, within[1])
    return (low, high)
