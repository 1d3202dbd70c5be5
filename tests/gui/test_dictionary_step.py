"""Step 1's dictionary buttons work in the background and their notes name the rows, as the
first reading does; reopening a project reads its dictionary the same way."""

from __future__ import annotations

import os

import numpy as np

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from conftest import DEMO  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from core.data import read_table  # noqa: E402
from core.project import load_project  # noqa: E402


def test_guess_again_runs_in_the_background_and_names_rows(demo, qtbot):
    window = demo
    data = window.panels["data"]
    with qtbot.waitSignal(window.session.data_changed, timeout=15000):
        qtbot.mouseClick(data.guess_button, Qt.LeftButton)
        assert not data.guess_button.isEnabled()  # working in the background, one job at a time
        assert "Guessing" in data.file_label.text()
    qtbot.waitUntil(data.guess_button.isEnabled, timeout=15000)
    coded = [n for n in window.session.notes if "'systolic_bp'" in n and "-99" in n]
    assert coded and "(rows 20, 289" in coded[0]


def test_a_project_whose_file_changed_is_inferred_with_row_numbers(demo, dialogs, tmp_path):
    from gui.main_window import read_for_project

    window = demo
    dialogs.save_name = str(tmp_path / "demo.prunella")
    assert window.save_as()
    project = load_project(dialogs.save_name)
    changed = tmp_path / "fewer_columns.csv"
    frame = read_table(DEMO).frame.drop(columns=["campus"])
    frame["pain_score"] = np.where(np.arange(len(frame)) % 50 == 3, -99, np.arange(len(frame)) % 11)
    frame.to_csv(changed, index=False)
    table, dictionary, notes = read_for_project(project, str(changed))
    assert "campus" not in dictionary.names
    assert dictionary.get("systolic_bp") == project.dictionary.get("systolic_bp")  # kept whole
    # The project's dictionary names -99 as not recorded for systolic_bp: nothing to propose;
    # the new column's -99 is proposed, naming its rows.
    assert not any("'systolic_bp'" in n and "-99" in n for n in notes)
    assert any("'pain_score'" in n and "(rows 5, 55" in n for n in notes)
