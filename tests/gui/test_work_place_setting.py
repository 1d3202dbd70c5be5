"""File ▸ Where the work runs: all cores by default, the choice kept in the app's settings,
and every run of the folds, nested CV and resamples made where it says."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import QSettings  # noqa: E402
from PySide6.QtWidgets import QDialog  # noqa: E402

from core.work_place import ALL_CORES, WorkPlace  # noqa: E402


def test_all_cores_by_default_and_the_choice_is_remembered(window):
    from gui.work_dialog import WorkPlaceDialog, saved_work_place

    assert window.session.work_place == WorkPlace(jobs=ALL_CORES)
    assert window.work_place_action.text().replace("&", "") == "Where the work runs…"
    dialog = WorkPlaceDialog(window.session.work_place, window)
    assert dialog.here.isChecked() and dialog.workers.value() == 0  # "all cores"
    assert not dialog.address.isEnabled()
    dialog.workers.setValue(1)
    assert dialog.place() == WorkPlace(jobs=1)
    dialog.cluster.setChecked(True)
    assert dialog.address.isEnabled() and not dialog.workers.isEnabled()
    dialog.address.setText(" tcp://127.0.0.1:8786 ")
    assert dialog.place() == WorkPlace(jobs=1, cluster="tcp://127.0.0.1:8786")
    dialog.address.setText("")
    assert dialog.place() == WorkPlace(jobs=1)  # no address: this computer

    dialog.address.setText("tcp://127.0.0.1:8786")
    import gui.main_window as main_window

    class Accepting(WorkPlaceDialog):
        def exec(self):
            self.workers.setValue(1)
            self.here.setChecked(True)
            return QDialog.DialogCode.Accepted

    original = main_window.WorkPlaceDialog
    main_window.WorkPlaceDialog = Accepting
    try:
        window.choose_work_place()
    finally:
        main_window.WorkPlaceDialog = original
    assert window.session.work_place == WorkPlace(jobs=1)
    assert saved_work_place(QSettings()) == WorkPlace(jobs=1)
    settings = QSettings()
    settings.setValue("work/jobs", "nonsense")
    assert saved_work_place(settings) == WorkPlace()  # unusable: all cores


def test_runs_go_where_the_setting_says(demo, run, qtbot, monkeypatch):
    seen = []
    real = WorkPlace.run

    def spy(self, work, *args, **kwargs):
        seen.append((work.__name__, self.n_jobs))
        return real(self, work, *args, **kwargs)

    monkeypatch.setattr(WorkPlace, "run", spy)
    window = demo
    window.session.work_place = WorkPlace(jobs=1)
    window.panels["size"].folds.setValue(3)
    run(window)
    assert seen == [("derive", 1)]
    window.session.work_place = WorkPlace()
    window.go_to("checking")
    checking = window.panels["checking"]
    checking.outer_folds.setValue(2)
    checking.run_nested()
    qtbot.waitUntil(lambda: not checking.running, timeout=60000)
    assert seen[-1] == ("nested_cross_validate", ALL_CORES)
    assert checking.nested is not None
