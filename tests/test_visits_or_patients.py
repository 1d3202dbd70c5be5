"""Rows are called "visits" only where they are visits: a patient-number column is set and some
patients have more than one row. Otherwise every row is a patient, and every count says
"patients". One helper (core/phrases.rows_word) decides; prunella fit, prunella check, the
chart, the rules, the report and the app's steps all count with it.

Invented data generated here (our own wording, not a reference).
"""

from __future__ import annotations

import io
import re

import numpy as np
import pandas as pd
import pytest
from pypdf import PdfReader

from core.chart import ChartOptions
from core.chart.content import chart_text
from core.checking import check_table
from core.data import read_table
from core.dictionary import infer_dictionary
from core.design import DesignSpec
from core.model import TreeModel
from core.phrases import rows_and_patients, rows_word
from core.report import prepare_report, render_report
from core.sizing import CVSettings, DerivationRequest, derive
from tests.helpers import prunella

PREDICTORS = ("Haemoglobin g/L", "lactate_mmol", "ward")
# A count followed by its noun: "412 visits", "1 patient".
VISITS = re.compile(r"\b\d[\d,]* visits?\b")
PATIENTS = re.compile(r"\b\d[\d,]* patients?\b")


def _cohort(patients: int, most_visits: int, seed: int, first: int = 0) -> pd.DataFrame:
    """Patients with 1..most_visits rows each: a haemoglobin, a lactate, a ward ("none" is a
    real answer), the days in hospital and whether blood was given."""
    rng = np.random.default_rng(seed)
    rows = []
    for p in range(patients):
        base = rng.normal(120, 15)
        for _ in range(int(rng.integers(1, most_visits + 1))):
            hb = base + rng.normal(0, 5)
            lactate = rng.gamma(2, 1)
            stay = 3 + 4 * (hb < 110) + 3 * (lactate > 3) + rng.normal(0, 1.5)
            given = (hb < 105 and rng.random() < 0.8) or rng.random() < 0.05
            rows.append({"Record no": f"MRN{first + p:05d}", "Haemoglobin g/L": round(hb),
                         "lactate_mmol": round(lactate, 1),
                         "ward": rng.choice(["medical", "surgical", "none"]),
                         "stay_days": max(1, round(stay)), "transfused": "yes" if given else "no"})
    return pd.DataFrame(rows)


def test_the_word_follows_the_rows():
    assert rows_word(412, 300) == "visits"
    assert rows_word(300, 300) == "patients"  # a patient number, but every patient once
    assert rows_word(300, None) == "patients"  # no patient number: every row a patient
    assert rows_and_patients(412, 300) == "412 visits of 300 patients"
    assert rows_and_patients(1, 1) == "1 patient"
    assert rows_and_patients(2_500, None) == "2,500 patients"


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("rows")
    paths = {}
    for name, frame in (("repeat", _cohort(200, 3, 1)), ("single", _cohort(220, 1, 2, 5000)),
                        ("repeat_ext", _cohort(80, 3, 3, 9000)),
                        ("single_ext", _cohort(90, 1, 4, 20000))):
        paths[name] = folder / f"{name}.csv"
        frame.to_csv(paths[name], index=False)
    single = pd.read_csv(paths["single"]).drop(columns="Record no")  # no patient number at all
    paths["anonymous"] = folder / "anonymous.csv"
    single.to_csv(paths["anonymous"], index=False)
    return folder, paths


def _fit(folder, data, outcome, patient_id=None):
    model = folder / f"{data.stem}_{outcome}.json"
    args = ["fit", data, "--outcome", outcome, "--predictors", ",".join(PREDICTORS),
            "--folds", "5", "--model", model]
    if patient_id:
        args += ["--patient-id", patient_id]
    ran = prunella(*args)
    assert ran.returncode == 0, ran.stderr
    return ran.stdout, TreeModel.load(model), model


def _chart_words(model: TreeModel) -> str:
    text = chart_text(model, ChartOptions().checked())
    lines = [item.text for section in text.sections for item in section.items]
    for box in text.tree.boxes.values():
        lines += [p.text for p in box.body]
    return "\n".join(lines)


def _report_words(data_path, outcome, patient_id, external=()) -> str:
    table = read_table(data_path)
    dictionary, _ = infer_dictionary(table.frame)
    request = DerivationRequest(DesignSpec(outcome, PREDICTORS, patient_id=patient_id),
                                cv=CVSettings(folds=5), holdout=0.25)
    derivation = derive(table, dictionary, request)
    checks = tuple(check_table(derivation.model, read_table(p)) for p in external)
    contents = prepare_report(derivation, external=checks, nested=False, bootstrap=0,
                              printed="2026-01-31")
    reader = PdfReader(io.BytesIO(render_report(contents)))
    return " ".join(" ".join(page.extract_text() for page in reader.pages).split()), derivation


@pytest.mark.parametrize("outcome", ["stay_days", "transfused"])
def test_repeat_visits_are_counted_as_visits_of_patients(files, outcome):
    folder, paths = files
    frame = pd.read_csv(paths["repeat"])
    visits, patients = len(frame), frame["Record no"].nunique()
    assert patients < visits
    printed, model, model_path = _fit(folder, paths["repeat"], outcome, "Record no")
    assert model.rows_word == "visits"
    assert f"{visits} visits of {patients} patients" in printed
    rules = model.rules()
    assert VISITS.search(rules) and not PATIENTS.search(rules), rules
    chart = _chart_words(model)
    assert f"{visits} visits of {patients} patients" in chart
    assert "per patient" not in chart  # the error is a cost per visit here
    assert not PATIENTS.search(chart.replace(f"of {patients} patients", "")), chart
    # Checked on a file of repeat visits: visits of patients; on one row per patient: patients.
    ran = prunella("check", model_path, paths["repeat_ext"])
    ext = pd.read_csv(paths["repeat_ext"])
    counted = f"{len(ext)} visits of {ext['Record no'].nunique()} patients"
    assert ran.returncode == 0 and f"Checked: {counted}" in ran.stdout, ran.stdout
    assert re.search(r"^Visits\s+\d+$", ran.stdout, re.M), ran.stdout
    ran = prunella("check", model_path, paths["single_ext"], "--checked-model",
                   folder / "checked.json")
    assert "Checked: 90 patients" in ran.stdout and not VISITS.search(ran.stdout), ran.stdout
    assert re.search(r"^Patients\s+90$", ran.stdout, re.M), ran.stdout
    checked = TreeModel.load(folder / "checked.json")
    # The chart counts the check in its own word, the derivation in the derivation's.
    assert "On 90 patients from an external file" in _chart_words(checked)


@pytest.mark.parametrize("data", ["single", "anonymous"])
def test_one_row_per_patient_is_never_called_visits(files, data):
    folder, paths = files
    patient_id = "Record no" if data == "single" else None
    printed, model, model_path = _fit(folder, paths[data], "stay_days", patient_id)
    assert model.rows_word == "patients"
    assert "220 patients," in printed and not VISITS.search(printed), printed
    assert not VISITS.search(model.rules()) and PATIENTS.search(model.rules())
    chart = _chart_words(model)
    assert not VISITS.search(chart) and "220 patients" in chart, chart
    ran = prunella("check", model_path, paths["single_ext"])
    assert "Checked: 90 patients" in ran.stdout and not VISITS.search(ran.stdout), ran.stdout
    assert re.search(r"^Patients\s+90$", ran.stdout, re.M), ran.stdout


def test_the_report_counts_visits_or_patients(files):
    folder, paths = files
    words, derivation = _report_words(paths["single"], "transfused", "Record no",
                                      (paths["single_ext"],))
    assert not VISITS.search(words), VISITS.findall(words)
    assert f"was grown on {derivation.data.n} patients" in words
    assert f"{derivation.heldout.n} patients" in words  # set aside before growing
    assert "Patients (rows with a recorded outcome, used for growing)" in words
    assert "Minimum patients per outcome box" in words
    words, derivation = _report_words(paths["repeat"], "stay_days", "Record no",
                                      (paths["repeat_ext"],))
    data = derivation.data
    assert f"was grown on {data.n} visits of {np.unique(data.groups).size} patients" in words
    assert "Visits (rows with a recorded outcome, used for growing)" in words
    assert "Minimum visits per outcome box" in words  # the box size counts rows
    ext = pd.read_csv(paths["repeat_ext"])
    assert f"{len(ext)} visits of {ext['Record no'].nunique()} patients checked" in words
    # Every bare count of patients belongs to "N visits of M patients" or names patients as
    # patients (the table row "Patients" has no noun after its number).
    stray = [m.group(0) for m in PATIENTS.finditer(words)
             if not re.search(r"visits of $", words[max(0, m.start() - 10):m.start()])]
    assert not stray, stray


def test_the_nested_error_is_a_cost_per_visit_where_rows_are_visits(files):
    from core.checking import nested_cross_validate

    folder, paths = files
    table = read_table(paths["repeat"])
    dictionary, _ = infer_dictionary(table.frame)
    request = DerivationRequest(DesignSpec("transfused", PREDICTORS, patient_id="Record no"),
                                cv=CVSettings(folds=3))
    data = derive(table, dictionary, request).data
    nested = nested_cross_validate(data, request, outer_folds=2)
    assert nested.risk_measure == "expected misclassification cost per visit"
