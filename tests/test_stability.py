"""Bootstrap stability of the chosen tree (core/checking/stability.py).

The demo cohort is invented; it serves to check that the planted first question (SpO2) is
found again, not as a reference for any clinical fact.
"""

from __future__ import annotations

import numpy as np
import pytest

from core.checking.stability import _Matcher, bootstrap_stability, resample_rows
from core.design import DesignSpec
from core.errors import Cancelled, InputError
from core.model import Question
from core.sizing import CVSettings, DerivationRequest, derive
from tests.helpers import demo_inputs


@pytest.fixture(scope="module")
def derivation():
    table, dictionary, _ = demo_inputs()
    predictors = ("age", "sex", "resp_rate", "spo2", "heart_rate", "arrival_mode", "crp")
    request = DerivationRequest(DesignSpec("admitted", predictors, patient_id="patient_id"),
                                cv=CVSettings(folds=5))
    return derive(table, dictionary, request)


def test_resamples_draw_whole_patients(derivation):
    data = derivation.data
    for rows in resample_rows(data, 3, seed=1):
        drawn = data.groups[rows]
        visits = np.bincount(data.groups)
        for patient, copies in zip(*np.unique(drawn, return_counts=True)):
            assert copies % visits[patient] == 0  # every visit of a drawn patient, each time
    one, two = resample_rows(data, 2, seed=5), resample_rows(data, 2, seed=5)
    assert all(np.array_equal(a, b) for a, b in zip(one, two))


def test_stability_finds_the_planted_first_question(derivation):
    steps = []
    st = bootstrap_stability(derivation.data, derivation.request, derivation.model, resamples=6,
                             progress=lambda d, t: steps.append((d, t)))
    assert steps[-1] == (6, 6) and len(steps) == 6
    assert st.patient_level and st.resamples == 6 and len(st.leaves) == 6
    top = st.predictors[0]
    assert top.column == "spo2" and top.first >= 5
    assert all(u.first <= u.anywhere <= 6 for u in st.predictors)
    assert sum(u.first for u in st.predictors) + st.no_question == 6
    root = st.questions[0]
    assert root.box == 1 and root.column == "spo2"
    assert root.in_place <= root.anywhere and root.in_place >= 5
    for q in st.questions:
        assert q.in_place <= q.anywhere <= 6
    assert "first question" in st.summary()


def test_parallel_resamples_give_the_same_counts(derivation):
    one = bootstrap_stability(derivation.data, derivation.request, derivation.model, resamples=3)
    two = bootstrap_stability(derivation.data, derivation.request, derivation.model, resamples=3,
                              jobs=2)
    assert one == two


def test_cancel_and_bad_counts(derivation):
    with pytest.raises(Cancelled):
        bootstrap_stability(derivation.data, derivation.request, derivation.model, resamples=50,
                            cancel=lambda: True)
    with pytest.raises(InputError):
        bootstrap_stability(derivation.data, derivation.request, derivation.model, resamples=0)


def test_threshold_tolerance_is_on_the_percentile_scale(derivation):
    data = derivation.data
    matcher = _Matcher(data, tolerance=0.05)
    ages = np.sort(data.predictors[0].numbers)
    q = Question("age", "above", threshold=float(np.quantile(ages, 0.5)))
    near = float(np.quantile(ages, 0.53))
    far = float(np.quantile(ages, 0.6))
    assert matcher.orientation(q, ("age", "above", near, (), (), 1, 2)) == "same"
    assert matcher.orientation(q, ("age", "above", far, (), (), 1, 2)) is None
    assert matcher.orientation(q, ("crp", "above", near, (), (), 1, 2)) is None
    levels = Question("arrival_mode", "in", yes_levels=("ambulance", "inter-hospital transfer"),
                      no_levels=("walked in", "GP referral"))
    same = ("arrival_mode", "in", None, ("inter-hospital transfer", "ambulance"),
            ("GP referral", "walked in"), 1, 2)
    swapped = ("arrival_mode", "in", None, same[4], same[3], 1, 2)
    other = ("arrival_mode", "in", None, ("ambulance",), ("GP referral", "walked in",
                                                           "inter-hospital transfer"), 1, 2)
    assert matcher.orientation(levels, same) == "same"
    assert matcher.orientation(levels, swapped) == "swapped"
    assert matcher.orientation(levels, other) is None
