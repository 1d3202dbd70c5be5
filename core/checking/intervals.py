"""Confidence intervals shared by the chart, the checks and the report, and a proportion with
its interval as every page prints it.

SciPy is imported on first use, so printing a chart, or a command that refuses bad input,
does not wait for it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

LEVEL = 0.95


@lru_cache(maxsize=64)
def normal_quantile(p: float) -> float:
    """The standard normal quantile (1.96 for p = 0.975)."""
    from scipy import stats

    return float(stats.norm.ppf(p))


def t_quantile(p: float, df: int) -> float:
    """The Student-t quantile with ``df`` degrees of freedom."""
    from scipy import stats

    return float(stats.t.ppf(p, df))


def wilson_interval(successes: int, n: int, level: float = 0.95) -> tuple[float, float]:
    """Wilson score interval for a proportion (Wilson 1927; Newcombe 1998, method 3)."""
    if n <= 0:
        return (0.0, 1.0)
    if not 0 <= successes <= n:
        raise ValueError("successes must lie between 0 and n")
    z = normal_quantile(0.5 + level / 2)
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
    half = t_quantile(0.5 + level / 2, n - 1) * sd / math.sqrt(n)
    low, high = float(mean - half), float(mean + half)
    if within is not None:
        low, high = max(low, within[0]), min(high, within[1])
    return (low, high)


_wilson = lru_cache(maxsize=4096)(wilson_interval)  # the chart planner asks for the same boxes often


@dataclass(frozen=True)
class Proportion:
    """k of n, with its Wilson 95% interval."""

    k: int
    n: int
    value: float | None
    low: float | None
    high: float | None

    def text(self) -> str:
        """'84% (79–88%)', or 'not estimable' when there is nobody to count."""
        return share_text(self.value, self.low, self.high)


def share_text(value: float | None, low: float | None, high: float | None) -> str:
    """A share with its interval as printed, '84% (79–88%)'; 'not estimable' without one."""
    if value is None or low is None or high is None:
        return "not estimable (no patients)"
    return f"{as_percent(value)} ({as_percent(low, sign=False)}–{as_percent(high)})"


def proportion(k: int, n: int) -> Proportion:
    """A proportion with its Wilson interval (value None when n is 0)."""
    k, n = int(k), int(n)
    if n == 0:
        return Proportion(k, n, None, None, None)
    low, high = _wilson(k, n, LEVEL)
    return Proportion(k, n, k / n, low, high)


def as_percent(value: float, sign: bool = True) -> str:
    """A share as a whole percentage: '84%' (or '84' without the sign, before a dash)."""
    text = f"{100 * value:.0f}"
    return text + "%" if sign else text
