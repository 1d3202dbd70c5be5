"""Closing the window stops every step's background work, so no computation outlives it."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import Qt  # noqa: E402


def test_closing_cancels_a_check_that_is_running(demo, qtbot, run, dialogs):
    window = demo
    run(window)
    window.go_to("checking")
    checking = window.panels["checking"]
    checking.outer_folds.setValue(20)  # long enough to be still running when the window closes
    qtbot.mouseClick(checking.nested_button, Qt.LeftButton)
    job = checking.job
    assert job is not None and job.running and not job.cancel_requested
    window.session.dirty = False  # no question about saving
    assert window.close()
    assert job.cancel_requested
    qtbot.waitUntil(lambda: not job.running, timeout=20000)


def test_closing_cancels_a_project_being_read(demo, qtbot, dialogs, tmp_path, monkeypatch):
    import threading

    import gui.main_window as main_window

    window = demo
    project = tmp_path / "demo.prunella"
    dialogs.save_name = str(project)
    assert window.save_as()
    release = threading.Event()
    real = main_window.read_for_project

    def slow_read(*args, **kwargs):  # holds the read until the window has closed
        release.wait(20)
        return real(*args, **kwargs)

    monkeypatch.setattr(main_window, "read_for_project", slow_read)
    window.open_any(str(project))
    job = window.project_reading.job
    assert job is not None and job.running and not job.cancel_requested
    window.session.dirty = False
    assert window.close()
    assert job.cancel_requested
    release.set()
    qtbot.waitUntil(lambda: not job.running, timeout=20000)
