"""Step 1, the data: open a spreadsheet, choose its sheet, see its rows, say what each column
is (the data dictionary), and read what reading it had to decide."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QSignalBlocker, Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView, QComboBox, QHBoxLayout, QHeaderView, QLabel, QMenu,
    QProgressBar, QPushButton, QSplitter, QStackedWidget, QTableView,
    QTabWidget, QToolButton, QVBoxLayout, QWidget,
)

from core.data import EXCEL_SUFFIXES, list_sheets, read_table
from core.dictionary import (
    confirm_missing_codes, dictionary_beside, dictionary_for, open_proposals,
)
from core.errors import InputError
from core.messages import app_advice, app_wording, kind_of as catalogue_entry, say
from gui.panels.step_panel import StepPanel, ask_open_path, heading_font, saving, with_tooltip
from gui.widgets.dictionary_model import (
    KIND_WORDS, ROLE_WORDS, ChoiceDelegate, DictionaryModel,
)
from gui.widgets.findings import Finding, FindingsView
from gui.widgets.frame_model import ROW_NUMBERS_TIP, FrameModel

SPREADSHEET_PATTERNS = "*.csv *.tsv *.txt *.tab *.xlsx *.xlsm"
DATA_FILTER = f"Spreadsheets ({SPREADSHEET_PATTERNS});;All files (*)"
DICTIONARY_FILTER = "Data dictionary (*.json *.csv)"
PROPOSED_MISSING = ("infer.sentinel", "infer.probable_missing")


def note_finding(note: str) -> Finding:
    """A reading note as the list shows it: how serious (from the message catalogue), the
    note, and the catalogue's "what to do"."""
    kind = catalogue_entry(note)
    severity = kind.severity if kind is not None else "note"
    code = "" if kind is None else kind.code
    if code in PROPOSED_MISSING and getattr(note, "fields", {}).get("column"):
        # A probable missing-value code: one click confirms it as "not recorded".
        return Finding(severity, app_wording(note) or note, app_advice(note),
                       action="not_recorded", action_text="Read as not recorded",
                       column=note.fields["column"], kind=code)
    return Finding(severity, app_wording(note) or note, app_advice(note), kind=code)


def read_data(path: str, sheet: str | None, dictionary_path: str | None):
    """Read a table and its dictionary (inferred, then the saved one over it). Runs in a worker."""
    table = read_table(path, sheet=sheet)
    dictionary, notes = dictionary_for(table, dictionary_path)
    return table, dictionary, tuple(notes)


class DataPanel(StepPanel):
    step = "data"
    intro = ("Open the spreadsheet of past patients (one row per visit). Check that each column "
             "is read as what it is, and read the notes below the table.")
    opened = Signal(str)  # a data file was read (for the recent-files list)

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self._dictionary_path: str | None = None
        self._reading_name = ""
        self.reading = self.runner()  # reading a file or a dictionary: one at a time
        self.reading.busy_changed.connect(self._set_busy)
        self.body.addLayout(self._file_row())
        self.stack = QStackedWidget()
        self.stack.addWidget(self._empty_page())
        self.stack.addWidget(self._table_page())
        self.body.addWidget(self.stack, 1)
        session.data_changed.connect(self.refresh)
        self.refresh()

    def _file_row(self) -> QHBoxLayout:
        """Open, Recent, the sheet, and what is open."""
        self.open_button = with_tooltip(QPushButton("Open spreadsheet…"), "Choose a CSV, TSV or "
                                        "Excel file; it is only read, never changed.")
        self.open_button.clicked.connect(self.choose_file)
        self.recent_button = with_tooltip(QToolButton(), "Open one of the spreadsheets used "
                                          "lately.")
        self.recent_button.setText("Recent")
        self.recent_button.setPopupMode(QToolButton.InstantPopup)
        self.recent_menu = QMenu(self.recent_button)
        self.recent_button.setMenu(self.recent_menu)
        self.sheet_label = QLabel("Sheet:")
        self.sheet_combo = with_tooltip(QComboBox(), "The sheet of the workbook that holds the "
                                        "patients.")
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
        for widget in (self.open_button, self.recent_button, self.sheet_label, self.sheet_combo,
                       self.busy):
            row.addWidget(widget)
        row.addWidget(self.file_label, 1)
        return row

    def _rows_view(self) -> QTableView:
        self.frame_model = FrameModel(parent=self)
        view = QTableView()
        view.setModel(self.frame_model)
        view.setSelectionBehavior(QAbstractItemView.SelectRows)
        view.verticalHeader().setSectionResizeMode(QHeaderView.Fixed)
        view.verticalHeader().setDefaultSectionSize(view.fontMetrics().height() + 6)
        view.horizontalHeader().setDefaultSectionSize(110)
        view.horizontalHeader().setDefaultAlignment(Qt.AlignLeft | Qt.AlignVCenter)
        view.horizontalHeader().setTextElideMode(Qt.ElideRight)
        view.setAlternatingRowColors(True)
        view.setAccessibleName("Rows of the spreadsheet")
        self.rows_view = view
        # One numbering everywhere: the row headers are the spreadsheet's row numbers, those
        # the notes and warnings name, and the tab says so.
        self.rows_caption = QLabel()
        self.rows_caption.setWordWrap(True)
        tab = QWidget()
        layout = QVBoxLayout(tab)
        layout.setContentsMargins(0, 4, 0, 0)
        layout.addWidget(self.rows_caption)
        layout.addWidget(view, 1)
        return tab

    def _fit_headers(self) -> None:
        """Each column of the Rows tab as wide as its header's name (within limits), the
        names left-aligned: none is cut at both ends."""
        header = self.rows_view.horizontalHeader()
        metrics = header.fontMetrics()
        for column in range(min(self.frame_model.columnCount(), 500)):
            name = str(self.frame_model.headerData(column, Qt.Horizontal))
            header.resizeSection(column, max(80, min(280, metrics.horizontalAdvance(name) + 24)))

    def _dictionary_tab(self) -> QWidget:
        """The data dictionary as a table, with its buttons below."""
        self.dictionary_model = DictionaryModel(self)
        self.dictionary_model.edited.connect(self.session.set_dictionary)
        self.dictionary_model.refused.connect(self.warn)
        view = QTableView()
        view.setModel(self.dictionary_model)
        view.setAccessibleName("What each column is")
        view.setAlternatingRowColors(True)
        view.setEditTriggers(QAbstractItemView.AllEditTriggers)
        view.setItemDelegateForColumn(1, ChoiceDelegate(ROLE_WORDS, self))
        view.setItemDelegateForColumn(2, ChoiceDelegate(KIND_WORDS, self))
        header = view.horizontalHeader()
        for column, width in enumerate((130, 150, 160, 220, 70, 150, 260, 200)):
            header.resizeSection(column, width)
        header.setStretchLastSection(True)
        # Left-aligned: a header scrolled half out of sight shows its name's start, not a
        # fragment from its middle.
        header.setDefaultAlignment(Qt.AlignLeft | Qt.AlignVCenter)
        self.dictionary_view = view
        self.load_dictionary_button = with_tooltip(
            QPushButton("Load dictionary…"),
            "Read a data dictionary (JSON or CSV) saved earlier; it replaces the guesses for the "
            "columns it describes.")
        self.save_dictionary_button = with_tooltip(
            QPushButton("Save dictionary…"),
            "Save what each column is, to reuse with this data or a new extract of it.")
        self.guess_button = with_tooltip(QPushButton("Guess again from the data"),
                                         "Forget the edits and let Prunella guess every column "
                                         "again.")
        self.load_dictionary_button.clicked.connect(self.choose_dictionary)
        self.save_dictionary_button.clicked.connect(self.save_dictionary)
        self.guess_button.clicked.connect(self.guess_again)
        tab = QWidget()
        layout = QVBoxLayout(tab)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.addWidget(view, 1)
        buttons = QHBoxLayout()
        for button in (self.load_dictionary_button, self.save_dictionary_button, self.guess_button):
            buttons.addWidget(button)
        buttons.addStretch(1)
        layout.addLayout(buttons)
        return tab

    def _table_page(self) -> QSplitter:
        """The dictionary and rows tabs above the reading notes."""
        self.tabs = QTabWidget()
        self.tabs.addTab(self._dictionary_tab(), "What each column is")
        self.tabs.addTab(self._rows_view(), "Rows")
        self.tabs.setTabToolTip(0, "The data dictionary: how each column is read and used; "
                                   "double-click a cell to change it.")
        self.tabs.setTabToolTip(1, "The spreadsheet as read (blank = not recorded).")
        self.notes_view = FindingsView()
        self.notes_view.setAccessibleName("Things to check")
        self.notes_view.acted.connect(self._act_on_note)
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
        return splitter

    def _empty_page(self) -> QWidget:
        """What shows before anything is open."""
        empty = QWidget()
        layout = QVBoxLayout(empty)
        layout.addStretch(1)
        hint = QLabel("Open a spreadsheet (CSV, TSV or Excel) to begin,\nor drop the file on "
                      "this window.")
        hint.setAlignment(Qt.AlignCenter)
        hint.setFont(heading_font(self, 1.15))
        layout.addWidget(hint)
        self.big_open = QPushButton("Open spreadsheet…")
        self.big_open.clicked.connect(self.choose_file)
        self.demo_button = with_tooltip(QPushButton("Try the demo cohort"),
                                        "Open the invented cohort of breathless patients that "
                                        "comes with Prunella.")
        big = QHBoxLayout()
        big.addStretch(1)
        big.addWidget(self.big_open)
        big.addWidget(self.demo_button)
        big.addStretch(1)
        layout.addLayout(big)
        layout.addStretch(2)
        return empty

    # --- opening ----------------------------------------------------------------------------

    def choose_file(self) -> None:
        path = ask_open_path(self, "Open a spreadsheet", DATA_FILTER)
        if path:
            self.open_path(path)

    def open_path(self, path: str, sheet: str | None = None,
                  dictionary_path: str | None = None) -> None:
        """Read a data file in the background; the sheet list is read first (it is quick)."""
        if self.reading.busy:
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
        with QSignalBlocker(self.sheet_combo):
            self.sheet_combo.clear()
            self.sheet_combo.addItems(sheets)
            if sheet:
                self.sheet_combo.setCurrentText(sheet)
        self._show_sheet_choice(len(sheets) > 0)
        self._start_reading(path, sheet if sheets else None)

    def _start_reading(self, path: str, sheet: str | None) -> None:
        self._reading_name = f"Reading {Path(path).name}…"
        self.reading.start(read_data, path, sheet, self._dictionary_path, takes_progress=False,
                           done=self._read, failed=self._read_failed)

    def _sheet_chosen(self, sheet: str) -> None:
        if sheet and self.session.table is not None:
            self._start_reading(self.session.table.provenance.path, sheet)

    def _read(self, result) -> None:
        table, dictionary, notes = result
        self.session.set_data(table, dictionary, notes)
        self.opened.emit(table.provenance.path)

    def _read_failed(self, message: str) -> None:
        self.warn(message, "The spreadsheet could not be read")
        self.refresh()  # the file line said what was being read

    def _set_busy(self, busy: bool) -> None:
        self.busy.setVisible(busy)
        for widget in (self.open_button, self.big_open, self.demo_button, self.sheet_combo,
                       self.recent_button, self.load_dictionary_button, self.guess_button):
            widget.setEnabled(not busy)
        if busy:
            self.file_label.setText(self._reading_name)

    def _show_sheet_choice(self, visible: bool) -> None:
        self.sheet_label.setVisible(visible)
        self.sheet_combo.setVisible(visible)

    def set_recent(self, entries: list[tuple[str, str]], opener) -> None:
        """The recent spreadsheets: (path, name as shown)."""
        self.recent_menu.clear()
        for path, shown in entries:
            action = self.recent_menu.addAction(shown)
            action.setToolTip(path)
            action.setData(path)
            action.triggered.connect(lambda _checked=False, p=path: opener(p))
        self.recent_button.setEnabled(bool(entries))

    # --- the dictionary ---------------------------------------------------------------------

    def choose_dictionary(self) -> None:
        if self.session.table is None:
            return
        path = ask_open_path(self, "Load a data dictionary", DICTIONARY_FILTER)
        if path:
            self.load_dictionary_file(path)

    def load_dictionary_file(self, path: str) -> None:
        """Read a saved dictionary over the one inferred from the data, in the background;
        step 2 follows the roles it gives."""
        self._start_dictionary(path, f"Reading {Path(path).name}…", self.session.set_dictionary)

    def guess_again(self) -> None:
        """Infer the dictionary afresh from the data, in the background (step 2's choices
        stay)."""
        table = self.session.table
        self._start_dictionary(None, "Guessing each column again from the data…",
                               lambda dictionary, notes: self.session.set_data(table, dictionary,
                                                                                notes))

    def _start_dictionary(self, path: str | None, what: str, take) -> None:
        table = self.session.table
        if table is None:
            return

        def read(result) -> None:
            dictionary, notes = result
            take(dictionary, tuple(table.provenance.warnings) + tuple(notes))

        self._reading_name = what
        self.reading.start(dictionary_for, table, path, takes_progress=False, done=read,
                           failed=self._dictionary_failed)

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
            with saving(self):
                self.session.dictionary.save(path)
        except OSError as exc:
            self.warn(say("app.not_saved", file=Path(path).name, reason=exc.strerror))
        except InputError as exc:  # the write was refused (no room, no permission)
            self.warn(str(exc))

    def _act_on_note(self, action: str, column: str) -> None:
        """The button beside a proposed missing-value code: read those cells as not recorded
        from now on (the dictionary's codes for 'not recorded'; undone by editing them)."""
        if action != "not_recorded" or self.session.dictionary is None:
            return
        proposal = next((n for n in self.session.notes if getattr(n, "code", "") in
                         PROPOSED_MISSING and n.fields.get("column") == column), None)
        if proposal is None or column not in self.session.dictionary:
            return
        dictionary, note = confirm_missing_codes(self.session.dictionary, column,
                                                 proposal.fields.get("codes", ()))
        notes = tuple(n for n in self.session.notes if n is not proposal) + (note,)
        self.session.set_dictionary(dictionary, notes)

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
            header = table.provenance.header_row
            self.frame_model.set_frame(table.frame, table.row_numbers, header)
            self.rows_caption.setText(ROW_NUMBERS_TIP.format(header=header))
            self._fit_headers()
        self.dictionary_model.set_dictionary(self.session.dictionary)
        p = table.provenance
        sheet = f", sheet {p.sheet}" if p.sheet else ""
        self.file_label.setText(
            f"<b>{Path(p.path).name}</b>{sheet}: {p.n_rows:,} rows, {p.n_columns} columns · "
            f"fingerprint {p.short_fingerprint}")
        self.file_label.setToolTip(f"{p.path}\nSHA-256 (the file's fingerprint): {p.sha256}")
        notes = open_proposals(dict.fromkeys(list(p.warnings) + list(self.session.notes)),
                               self.session.dictionary)
        findings = [note_finding(n) for n in notes]
        if not findings:
            findings = [Finding("note", "Nothing to check: every column was read without "
                                "surprises.")]
        self.notes_view.show_findings("", findings)
        self.notes_title.setText(f"Things to check ({len(notes)})" if notes else "Things to check")

