"""Leakage, identity, repeat-visit and rare-class guards (core/design/guards.py,
core/dictionary/identity.py).

The demo cohort is invented; its planted structure (sample_data/README.md) is what these
checks rely on, not any clinical fact: `bed_booked` agrees with `admitted` for 98 % of visits
and is recorded after the decision, `los_hours` is measured after it, and SpO2, breathing rate,
age, triage level, arrival and CRP carry the planted, real-looking signal.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from core.data import read_table
from core.design import DesignSpec, prepare_analysis
from core.design.guards import (
    LEAKAGE_AUC, guard_design, identity_findings, leakage_findings, outcome_findings,
    repeat_visit_findings,
)
from core.dictionary import infer_dictionary
from core.dictionary.identity import (
    identity_by_contents, identity_by_header, looks_like_record_numbers, normalised_header,
)
from core.errors import InputError
from tests.helpers import DEMO_CSV, prunella


@pytest.fixture(scope="module")
def demo():
    table = read_table(DEMO_CSV)
    dictionary, _ = infer_dictionary(table.frame)
    return table, dictionary


@pytest.fixture(scope="module")
def demo_leaks(demo):
    table, dictionary = demo
    predictors = tuple(c.name for c in dictionary.by_role("predictor") if c.name != "admitted")
    data = prepare_analysis(table.frame, dictionary,
                            DesignSpec("admitted", predictors, patient_id="patient_id"))
    return {f.column: f for f in leakage_findings(data)}, predictors


def test_bed_booked_and_length_of_stay_are_flagged_for_admission(demo_leaks):
    found, _ = demo_leaks
    assert set(found) == {"bed_booked", "los_hours"}
    booked = found["bed_booked"]
    assert booked.kind == "leakage" and booked.severity == "warning"
    assert booked.measures["cv_auc"] >= LEAKAGE_AUC or \
        booked.measures["cv_error"] <= 0.1 * booked.measures["baseline_error"]
    assert "check when it is recorded" in booked.message.lower()
    assert "--exclude bed_booked" in booked.message


def test_planted_real_predictors_are_not_flagged(demo_leaks):
    found, predictors = demo_leaks
    for name in ("spo2", "resp_rate", "age", "crp", "triage_level", "arrival_mode"):
        assert name in predictors and name not in found


def test_leakage_in_regression_uses_cross_validated_r2():
    rng = np.random.default_rng(3)
    n = 300
    stay = rng.lognormal(2, 1, n)
    frame = pd.DataFrame({"stay": stay, "billed_hours": stay * 1.01 + rng.normal(0, 0.01, n),
                          "age": rng.integers(20, 90, n)})
    dictionary, _ = infer_dictionary(frame)
    data = prepare_analysis(frame, dictionary, DesignSpec("stay", ("billed_hours", "age"),
                                                          task="regression"))
    found = leakage_findings(data)
    assert [f.column for f in found] == ["billed_hours"]
    assert found[0].measures["cv_rank_r2"] >= 0.9


def test_identity_by_header():
    cases = {"Surname": "names", "first_name": "names", "patientName": "names",
             "DOB": "dates of birth", "Date of birth": "dates of birth",
             "home address": "addresses", "Postcode": "addresses", "mobile": "phone numbers",
             "Tel.": "phone numbers", "E-mail": "e-mail addresses", "MRN": "record numbers",
             "NHS number": "record numbers", "hospital no": "record numbers"}
    for header, what in cases.items():
        hint = identity_by_header(header)
        assert hint is not None and hint.what == what, header
    for header in ("spo2", "temperature", "hotel_days", "mobility score", "drug name",
                   "ward", "admitted", "resp_rate", "zipper_sores"):
        assert identity_by_header(header) is None, header
    assert normalised_header("patientFirstName") == "patient first name"


def test_identity_by_contents():
    n = 60
    emails = pd.Series([f"a{i}@clinic.example.org" for i in range(n)])
    phones = pd.Series([f"+44 7700 900{i:03d}" for i in range(n)])
    firsts, lasts = ["Ada", "Ben", "Cleo", "Dev", "Ema", "Finn"], ["Okafor", "Smith", "Nguyen",
                                                                 "Kowalski", "Haddad",
                                                                 "O'Brien", "Lindqvist",
                                                                 "Mbeki", "Rossi", "Tanaka"]
    names = pd.Series([f"{f} {l}" for f in firsts for l in lasts])
    streets = pd.Series([f"{i} Mill Lane" for i in range(n)])
    births = pd.Series(pd.date_range("1935-01-01", periods=n, freq="400D"))
    assert identity_by_contents(emails).what == "e-mail addresses"
    assert identity_by_contents(phones).what == "phone numbers"
    assert identity_by_contents(names).what == "names"
    assert identity_by_contents(streets).what == "addresses"
    assert identity_by_contents(births).what == "dates of birth"
    visits = pd.Series(pd.date_range("2024-01-01", periods=n, freq="7D"))
    for ordinary in (pd.Series(["Walked In", "Ambulance", "Gp Referral"] * 20), visits,
                     pd.Series(np.arange(n) * 1.5), pd.Series(["cough with fever"] * n)):
        assert identity_by_contents(ordinary) is None


def test_record_numbers_versus_measurements():
    assert looks_like_record_numbers(np.arange(1, 101, dtype=float), 100, hinted=False)
    assert looks_like_record_numbers(np.arange(100) * 37 + 200_000.0, 100, hinted=False)
    assert not looks_like_record_numbers(np.arange(100) * 3.0 + 20, 100, hinted=False)
    assert not looks_like_record_numbers(np.arange(100) + 0.5, 100, hinted=False)
    rng = np.random.default_rng(0)
    assert not looks_like_record_numbers(rng.integers(90, 101, 100).astype(float), 100, False)


def test_identity_columns_leave_the_design_unless_named(demo):
    table, dictionary = demo
    frame = table.frame.copy()
    frame["contact"] = [f"0161 496 {i % 10000:04d}" for i in range(len(frame))]
    inferred, notes = infer_dictionary(frame)
    assert inferred.get("contact").role == "ignore"
    assert any("'contact' seems to identify patients" in n for n in notes)
    design = DesignSpec("admitted", ("spo2", "contact", "visit_id"))
    report = guard_design(frame, inferred, design, leakage=False)
    assert report.design.predictors == ("spo2",)
    assert set(report.left_out) == {"contact", "visit_id"}
    assert all(f.leave_out for f in report.of_kind("identity"))
    kept = guard_design(frame, inferred, design, keep=("contact",), leakage=False)
    assert kept.design.predictors == ("spo2", "contact")
    with pytest.raises(InputError, match="Every chosen predictor identifies patients"):
        guard_design(frame, inferred, DesignSpec("admitted", ("contact",)), leakage=False)


def test_repeat_visits(demo):
    table, dictionary = demo
    grouped = repeat_visit_findings(table.frame, dictionary,
                                    DesignSpec("admitted", ("spo2",), patient_id="patient_id"))
    assert grouped and grouped[0].severity == "note"
    assert grouped[0].measures["patients_with_repeats"] == 445  # sample_data/README.md
    loose = repeat_visit_findings(table.frame, dictionary,
                                  DesignSpec("admitted", ("spo2",), patient_id="patient_id"),
                                  grouped=False)
    assert loose[0].severity == "warning" and "turn grouping by patient on" in loose[0].message
    hinted = repeat_visit_findings(table.frame, dictionary, DesignSpec("admitted", ("spo2",)))
    assert hinted and hinted[0].column == "patient_id" and "--patient-id" in hinted[0].message


def test_a_repeating_name_is_not_offered_as_the_patient_identifier():
    """Repeat names hint at repeat visits, but names are shared by different people
    (common practice: link visits by a record number, never by name)."""
    frame = pd.DataFrame({"surname": ["Okafor", "Novak", "Okafor", "Tanaka", "Novak", "Haddad"] * 5,
                          "spo2": np.arange(30) + 70, "admitted": ["yes", "no"] * 15})
    dictionary, _ = infer_dictionary(frame)
    found = repeat_visit_findings(frame, dictionary, DesignSpec("admitted", ("spo2",)))
    assert found and found[0].code == "guard.repeats_by_name"
    assert "not a safe patient identifier" in found[0].message
    assert "--patient-id" not in found[0].message


def test_rare_class():
    rng = np.random.default_rng(1)
    frame = pd.DataFrame({"x": rng.normal(size=100), "y": ["no"] * 93 + ["yes"] * 7})
    dictionary, _ = infer_dictionary(frame)
    data = prepare_analysis(frame, dictionary, DesignSpec("y", ("x",)))
    found = outcome_findings(data)
    assert len(found) == 1 and found[0].measures == {"class": "yes", "n": 7}
    common = pd.DataFrame({"x": rng.normal(size=100), "y": ["no", "yes"] * 50})
    dictionary, _ = infer_dictionary(common)
    assert not outcome_findings(prepare_analysis(common, dictionary, DesignSpec("y", ("x",))))


def test_identity_findings_ignore_clinical_columns(demo):
    table, dictionary = demo
    clinical = ("age", "spo2", "resp_rate", "heart_rate", "temperature", "crp", "sex",
                "arrival_mode", "complaint", "triage_level", "campus")
    assert identity_findings(table.frame, dictionary, clinical) == ()


def test_fit_shows_the_guards_and_leaves_identity_out(tmp_path):
    """`prunella fit` without a dictionary: leakage warnings on stderr, identity columns out,
    and a column named in --predictors stays in."""
    frame = pd.read_csv(DEMO_CSV).iloc[:1200]
    frame["email"] = [f"p{i}@example.org" for i in range(len(frame))]
    path = tmp_path / "cohort.csv"
    frame.to_csv(path, index=False)
    result = prunella("fit", path, "--outcome", "admitted", "--model", tmp_path / "m.json",
                      "--folds", "5", "--quiet")
    assert result.returncode == 0, result.stderr
    assert "warning: Probable leakage: 'bed_booked'" in result.stderr
    assert "'email' seems to identify patients" in result.stderr
    import json
    model = json.loads((tmp_path / "m.json").read_text())
    offered = {p["name"] for p in model["predictors"]}
    assert "email" not in offered and "visit_id" not in offered and "spo2" in offered
    explicit = prunella("fit", path, "--outcome", "admitted", "--model", tmp_path / "m2.json",
                        "--predictors", "spo2,age,visit_id", "--folds", "5", "--quiet")
    assert explicit.returncode == 2  # named on purpose, then refused: it is an identifier
    assert "marked as identifier" in explicit.stderr and "Traceback" not in explicit.stderr


def test_guards_stop_when_cancelled(demo):
    """The app restarts the guards when the design changes: a cancel is honoured between the
    leakage screens, and only then (nothing is screened once it is asked)."""
    from core.errors import Cancelled

    table, dictionary = demo
    predictors = tuple(c.name for c in dictionary.by_role("predictor") if c.name != "admitted")
    design = DesignSpec("admitted", predictors, patient_id="patient_id")
    asked = []

    def cancel_after_two() -> bool:
        asked.append(1)
        return len(asked) > 2

    with pytest.raises(Cancelled):
        guard_design(table.frame, dictionary, design, cancel=cancel_after_two)
    assert len(asked) == 3  # two predictors screened, stopped before the third
    report = guard_design(table.frame, dictionary, design, cancel=lambda: False)
    assert "bed_booked" in report.leakage_columns


def test_an_outcome_value_in_one_or_two_rows_is_said_to_be_a_likely_slip():
    # Invented: a yes/no outcome with two stray "Yes?" cells (issue 15, item 9).
    rng = np.random.default_rng(2)
    frame = pd.DataFrame({"x": rng.normal(size=120),
                          "y": ["no"] * 80 + ["yes"] * 38 + ["Yes?"] * 2})
    dictionary, _ = infer_dictionary(frame)
    data = prepare_analysis(frame, dictionary, DesignSpec("y", ("x",)))
    found = outcome_findings(data)
    assert len(found) == 1 and found[0].code == "guard.stray_outcome_value"
    assert found[0].measures == {"class": "Yes?", "n": 2}
    message = found[0].message
    assert "Only 2 row(s) have 'Yes?'" in message and "typing slip" in message
    assert "3 classes" in message and "missing code" in message
