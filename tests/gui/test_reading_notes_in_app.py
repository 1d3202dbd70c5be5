"""Step 1's "Things to check" shows what reading a file had to decide (issue 15, item 9): a
header row repeated inside the file, dates stored as serial numbers, numbers written with their
unit. The spreadsheets are invented by the tests; none is changed by opening it."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import Qt  # noqa: E402

from tests.helpers import sha256_of  # noqa: E402
from tests.test_bad_inputs import HEADER, add_column, base_rows, csv_text  # noqa: E402


def _open(window, qtbot, path):
    window.open_any(str(path))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20000)
    return window.panels["data"].notes_view


def _row(notes_view, words):
    return next((r for r in notes_view.rows if words in r.finding.text), None)


def test_step_one_shows_the_repeated_header_row_that_was_left_out(window, qtbot, tmp_path):
    # Two exports pasted one below the other: the second brings its header row along.
    path = tmp_path / "two_exports.csv"
    second = csv_text(HEADER, base_rows(50, seed=4))
    path.write_text(csv_text(HEADER, base_rows(70)) + second, encoding="utf-8")
    before = (sha256_of(path), path.stat().st_mtime_ns)
    notes_view = _open(window, qtbot, path)
    qtbot.waitUntil(lambda: _row(notes_view, "repeating the column names") is not None,
                    timeout=10000)
    row = _row(notes_view, "repeating the column names")
    assert "(row 72)" in row.finding.text
    assert row.finding.severity == "warning"
    assert row.finding.advice  # what to do, from the catalogue
    assert window.session.table.provenance.n_rows == 120
    assert set(window.session.table.frame["admitted"]) == {"yes", "no"}
    assert (sha256_of(path), path.stat().st_mtime_ns) == before


def test_step_one_shows_serial_dates_and_units_read_from_the_cells(window, qtbot, tmp_path):
    rows = add_column(base_rows(60), [45292 + 3 * i for i in range(60)])
    rows = add_column(rows, [f"{36 + (i % 40) / 10:.1f} °C" for i in range(60)])
    path = tmp_path / "arrivals.csv"
    path.write_text(csv_text(HEADER + ["Arrival date", "Temperature"], rows), encoding="utf-8")
    before = (sha256_of(path), path.stat().st_mtime_ns)
    notes_view = _open(window, qtbot, path)
    qtbot.waitUntil(lambda: _row(notes_view, "dates as a spreadsheet stores them") is not None,
                    timeout=10000)
    assert _row(notes_view, "45292 (row 2)") is not None
    units = _row(notes_view, "Temperature: units were written in the cells (°C)")
    assert units is not None and units.finding.severity == "warning"
    dictionary = window.session.dictionary
    assert dictionary.get("Arrival date").kind == "date"
    assert dictionary.get("Temperature").unit == "°C"
    assert (sha256_of(path), path.stat().st_mtime_ns) == before


def test_step_two_leaves_a_ward_of_names_out_and_warns_about_a_period(window, qtbot, tmp_path):
    from tests.gui.test_guards_step import rows_of, settled, tick

    nurses = ["Margaret Okafor", "John Smith", "Aisha Khan", "Peter O'Neill", "Grace Mensah"]
    rows = add_column(base_rows(120), [nurses[i % 5] for i in range(120)])
    rows = add_column(rows, [2019 + i % 6 for i in range(120)])
    rows = add_column(rows, [["Medical", "Surgical", "A&E", "Ward 3"][i % 4] for i in range(120)])
    path = tmp_path / "wards.csv"
    path.write_text(csv_text(HEADER + ["Nurse", "Admission year", "Service"], rows),
                    encoding="utf-8")
    before = (sha256_of(path), path.stat().st_mtime_ns)
    _open(window, qtbot, path)
    window.go_to("outcome")
    panel, session = window.panels["outcome"], window.session
    panel.outcome_combo.setCurrentIndex(panel.outcome_combo.findData("admitted"))
    settled(window, qtbot)
    # The nurses' names are never offered ticked; the service is.
    assert "Nurse" not in session.design.predictors
    assert "Service" in session.design.predictors
    assert any("its categories look like names" in t for t in
               window.panels["data"].notes_view.texts())
    tick(panel, "Nurse")  # on purpose: kept, with the identity warning beside it
    settled(window, qtbot)
    assert rows_of(panel, "identity_kept", "Nurse")
    # A period asked about carries its warning and a button that leaves it out.
    if "Admission year" not in session.design.predictors:
        tick(panel, "Admission year")
        settled(window, qtbot)
    (period,) = rows_of(panel, "period", "Admission year")
    assert period.finding.severity == "warning"
    assert "would split patients by when they came" in period.finding.text
    qtbot.mouseClick(period.button, Qt.LeftButton)
    settled(window, qtbot)
    assert "Admission year" not in session.design.predictors
    assert not rows_of(panel, "period")
    assert (sha256_of(path), path.stat().st_mtime_ns) == before
