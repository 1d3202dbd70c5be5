"""Details a new user meets: File → Open offers spreadsheets and projects together and starts
in the last folder used; a reopened project lists the same things to check; the recent list
names each file once; the size list shows each size's errors; step 4 before any run keeps
its banner at the top; the Rows tab's headers fit their names."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import shutil  # noqa: E402

import pandas as pd  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtWidgets import QFileDialog  # noqa: E402

from core.messages import kind_of as catalogue_entry  # noqa: E402
from tests.helpers import DEMO_CSV  # noqa: E402


def test_open_starts_in_the_last_folder_with_spreadsheets_and_projects(
        window, qtbot, monkeypatch, tmp_path):
    asked = []
    folder = tmp_path / "audits"
    folder.mkdir()
    shutil.copy(DEMO_CSV, folder / "cohort.csv")

    def ask(_parent, _caption, start, filters, *args, **kwargs):
        asked.append((start, filters))
        return str(folder / "cohort.csv"), ""

    monkeypatch.setattr(QFileDialog, "getOpenFileName", staticmethod(ask))
    window.open_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20000)
    first_filter = asked[0][1].split(";;")[0]
    assert first_filter.startswith("Spreadsheets and projects")
    assert "*.csv" in first_filter and "*.xlsx" in first_filter and "*.prunella" in first_filter
    window.session.dirty = False
    from gui.main_window import MainWindow

    again = MainWindow()  # a later session: the folder is remembered in the settings
    qtbot.addWidget(again)
    again.panels["data"].choose_file()
    assert asked[-1][0] == str(folder.resolve())
    again.session.dirty = False


def _inferred(notes):
    """The notes about the data themselves (not which dictionary file was used)."""
    return [n for n in notes if getattr(catalogue_entry(n), "code", "") not in ("dictionary.used", "dictionary.used_whole")]


def test_a_reopened_project_lists_what_the_first_opening_did(demo, qtbot, run, dialogs,
                                                            tmp_path):
    window = demo
    first = _inferred(window.session.notes)
    assert first  # the demo has things to check (the -99 code, the identifier)
    dialogs.save_name = str(tmp_path / "demo.prunella")
    assert window.save_as()
    from gui.main_window import MainWindow

    again = MainWindow()
    qtbot.addWidget(again)
    again.open_any(str(tmp_path / "demo.prunella"))
    qtbot.waitUntil(lambda: again.session.table is not None, timeout=20000)
    assert _inferred(again.session.notes) == first
    shown = [r.finding.text for r in again.panels["data"].notes_view.rows]
    assert not any(t.startswith("Nothing to check") for t in shown)
    assert len(shown) >= len(first)
    again.session.dirty = False


def test_recent_files_are_listed_once_and_told_apart(window, tmp_path):
    for name in ("north", "south"):
        (tmp_path / name).mkdir()
        shutil.copy(DEMO_CSV, tmp_path / name / "cohort.csv")
    window._remember(str(tmp_path / "north" / "cohort.csv"))
    window._remember(str(tmp_path / "north" / ".." / "north" / "cohort.csv"))  # the same file
    window._remember(str(tmp_path / "south" / "cohort.csv"))
    assert window.recent_files() == [str((tmp_path / d / "cohort.csv").resolve())
                                     for d in ("south", "north")]
    shown = [a.text() for a in window.recent_menu.actions()]
    assert shown == ["cohort.csv (south)", "cohort.csv (north)"]
    assert [a.text() for a in window.panels["data"].recent_menu.actions()] == shown


def test_each_size_in_the_list_shows_its_errors(demo, run):
    window = demo
    window.panels["size"].folds.setValue(5)
    run(window)
    combo, path = window.panels["size"].size_combo, window.session.model.path
    assert combo.count() == len(path["leaves"])
    for k in range(combo.count()):
        text = combo.itemText(k)
        cv = f"cross-validated error {path['cv_risk'][k]:.3f} ± {path['cv_se'][k]:.3f}"
        assert cv in text and f"training {path['train_risk'][k]:.3f}" in text
        assert text.index("cross-validated") < text.index("training")  # never alone, second


def test_step_4_before_any_run_keeps_its_banner_at_the_top(window, qtbot):
    window.resize(1280, 800)
    window.go_to("tree")
    tree = window.panels["tree"]
    qtbot.waitUntil(lambda: tree.no_tree.isVisible(), timeout=5000)
    banner = tree.no_tree.geometry()
    assert banner.top() - tree.intro_label.geometry().bottom() < 40  # right under the intro
    assert banner.height() < 3 * tree.no_tree.sizeHint().height()  # not half the screen


def test_rows_tab_headers_fit_their_names(window, qtbot, tmp_path):
    names = ["Oxygen saturation on arrival (%)", "Systolic blood pressure (mmHg)", "age"]
    path = tmp_path / "long_names.csv"
    pd.DataFrame({n: [1, 2, 3] * 10 for n in names}).assign(outcome=["a", "b"] * 15).to_csv(
        path, index=False)
    window.panels["data"].open_path(str(path))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20000)
    header = window.panels["data"].rows_view.horizontalHeader()
    for column, name in enumerate(names):
        assert header.sectionSize(column) >= header.fontMetrics().horizontalAdvance(name)
    assert header.defaultAlignment() & Qt.AlignLeft
    dictionary_header = window.panels["data"].dictionary_view.horizontalHeader()
    assert dictionary_header.defaultAlignment() & Qt.AlignLeft  # no fragment from the middle


def test_step_2_names_each_column_once():
    from core.dictionary import ColumnSpec
    from gui.panels.outcome import column_text

    assert column_text(ColumnSpec("Age (yrs)", label="Age")) == "Age (yrs)"
    assert column_text(ColumnSpec("spo2", label="Oxygen saturation")) == \
        "Oxygen saturation (spo2)"
    assert column_text(ColumnSpec("crp")) == "crp"  # no label: the header alone
