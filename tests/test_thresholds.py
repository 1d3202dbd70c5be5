"""Round thresholds inside the data's gap (hand-written, so tested hardest)."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings, strategies as st

from core.model.thresholds import format_number, round_threshold


@pytest.mark.parametrize("lo,hi,expected", [
    (24, 25, 24), (23.5, 26, 25), (91, 92, 91), (99.95, 100.2, 100), (36.9, 37.1, 37),
    (37.2, 37.3, 37.2), (-5.5, -3, -5), (-0.5, 0.5, 0), (0.123, 0.1234, 0.123),
    (123456, 123457, 123456), (1499, 1601, 1500), (0.004, 0.0081, 0.005),
])
def test_roundest_number_in_the_gap(lo, hi, expected):
    assert round_threshold(lo, hi) == expected


finite = st.floats(min_value=-1e9, max_value=1e9, allow_nan=False, allow_infinity=False)


@settings(max_examples=2000, deadline=None)
@given(finite, finite)
def test_threshold_always_routes_the_neighbours_like_the_grower(a, b):
    lo, hi = min(a, b), max(a, b)
    if not lo < hi:
        return
    t = round_threshold(lo, hi)
    assert lo <= t < hi  # lo goes left (not above t), hi goes right (above t)
    assert not lo > t and hi > t


@settings(max_examples=500, deadline=None)
@given(st.floats(min_value=-1e6, max_value=1e6, allow_nan=False))
def test_printed_number_reads_back_as_the_same_value(value):
    value = round(value, 6)
    assert math.isclose(float(format_number(value)), value, rel_tol=1e-9, abs_tol=1e-9)
    assert "e" not in format_number(value)
