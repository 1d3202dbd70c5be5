"""Projects in the app: save and reopen gives the identical tree; a changed data file is found
by its fingerprint and the user told; a moved file is asked for; unsaved work is not lost."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import json  # noqa: E402
import shutil  # noqa: E402

from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtWidgets import QMessageBox  # noqa: E402

from tests.helpers import DEMO_CSV as DEMO, DEMO_DICTIONARY  # noqa: E402
from core.project import PROJECT_FORMAT  # noqa: E402


def _copy_demo(folder):
    folder.mkdir(parents=True, exist_ok=True)
    shutil.copy(DEMO, folder / "cohort.csv")
    shutil.copy(DEMO_DICTIONARY, folder / "cohort.dictionary.json")
    return folder / "cohort.csv"


def _grow_and_save(window, qtbot, run, dialogs, data, target, size_leaves=None):
    window.panels["data"].open_path(str(data))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    size = window.panels["size"]
    size.folds.setValue(5)
    size.seed.setValue(11)
    window.panels["outcome"].cost_spin.setValue(2.0)
    run(window)
    if size_leaves is not None:
        size.choose_size(size_leaves)
    window.session.set_chart(title="Who is admitted?", paper="a3")
    dialogs.save_name = str(target)
    assert window.save()
    assert not window.session.dirty
    return window.session.model


def _reopen(qtbot, path):
    from gui.main_window import MainWindow

    again = MainWindow()
    qtbot.addWidget(again)
    size = again.panels["size"]
    with qtbot.waitSignal(size.run_finished, timeout=30000):
        again.open_any(str(path))
    return again


def test_saved_project_reopens_to_the_identical_tree(window, qtbot, run, dialogs, tmp_path):
    data = _copy_demo(tmp_path / "work")
    # A size the user picked on the curve: 17 boxes is on this run's pruning path and is
    # neither its 1-SE (4) nor its lowest-error (6) choice.
    first = _grow_and_save(window, qtbot, run, dialogs, data, tmp_path / "work" / "admit",
                           size_leaves=17)
    target = tmp_path / "work" / "admit.prunella"
    raw = json.loads(target.read_text(encoding="utf-8"))
    assert raw["format"] == PROJECT_FORMAT and raw["size"] == 17 and raw["seed"] == 11
    assert raw["request"]["tree"]["miss_cost"] == 2.0
    assert raw["model_fingerprint"] == first.fingerprint
    again = _reopen(qtbot, target)
    assert again.session.model.fingerprint == first.fingerprint
    assert again.session.model.chosen["leaves"] == 17
    assert "exactly the tree saved" in again.panels["size"].status.text()
    assert again.session.chart.title == "Who is admitted?" and again.session.chart.paper == "a3"
    assert again.panels["chart"].paper_combo.currentData() == "a3"
    assert again.panels["size"].seed.value() == 11
    assert again.panels["outcome"].cost_spin.value() == 2.0
    assert not again.session.dirty and again.session.project_path == str(target)
    assert not dialogs.texts("warning")
    again.session.dirty = False


def test_changed_data_file_is_detected_and_the_user_told(window, qtbot, run, dialogs, tmp_path):
    data = _copy_demo(tmp_path / "work")
    _grow_and_save(window, qtbot, run, dialogs, data, tmp_path / "work" / "p.prunella")
    with open(data, "a", encoding="utf-8") as handle:  # someone adds a visit to the file
        handle.write("V09999,P9999,North,2025-12-31,50,male,18,97,80,37.0,120,,3,walked in,"
                     "wheeze,no,3.0,no\n")
    again = _reopen(qtbot, tmp_path / "work" / "p.prunella")
    changed = [t for t in dialogs.texts("warning") if "has changed since the project was saved" in t]
    assert len(changed) == 1
    assert again.session.model is not None  # grown again on the file as it is now
    assert again.session.model.n_rows == 3951
    again.session.dirty = False


def test_moved_data_file_is_asked_for(window, qtbot, run, dialogs, tmp_path):
    data = _copy_demo(tmp_path / "work")
    first = _grow_and_save(window, qtbot, run, dialogs, data, tmp_path / "elsewhere" / "p.prunella")
    (tmp_path / "moved").mkdir()
    moved = tmp_path / "moved" / "cohort.csv"  # the model names the file, so keep its name
    shutil.move(data, moved)
    dialogs.open_name = str(moved)
    again = _reopen(qtbot, tmp_path / "elsewhere" / "p.prunella")
    assert any("not at" in t for t in dialogs.texts("warning"))
    assert again.session.model.fingerprint == first.fingerprint  # same bytes, same tree
    again.session.dirty = False


def test_unsaved_changes_prompt_before_closing(demo, qtbot, run, dialogs, tmp_path):
    window = demo
    run(window)
    assert window.session.dirty and window.isWindowModified()
    dialogs.answer = QMessageBox.Cancel
    window.close()
    assert window.isVisible()  # Cancel keeps the window and the work
    assert dialogs.texts("question")
    dialogs.answer = QMessageBox.Save
    dialogs.save_name = str(tmp_path / "kept.prunella")
    window.close()
    assert not window.isVisible()
    assert (tmp_path / "kept.prunella").exists()


def test_new_project_asks_and_clears(demo, qtbot, run, dialogs):
    window = demo
    run(window)
    dialogs.answer = QMessageBox.Discard
    window.new_action.trigger()
    assert window.session.table is None and window.session.model is None
    assert window.current_step() == "data" and not window.session.dirty
    assert window.panels["tree"].view.boxes == {}


def test_stale_steps_are_marked_and_cleared_by_running_again(demo, qtbot, run):
    window = demo
    run(window)
    assert not window.session.stale_steps()
    window.panels["size"].min_leaf.setValue(40)  # an earlier choice changes
    assert window.session.stale_steps() == {"size", "tree", "checking", "chart"}
    for row, step in enumerate(("data", "outcome", "size", "tree", "checking", "chart")):
        marked = "out of date" in window.steps.item(row).text()
        assert marked == (step in window.session.stale_steps())
    window.go_to("tree")
    assert window.panels["tree"].stale_banner.isVisible()
    run(window)
    assert not window.session.stale_steps()
    assert not window.panels["tree"].stale_banner.isVisible()
    assert "out of date" not in window.steps.item(3).text()


def test_save_shortcut_and_menu_actions(window):
    from PySide6.QtGui import QKeySequence

    assert window.open_action.shortcut() == QKeySequence(QKeySequence.Open)
    assert window.save_action.shortcut() == QKeySequence(QKeySequence.Save)
    assert window.print_action.shortcut() == QKeySequence(QKeySequence.Print)
    assert window.quit_action.shortcut() == QKeySequence(QKeySequence.Quit)
    assert not window.print_action.isEnabled()  # nothing to print before a tree exists
    _ = Qt
