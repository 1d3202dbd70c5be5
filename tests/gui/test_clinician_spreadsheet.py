"""The app on an invented spreadsheet a clinician might bring: other column names, a rare
outcome, names and record numbers, "none" answers, dd/mm/yyyy dates. The data are invented."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from tests.helpers import sha256_of  # noqa: E402


def clinic_sheet(path, n: int = 120, seed: int = 5) -> None:
    rng = np.random.default_rng(seed)
    sats = rng.integers(84, 100, n)
    first = ["Margaret", "John", "Aisha", "Tomasz", "Li", "Fatima", "Peter", "Grace"]
    last = ["Okafor", "Smith", "Khan", "Nowak", "Wei", "Haddad", "Jones", "Mensah"]
    pd.DataFrame({
        "Hosp No": [f"H{400000 + i // 2}" for i in range(n)],
        "Patient name": [f"{first[i // 2 % 8]} {last[(i // 16) % 8]}" for i in range(n)],
        "Seen on": [f"{1 + i % 28:02d}/{1 + i % 12:02d}/2024" for i in range(n)],
        "Sats on air": sats,
        "O2 given": (["none", "nasal", "none", "mask", "none"] * n)[:n],
        "Smoking": (["never", "current", "unknown", "ex"] * n)[:n],
        "ICU": np.where((sats < 88) & (rng.random(n) < 0.8), "yes", "no"),
    }).to_csv(path, index=False)


def _open(window, qtbot, path):
    window.open_any(str(path))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20000)


def test_probable_missing_codes_are_confirmed_with_one_click(window, qtbot, tmp_path):
    path = tmp_path / "icu.csv"
    clinic_sheet(path)
    before = (sha256_of(path), path.stat().st_mtime_ns)
    _open(window, qtbot, path)
    spec = window.session.dictionary.get("O2 given")
    assert "none" in spec.levels and spec.missing_codes == ()  # an answer, not missing
    notes_view = window.panels["data"].notes_view
    row = next(r for r in notes_view.rows if "'Smoking' holds 'unknown' (30 cells)" in
               r.finding.text)
    assert row.button is not None and row.button.text() == "Read as not recorded"
    with qtbot.waitSignal(window.session.data_changed, timeout=5000):
        qtbot.mouseClick(row.button, Qt.LeftButton)
    spec = window.session.dictionary.get("Smoking")
    assert spec.missing_codes == ("unknown",) and "unknown" not in spec.levels
    texts = notes_view.texts()
    assert not any("'Smoking' holds" in t for t in texts)
    assert any("'Smoking': 'unknown' now read as not recorded" in t for t in texts)
    assert (sha256_of(path), path.stat().st_mtime_ns) == before


def test_names_are_never_offered_as_the_patient_number(window, qtbot, tmp_path):
    path = tmp_path / "icu.csv"
    clinic_sheet(path)
    _open(window, qtbot, path)
    dictionary = window.session.dictionary
    assert dictionary.get("Patient name").role == "ignore"
    assert dictionary.get("Seen on").kind == "date"  # dd/mm/yyyy: a date, not phone numbers
    window.session.choose_outcome("ICU")
    window.go_to("outcome")
    combo = window.panels["outcome"].patient_combo
    offered = [combo.itemData(i) for i in range(combo.count())]
    assert "Hosp No" in offered and "Patient name" not in offered
    assert window.session.design.patient_id == "Hosp No"
    assert "Patient name" not in window.session.design.predictors


def test_the_apps_model_records_the_guards_findings(window, qtbot, tmp_path, run):
    path = tmp_path / "icu.csv"
    clinic_sheet(path)
    _open(window, qtbot, path)
    window.session.choose_outcome("ICU")
    run(window)
    findings = window.session.model.extra.get("findings", [])
    kinds = {(f["kind"], f["column"]) for f in findings}
    assert ("identity", "Patient name") in kinds
    assert ("repeat_visits", "Hosp No") in kinds
    assert all(isinstance(f["message"], str) and f["message"] for f in findings)
