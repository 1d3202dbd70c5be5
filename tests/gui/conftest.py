"""GUI test set-up: offscreen Qt, settings in a temporary folder (never the user's own), and
message boxes and file dialogs that never block."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

import pytest  # noqa: E402
from PySide6.QtCore import QSettings, QStandardPaths, Qt  # noqa: E402
from PySide6.QtWidgets import QFileDialog, QMessageBox  # noqa: E402

from gui.app import make_application  # noqa: E402
from tests.helpers import DEMO_CSV as DEMO  # noqa: E402


@pytest.fixture(scope="session")
def qapp():
    """The application with Prunella's names (pytest-qt's own fixtures use this one)."""
    return make_application()


class Dialogs:
    """Records every message shown; answers questions and file dialogs as a test says."""

    def __init__(self) -> None:
        self.messages: list[tuple[str, str, str]] = []  # (kind, title, text)
        self.answer = QMessageBox.Discard
        self.open_name = ""
        self.save_name = ""

    def texts(self, kind: str | None = None) -> list[str]:
        return [text for k, _title, text in self.messages if kind is None or k == kind]


@pytest.fixture(autouse=True)
def dialogs(qapp, tmp_path, monkeypatch) -> Dialogs:
    QStandardPaths.setTestModeEnabled(True)
    QSettings.setDefaultFormat(QSettings.IniFormat)
    QSettings.setPath(QSettings.IniFormat, QSettings.UserScope, str(tmp_path / "settings"))
    record = Dialogs()

    def shower(kind):
        def show(_parent, title, text, *args, **kwargs):
            record.messages.append((kind, title, text))
            return QMessageBox.Ok
        return show

    for kind in ("warning", "information", "critical", "about"):
        monkeypatch.setattr(QMessageBox, kind, staticmethod(shower(kind)))

    def question(_parent, title, text, *args, **kwargs):
        record.messages.append(("question", title, text))
        return record.answer

    monkeypatch.setattr(QMessageBox, "question", staticmethod(question))
    monkeypatch.setattr(QFileDialog, "getOpenFileName",
                        staticmethod(lambda *a, **k: (record.open_name, "")))
    monkeypatch.setattr(QFileDialog, "getSaveFileName",
                        staticmethod(lambda *a, **k: (record.save_name, "")))
    return record


@pytest.fixture
def window(qtbot, dialogs):
    from gui.main_window import MainWindow

    win = MainWindow()
    win.settings.setValue("cautions_seen", True)
    qtbot.addWidget(win)
    win.resize(1366, 768)
    win.show()
    yield win
    from gui.workers import JobRunner

    for runner in win.findChildren(JobRunner):  # no work outlives the test
        runner.forget()
        qtbot.waitUntil(lambda: not runner.running, timeout=20000)
    win.session.dirty = False  # no prompt when the test closes it


_DEMO_READS: dict = {}


@pytest.fixture(autouse=True)
def demo_read_once(monkeypatch):
    """Read the (unchanging) demo files once per session: the app still reads them through the
    same worker and function, only the parsing is not repeated for every test."""
    import gui.panels.data as data_panel

    real = data_panel.read_data

    def read_data(path, sheet, dictionary_path):
        key = (str(path), sheet, None if dictionary_path is None else str(dictionary_path))
        if Path(path).resolve() != DEMO.resolve():
            return real(path, sheet, dictionary_path)
        if key not in _DEMO_READS:
            _DEMO_READS[key] = real(path, sheet, dictionary_path)
        return _DEMO_READS[key]

    monkeypatch.setattr(data_panel, "read_data", read_data)


@pytest.fixture
def demo(window, qtbot):
    """The window with the demo cohort open (File → Open the demo cohort)."""
    window.demo_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    return window


@pytest.fixture
def run(qtbot):
    """Press Run on step 3 and wait until the run is over and its result shown."""
    def press(window, timeout: int = 30000) -> None:
        size = window.panels["size"]
        window.go_to("size")
        with qtbot.waitSignal(size.run_finished, timeout=timeout):
            qtbot.mouseClick(size.run_button, Qt.LeftButton)
    return press
