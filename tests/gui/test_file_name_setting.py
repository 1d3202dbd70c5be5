"""Step 6 offers printing the data file's name on the chart, off by default (issue 15,
item 10); the project keeps the choice."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


def test_the_app_has_the_choice_off_by_default(demo):
    window = demo
    panel = window.panels["chart"]
    assert not panel.file_name_box.isChecked()
    assert window.session.chart.show_file_name is False
    panel.file_name_box.setChecked(True)
    assert window.session.chart.show_file_name is True
    assert window.session.to_project().chart["show_file_name"] is True
