"""Checks of the invented demo cohort in sample_data/.

Invented demo data — not a reference: these checks test our own generator (that it is
reproducible and carries the structure it promises), not any clinical or scientific fact.
"""

from __future__ import annotations

import csv
import datetime as dt
import json
import subprocess
import sys
from pathlib import Path

import openpyxl
import pandas as pd
import pytest

from tests.helpers import (
    DEMO_CSV, DEMO_DICTIONARY, DEMO_PLANTED_BOXES, DEMO_XLSX, SAMPLE, demo_planted_box, sha256_of,
)

SCRIPT = SAMPLE / "make_demo_cohort.py"
DATA_FILES = ["breathless_ed.csv", "breathless_ed.xlsx", "breathless_ed.dictionary.json"]
EXPECTED_COLUMNS = [
    "visit_id", "patient_id", "campus", "arrival_date", "age", "sex",
    "resp_rate", "spo2", "heart_rate", "temperature", "systolic_bp", "crp",
    "triage_level", "arrival_mode", "complaint", "admitted", "los_hours", "bed_booked",
]
ROLES = {"outcome", "predictor", "patient_id", "site", "ignore"}
KINDS = {"numeric", "binary", "ordinal", "nominal", "identifier", "date", "text"}


@pytest.fixture(scope="module")
def regenerated(tmp_path_factory: pytest.TempPathFactory) -> Path:
    out = tmp_path_factory.mktemp("demo_cohort")
    subprocess.run([sys.executable, str(SCRIPT), str(out)], check=True,
                   capture_output=True, text=True, timeout=300)
    return out


@pytest.fixture(scope="module")
def rows() -> list[dict[str, str]]:
    with open(DEMO_CSV, encoding="utf-8", newline="") as fh:
        return list(csv.DictReader(fh))


@pytest.fixture(scope="module")
def frame() -> pd.DataFrame:
    return pd.read_csv(DEMO_CSV, keep_default_na=False, na_values=[""])


@pytest.fixture(scope="module")
def dictionary() -> dict:
    return json.loads((DEMO_DICTIONARY).read_text(encoding="utf-8"))


# --- reproducibility ------------------------------------------------------------------------

@pytest.mark.parametrize("name", DATA_FILES)
def test_script_reproduces_committed_file_byte_for_byte(regenerated: Path, name: str) -> None:
    assert sha256_of(regenerated / name) == sha256_of(SAMPLE / name), (
        f"{name} differs from a fresh run of make_demo_cohort.py: rerun the script and commit"
    )


def test_script_refuses_missing_output_folder(tmp_path: Path) -> None:
    result = subprocess.run([sys.executable, str(SCRIPT), str(tmp_path / "nope")],
                            capture_output=True, text=True, timeout=60)
    assert result.returncode == 2
    assert "does not exist" in result.stderr
    assert not (tmp_path / "nope").exists()


def test_csv_format() -> None:
    raw = (DEMO_CSV).read_bytes()
    raw.decode("utf-8")
    assert b"\r" not in raw
    assert raw.endswith(b"\n")


# --- shape ----------------------------------------------------------------------------------

def test_shape_and_ids(rows: list[dict[str, str]]) -> None:
    assert list(rows[0].keys()) == EXPECTED_COLUMNS
    assert 3600 <= len(rows) <= 4400
    patients = {r["patient_id"] for r in rows}
    assert 2900 <= len(patients) <= 3700
    assert len({r["visit_id"] for r in rows}) == len(rows)
    assert len(patients) < len(rows), "some patients should return"


def test_values_in_range(rows: list[dict[str, str]]) -> None:
    assert {r["campus"] for r in rows} == {"North", "Riverside"}
    assert {r["admitted"] for r in rows} == {"yes", "no"}
    assert {r["bed_booked"] for r in rows} == {"yes", "no"}
    assert {r["triage_level"] for r in rows} == {"1", "2", "3", "4", "5"}
    dates = [dt.date.fromisoformat(r["arrival_date"]) for r in rows]
    assert min(dates) >= dt.date(2024, 1, 1) and max(dates) <= dt.date(2025, 12, 31)
    assert all(18 <= int(r["age"]) <= 99 for r in rows)
    assert all(int(r["spo2"]) <= 100 for r in rows)
    sbp = [int(r["systolic_bp"]) for r in rows]
    sentinel_share = sum(v == -99 for v in sbp) / len(sbp)
    assert 0.003 <= sentinel_share <= 0.03
    assert all(70 <= v <= 220 for v in sbp if v != -99)
    blank_temps = sum(r["temperature"] == "" for r in rows)
    assert 1 <= blank_temps <= 0.02 * len(rows)


def test_xlsx_holds_the_same_table(rows: list[dict[str, str]]) -> None:
    wb = openpyxl.load_workbook(DEMO_XLSX, read_only=True)
    assert wb.sheetnames == ["visits", "about"]
    sheet = list(wb["visits"].iter_rows(values_only=True))
    assert list(sheet[0]) == EXPECTED_COLUMNS
    assert len(sheet) - 1 == len(rows)

    def same(cell: object, text: str) -> bool:
        # XLSX keeps numbers as numbers (37.0 reads back as 37) and dates as dates.
        if cell is None:
            return text == ""
        if isinstance(cell, dt.datetime):
            return cell.date().isoformat() == text
        if isinstance(cell, (int, float)):
            return text != "" and float(cell) == float(text)
        return cell == text

    for xrow, crow in zip(sheet[1:], rows):
        for name, cell in zip(EXPECTED_COLUMNS, xrow):
            assert same(cell, crow[name]), (crow["visit_id"], name, cell, crow[name])
    about = " ".join(str(r[0]) for r in wb["about"].iter_rows(values_only=True) if r[0])
    assert "INVENTED" in about
    wb.close()


# --- dictionary -----------------------------------------------------------------------------

def test_dictionary_lists_every_column_once(dictionary: dict) -> None:
    assert dictionary["format"] == "prunella-dictionary/1"
    names = [c["name"] for c in dictionary["columns"]]
    assert sorted(names) == sorted(EXPECTED_COLUMNS)
    assert len(names) == len(set(names))
    keys = {"name", "role", "kind", "label", "unit", "missing_codes", "levels", "positive", "note"}
    for col in dictionary["columns"]:
        assert set(col) == keys, col["name"]
        assert col["role"] in ROLES, col["name"]
        assert col["kind"] in KINDS, col["name"]


def test_dictionary_roles(dictionary: dict, rows: list[dict[str, str]]) -> None:
    by_name = {c["name"]: c for c in dictionary["columns"]}
    outcomes = [c["name"] for c in dictionary["columns"] if c["role"] == "outcome"]
    assert outcomes == ["admitted"]
    assert by_name["admitted"]["positive"] == "yes"
    assert by_name["los_hours"]["role"] == "ignore"
    assert "regression outcome" in by_name["los_hours"]["note"]
    assert by_name["bed_booked"]["role"] == "ignore"
    assert "leakage" in by_name["bed_booked"]["note"]
    assert by_name["systolic_bp"]["missing_codes"] == ["-99"]
    assert by_name["triage_level"]["levels"] == ["1", "2", "3", "4", "5"]
    assert by_name["patient_id"]["role"] == "patient_id"
    assert by_name["campus"]["role"] == "site"
    # Every listed level actually occurs, and nothing outside the list does.
    for col in dictionary["columns"]:
        if col["kind"] in {"binary", "nominal", "ordinal"}:
            seen = {r[col["name"]] for r in rows} - {""}
            assert seen == set(col["levels"]), col["name"]


# --- planted facts (invented demo data — not a reference) -----------------------------------

def _rate(rows: list[dict[str, str]]) -> float:
    return sum(r["admitted"] == "yes" for r in rows) / len(rows)


def test_low_spo2_is_the_strong_split(rows: list[dict[str, str]]) -> None:
    low = [r for r in rows if int(r["spo2"]) <= 91]
    high = [r for r in rows if int(r["spo2"]) >= 92]
    assert _rate(low) - _rate(high) >= 0.35
    assert 0.30 <= _rate(rows) <= 0.40


def test_each_planted_box_falls_on_its_side_of_one_half(frame: pd.DataFrame) -> None:
    # Boxes that part at a question lie on opposite sides of a 50 % rate at both campuses, so a
    # tree pruned by misclassification cost keeps every planted question.
    admitted = frame["admitted"] == "yes"
    box = demo_planted_box(frame)
    for campus in ("North", "Riverside"):
        for name, mostly_admitted in DEMO_PLANTED_BOXES.items():
            inside = admitted[(box == name) & (frame["campus"] == campus)]
            assert len(inside) >= 50, (campus, name)
            rate = inside.mean()
            assert (rate >= 0.6) if mostly_admitted else (rate <= 0.42), (campus, name, rate)


def test_riverside_admits_more_in_the_moderate_box(frame: pd.DataFrame) -> None:
    admitted = frame["admitted"] == "yes"
    box = demo_planted_box(frame)

    def rate(name: str, campus: str) -> float:
        return admitted[(box == name) & (frame["campus"] == campus)].mean()

    moderate = "fast breathing, walked in or GP referral"
    assert rate(moderate, "Riverside") - rate(moderate, "North") >= 0.15
    # ... and a few more from the large low-risk box.
    low = "slower breathing, the rest"
    assert rate(low, "Riverside") - rate(low, "North") >= 0.02


def test_bed_booked_is_a_near_copy_of_the_outcome(rows: list[dict[str, str]]) -> None:
    agree = sum(r["bed_booked"] == r["admitted"] for r in rows) / len(rows)
    assert agree >= 0.95
    assert agree < 1.0, "a perfect copy would make the leakage too obvious"


def test_crp_often_missing(rows: list[dict[str, str]]) -> None:
    share = sum(r["crp"] == "" for r in rows) / len(rows)
    assert 0.2 <= share <= 0.45
    # SpO2, by contrast, is recorded at every visit: the planted tree asks one predictor that
    # is sometimes blank (CRP) and one that never is.
    assert all(r["spo2"] != "" for r in rows)

    def missing_share(subset: list[dict[str, str]]) -> float:
        return sum(r["crp"] == "" for r in subset) / len(subset)

    walked = [r for r in rows if r["arrival_mode"] == "walked in"]
    others = [r for r in rows if r["arrival_mode"] != "walked in"]
    assert missing_share(walked) > missing_share(others)
    assert (missing_share([r for r in rows if r["campus"] == "Riverside"])
            > missing_share([r for r in rows if r["campus"] == "North"]))
