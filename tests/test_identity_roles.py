"""Names are never patient numbers (issue 10.4): names, addresses, phone numbers and e-mail
addresses identify people but are shared and written in several ways, so only record-number
columns may be proposed as the patient identifier (common practice in record linkage: link
visits by a record number, never by name). Also: a dd/mm/yyyy date column is a date, not phone
numbers (issue 15.14). The data are invented."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from core.design import DesignSpec, default_design
from core.design.guards import repeat_visit_findings
from core.dictionary import ColumnSpec, DataDictionary, infer_dictionary, may_group_patients
from core.errors import InputError
from tests.helpers import prunella, sha256_of

FIRST = ["Margaret", "John", "Aisha", "Tomasz", "Li", "Fatima", "Peter", "Grace"]
LAST = ["Okafor", "Smith", "Khan", "Nowak", "Wei", "Haddad", "Jones", "Mensah"]


def visits(n: int = 120) -> pd.DataFrame:
    rng = np.random.default_rng(2)
    sats = rng.integers(84, 100, n)
    return pd.DataFrame({
        "Hosp No": [f"H{400000 + i // 2}" for i in range(n)],
        "Patient name": [f"{FIRST[i // 2 % 8]} {LAST[(i // 16) % 8]}" for i in range(n)],
        "Patient": [f"{FIRST[(i // 2 + 3) % 8]} {LAST[(i // 16 + 1) % 8]}" for i in range(n)],
        "Phone": [f"07700 900{(i // 2) % 50:03d}" for i in range(n)],
        "Seen on": [f"{1 + i % 28:02d}/{1 + i % 12:02d}/2024" for i in range(n)],
        "Sats": sats,
        "ICU": np.where(sats < 88, "yes", "no"),
    })


def test_names_are_left_out_and_record_numbers_proposed():
    dictionary, notes = infer_dictionary(visits())
    assert dictionary.get("Hosp No").role == "patient_id"
    for name in ("Patient name", "Patient", "Phone"):
        spec = dictionary.get(name)
        assert spec.role == "ignore" and spec.note.startswith("identity: "), spec
        assert not may_group_patients(spec)
        assert any(n.code == "infer.identity" and f"{name!r}" in n for n in notes), name
    assert not any(n.code == "infer.patient_id" and "'Patient" in n for n in notes)
    assert may_group_patients(dictionary.get("Hosp No"))


def test_a_dd_mm_yyyy_column_is_a_date_not_phone_numbers():
    dictionary, notes = infer_dictionary(visits())
    assert dictionary.get("Seen on").kind == "date"
    assert not any("'Seen on'" in n and "phone" in n for n in notes)


def test_a_name_marked_as_patient_number_is_never_used_as_one():
    frame = visits().drop(columns=["Hosp No"])
    dictionary, _ = infer_dictionary(frame)
    marked = dictionary.with_column("Patient name", role="patient_id", kind="identifier")
    assert default_design(marked, "ICU").patient_id is None  # not taken from the dictionary
    with pytest.raises(InputError, match="not a safe patient number"):
        default_design(marked, "ICU", patient_id="Patient name")
    # Repeat visits seen through the names are reported, but the name is never offered.
    found = repeat_visit_findings(frame, marked, DesignSpec("ICU", ("Sats",)))
    assert found and found[0].code == "guard.repeats_by_name"
    assert "--patient-id" not in found[0].message
    plain = DataDictionary((ColumnSpec("Email", kind="identifier"),))
    assert not may_group_patients(plain.get("Email"))


def _refused(path, tmp_path, *options) -> tuple[str, str]:
    """``prunella fit`` on ``path`` with ``options``: exit 2, no traceback; its one
    'prunella:' sentence and all it printed on stderr."""
    run = prunella("fit", path, "--outcome", "ICU", *options, "--model", tmp_path / "m.json",
                   "--folds", "3")
    assert run.returncode == 2 and "Traceback" not in run.stderr
    lines = [line for line in run.stderr.splitlines() if line.startswith("prunella: ")]
    assert len(lines) == 1, run.stderr
    return lines[0], run.stderr


def test_the_command_line_refuses_a_name_as_patient_number(tmp_path):
    path = tmp_path / "icu.csv"
    visits().to_csv(path, index=False)
    before = (sha256_of(path), path.stat().st_mtime_ns)
    line, _ = _refused(path, tmp_path, "--patient-id", "Patient name")
    assert "'Patient name'" in line and "not a safe patient number" in line
    run = prunella("fit", path, "--outcome", "ICU", "--model", tmp_path / "m.json",
                   "--folds", "3", "--min-leaf", "5")
    assert run.returncode == 0, run.stderr
    assert '"patient_id": "Hosp No"' in (tmp_path / "m.json").read_text()
    assert (sha256_of(path), path.stat().st_mtime_ns) == before


def test_a_name_named_as_a_predictor_is_refused_without_teaching_the_way_round(tmp_path):
    """The refusal for a text column told how to make it a predictor ("set its kind to
    numeric, …"); for a column of names it says it identifies patients instead."""
    path = tmp_path / "icu.csv"
    visits().to_csv(path, index=False)
    before = (sha256_of(path), path.stat().st_mtime_ns)
    line, stderr = _refused(path, tmp_path, "--predictors", "Sats,Patient name")
    assert "seems to identify patients" in line, stderr
    assert "set its kind to numeric" not in stderr
    assert (sha256_of(path), path.stat().st_mtime_ns) == before


def test_names_that_repeat_often_are_still_names_said_once():
    """A ward's residents recur across many visits, so a name column need not be mostly
    distinct: 80 names over 1,400 visits are still names, and the identity warning is the only
    note about the column (not also "too many different texts")."""
    rng = np.random.default_rng(5)
    people = [f"{f} {s}" for f in FIRST + ["Ingrid", "Kenji"] for s in LAST]
    assert len(people) == 80
    frame = pd.DataFrame({"Resident": rng.choice(people, 1400),
                          "Age": rng.integers(65, 100, 1400),
                          "Fell": rng.choice(["fell", "no fall"], 1400)})
    dictionary, notes = infer_dictionary(frame)
    spec = dictionary.get("Resident")
    assert spec.role == "ignore" and spec.note == "identity: names"
    about = [str(n) for n in notes if "Resident" in str(n)]
    assert len(about) == 1 and "look like names" in about[0]


def test_a_category_of_a_few_capitalised_places_is_not_names():
    """A handful of campus names (capitalised two-word texts) is a category, not people."""
    frame = pd.DataFrame({"Campus": ["North Campus", "River Side", "Hill Top", "West End",
                                     "Old Town"] * 40, "Age": range(200)})
    dictionary, _ = infer_dictionary(frame)
    assert dictionary.get("Campus").role != "ignore"
