"""Numbers as printed: to the precision the data were recorded with.

A length of stay recorded in whole days is summarised as "10.9 days", never "10.873 days":
a mean, median, quartile, interval or error of an outcome gets at most one decimal more than
the data were recorded with (common practice in clinical reporting: a summary is not more
precise than its measurements allow), and never more than three significant figures. The
chart, the box details, the rules text, the report, the app and the command line all print
through :func:`summary_number`, so they agree to the digit.
"""

from __future__ import annotations

import math
from collections.abc import Iterable

import numpy as np

# Past six decimals a recorded value is a computed one (a ratio, a converted unit): the data
# then give no precision to follow, and three significant figures apply alone.
MAX_DECIMALS = 6
_FIGURES = 3  # significant figures at most


def decimals_observed(values: Iterable[float] | np.ndarray) -> int | None:
    """The decimals the values were recorded with: the fewest d ≤ 6 for which every finite
    value is a whole number of 10⁻ᵈ (12 and 7 → 0; 36.6 → 1). None when no value is finite
    or the values need more than six decimals."""
    array = np.asarray(values, dtype=float).ravel()
    array = array[np.isfinite(array)]
    if array.size == 0:
        return None
    for d in range(MAX_DECIMALS + 1):
        scaled = array * 10.0 ** d
        # A float holds 36.6 as 36.600000000000001: judge "whole" within a relative hair.
        if np.all(np.abs(scaled - np.round(scaled)) <= 1e-9 * np.maximum(1.0, np.abs(scaled))):
            return d
    return None


def summary_decimals(value: float, data_decimals: int | None = None, power: int = 1) -> int:
    """The decimals a summary of the data is printed with: three significant figures of
    ``value``, at most three decimals, and at most one decimal more than the data's
    ``data_decimals`` (None: the data's precision is not known). A summary in the unit
    squared (``power`` 2: a mean squared error) follows the squares' decimals, 2 × d."""
    if not math.isfinite(value) or value == 0:
        figures = 0
    else:
        figures = max(0, _FIGURES - 1 - int(math.floor(math.log10(abs(value)))))
    decimals = min(figures, 3)
    if data_decimals is not None:
        decimals = min(decimals, power * int(data_decimals) + 1)
    return decimals


def column_decimals(values: Iterable[float], data_decimals: int | None = None,
                    power: int = 1) -> int:
    """One number of decimals for a column of summaries (a table's errors, say), so that its
    rows compare digit by digit: the most any value of it gets from :func:`summary_decimals`,
    still at most one decimal more than the data (or their squares, ``power`` 2)."""
    finite = [float(v) for v in values if v is not None and math.isfinite(float(v))]
    return max((summary_decimals(v, data_decimals, power) for v in finite), default=0)


def summary_number(value: float, data_decimals: int | None = None, unit: str = "",
                   decimals: int | None = None, power: int = 1) -> str:
    """A summary as printed: :func:`summary_decimals` decimals (or ``decimals`` when given,
    so the ends of an interval share its centre's), thousands separated, a true minus sign,
    then the unit ('10.9 days', '37.4 °C' as '37.4°C', '−0.3 mmol/L')."""
    if value is None or not math.isfinite(value):
        return "–"
    places = summary_decimals(value, data_decimals, power) if decimals is None else decimals
    text = f"{value:,.{places}f}"
    if text.lstrip("-").strip("0.,") == "":  # -0.0 prints as 0.0
        text = text.lstrip("-")
    text = text.replace("-", "−")
    if unit:
        text += unit if unit in ("%", "°C", "°F", "°") else f" {unit}"
    return text


def error_number(value: float, task: str, data_decimals: int | None = None,
                 class_decimals: int = 3) -> str:
    """One tree error as printed: a mean squared error to its squares' precision, a
    classification error (rate or cost) to ``class_decimals`` decimals."""
    if task == "regression":
        return summary_number(value, data_decimals, power=2)
    return f"{value:.{class_decimals}f}"
