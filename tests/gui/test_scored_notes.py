"""Saving a scored spreadsheet from step 6 shows what scoring had to decide about the values,
as the command line prints it."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from dataclasses import replace  # noqa: E402

from PySide6.QtCore import Qt  # noqa: E402

from core.model import scored_table  # noqa: E402
from gui.panels.wording import warning_html  # noqa: E402


def test_scoring_notes_are_shown(demo, qtbot, run, dialogs, tmp_path):
    window = demo
    run(window)
    session = window.session
    model = session.model
    numeric = next(c for c in model.columns_asked() if model.spec(c).kind == "numeric")
    frame = session.table.frame.copy()  # a copy: the demo table itself stays as read
    frame[numeric] = frame[numeric].astype(object)
    frame.loc[frame.index[:3], numeric] = "see notes"
    session.table = replace(session.table, frame=frame)
    _, notes = scored_table(model, frame)
    assert notes  # the text cells are something scoring has to say about
    window.go_to("chart")
    chart = window.panels["chart"]
    dialogs.save_name = str(tmp_path / "scored.csv")
    qtbot.mouseClick(chart.scored_button, Qt.LeftButton)
    assert (tmp_path / "scored.csv").is_file()
    shown = chart.message.text()
    assert "Saved scored.csv." in shown
    for note in notes:
        assert warning_html(note) in shown
