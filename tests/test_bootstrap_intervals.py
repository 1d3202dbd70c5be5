"""Issue 10, item 10: 95% intervals for the Brier score, RMSE, MAE and R² by a seeded
percentile bootstrap over patients (whole patients when an identifier is known), with the
resample count stated, in `prunella check`'s JSON and text, the app's checking step and the
report. The percentile interval is Efron & Tibshirani (1993), *An Introduction to the
Bootstrap*, ch. 13; drawing whole patients (clusters) is common practice for repeated visits."""

from __future__ import annotations

import io
import json

import numpy as np
import pandas as pd
import pytest
from pypdf import PdfReader

from core.checking.bootstrap_intervals import (
    INTERVAL_RESAMPLES, brier_interval, plan_for, regression_intervals,
)
from core.checking.metrics import classification_measures, regression_measures
from tests.helpers import prunella


def _inside(interval, value) -> bool:
    return interval is not None and interval[0] <= value <= interval[1]


def _stay_data(seed=3, patients=150, visits=3):
    """Invented lengths of stay: each patient's visits alike, so patients are the unit."""
    rng = np.random.default_rng(seed)
    person = np.repeat(np.arange(patients), visits)
    own = rng.gamma(2.0, 3.0, patients)[person]
    y = own + rng.normal(0, 1.0, person.size)
    predicted = np.where(own > 6, 9.0, 3.5)
    return y, predicted, person


def test_regression_intervals_contain_the_estimate_and_repeat_with_the_seed():
    y, predicted, person = _stay_data()
    m = regression_measures(y, predicted, groups=person, unit="days")
    assert _inside(m.rmse_interval, m.rmse) and _inside(m.mae_interval, m.mae)
    assert _inside(m.r2_interval, m.r2)
    again = regression_measures(y, predicted, groups=person, unit="days")
    assert (again.rmse_interval, again.mae_interval, again.r2_interval) == \
        (m.rmse_interval, m.mae_interval, m.r2_interval)
    other = regression_intervals(y, predicted, person, plan_for(person, seed=7))
    assert other.rmse != m.rmse_interval  # the seed is what fixes the draws
    assert m.intervals.resamples == INTERVAL_RESAMPLES and m.intervals.whole_patients
    rows = dict(m.rows())
    assert f"{INTERVAL_RESAMPLES} resamples of whole patients" in rows["Intervals of RMSE, MAE and R²"]
    assert rows["Root mean squared error"].startswith(f"{m.rmse:.3g} days (")


def test_whole_patients_give_a_wider_interval_than_single_visits():
    # Three alike visits per patient: drawing visits alone pretends there are three times
    # as many patients, and the interval comes out too narrow.
    y, predicted, person = _stay_data()
    whole = regression_measures(y, predicted, groups=person)
    visits = regression_measures(y, predicted)
    width = lambda iv: iv[1] - iv[0]  # noqa: E731
    assert width(whole.mae_interval) > 1.3 * width(visits.mae_interval)
    assert not visits.intervals.whole_patients
    assert "resamples of visits" in visits.intervals.text()


def test_brier_interval_contains_the_score_for_two_and_three_classes():
    rng = np.random.default_rng(5)
    n = 400
    y = rng.integers(0, 2, n)
    share = np.where(y == 1, 0.7, 0.25) + rng.normal(0, 0.05, n)
    probabilities = np.column_stack([1 - share, share])
    m = classification_measures(y, (share > 0.5).astype(int), probabilities, ("no", "yes"))
    assert _inside(m.brier_interval, m.brier)
    assert dict(m.rows())["Brier score"] == \
        f"{m.brier:.3f} ({m.brier_interval[0]:.3f}–{m.brier_interval[1]:.3f})"
    three = rng.dirichlet([2, 2, 2], n)
    y3 = rng.integers(0, 3, n)
    m3 = classification_measures(y3, three.argmax(1), three, ("a", "b", "c"))
    assert _inside(m3.brier_interval, m3.brier)
    # The per-row terms the bootstrap resamples add up to scikit-learn's own score.
    squared = ((three - np.eye(3)[y3]) ** 2).sum(axis=1)
    assert squared.mean() == pytest.approx(m3.brier)
    assert brier_interval(squared, None, plan_for(None)) == m3.brier_interval


def test_too_few_patients_give_no_interval_rather_than_a_false_one():
    m = regression_measures(np.array([3.0, 4.0]), np.array([3.5, 3.5]),
                            groups=np.array(["a", "a"]))
    assert m.rmse_interval is None and "(" not in dict(m.rows())["Root mean squared error"]


@pytest.fixture(scope="module")
def ward(tmp_path_factory):
    """An invented surgical ward: record numbers with repeat admissions, stay in days."""
    folder = tmp_path_factory.mktemp("stay")
    rng = np.random.default_rng(21)
    n = 420
    frame = pd.DataFrame({
        "record_no": [f"RN{5000 + i // 2}" for i in range(n)],
        "age_years": rng.integers(18, 95, n),
        "albumin": rng.normal(36, 6, n).round(0),
        "operation": rng.choice(["hip", "knee", "none"], n),
    })
    frame["stay_days"] = (3 + (frame["age_years"] > 70) * 4 + (frame["albumin"] < 32) * 3
                          + rng.gamma(1.5, 1.0, n)).round(0)
    derivation, external = frame.iloc[:300], frame.iloc[300:]
    derivation.to_csv(folder / "ward.csv", index=False)
    external.to_csv(folder / "ward_later.csv", index=False)
    return folder


def test_check_states_the_intervals_and_their_resamples(ward):
    folder = ward
    fit = prunella("fit", folder / "ward.csv", "--outcome", "stay_days", "--patient-id",
                   "record_no", "--folds", "5", "--model", folder / "stay.json", "--quiet",
                   cwd=folder)
    assert fit.returncode == 0, fit.stderr
    done = prunella("check", folder / "stay.json", folder / "ward_later.csv", "--out",
                    folder / "check.json", "--checked-model", folder / "checked.json", cwd=folder)
    assert done.returncode == 0, done.stderr
    assert f"{INTERVAL_RESAMPLES} resamples of whole patients" in done.stdout
    results = json.loads((folder / "check.json").read_text(encoding="utf-8"))
    m = results["measures"]
    for name in ("rmse", "mae", "r2"):
        low, high = m[f"{name}_interval"]
        assert low <= m[name] <= high, name
    assert m["intervals"]["resamples"] == INTERVAL_RESAMPLES and m["intervals"]["whole_patients"]
    record = json.loads((folder / "checked.json").read_text(encoding="utf-8"))["validation"]
    assert record["rmse_interval"] == m["rmse_interval"]
    assert record["bootstrap"]["resamples"] == INTERVAL_RESAMPLES
    # The same file checked again gives the same intervals (seeded).
    again = prunella("check", folder / "stay.json", folder / "ward_later.csv", "--out",
                     folder / "again.json", cwd=folder)
    assert again.returncode == 0
    assert json.loads((folder / "again.json").read_text(encoding="utf-8"))["measures"] == m


def test_the_report_prints_the_intervals_and_the_resample_count(ward):
    from core.checking import check_table
    from core.data import read_table
    from core.design import DesignSpec
    from core.dictionary import infer_dictionary
    from core.report import prepare_report, render_report
    from core.sizing import CVSettings, DerivationRequest, derive

    table = read_table(ward / "ward.csv")
    dictionary, _notes = infer_dictionary(table.frame)
    request = DerivationRequest(DesignSpec("stay_days", ("age_years", "albumin", "operation"),
                                           patient_id="record_no"), cv=CVSettings(folds=5))
    derivation = derive(table, dictionary, request)
    external = check_table(derivation.model, read_table(ward / "ward_later.csv"),
                           source="later admissions")
    contents = prepare_report(derivation, external=(external,), nested=False, bootstrap=0,
                              printed="2026-01-31")
    words = " ".join(" ".join(p.extract_text() for p in
                              PdfReader(io.BytesIO(render_report(contents))).pages).split())
    m = external.measures
    # Stays are recorded in whole days: the interval has one decimal more, not three figures.
    assert m.decimals == 0
    assert f"{m.rmse_interval[0]:.1f}–{m.rmse_interval[1]:.1f}" in words
    assert f"bootstrap, {INTERVAL_RESAMPLES} resamples of whole patients" in words
