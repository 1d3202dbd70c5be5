"""Details of the app a new user met on their own spreadsheet (issue 15, item 14): the window
title names the file once; the Rows tab numbers rows as the notes do (the spreadsheet's row
numbers); a dd/mm/yyyy date column is a date, never phone numbers; the one-patient lookup
flags values no patient had and refuses words in its own wording; a reopened project of a
spreadsheet the app never saw lists what its first opening found. The data are invented."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

from tests.gui.test_guards_step import settled  # noqa: E402


def falls_sheet(path, n: int = 90, seed: int = 11) -> None:
    """Invented falls audit: dd/mm/yyyy visit dates (day first, days above 12 included),
    a date and time of arrival, a word among the ages, and a rare outcome."""
    rng = np.random.default_rng(seed)
    ages = rng.integers(60, 99, n).astype(object)
    ages[5] = "ninety"  # the seventh spreadsheet row (header in row 1): a typed word
    pd.DataFrame({
        "MRN": [f"M{700000 + i}" for i in range(n)],
        "Visit date": [f"{1 + (i * 7) % 28:02d}/{1 + i % 12:02d}/2025" for i in range(n)],
        "Arrived": [f"{1 + (i * 5) % 28:02d}/{1 + i % 12:02d}/2025 {i % 24:02d}:{i % 60:02d}"
                    for i in range(n)],
        "Age": ages,
        "Gait": rng.choice(["steady", "unsteady", "frame"], n),
        "Fell again": np.where(rng.random(n) < 0.2, "yes", "no"),
    }).to_csv(path, index=False)


def _open(window, qtbot, path) -> None:
    window.open_any(str(path))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20000)


def _shown_title(window) -> str:
    """The title as the system shows it: the window's own, then the app's display name."""
    own = window.windowTitle().replace("[*]", "*" if window.isWindowModified() else "")
    return f"{own} — {QApplication.applicationDisplayName()}"


def test_the_title_names_the_file_once(window, qtbot, tmp_path, dialogs):
    assert _shown_title(window) == "New project — Prunella"
    path = tmp_path / "falls_home.csv"
    falls_sheet(path)
    _open(window, qtbot, path)
    window.session.dirty = False
    window.update_state()
    assert _shown_title(window) == "falls_home.csv — Prunella"
    assert "Prunella" not in window.windowTitle()
    dialogs.save_name = str(tmp_path / "falls audit.prunella")
    assert window.save_as()
    assert _shown_title(window) == "falls audit.prunella — Prunella"


def test_the_rows_tab_numbers_rows_as_the_notes_do(window, qtbot, tmp_path):
    path = tmp_path / "falls.csv"
    falls_sheet(path)
    text = path.read_text(encoding="utf-8").splitlines()
    # A blank line after the third patient: later rows are numbered as the spreadsheet does.
    path.write_text("\n".join(text[:4] + [""] + text[4:]) + "\n", encoding="utf-8")
    _open(window, qtbot, path)
    notes = list(window.session.table.provenance.warnings) + list(window.session.notes)
    assert any("(row 5)" in n for n in notes)  # the empty row left out
    age = next(n for n in notes if "'Age' holds numbers and a few words" in n)
    assert "(row 8)" in age  # 'ninety': header in row 1, blank row 5
    panel = window.panels["data"]
    model = panel.frame_model
    headers = [model.headerData(r, Qt.Vertical) for r in range(model.rowCount())]
    assert headers[:5] == ["2", "3", "4", "6", "7"]
    row = headers.index("8")
    assert model.data(model.index(row, 3)) == "ninety"  # the row the note names
    assert "numbered as in the spreadsheet (row 1 holds the column names)" in \
        panel.rows_caption.text()
    assert "as the notes and warnings number them" in model.headerData(0, Qt.Vertical,
                                                                        Qt.ToolTipRole)


def test_a_day_first_date_column_is_a_date_not_phone_numbers(window, qtbot, tmp_path):
    path = tmp_path / "falls.csv"
    falls_sheet(path)
    _open(window, qtbot, path)
    dictionary = window.session.dictionary
    assert dictionary.get("Visit date").kind == "date"
    assert dictionary.get("Arrived").kind == "date"
    window.session.choose_outcome("Fell again")
    window.go_to("outcome")
    settled(window, qtbot)
    said = [r.finding.text for r in window.panels["outcome"].findings.rows] + \
        [r.finding.text for r in window.panels["data"].notes_view.rows]
    assert not any("phone" in t for t in said), said
    assert not any(("Visit date" in t or "Arrived" in t) and "identif" in t for t in said)


def test_the_lookup_flags_values_no_patient_had_and_refuses_words(demo, run, qtbot):
    window = demo
    run(window)
    model = window.session.model
    assert "spo2" in model.columns_asked()
    spo2 = window.session.chosen.data.predictors
    numbers = next(p.numbers for p in spo2 if p.spec.name == "spo2")
    low, high = float(np.nanmin(numbers)), float(np.nanmax(numbers))
    window.go_to("tree")
    tree = window.panels["tree"]
    label = model.spec("spo2").display
    typed = {p.spec.name: p for p in window.session.chosen.data.predictors}
    others = {c: (f"{np.nanmedian(typed[c].numbers):g}" if typed[c].numbers is not None
                  else model.spec(c).levels[0]) for c in model.columns_asked()}
    tree.set_values(others)
    # An impossible value (SpO2 250%, or 150%): no box, like a word; it says which value
    # is impossible and what to do (issue: a confident answer above the flag).
    for slip in ("250", "150"):
        tree.set_values({"spo2": slip})
        route = tree.last_route
        assert route.refused and route.outcome_box == 0 and route.boxes == ()
        text = tree.result.text()
        assert "Reaches box" not in text and "expect" not in text.lower()
        assert (f"{label} {slip}% is impossible for a percentage (0 to 100%), so the tree "
                "gives no outcome box for it; correct the value, or leave it blank if it was "
                "not measured.") in text
        assert not any(b.lit for b in tree.view.boxes.values())
    # Possible but above every patient's value (100% when no patient had it): still a box,
    # the flag read first.
    if high < 100:
        tree.set_values({"spo2": "100"})
        route = tree.last_route
        assert route.outcome_box > 0 and not route.refused
        text = tree.result.text()
        assert f"Reaches box {route.outcome_box}" in text
        assert (f"{label} 100% lies outside the values of the patients the tree was grown on "
                f"({low:g} to {high:g}%)") in text
        assert text.index("lies outside") < text.index("Reaches box")  # the flag first
    # Inside what the patients had: no flag.
    tree.set_values({"spo2": f"{(low + high) // 2:g}"})
    assert tree.last_route.outcome_box > 0 and not tree.last_route.warnings
    assert "⚠" not in tree.result.text()
    # Below the patients' values but possible: the cohort flag only.
    if low > 1:
        tree.set_values({"spo2": f"{low - 1:g}"})
        assert len(tree.last_route.warnings) == 1 and tree.last_route.outcome_box > 0
        text = tree.result.text()
        assert "lies outside the values" in text
        assert text.index("lies outside") < text.index("Reaches box")  # the flag first
    # A word: refused in the lookup's words, nothing lit, no file wording.
    tree.set_values({"spo2": "ninety"})
    assert tree.last_route.refused and tree.last_route.outcome_box == 0
    text = tree.result.text()
    assert f"{label} needs a number, and “ninety” is not one; type it in digits " \
        f"(for example {round(low):g}), or leave it blank if it was not measured." in \
        text.replace("&quot;", '"')
    assert "Reaches box" not in text and "row" not in text and "cell" not in text
    assert not any(b.lit for b in tree.view.boxes.values())
    # Not recorded is not a word: blank follows the tree's branch for missing values.
    tree.set_values({"spo2": ""})
    assert not (tree.last_route and tree.last_route.refused)


def test_a_reopened_project_of_a_new_spreadsheet_lists_its_things_to_check(
        window, qtbot, tmp_path, dialogs):
    """A spreadsheet without a dictionary beside it: the project saves the dictionary the
    first opening made, and reopening still lists what reading the file found."""
    path = tmp_path / "falls.csv"
    falls_sheet(path)
    _open(window, qtbot, path)
    first = [r.finding.text for r in window.panels["data"].notes_view.rows]
    assert any("'Age' holds numbers and a few words" in t for t in first)
    assert any("'MRN' seems to identify patients" in t for t in first)
    dialogs.save_name = str(tmp_path / "falls.prunella")
    assert window.save_as()
    from gui.main_window import MainWindow

    again = MainWindow()
    qtbot.addWidget(again)
    again.open_any(str(tmp_path / "falls.prunella"))
    qtbot.waitUntil(lambda: again.session.table is not None, timeout=20000)
    assert not dialogs.texts("warning")
    shown = [r.finding.text for r in again.panels["data"].notes_view.rows]
    assert not any(t.startswith("Nothing to check") for t in shown)
    for text in first:
        if "dictionary" not in text:  # which dictionary was used may differ: the saved one
            assert text in shown, text
    again.session.dirty = False


def test_open_after_the_demo_starts_in_the_users_own_folder(window, qtbot, monkeypatch,
                                                          tmp_path):
    from PySide6.QtWidgets import QFileDialog

    from gui.resources import DEMO_DATA

    asked = []
    folder = tmp_path / "audits"
    folder.mkdir()
    falls_sheet(folder / "falls.csv")

    def ask(_parent, _caption, start, filters, *args, **kwargs):
        asked.append((start, filters.split(";;")[0]))
        return str(folder / "falls.csv"), ""

    monkeypatch.setattr(QFileDialog, "getOpenFileName", staticmethod(ask))
    window.demo_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20000)
    window.session.dirty = False
    window.open_action.trigger()  # the demo is the app's, not a folder the user chose
    qtbot.waitUntil(lambda: window.session.table is not None and
                    window.session.table.provenance.path.endswith("falls.csv"), timeout=20000)
    assert asked[0][0] != str(DEMO_DATA.parent) and "sample_data" not in asked[0][0]
    assert asked[0][1].startswith("Spreadsheets and projects")
    window.session.dirty = False
    window.demo_action.trigger()  # the demo again: the user's folder is still remembered
    qtbot.waitUntil(lambda: window.session.table.provenance.path.endswith(DEMO_DATA.name),
                    timeout=20000)
    window.session.dirty = False
    window.open_action.trigger()
    assert asked[-1][0] == str(folder.resolve())
    window.session.dirty = False


def test_a_workbook_with_title_rows_is_numbered_as_the_spreadsheet(window, qtbot, tmp_path):
    import openpyxl

    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(["Falls audit 2025, ward 7"])
    sheet.append([])
    sheet.append(["Age", "Gait", "Fell"])
    for i in range(40):
        sheet.append(["ninety" if i == 6 else 60 + i, ("steady", "frame")[i % 2],
                      ("yes", "no")[i % 3 == 0]])
    book.save(tmp_path / "falls.xlsx")
    _open(window, qtbot, tmp_path / "falls.xlsx")
    notes = list(window.session.notes)
    assert any("'ninety'" in n and "(row 10)" in n for n in notes)
    model = window.panels["data"].frame_model
    assert model.headerData(0, Qt.Vertical) == "4"
    assert model.data(model.index(6, 0)) == "ninety" and model.headerData(6, Qt.Vertical) == "10"
    assert "(row 3 holds the column names)" in window.panels["data"].rows_caption.text()
