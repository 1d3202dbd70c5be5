"""The two helpers every step uses: widgets bound to the session (gui/binding.py) and one
runner for background work (gui/workers.JobRunner)."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import threading  # noqa: E402

from PySide6.QtWidgets import QComboBox, QLineEdit, QProgressBar, QPushButton, QSpinBox  # noqa: E402

from core.errors import Cancelled  # noqa: E402
from gui.binding import Bindings  # noqa: E402
from gui.workers import JobRunner  # noqa: E402


def test_bindings_show_without_writing_back_and_write_the_users_change(qtbot):
    state = {"n": 3, "code": "b", "text": "Who is"}
    writes = []

    def writer(key):
        return lambda value: (writes.append((key, value)), state.__setitem__(key, value))

    spin, combo, edit = QSpinBox(), QComboBox(), QLineEdit()
    for widget in (spin, combo, edit):
        qtbot.addWidget(widget)
    bindings = Bindings()
    bindings.bind(spin, lambda: state["n"], writer("n"))
    bindings.bind(combo, lambda: state["code"], writer("code"),
                  lambda: (("first", "a"), ("second", "b")))
    bindings.bind(edit, lambda: state["text"], writer("text"))
    bindings.show()
    assert (spin.value(), combo.currentData(), edit.text()) == (3, "b", "Who is")
    assert writes == []  # showing is not a change
    spin.setValue(7)  # as the user's arrow key does
    combo.setCurrentIndex(0)
    edit.setText("Who is ")
    edit.textEdited.emit("Who is ")  # typing a space
    assert writes == [("n", 7), ("code", "a"), ("text", "Who is ")]
    edit.setCursorPosition(3)
    bindings.show()  # the session already holds it: the cursor stays where it was
    assert edit.cursorPosition() == 3 and len(writes) == 3
    state["n"] = 9
    bindings.show()
    assert spin.value() == 9 and len(writes) == 3


def _wait(qtbot, runner):
    qtbot.waitUntil(lambda: not runner.running and not runner.busy, timeout=10000)


def test_runner_delivers_only_wanted_results(qtbot):
    progress, cancel = QProgressBar(), QPushButton()
    runner = JobRunner(progress=progress, cancel_button=cancel)
    got, release = [], threading.Event()

    def slow(value, progress=None, cancel=None):
        progress(1, 2)
        release.wait(5)
        return value

    assert runner.start(slow, "first", done=got.append)
    assert runner.busy and cancel.isEnabled()
    assert not runner.start(slow, "second", done=got.append)  # one at a time
    runner.forget()  # e.g. another file was opened
    assert not runner.busy and not cancel.isEnabled()
    release.set()
    _wait(qtbot, runner)
    qtbot.wait(50)
    assert got == []  # the old result is dropped
    release.clear()
    token_before = runner.job.token
    runner.start(slow, "third", done=got.append)
    assert runner.job.token > token_before  # tokens never repeat
    release.set()
    qtbot.waitUntil(lambda: got == ["third"], timeout=10000)
    assert progress.maximum() == 1  # idle again


def test_latest_wins_cancels_the_older_job(qtbot):
    runner = JobRunner(latest_wins=True)
    got, started = [], []

    def work(value, progress=None, cancel=None):
        started.append(value)
        while value == "old" and not cancel():
            threading.Event().wait(0.01)
        if cancel():
            raise Cancelled()
        return value

    runner.start(work, "old", done=got.append)
    qtbot.waitUntil(lambda: started == ["old"], timeout=5000)
    runner.start(work, "new", done=got.append)
    qtbot.waitUntil(lambda: got == ["new"], timeout=10000)
    assert started == ["old", "new"]  # the new one waited for the old to stop


def test_cancel_and_hold(qtbot):
    runner = JobRunner()
    said = []
    assert runner.hold(cancelled=lambda: said.append("cancelled"))
    assert runner.busy and runner.holding
    runner.cancel()
    assert said == ["cancelled"] and not runner.busy

    def endless(progress=None, cancel=None):
        while not cancel():
            threading.Event().wait(0.01)
        raise Cancelled()

    runner.start(endless, done=said.append, cancelled=lambda: said.append("stopped"))
    runner.cancel()
    qtbot.waitUntil(lambda: said[-1] == "stopped", timeout=10000)
