"""A list of findings in plain words: a symbol (never colour alone), the message, what to do,
and at most one button that does it."""

from __future__ import annotations

from dataclasses import dataclass

from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QFont
from PySide6.QtWidgets import (
    QFrame, QHBoxLayout, QLabel, QPushButton, QScrollArea, QSizePolicy, QVBoxLayout, QWidget,
)

SYMBOLS = {"refused": "⛔", "warning": "⚠", "note": "ℹ"}
BACKGROUNDS = {"refused": "#fde3e1", "warning": "#fff4d6", "note": "#eef2f5"}
BORDERS = {"refused": "#b3261e", "warning": "#b88a00", "note": "#c5ced6"}


SEVERITY_ORDER = {"refused": 0, "warning": 1, "note": 2}  # what to check first, first


@dataclass(frozen=True)
class Finding:
    """One row: how serious, what was found, what to do, and an optional button."""

    severity: str  # "refused" | "warning" | "note"
    text: str
    advice: str | None = None
    action: str | None = None  # a code the owner understands, e.g. "leave"
    action_text: str = ""
    column: str | None = None
    kind: str = ""


class FindingRow(QFrame):
    def __init__(self, finding: Finding, parent=None) -> None:
        super().__init__(parent)
        self.finding = finding
        self.setObjectName("finding")
        self.setStyleSheet(
            f"#finding {{ background: {BACKGROUNDS[finding.severity]}; border: 1px solid "
            f"{BORDERS[finding.severity]}; border-radius: 4px; }} "
            "#finding QLabel { color: #1f2529; background: transparent; border: none; }")
        symbol = QLabel(SYMBOLS[finding.severity])
        font = QFont(symbol.font())
        font.setPointSizeF(font.pointSizeF() * 1.2)
        symbol.setFont(font)
        symbol.setAlignment(Qt.AlignTop | Qt.AlignHCenter)
        symbol.setAccessibleName(finding.severity)
        self.text = QLabel(finding.text)
        self.text.setWordWrap(True)
        self.text.setTextFormat(Qt.PlainText)
        self.text.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.text.setSizePolicy(QSizePolicy.Ignored, QSizePolicy.Preferred)
        words = QVBoxLayout()
        words.setSpacing(2)
        words.addWidget(self.text)
        self.advice = None
        if finding.advice:
            self.advice = QLabel(f"What to do: {finding.advice}")
            self.advice.setWordWrap(True)
            self.advice.setTextFormat(Qt.PlainText)
            self.advice.setSizePolicy(QSizePolicy.Ignored, QSizePolicy.Preferred)
            small = QFont(self.advice.font())
            small.setItalic(True)
            self.advice.setFont(small)
            words.addWidget(self.advice)
        self.button = None
        layout = QHBoxLayout(self)
        layout.setContentsMargins(8, 6, 8, 6)
        layout.addWidget(symbol, 0, Qt.AlignTop)
        layout.addLayout(words, 1)
        if finding.action:
            self.button = QPushButton(finding.action_text)
            self.button.setSizePolicy(QSizePolicy.Fixed, QSizePolicy.Fixed)
            layout.addWidget(self.button, 0, Qt.AlignTop)


class FindingsView(QWidget):
    """A heading line and the findings under it, scrolling when they do not fit."""

    acted = Signal(str, str)  # (action, column)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.rows: list[FindingRow] = []
        self.status = QLabel()
        self.status.setWordWrap(True)
        self._inner = QWidget()
        self._list = QVBoxLayout(self._inner)
        self._list.setContentsMargins(0, 0, 0, 0)
        self._list.setSpacing(6)
        self._list.addStretch(1)
        self.scroll = QScrollArea()
        self.scroll.setWidget(self._inner)
        self.scroll.setWidgetResizable(True)
        self.scroll.setFrameShape(QFrame.NoFrame)
        self.scroll.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.status)
        layout.addWidget(self.scroll, 1)

    def show_findings(self, status: str, findings: list[Finding]) -> None:
        """Show the findings, the most serious first (refused, then warnings, then notes; in
        the given order within each)."""
        findings = sorted(findings, key=lambda f: SEVERITY_ORDER[f.severity])
        self.status.setText(status)
        self.status.setVisible(bool(status))
        for row in self.rows:
            self._list.removeWidget(row)
            row.hide()  # at once: deleteLater acts only when the event loop comes round
            row.deleteLater()
        self.rows = []
        for finding in findings:
            row = FindingRow(finding, self._inner)
            if row.button is not None:
                row.button.clicked.connect(
                    lambda _checked=False, f=finding: self.acted.emit(f.action, f.column or ""))
            self._list.insertWidget(self._list.count() - 1, row)
            row.show()  # at once, not when the event loop next comes round
            self.rows.append(row)

    def texts(self) -> list[str]:
        return [row.finding.text for row in self.rows]
