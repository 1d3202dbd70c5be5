"""The panel helpers every step shares: findings listed most serious first, and the scrolling
parts of a step."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtWidgets import QFrame, QLabel  # noqa: E402

from gui.panels.step_panel import scrolling  # noqa: E402
from gui.widgets.findings import Finding, FindingsView  # noqa: E402


def test_findings_are_shown_most_serious_first(qtbot):
    view = FindingsView()
    qtbot.addWidget(view)
    view.show_findings("", [Finding("note", "n1"), Finding("warning", "w1"),
                            Finding("refused", "r1"), Finding("note", "n2"),
                            Finding("warning", "w2")])
    assert [row.finding.severity for row in view.rows] == \
        ["refused", "warning", "warning", "note", "note"]
    assert [row.finding.text for row in view.rows] == ["r1", "w1", "w2", "n1", "n2"]


def test_scrolling_part(qtbot):
    label = QLabel("inside")
    scroll = scrolling(label)
    qtbot.addWidget(scroll)
    assert scroll.widget() is label and scroll.widgetResizable()
    assert scroll.focusPolicy() == Qt.NoFocus and scroll.frameShape() == QFrame.NoFrame
    assert scroll.horizontalScrollBarPolicy() == Qt.ScrollBarAlwaysOff
    assert scrolling(QLabel("wide"), across=True).horizontalScrollBarPolicy() == \
        Qt.ScrollBarAsNeeded
