"""The window around the steps: starting with --demo, the cautions, settings kept in a
temporary place, recent files, geometry, drag and drop, and going back and forth."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

from PySide6.QtCore import QMimeData, QPointF, QSettings, Qt, QUrl  # noqa: E402
from PySide6.QtGui import QDropEvent  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

from tests.helpers import DEMO_CSV as DEMO  # noqa: E402
from core.cautions import CAUTIONS  # noqa: E402


def test_settings_live_in_the_test_folder(window, tmp_path):
    assert Path(window.settings.fileName()).is_relative_to(tmp_path)
    assert QApplication.organizationName() == "Prunella Tree Charts"


def test_prunella_demo_opens_the_app_with_the_demo_loaded(qapp, qtbot, dialogs, monkeypatch):
    """`prunella --demo` through the entry point; the event loop is the test's own, because
    a second QApplication.exec() in one process is not something the app ever does."""
    from gui.launch import main
    from gui.main_window import MainWindow

    seen = {}

    def event_loop(_app) -> int:
        windows = [w for w in QApplication.topLevelWidgets() if isinstance(w, MainWindow)
                   and w.isVisible()]
        assert len(windows) == 1
        window = windows[0]
        qtbot.addWidget(window)
        qtbot.waitUntil(lambda: window.session.design is not None, timeout=15000)
        qtbot.wait(20)  # the first-start cautions are shown from the event loop
        seen.update(rows=window.session.table.provenance.n_rows,
                    outcome=window.session.design.outcome, title=window.windowTitle())
        window.session.dirty = False
        window.close()
        return 0

    monkeypatch.setattr(QApplication, "exec", event_loop)
    assert main(["--demo"]) == 0
    assert seen["rows"] == 3950 and seen["outcome"] == "admitted"
    # The window's own title names the data file open (no project is saved yet); the system
    # adds the app's display name after it (" — Prunella"), so the name is not said twice.
    assert seen["title"].startswith("breathless_ed.csv") and "Prunella" not in seen["title"]
    assert QApplication.applicationDisplayName() == "Prunella"
    # The first start showed the cautions (once).
    shown = dialogs.texts("information")
    assert len(shown) == 1 and all(c in shown[0] for c in CAUTIONS)


def test_cautions_first_start_only_and_always_in_help(qtbot, dialogs):
    from gui.main_window import MainWindow

    first = MainWindow()
    qtbot.addWidget(first)
    first.first_start()
    first.first_start()
    assert len(dialogs.texts("information")) == 1
    second = MainWindow()
    qtbot.addWidget(second)
    second.first_start()
    assert len(dialogs.texts("information")) == 1  # remembered in the settings
    help_menu = next(a.menu() for a in second.menuBar().actions() if a.text() == "&Help")
    about = next(a for a in help_menu.actions() if "About" in a.text())
    about.trigger()
    text = dialogs.texts("about")[-1]
    assert all(c in text for c in CAUTIONS)
    # The chart step shows them beside the preview, and the side bar names them.
    chart = second.panels["chart"]
    labels = " ".join(label.text() for label in chart.findChildren(type(second.caution_note)))
    assert all(c in labels for c in CAUTIONS)
    assert CAUTIONS[0] in second.caution_note.text()


def test_recent_files_and_geometry_persist(window, qtbot, dialogs):
    window.open_any(str(DEMO))
    qtbot.waitUntil(lambda: window.session.table is not None or bool(dialogs.messages), timeout=15000)
    assert not dialogs.messages
    assert window.recent_files()[0] == str(DEMO.resolve())
    window.resize(800, 520)  # inside the offscreen screen (800 × 600)
    window.session.dirty = False
    window.close()
    from gui.main_window import MainWindow

    again = MainWindow()
    qtbot.addWidget(again)
    assert again.recent_files()[0] == str(DEMO.resolve())
    assert [a.toolTip() for a in again.recent_menu.actions()][0] == str(DEMO.resolve())
    assert again.size().height() == 520 and abs(again.size().width() - 800) <= 4  # frame rounding
    assert QSettings().value("recent")[0] == str(DEMO.resolve())


def test_drop_a_spreadsheet_on_the_window(window, qtbot):
    data = QMimeData()
    data.setUrls([QUrl.fromLocalFile(str(DEMO))])
    event = QDropEvent(QPointF(200, 200), Qt.CopyAction, data, Qt.LeftButton, Qt.NoModifier)
    window.dropEvent(event)
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    assert window.session.table.provenance.n_rows == 3950
    assert window.session.dictionary.get("spo2").unit == "%"  # its dictionary came too


def test_back_and_next_walk_the_steps(window, qtbot):
    assert window.current_step() == "data" and not window.back_button.isEnabled()
    assert "Outcome and predictors" in window.next_button.text()
    for expected in ("outcome", "size", "tree", "checking", "chart"):
        qtbot.mouseClick(window.next_button, Qt.LeftButton)
        assert window.current_step() == expected
    assert not window.next_button.isEnabled()
    qtbot.mouseClick(window.back_button, Qt.LeftButton)
    assert window.current_step() == "checking"
    # Steps without what they need say so instead of showing nothing.
    assert "run step 3" in window.panels["checking"].no_tree.text.text()
    window.steps.setCurrentRow(0)
    assert window.current_step() == "data"


def _tab_chain(window, start) -> list:
    """The visible widgets Tab reaches, in order, from ``start`` round to it again."""
    chain, widget = [], start
    for _ in range(5000):
        widget = widget.nextInFocusChain()
        if widget is start:
            break
        if widget.isVisible() and widget.isEnabled() and widget.focusPolicy() & Qt.TabFocus:
            chain.append(widget)
    return chain


def _in_order(chain, widgets) -> bool:
    positions = [chain.index(w) for w in widgets]
    return positions == sorted(positions)


def test_tab_order_follows_each_step(demo, qtbot, run):
    window = demo
    outcome = window.panels["outcome"]
    window.go_to("outcome")
    chain = _tab_chain(window, window.steps)
    assert _in_order(chain, [outcome.outcome_combo, outcome.task_combo, outcome.positive_combo,
                             outcome.cost_spin, outcome.patient_combo, outcome.site_combo,
                             outcome.checklist.search, outcome.checklist.view,
                             window.next_button])
    run(window)
    size = window.panels["size"]
    chain = _tab_chain(window, window.steps)
    assert _in_order(chain, [size.min_leaf, size.max_depth, size.plan, size.folds, size.seed,
                             size.run_button, size.size_combo, size.one_se_button])
    window.go_to("tree")
    tree = window.panels["tree"]
    chain = _tab_chain(window, window.steps)
    assert _in_order(chain, [tree.view, tree.details, *tree._fields.values(), tree.clear_button,
                             window.next_button])
