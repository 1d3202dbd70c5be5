"""Step 3's 'Coarsen measurements' setting: off by default, used by Run, kept in projects."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


def test_coarsening_is_off_by_default_used_when_set_and_kept_in_the_project(
        demo, qtbot, run, dialogs, tmp_path):
    window = demo
    size = window.panels["size"]
    assert size.coarsen.value() == 1 and size.coarsen.text() == "off"
    assert window.session.tree.coarsen is None
    size.coarsen.setValue(8)
    assert window.session.tree.coarsen == 8
    size.folds.setValue(3)
    run(window)
    model = window.session.derivation.model
    assert model.extra["settings"]["tree"]["coarsen"] == 8
    assert model.coarsening().startswith("Coarsened: ")
    dialogs.save_name = str(tmp_path / "coarse.prunella")
    assert window.save_as()
    from gui.main_window import MainWindow

    again = MainWindow()
    qtbot.addWidget(again)
    again.open_any(str(tmp_path / "coarse.prunella"))
    qtbot.waitUntil(lambda: again.session.table is not None, timeout=20000)
    assert again.session.tree.coarsen == 8
    assert again.panels["size"].coarsen.value() == 8
    again.panels["size"].coarsen.setValue(1)  # back to off
    assert again.session.tree.coarsen is None
    again.session.dirty = False
