"""Cells that pass for something they are not (issue 15, items 9 and 10): dates stored as
spreadsheet serial numbers, dates and periods offered as questions, numbers written with their
unit, and category levels that are people's names or record numbers. Each file loads correctly
with a warning, or is refused in one sentence (exit status 2, no traceback), and every input
stays byte-identical (SHA-256 and modification time).

Every file here is invented and written by the test itself.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd

from core.data import read_table
from core.data.cells import parse_dates
from core.dictionary import infer_dictionary
from tests.test_bad_inputs import HEADER, add_column, base_rows, csv_text
from tests.test_hostile_inputs import refused
from tests.test_reader_oddities import loads


def _model(data: Path) -> dict:
    return json.loads((data.parent / "m.json").read_text(encoding="utf-8"))


def _inferred(data: Path):
    table = read_table(data)
    dictionary, notes = infer_dictionary(table.frame, table.row_numbers)
    return table, dictionary, notes


# --- item 9: dates stored as spreadsheet serial numbers ----------------------------------------


def _written(path: Path, column: str, rows: list) -> Path:
    """The base rows with ``column`` added, written as a CSV at ``path``."""
    path.write_text(csv_text(HEADER + [column], rows), encoding="utf-8")
    return path


def _serial_dates(n: int, seed: int = 0) -> list[int]:
    # 45292 is 1 January 2024 as spreadsheets count days (from 30 December 1899).
    return [45292 + int(d) for d in np.random.default_rng(seed).integers(0, 366, n)]


def test_serial_numbers_in_a_date_column_are_read_as_dates_with_a_warning(tmp_path):
    rows = add_column(base_rows(80), _serial_dates(80))
    rows[0][-1] = 45650  # 24 December 2024
    data = _written(tmp_path / "arrivals.csv", "Arrival date", rows)
    _table, dictionary, notes = _inferred(data)
    spec = dictionary.get("Arrival date")
    assert spec.kind == "date" and spec.role == "ignore"
    note = next(n for n in notes if n.code == "infer.serial_dates")
    assert "45650 (row 2)" in note and "24 December 2024" in note
    stderr = loads(data)
    assert "dates as a spreadsheet stores them" in stderr
    model = _model(data)
    assert "Arrival date" not in [p["name"] for p in model["predictors"]]
    assert model["cohort"]["date_column"] == "Arrival date"  # the cohort's dates come from it
    assert model["cohort"]["first_date"].startswith("2024-")


def test_serial_dates_with_times_and_words_and_in_a_text_column_are_dates_too(tmp_path):
    values = [f"{v + 0.375:g}" for v in _serial_dates(60, seed=2)]  # 09:00 as the fraction
    values[3] = "not recorded"
    values[7] = "unknown"
    rows = add_column(base_rows(60), values)
    data = _written(tmp_path / "admitted_on.csv", "date_of_admission", rows)
    table, dictionary, notes = _inferred(data)
    assert dictionary.get("date_of_admission").kind == "date"
    note = next(n for n in notes if n.code == "infer.serial_dates")
    assert f"such as {values[0]} (row 2)" in note  # the number as written, its time kept
    dates = parse_dates(table.frame["date_of_admission"])
    assert dates.notna().sum() == 58 and (dates.dt.hour[dates.notna()] == 9).all()
    loads(data)


def test_large_numbers_in_a_column_not_named_as_a_date_stay_numbers(tmp_path):
    # Platelets per microlitre, hospital charges: numbers in the serial range are numbers when
    # nothing says they are dates.
    rng = np.random.default_rng(1)
    rows = add_column(base_rows(60), [int(v) for v in rng.integers(30_000, 60_000, 60)])
    data = _written(tmp_path / "charges.csv", "charge", rows)
    _table, dictionary, notes = _inferred(data)
    assert dictionary.get("charge").kind == "numeric"
    assert not any(n.code == "infer.serial_dates" for n in notes)


def test_a_date_column_named_as_a_predictor_is_refused_in_one_sentence(tmp_path):
    rows = add_column(base_rows(60), _serial_dates(60))
    data = _written(tmp_path / "arrivals.csv", "Arrival date", rows)
    refused(["fit", data, "--outcome", "admitted", "--model", tmp_path / "m.json",
             "--predictors", "Arrival date,age"],
            ["'Arrival date' holds dates", "when they came", "take it out of the predictors"],
            inputs=[data])
    assert not (tmp_path / "m.json").exists()


# --- item 9: a date or period never becomes a question without a warning ----------------------


def test_a_period_column_offered_as_a_question_is_warned_about(tmp_path):
    # The year of admission is a number, so it may be asked about, but only with a warning
    # that it encodes a period.
    rng = np.random.default_rng(3)
    rows = add_column(base_rows(80), [int(v) for v in rng.integers(2019, 2025, 80)])
    data = _written(tmp_path / "by_year.csv", "Admission year", rows)
    stderr = loads(data)
    assert "'Admission year' would split patients by when they came, not by anything about " \
           "them; leave it out unless the period matters" in stderr
    model = _model(data)
    assert any(f["kind"] == "period" and f["column"] == "Admission year"
               for f in model["findings"])


def test_a_date_column_set_to_numbers_in_the_dictionary_is_warned_about(tmp_path):
    rows = add_column(base_rows(80), _serial_dates(80))
    data = _written(tmp_path / "arrivals.csv", "Arrival date", rows)
    dictionary = tmp_path / "arrivals.dictionary.json"
    dictionary.write_text(json.dumps({"format": "prunella-dictionary/1", "columns": [
        {"name": "Arrival date", "kind": "numeric", "role": "predictor"}]}), encoding="utf-8")
    from tests.test_hostile_inputs import state
    before = state([dictionary])
    stderr = loads(data)
    assert "'Arrival date' would split patients by when they came" in stderr
    assert state([dictionary]) == before


def test_durations_and_ordinary_measurements_are_not_taken_for_periods():
    from core.dictionary.dates import names_a_date

    for name in ("Arrival date", "date_of_admission", "AdmissionDate", "Admission year",
                 "month seen", "Day of week", "triage date-time", "Seen on", "Admitted on"):
        assert names_a_date(name), name
    for name in ("days in hospital", "Age (years)", "months since diagnosis", "update_flag",
                 "Length of stay", "resp_rate", "weekly alcohol units", "Mandated",
                 "Temperature on arrival", "SpO2 on air"):
        assert not names_a_date(name), name


def test_parse_dates_reads_serial_numbers_and_written_dates_side_by_side():
    got = parse_dates(pd.Series(["45650", "03/01/2024", None, "2024-02-02"]))
    assert [d.date().isoformat() if pd.notna(d) else None for d in got] == \
        ["2024-12-24", "2024-01-03", None, "2024-02-02"]
    got = parse_dates(pd.Series([45650.5, np.nan, 12.0]))
    assert got.iloc[0] == pd.Timestamp("2024-12-24 12:00") and got.iloc[1:].isna().all()


# --- item 9: numbers written with their unit -------------------------------------------------


def _temperatures(n: int, seed: int = 0) -> list[float]:
    return [round(float(t), 1) for t in np.random.default_rng(seed).uniform(35.5, 40.5, n)]


def test_numbers_written_with_their_unit_are_read_as_numbers_with_a_warning(tmp_path):
    rows = add_column(base_rows(80), [f"{t} °C" for t in _temperatures(80)])
    rows[5][-1] = "not recorded"
    rows[0][-1] = "38.2 °C"
    data = _written(tmp_path / "temperatures.csv", "Temperature", rows)
    table, dictionary, notes = _inferred(data)
    spec = dictionary.get("Temperature")
    assert spec.kind == "numeric" and spec.unit == "°C" and spec.role == "predictor"
    note = next(n for n in notes if n.code == "values.units")
    assert note.startswith("Temperature: units were written in the cells (°C)")
    assert "'38.2 °C'" in note and "79 value(s) were read as numbers in °C" in note
    stderr = loads(data)
    assert "Temperature: units were written in the cells (°C)" in stderr
    temperature = next(p for p in _model(data)["predictors"] if p["name"] == "Temperature")
    assert temperature["unit"] == "°C"


def test_the_usual_clinical_units_are_read_and_named_one_way():
    from core.data.cells import parse_numbers

    cases = {
        ("120 mmHg", "95mmHg", "101 mm Hg"): ("mmHg", [120, 95, 101]),
        ("94%", "88 %", "100"): ("%", [94, 88, 100]),
        ("5.4 mmol/L", "3.1 mmol/l", "7 mmol/L"): ("mmol/L", [5.4, 3.1, 7]),
        ("12 mg/L", "140mg/L", "3 mg/l"): ("mg/L", [12, 140, 3]),
        ("118 g/L", "97 g/l", "130 g/L"): ("g/L", [118, 97, 130]),
        ("72.5 kg", "80kg", "61 KG"): ("kg", [72.5, 80, 61]),
        ("170 cm", "158cm", "181 cm"): ("cm", [170, 158, 181]),
        ("88 bpm", "120 BPM", "64 bpm"): ("bpm", [88, 120, 64]),
        ("22 /min", "18/min", "30 /min"): ("/min", [22, 18, 30]),
        ("38.2C", "37 degC", "36.9 ºC"): ("°C", [38.2, 37, 36.9]),
        ("45 umol/L", "60 µmol/L", "72 μmol/l"): ("µmol/L", [45, 60, 72]),
    }
    for cells, (unit, values) in cases.items():
        parsed = parse_numbers(pd.Series(cells), label="x")
        assert parsed.unit == unit, cells
        assert parsed.values.tolist() == values, cells
        assert not parsed.mixed_units


def test_text_that_only_starts_with_a_number_is_not_a_number_with_a_unit():
    from core.data.cells import parse_numbers

    parsed = parse_numbers(pd.Series(["3 times", "2 West", "1 Main Street", "12"]), label="x")
    assert parsed.unit == "" and parsed.n_unreadable == 3


def test_mixed_units_in_one_column_are_never_converted_but_left_as_text_with_a_warning(tmp_path):
    temperatures = _temperatures(80, seed=4)
    cells = [f"{t} °C" if i % 3 else f"{t * 9 / 5 + 32:.1f} °F" for i, t in enumerate(temperatures)]
    rows = add_column(base_rows(80), cells)
    data = _written(tmp_path / "two_scales.csv", "Temperature", rows)
    _table, dictionary, notes = _inferred(data)
    spec = dictionary.get("Temperature")
    assert spec.kind == "text" and spec.role == "ignore"
    note = next(n for n in notes if n.code == "values.mixed_units")
    assert "different units (°C, °F)" in note and "does not convert units" in note
    stderr = loads(data)
    assert "Temperature writes its values in different units (°C, °F)" in stderr
    assert "Temperature" not in [p["name"] for p in _model(data)["predictors"]]
    # Named as a predictor, it is refused in one sentence rather than grown on half its cells.
    refused(["fit", data, "--outcome", "admitted", "--model", tmp_path / "m2.json",
             "--predictors", "Temperature,age"], ["Temperature"], inputs=[data])


# --- item 10: category levels that are people's names or record numbers -----------------------

NURSES = ["Margaret Okafor", "John Smith", "Aisha Khan", "Peter O'Neill", "Mary-Jane Watts",
          "Li Wei", "Dr Tomasz Nowak", "Grace Mensah"]


def _cycle(levels, n):
    return [levels[i % len(levels)] for i in range(n)]


def test_a_category_whose_levels_are_names_is_left_out_with_the_identity_warning(tmp_path):
    rows = add_column(base_rows(80), _cycle(NURSES, 80))
    data = _written(tmp_path / "wards.csv", "Ward", rows)
    _table, dictionary, notes = _inferred(data)
    assert dictionary.get("Ward").role == "ignore"
    note = next(n for n in notes if n.code == "infer.identity")
    assert "'Ward' seems to identify patients (its categories look like names)" in note
    assert not any(name in note for name in NURSES)  # the warning never repeats a name
    stderr = loads(data)
    assert "its categories look like names" in stderr
    model = _model(data)
    assert "Ward" not in [p["name"] for p in model["predictors"]]
    assert any(f["kind"] == "identity" and f["column"] == "Ward" for f in model["findings"])
    assert not any(name in json.dumps(model) for name in NURSES)


def test_the_guard_screens_levels_too_when_a_dictionary_offers_the_column(tmp_path):
    from core.design import DesignSpec, guard_design
    from core.dictionary import DataDictionary

    frame = pd.DataFrame({"Ward": _cycle(NURSES[:3], 60),
                          "Referred from": _cycle(["H400123", "H400124", "H577001"], 60),
                          "age": _cycle([34, 51, 67, 72, 80, 45, 29], 60),
                          "admitted": _cycle(["yes", "no", "no", "yes", "no"], 60)})
    dictionary, _ = infer_dictionary(frame)
    dictionary = DataDictionary(tuple(
        c if c.name not in ("Ward", "Referred from") else
        type(c)(name=c.name, kind="nominal", role="predictor", levels=tuple(sorted(set(frame[c.name]))))
        for c in dictionary.columns))
    report = guard_design(frame, dictionary, DesignSpec("admitted", ("Ward", "Referred from", "age")),
                          leakage=False)
    assert report.design.predictors == ("age",)
    reasons = {f.column: f.message for f in report.of_kind("identity")}
    assert "its categories look like names" in reasons["Ward"]
    assert "its categories look like record numbers" in reasons["Referred from"]


# Levels of wards, services, triage, arrival, ethnicity, diagnoses and severity as spreadsheets
# hold them (common practice in clinical exports); none is a person.
ORDINARY_LEVELS = {
    "Ward": ["Medical", "Surgical", "A&E", "Ward 3", "Ward 10", "Dr on call", "AMU North",
             "Florence Nightingale Ward", "Labour Ward", "ICU Step Down", "ED Majors"],
    "Service": ["General Medicine", "General Surgery", "Acute Medical Unit", "Intensive Care",
                "High Dependency", "Emergency Department", "Care Of The Elderly",
                "Trauma And Orthopaedics", "Respiratory Medicine", "Same Day Emergency Care",
                "Mental Health", "Short Stay"],
    "Triage": ["Red", "Orange", "Yellow", "Green", "Blue", "Very Urgent", "Non Urgent",
               "Immediate", "Standard"],
    "Arrival": ["Walk In", "Ambulance", "GP Referral", "Inter-hospital Transfer",
                "Self Referred", "Care Home", "Nursing Home", "Police"],
    "Ethnicity": ["White British", "Asian Indian", "Black Caribbean", "Mixed Other",
                  "Asian Pakistani", "Not Stated", "Any Other", "White Irish"],
    "Diagnosis": ["Heart Failure", "Chest Pain", "Atrial Fibrillation", "Community Acquired "
                  "Pneumonia", "Urinary Tract Infection", "Fractured Neck Of Femur", "COPD "
                  "Exacerbation", "Pulmonary Embolism", "Sepsis"],
    "Oxygen": ["none", "Room Air", "Nasal Cannula", "Venturi Mask", "Reservoir Mask"],
}


def test_ordinary_clinical_categories_are_not_taken_for_names(tmp_path):
    from core.dictionary.identity import identity_by_levels

    for column, levels in ORDINARY_LEVELS.items():
        assert identity_by_levels(levels) is None, column
    rows = base_rows(120)
    header = list(HEADER)
    for column, levels in ORDINARY_LEVELS.items():
        rows = add_column(rows, _cycle(levels, 120))
        header.append(column)
    data = tmp_path / "ordinary.csv"
    data.write_text(csv_text(header, rows), encoding="utf-8")
    _table, dictionary, notes = _inferred(data)
    assert not [n for n in notes if n.code == "infer.identity"]
    assert all(dictionary.get(c).role == "predictor" for c in ORDINARY_LEVELS)


def test_names_written_in_other_ways_and_record_numbers_as_levels_are_caught():
    from core.dictionary.identity import identity_by_levels

    assert identity_by_levels(["MARGARET OKAFOR", "JOHN SMITH", "AISHA KHAN"]).what == "names"
    assert identity_by_levels(["Dr Okafor", "Mr Smith", "Sister Mensah", "Medical"]).what == \
        "names"
    assert identity_by_levels(["943 476 5919", "401 023 2137", "none"]).what == "record numbers"
    assert identity_by_levels(["MRN 0012345", "MRN 0012346"]).what == "record numbers"
    assert identity_by_levels(["Margaret Okafor", "Medical", "Surgical", "A&E"]) is None


def test_a_site_column_named_after_people_is_not_taken_for_names(tmp_path):
    rows = add_column(base_rows(80), _cycle(["John Radcliffe", "Charles Gairdner"], 80))
    data = _written(tmp_path / "two_hospitals.csv", "hospital", rows)
    _table, dictionary, notes = _inferred(data)
    assert dictionary.get("hospital").role == "site"
    assert not [n for n in notes if n.code == "infer.identity"]


def test_a_header_unit_the_cells_contradict_is_never_converted(tmp_path):
    rows = add_column(base_rows(60), [f"{t} °C" for t in _temperatures(60)])
    data = _written(tmp_path / "fahrenheit_header.csv", "Temperature (°F)", rows)
    _table, dictionary, notes = _inferred(data)
    assert dictionary.get("Temperature (°F)").kind == "text"
    note = next(n for n in notes if n.code == "infer.unit_disagrees")
    assert "the header says °F, but the cells write °C" in note
    # Spellings of one unit agree: "breaths/min" in the header, "22 /min" in the cells.
    rows = add_column(base_rows(60), [f"{r[2]} /min" for r in base_rows(60)])
    data = _written(tmp_path / "per_minute.csv", "Breathing rate (breaths/min)", rows)
    _table, dictionary, notes = _inferred(data)
    spec = dictionary.get("Breathing rate (breaths/min)")
    assert spec.kind == "numeric" and spec.unit == "breaths/min"


def test_a_check_on_a_file_in_another_unit_is_refused_in_one_sentence(tmp_path):
    temperatures = _temperatures(120, seed=6)
    rows = base_rows(120)
    for row, t in zip(rows, temperatures):
        row[-1] = "yes" if t > 38.3 else row[-1]
    data = tmp_path / "derivation.csv"
    data.write_text(csv_text(HEADER + ["Temperature"], add_column(
        rows, [f"{t} °C" for t in temperatures])), encoding="utf-8")
    loads(data, "--predictors", "Temperature,age")
    model = tmp_path / "m.json"
    assert any(n["split"]["column"] == "Temperature"
               for n in _model(data)["nodes"] if not n["leaf"])
    other = tmp_path / "other_campus.csv"
    other.write_text(csv_text(HEADER + ["Temperature"], add_column(
        base_rows(60, seed=9), [f"{t * 9 / 5 + 32:.1f} °F" for t in _temperatures(60)])),
        encoding="utf-8")
    last = refused(["check", model, other],
                   ["Temperature", "°F", "°C", "does not convert units"], inputs=[model, other])
    assert last == ("prunella: Temperature: the cells write °F, but the column's unit is °C, "
                    "and Prunella does not convert units; convert the values to °C (or correct "
                    "the column's unit in the data dictionary) and try again.")
    # The app's one-patient lookup says the same instead of routing 100.4 as °C.
    from core.model import TreeModel
    from core.model.details import route_patient

    tree = TreeModel.load(model)
    route = route_patient(tree, {"Temperature": "100.4 °F", "age": 50})
    assert route.prediction is None and "does not convert units" in route.refused[0]
    assert route_patient(tree, {"Temperature": "39.5 °C", "age": 50}).prediction is not None


def test_a_workbook_with_serial_dates_units_and_names_loads_with_its_warnings(tmp_path):
    from tests.test_bad_inputs import workbook

    rows = add_column(base_rows(80), _serial_dates(80, seed=5))
    rows = add_column(rows, [f"{t} °C" for t in _temperatures(80, seed=5)])
    rows = add_column(rows, _cycle(NURSES, 80))
    book = tmp_path / "ward_export.xlsx"
    workbook(book, {"Export": [HEADER + ["Date of admission", "Temperature", "Ward"]] + rows})
    _table, dictionary, _notes = _inferred(book)
    assert dictionary.get("Date of admission").kind == "date"
    assert dictionary.get("Temperature").unit == "°C"
    assert dictionary.get("Ward").role == "ignore"
    stderr = loads(book)
    for words in ("dates as a spreadsheet stores them", "units were written in the cells (°C)",
                  "its categories look like names"):
        assert words in stderr


def test_written_dates_set_to_categories_in_the_dictionary_are_warned_about(tmp_path):
    # "Seen on" holds dd/mm/yyyy dates; a hand-made dictionary calls it a category.
    rows = add_column(base_rows(80), [f"{1 + i % 3:02d}/0{1 + i % 2}/2024" for i in range(80)])
    data = _written(tmp_path / "seen.csv", "When", rows)
    (tmp_path / "seen.dictionary.json").write_text(json.dumps({
        "format": "prunella-dictionary/1", "columns": [
            {"name": "When", "kind": "nominal", "role": "predictor"}]}), encoding="utf-8")
    stderr = loads(data)
    assert "'When' would split patients by when they came" in stderr
