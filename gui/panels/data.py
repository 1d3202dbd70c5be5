"""Step 1, the data: open a spreadsheet, choose its sheet, see its rows, say what each column
is (the data dictionary), and read what reading it had to decide."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView, QComboBox, QFileDialog, QHBoxLayout, QHeaderView, QLabel, QMenu,
    QProgressBar, QPushButton, QSplitter, QStackedWidget, QTableView,
    QTabWidget, QToolButton, QVBoxLayout, QWidget,
)

from core.data import EXCEL_SUFFIXES, list_sheets, read_table
from core.dictionary import DataDictionary, dictionary_beside, dictionary_for
from core.errors import InputError
from core.messages import app_advice, app_wording, kind_of as catalogue_entry
from gui import workers
from gui.panels.base import Panel, explain, heading_font
from gui.widgets.dictionary_model import (
    KIND_WORDS, ROLE_WORDS, ChoiceDelegate, DictionaryModel,
)
from gui.widgets.findings import Finding, FindingsView
from gui.widgets.frame_model import FrameModel

DATA_FILTER = "Spreadsheets (*.csv *.tsv *.txt *.tab *.xlsx *.xlsm);;All files (*)"
DICTIONARY_FILTER = "Data dictionary (*.json *.csv)"


def note_finding(note: str) -> Finding:
    """A reading note as the list shows it: how serious (from the message catalogue), the
    note, and the catalogue's "what to do"."""
    kind = catalogue_entry(note)
    severity = kind.severity if kind is not None else "note"
    return Finding(severity, app_wording(note) or note, app_advice(note), kind=
                   "" if kind is None else kind.code)


def read_data(path: str, sheet: str | None, dictionary_path: str | None):
    """Read a table and its dictionary (inferred, then the saved one over it). Runs in a worker."""
    table = read_table(path, sheet=sheet)
    dictionary, notes = dictionary_for(table, dictionary_path)
    return table, dictionary, tuple(notes)


class DataPanel(Panel):
    step = "data"
    intro = ("Open the spreadsheet of past patients (one row per visit). Check that each column "
             "is read as what it is, and read the notes below the table.")
    opened = Signal(str)  # a data file was read (for the recent-files list)

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self.job: workers.Job | None = None
        self._dictionary_path: str | None = None

        # The row of controls.
        self.open_button = explain(QPushButton("Open spreadsheet…"),
                                   "Choose a CSV, TSV or Excel file; it is only read, never changed.")
        self.open_button.clicked.connect(self.choose_file)
        self.recent_button = explain(QToolButton(), "Open one of the spreadsheets used lately.")
        self.recent_button.setText("Recent")
        self.recent_button.setPopupMode(QToolButton.InstantPopup)
        self.recent_menu = QMenu(self.recent_button)
        self.recent_button.setMenu(self.recent_menu)
        self.sheet_label = QLabel("Sheet:")
        self.sheet_combo = explain(QComboBox(), "The sheet of the workbook that holds the patients.")
        self.sheet_combo.setMinimumContentsLength(12)
        self.sheet_combo.currentTextChanged.connect(self._sheet_chosen)
        self.file_label = QLabel("No spreadsheet open yet.")
        self.file_label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.file_label.setWordWrap(True)
        self.busy = QProgressBar()
        self.busy.setRange(0, 0)
        self.busy.setMaximumWidth(160)
        self.busy.hide()
        row = QHBoxLayout()
        row.addWidget(self.open_button)
        row.addWidget(self.recent_button)
        row.addWidget(self.sheet_label)
        row.addWidget(self.sheet_combo)
        row.addWidget(self.busy)
        row.addWidget(self.file_label, 1)
        self.body.addLayout(row)

        # Rows and columns.
        self.frame_model = FrameModel(parent=self)
        self.rows_view = QTableView()
        self.rows_view.setModel(self.frame_model)
        self.rows_view.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.rows_view.verticalHeader().setSectionResizeMode(QHeaderView.Fixed)
        self.rows_view.verticalHeader().setDefaultSectionSize(
            self.rows_view.fontMetrics().height() + 6)
        self.rows_view.horizontalHeader().setDefaultSectionSize(110)
        self.rows_view.setAlternatingRowColors(True)
        self.rows_view.setAccessibleName("Rows of the spreadsheet")

        self.dictionary_model = DictionaryModel(self)
        self.dictionary_model.edited.connect(self._dictionary_edited)
        self.dictionary_model.refused.connect(self.warn)
        self.dictionary_view = QTableView()
        self.dictionary_view.setModel(self.dictionary_model)
        self.dictionary_view.setAccessibleName("What each column is")
        self.dictionary_view.setAlternatingRowColors(True)
        self.dictionary_view.setEditTriggers(QAbstractItemView.AllEditTriggers)
        self.dictionary_view.setItemDelegateForColumn(1, ChoiceDelegate(ROLE_WORDS, self))
        self.dictionary_view.setItemDelegateForColumn(2, ChoiceDelegate(KIND_WORDS, self))
        header = self.dictionary_view.horizontalHeader()
        for column, width in enumerate((130, 150, 160, 220, 70, 150, 260, 200)):
            header.resizeSection(column, width)
        header.setStretchLastSection(True)
        self.load_dictionary_button = explain(
            QPushButton("Load dictionary…"),
            "Read a data dictionary (JSON or CSV) saved earlier; it replaces the guesses for the "
            "columns it describes.")
        self.save_dictionary_button = explain(
            QPushButton("Save dictionary…"),
            "Save what each column is, to reuse with this data or a new extract of it.")
        self.guess_button = explain(QPushButton("Guess again from the data"),
                                    "Forget the edits and let Prunella guess every column again.")
        self.load_dictionary_button.clicked.connect(self.choose_dictionary)
        self.save_dictionary_button.clicked.connect(self.save_dictionary)
        self.guess_button.clicked.connect(self.guess_again)
        dictionary_tab = QWidget()
        tab_layout = QVBoxLayout(dictionary_tab)
        tab_layout.setContentsMargins(4, 4, 4, 4)
        tab_layout.addWidget(self.dictionary_view, 1)
        buttons = QHBoxLayout()
        for button in (self.load_dictionary_button, self.save_dictionary_button, self.guess_button):
            buttons.addWidget(button)
        buttons.addStretch(1)
        tab_layout.addLayout(buttons)

        self.tabs = QTabWidget()
        self.tabs.addTab(dictionary_tab, "What each column is")
        self.tabs.addTab(self.rows_view, "Rows")
        self.tabs.setTabToolTip(0, "The data dictionary: how each column is read and used; "
                                   "double-click a cell to change it.")
        self.tabs.setTabToolTip(1, "The spreadsheet as read (blank = not recorded).")

        self.notes_view = FindingsView()
        self.notes_view.setAccessibleName("Things to check")
        notes_box = QWidget()
        notes_layout = QVBoxLayout(notes_box)
        notes_layout.setContentsMargins(0, 4, 0, 0)
        self.notes_title = QLabel("Things to check")
        self.notes_title.setFont(heading_font(self, 1.1))
        notes_layout.addWidget(self.notes_title)
        notes_layout.addWidget(self.notes_view, 1)

        splitter = QSplitter(Qt.Vertical)
        splitter.addWidget(self.tabs)
        splitter.addWidget(notes_box)
        splitter.setStretchFactor(0, 3)
        splitter.setStretchFactor(1, 2)
        splitter.setSizes([560, 260])  # room for two or three notes with their advice
        splitter.setChildrenCollapsible(False)

        # What shows before anything is open.
        self.empty = QWidget()
        empty_layout = QVBoxLayout(self.empty)
        empty_layout.addStretch(1)
        hint = QLabel("Open a spreadsheet (CSV, TSV or Excel) to begin,\nor drop the file on "
                      "this window.")
        hint.setAlignment(Qt.AlignCenter)
        hint.setFont(heading_font(self, 1.15))
        empty_layout.addWidget(hint)
        self.big_open = QPushButton("Open spreadsheet…")
        self.big_open.clicked.connect(self.choose_file)
        self.demo_button = explain(QPushButton("Try the demo cohort"),
                                   "Open the invented cohort of breathless patients that comes "
                                   "with Prunella.")
        big = QHBoxLayout()
        big.addStretch(1)
        big.addWidget(self.big_open)
        big.addWidget(self.demo_button)
        big.addStretch(1)
        empty_layout.addLayout(big)
        empty_layout.addStretch(2)
        self.stack = QStackedWidget()
        self.stack.addWidget(self.empty)
        self.stack.addWidget(splitter)
        self.body.addWidget(self.stack, 1)

        session.data_changed.connect(self.refresh)
        self.refresh()

    # --- opening ----------------------------------------------------------------------------

    def choose_file(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Open a spreadsheet", "", DATA_FILTER)
        if path:
            self.open_path(path)

    def open_path(self, path: str, sheet: str | None = None,
                  dictionary_path: str | None = None) -> None:
        """Read a data file in the background; the sheet list is read first (it is quick)."""
        if self.job is not None and self.job.running:
            return
        sheets: list[str] = []
        try:
            if Path(path).suffix.lower() in EXCEL_SUFFIXES:
                sheets = list_sheets(path)
        except InputError as exc:
            self.warn(str(exc))
            return
        if dictionary_path is None:
            beside = dictionary_beside(path)
            dictionary_path = None if beside is None else str(beside)
        self._dictionary_path = dictionary_path
        blocker = self.sheet_combo.blockSignals(True)
        self.sheet_combo.clear()
        self.sheet_combo.addItems(sheets)
        if sheet:
            self.sheet_combo.setCurrentText(sheet)
        self.sheet_combo.blockSignals(blocker)
        self._show_sheet_choice(len(sheets) > 0)
        self._start_reading(path, sheet if sheets else None)

    def _start_reading(self, path: str, sheet: str | None) -> None:
        self._reading = path
        self.job = workers.Job(read_data, path, sheet, self._dictionary_path, takes_progress=False)
        self.job.signals.done.connect(self._read)
        self.job.signals.failed.connect(self._read_failed)
        self.job.signals.finished.connect(self._reading_over)
        self._set_busy(True)
        workers.start(self.job)

    def _sheet_chosen(self, sheet: str) -> None:
        if sheet and self.session.table is not None:
            self._start_reading(self.session.table.provenance.path, sheet)

    def _read(self, result) -> None:
        table, dictionary, notes = result
        self.session.set_data(table, dictionary, notes)
        self.opened.emit(table.provenance.path)

    def _read_failed(self, message: str) -> None:
        self.warn(message, "The spreadsheet could not be read")

    def _reading_over(self) -> None:
        self._set_busy(False)

    def _set_busy(self, busy: bool, what: str = "") -> None:
        self.busy.setVisible(busy)
        for widget in (self.open_button, self.big_open, self.demo_button, self.sheet_combo,
                       self.recent_button, self.load_dictionary_button, self.guess_button):
            widget.setEnabled(not busy)
        if busy:
            self.file_label.setText(what or f"Reading {Path(self._reading).name}…")

    def _show_sheet_choice(self, visible: bool) -> None:
        self.sheet_label.setVisible(visible)
        self.sheet_combo.setVisible(visible)

    def set_recent(self, paths: list[str], opener) -> None:
        self.recent_menu.clear()
        for path in paths:
            action = self.recent_menu.addAction(Path(path).name)
            action.setToolTip(path)
            action.setData(path)
            action.triggered.connect(lambda _checked=False, p=path: opener(p))
        self.recent_button.setEnabled(bool(paths))

    # --- the dictionary ---------------------------------------------------------------------

    def _dictionary_edited(self, dictionary: DataDictionary) -> None:
        self.session.set_dictionary(dictionary)

    def choose_dictionary(self) -> None:
        if self.session.table is None:
            return
        path, _ = QFileDialog.getOpenFileName(self, "Load a data dictionary", "", DICTIONARY_FILTER)
        if path:
            self.load_dictionary_file(path)

    def load_dictionary_file(self, path: str) -> None:
        """Read a saved dictionary over the one inferred from the data, in the background."""
        self._start_dictionary(path, f"Reading {Path(path).name}…")

    def guess_again(self) -> None:
        """Infer the dictionary afresh from the data, in the background."""
        self._start_dictionary(None, "Guessing each column again from the data…")

    def _start_dictionary(self, path: str | None, what: str) -> None:
        table = self.session.table
        if table is None or (self.job is not None and self.job.running):
            return
        self.job = workers.Job(dictionary_for, table, path, takes_progress=False)
        self.job.signals.done.connect(lambda result: self._dictionary_read(table, result))
        self.job.signals.failed.connect(self._dictionary_failed)
        self.job.signals.finished.connect(self._reading_over)
        self._set_busy(True, what)
        workers.start(self.job)

    def _dictionary_read(self, table, result) -> None:
        if self.session.table is not table:
            return  # another file was opened meanwhile; this dictionary belongs to the old one
        dictionary, notes = result
        self.session.set_data(table, dictionary, tuple(table.provenance.warnings) + tuple(notes))

    def _dictionary_failed(self, message: str) -> None:
        self.warn(message, "The dictionary could not be read")
        self.refresh()  # the file line said what was being read

    def save_dictionary(self) -> None:
        if self.session.dictionary is None:
            return
        path = self.ask_save_path("Save the data dictionary", DICTIONARY_FILTER,
                                  ".dictionary.json")
        if not path:
            return
        try:
            self.session.dictionary.save(path)
        except OSError as exc:
            self.warn(f"The dictionary could not be saved ({exc.strerror}); choose another folder.")

    # --- showing ----------------------------------------------------------------------------

    def refresh(self) -> None:
        table = self.session.table
        self.stack.setCurrentIndex(0 if table is None else 1)
        if table is None:
            self.frame_model.set_frame(None)
            self.dictionary_model.set_dictionary(None)
            self.file_label.setText("No spreadsheet open yet.")
            self.notes_view.show_findings("", [])
            self._show_sheet_choice(False)
            return
        if self.frame_model.frame is not table.frame:
            self.frame_model.set_frame(table.frame)
        self.dictionary_model.set_dictionary(self.session.dictionary)
        p = table.provenance
        sheet = f", sheet {p.sheet}" if p.sheet else ""
        self.file_label.setText(
            f"<b>{Path(p.path).name}</b>{sheet}: {p.n_rows:,} rows, {p.n_columns} columns · "
            f"fingerprint {p.short_fingerprint}")
        self.file_label.setToolTip(f"{p.path}\nSHA-256 (the file's fingerprint): {p.sha256}")
        notes = list(dict.fromkeys(list(p.warnings) + list(self.session.notes)))
        findings = [note_finding(n) for n in notes]
        if not findings:
            findings = [Finding("note", "Nothing to check: every column was read without "
                                "surprises.")]
        self.notes_view.show_findings("", findings)
        self.notes_title.setText(f"Things to check ({len(notes)})" if notes else "Things to check")

