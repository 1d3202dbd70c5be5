"""Numbers the app draws or prints come from core: the 1-SE limit of the pruning curve and
the shares of a stability check."""

from __future__ import annotations

import numpy as np

from core.checking.stability import QuestionRecurrence
from core.sizing import one_se_limit


def test_one_se_limit_is_the_lowest_error_plus_its_se():
    cv_risk = [0.40, 0.31, 0.30, 0.33]
    cv_se = [0.02, 0.03, 0.025, 0.04]
    assert one_se_limit(cv_risk, cv_se, 2) == 0.30 + 0.025
    assert one_se_limit(np.asarray(cv_risk), np.asarray(cv_se), 2) == 0.30 + 0.025


def test_stability_shares_are_over_the_resamples():
    q = QuestionRecurrence(box=1, column="spo2", text="SpO2 below 92%?", anywhere=45,
                           in_place=30, resamples=50)
    assert q.share_anywhere == 0.9 and q.share_in_place == 0.6
