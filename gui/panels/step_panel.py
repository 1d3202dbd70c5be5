"""What every step's panel has: a title, one line saying what the step is for, a banner when
its content is out of date, a way to ask the window to go to another step, and the layout,
file-dialog and message helpers the steps share."""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

from PySide6.QtCore import QSettings, Qt, Signal
from PySide6.QtGui import QFont
from PySide6.QtWidgets import (
    QFileDialog, QFrame, QHBoxLayout, QLabel, QMessageBox, QPushButton, QScrollArea, QSizePolicy,
    QSplitter, QToolButton, QVBoxLayout, QWidget,
)

from core.messages import say
from core.safe_files import names_an_input, save_notes
from gui.panels.wording import with_advice
from gui.session import STEP_TITLES, STEPS, Session
from gui.workers import JobRunner

LAST_FOLDER = "last_folder"  # the settings key: where the last file was opened from


def heading_font(widget: QWidget, factor: float = 1.45) -> QFont:
    font = QFont(widget.font())
    font.setPointSizeF(font.pointSizeF() * factor)
    font.setBold(True)
    return font


def with_tooltip(widget: QWidget, text: str) -> QWidget:
    """Attach a one-sentence explanation to a control (tooltip and What's This)."""
    widget.setToolTip(text)
    widget.setWhatsThis(text)
    return widget


def tool_buttons(layout: QHBoxLayout, buttons) -> None:
    """Small buttons in a row, each (words, tooltip, what it does): the zoom rows of the
    tree and the chart preview."""
    for text, tip, slot in buttons:
        button = with_tooltip(QToolButton(), tip)
        button.setText(text)
        button.clicked.connect(slot)
        layout.addWidget(button)


def side_by_side(left: QWidget, right: QWidget, stretch: tuple[int, int],
                 sizes: tuple[int, int] | None = None) -> QSplitter:
    """Two parts of a step beside each other; the user may move the divider, but neither
    part can be squeezed away."""
    splitter = QSplitter(Qt.Horizontal)
    splitter.addWidget(left)
    splitter.addWidget(right)
    splitter.setStretchFactor(0, stretch[0])
    splitter.setStretchFactor(1, stretch[1])
    if sizes:
        splitter.setSizes(list(sizes))
    splitter.setChildrenCollapsible(False)
    return splitter


def ask_save_path(parent: QWidget, session: Session, caption: str, filter_text: str,
                  ending: str, suffix: str | None = None, start: str | None = None,
                  protect_project: bool = True) -> str | None:
    """Ask where to save; None if the user cancels or names an input file (then says so).

    The dialog starts at the data file's name with ``ending`` in place of its suffix (or at
    ``start``); ``suffix`` is added when the name lacks it. The data file, and the project
    file unless it is the one being saved, are never written over.
    """
    data = session.table.provenance.path if session.table is not None else None
    if start is None:
        start = "" if data is None else str(Path(data).with_name(Path(data).stem + ending))
    path, _ = QFileDialog.getSaveFileName(parent, caption, start, filter_text)
    if not path:
        return None
    if suffix and not path.lower().endswith(suffix):
        path += suffix
    if names_an_input(path, data, session.project_path if protect_project else None):
        QMessageBox.warning(parent, "Prunella", with_advice(say("app.save_over_input")))
        return None
    return path


def show_save_notes(parent: QWidget, notes) -> None:
    """What a save had to do besides saving (our leftover temporary files removed), shown as
    a message with its advice."""
    for note in dict.fromkeys(notes):
        QMessageBox.information(parent, "Leftover temporary files removed", with_advice(note))


@contextmanager
def saving(parent: QWidget) -> Iterator[None]:
    """Around a save made on this (the window's) thread: the notes it makes are shown once
    it is over, whether it worked or not."""
    notes: list[str] = []
    try:
        with save_notes(notes.append):
            yield
    finally:
        show_save_notes(parent, notes)


def ask_open_path(parent: QWidget, caption: str, filter_text: str) -> str | None:
    """Ask for a file to open, starting in the folder the last file was opened from (kept in
    the settings across sessions); None if the user cancels."""
    settings = QSettings()
    path, _ = QFileDialog.getOpenFileName(parent, caption, str(settings.value(LAST_FOLDER, "")),
                                          filter_text)
    if not path:
        return None
    remember_folder(path)
    return path


def remember_folder(path: str) -> None:
    """The folder of a file just opened, for the next open dialog."""
    QSettings().setValue(LAST_FOLDER, str(Path(path).resolve().parent))


def scrolling(widget: QWidget, across: bool = False) -> QScrollArea:
    """A part of a step that scrolls when the window is small: no frame of its own, Tab goes
    to the controls inside (not the frame), and up and down only unless ``across``."""
    scroll = QScrollArea()
    scroll.setWidget(widget)
    scroll.setWidgetResizable(True)
    scroll.setFocusPolicy(Qt.NoFocus)
    scroll.setFrameShape(QFrame.NoFrame)
    if not across:
        scroll.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
    return scroll


NO_BETTER_STEPS = ("size", "tree", "chart")  # where a tree no better than no tree is said so


class Banner(QFrame):
    """A notice across the top of a panel: text (with a symbol, never colour alone) and a button."""

    def __init__(self, symbol: str, button_text: str = "", parent=None) -> None:
        super().__init__(parent)
        self.setObjectName("banner")
        self.setFrameShape(QFrame.StyledPanel)
        self.setStyleSheet("#banner { background: #fff4d6; border: 1px solid #b88a00; "
                           "border-radius: 4px; } #banner QLabel { color: #3d2e00; }")
        self.symbol = QLabel(symbol)
        self.symbol.setFont(heading_font(self, 1.2))
        self.text = QLabel()
        self.text.setWordWrap(True)
        self.text.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.button = QPushButton(button_text)
        self.button.setVisible(bool(button_text))
        layout = QHBoxLayout(self)
        layout.setContentsMargins(10, 6, 10, 6)
        layout.addWidget(self.symbol)
        layout.addWidget(self.text, 1)
        layout.addWidget(self.button)
        self.setSizePolicy(QSizePolicy.Preferred, QSizePolicy.Maximum)  # never taller than its text
        self.hide()

    def show_text(self, text: str) -> None:
        self.text.setText(text)
        self.show()


class StepPanel(QWidget):
    """Base of the six step panels."""

    step = "data"
    intro = ""
    go_to = Signal(str)  # ask the window to show another step

    def __init__(self, session: Session, parent=None) -> None:
        super().__init__(parent)
        self.session = session
        self._layout = QVBoxLayout(self)
        self._layout.setContentsMargins(16, 12, 16, 12)
        self._layout.setSpacing(8)
        number = STEPS.index(self.step) + 1
        self.title = QLabel(f"{number}. {STEP_TITLES[self.step]}")
        self.title.setFont(heading_font(self))
        self.title.setAccessibleName(STEP_TITLES[self.step])
        self.intro_label = QLabel(self.intro)
        self.intro_label.setWordWrap(True)
        self.stale_banner = Banner("⚠", "Go to step 3")
        self.stale_banner.button.clicked.connect(self._go_to_size)
        self._layout.addWidget(self.title)
        self._layout.addWidget(self.intro_label)
        self._layout.addWidget(self.stale_banner)
        # Steps 3, 4 and 6 say when the chosen tree predicts no better than no tree.
        self.no_better_banner = Banner("⚠")
        self._layout.addWidget(self.no_better_banner)
        if self.step in NO_BETTER_STEPS:
            for signal in (session.result_changed, session.chosen_changed, session.opened):
                signal.connect(self.update_no_better)
        self.runners: list[JobRunner] = []  # the step's background work, one runner per kind
        session.state_changed.connect(self.update_stale)
        session.opened.connect(self.stop_work)  # work for the previous file is not wanted

    def runner(self, **options) -> JobRunner:
        """A job runner for one kind of this step's background work (see JobRunner)."""
        runner = JobRunner(self, **options)
        self.runners.append(runner)
        return runner

    @property
    def body(self) -> QVBoxLayout:
        return self._layout

    def update_stale(self) -> None:
        if self.step in self.session.stale_steps():
            self.stale_banner.show_text(
                "Out of date: the data or the choices changed after this tree was grown. "
                "What you see is the earlier tree; run again on step 3 to update it.")
        else:
            self.stale_banner.hide()

    def update_no_better(self) -> None:
        model = self.session.model
        warning = None if model is None else model.no_better_warning()
        if warning:
            self.no_better_banner.show_text(warning)
        else:
            self.no_better_banner.hide()

    def _go_to_size(self) -> None:
        self.go_to.emit("size")

    def add_tree_content(self, content: QWidget) -> None:
        """For the steps that show a grown tree: the step's content, or, while there is no
        tree, a banner leading to step 3 at the top (the space below it stays empty)."""
        self.no_tree = Banner("ℹ", "Go to step 3")
        self.no_tree.button.clicked.connect(self._go_to_size)
        holder = QVBoxLayout()
        holder.setContentsMargins(0, 0, 0, 0)
        holder.addWidget(self.no_tree)
        holder.addWidget(content, 1)
        holder.addStretch(0)  # takes the room only while the content is hidden
        self.body.addLayout(holder, 1)
        self.content = content

    def show_tree_content(self) -> bool:
        """Show the content if there is a tree, else the banner; True if there is a tree."""
        has_tree = self.session.model is not None
        self.content.setVisible(has_tree)
        if has_tree:
            self.no_tree.hide()
        else:
            self.no_tree.show_text("No tree yet: run step 3 to grow one.")
        return has_tree

    def stop_work(self) -> None:
        """Stop the step's background work and drop its results (the window calls this for
        every step on closing, so no computation outlives it)."""
        for runner in self.runners:
            runner.forget()

    def ask_save_path(self, caption: str, filter_text: str, ending: str,
                      suffix: str | None = None) -> str | None:
        """Where to save one of this step's files (see the module function)."""
        return ask_save_path(self, self.session, caption, filter_text, ending, suffix)

    def warn(self, text: str, title: str = "Prunella") -> None:
        """One clear message for the user (never a crash), with what to do about it."""
        QMessageBox.warning(self, title, with_advice(text))
