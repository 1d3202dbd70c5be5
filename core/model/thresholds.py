"""Round thresholds: the number a clinician would write, inside the gap the data leave.

A split sends values ≤ lo one way and values ≥ hi the other, where lo and hi are neighbouring
observed values. Any t with lo ≤ t < hi makes "above t?" route every derivation patient
exactly as the grower did; among those we pick the roundest (fewest significant digits,
preferring multiples of 10, then 5, then 2), so the chart and the model agree.
"""

from __future__ import annotations

import math
from decimal import ROUND_CEILING, Decimal

_MULTIPLIERS = (10, 5, 2, 1)


def round_threshold(lo: float, hi: float) -> float:
    """The roundest t with lo ≤ t < hi (lo < hi, both finite)."""
    if not (math.isfinite(lo) and math.isfinite(hi)) or not lo < hi:
        raise ValueError(f"need finite lo < hi, got {lo!r}, {hi!r}")
    if lo <= 0 < hi:
        return 0.0
    # Candidates are built from lo's shortest decimal form (37.2, not 37.2000000000000028...)
    # and accepted by float comparison, so t may equal lo itself.
    low = Decimal(repr(float(lo)))
    top = math.floor(math.log10(max(abs(lo), abs(hi)))) + 1
    for exponent in range(top, top - 20, -1):
        for multiplier in _MULTIPLIERS:
            step = multiplier * Decimal(10) ** (exponent - 1)
            candidate = (low / step).to_integral_value(rounding=ROUND_CEILING) * step
            value = float(candidate)
            if lo <= value < hi:
                return value
    return lo


def format_number(value: float) -> str:
    """A threshold as printed: no trailing zeros, no scientific notation for usual values."""
    if value == int(value) and abs(value) < 1e15:
        return str(int(value))
    text = f"{value:.10f}".rstrip("0").rstrip(".")
    return text
