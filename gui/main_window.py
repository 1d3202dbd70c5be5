"""The window: the six steps down the side, one panel per step, the File and Help menus,
projects (new, open, save), recent files, drag and drop, and the cautions."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QSettings, QSize, Qt
from PySide6.QtGui import QAction, QFont, QIcon, QKeySequence
from PySide6.QtWidgets import (
    QDialog, QFileDialog, QFrame, QHBoxLayout, QLabel, QListWidget, QListWidgetItem, QMainWindow,
    QMessageBox, QPushButton, QStackedWidget, QVBoxLayout, QWidget,
)

from core import __version__
from core.cautions import CAUTION_TITLE, CAUTIONS
from core.errors import InputError
from core.messages import say
from core.phrases import METHOD_NAME
from core.data import read_table
from core.dictionary import dictionary_for
from core.project import PROJECT_SUFFIX, check_data_file, load_project, save_project
from gui.panels.step_panel import (
    ask_open_path, ask_save_path, heading_font, remember_folder, saving,
)
from gui.panels.wording import with_advice
from gui.workers import JobRunner
from gui.work_dialog import WorkPlaceDialog, save_work_place, saved_work_place
from gui.panels.chart import ChartPanel
from gui.panels.checking import CheckingPanel
from gui.panels.data import DATA_FILTER, SPREADSHEET_PATTERNS, DataPanel
from gui.panels.outcome import OutcomePanel
from gui.panels.size import SizePanel
from gui.panels.tree import TreePanel
from gui.resources import ICON, demo_files, is_demo_file
from gui.session import STEP_TITLES, STEPS, Session

PROJECT_FILTER = f"Prunella project (*{PROJECT_SUFFIX})"
OPEN_FILTER = (f"Spreadsheets and projects ({SPREADSHEET_PATTERNS} *{PROJECT_SUFFIX});;"
               f"{DATA_FILTER};;{PROJECT_FILTER}")
MAX_RECENT = 8


def read_for_project(project, path: str):
    """Read a project's data; its saved dictionary is used whole when the file's columns are
    unchanged. The notes are those the first opening listed (what reading and inferring the
    columns found), so reopening shows the same things to check."""
    table = read_table(path, sheet=project.data_sheet)
    inferred, notes = dictionary_for(table, project.dictionary)
    dictionary = project.dictionary
    if dictionary is None or tuple(table.frame.columns) != dictionary.names:
        dictionary = inferred
    return table, dictionary, tuple(table.provenance.warnings) + tuple(notes)


def recent_names(paths: list[str]) -> list[tuple[str, str]]:
    """(path, name as listed) for recent files: the file's name, with its folder when two
    files of the same name are listed."""
    names = [Path(p).name for p in paths]
    return [(p, n if names.count(n) == 1 else f"{n} ({Path(p).parent.name})")
            for p, n in zip(paths, names)]


def window_name(session: Session) -> str:
    """What the window's title names: the project, else the data file open, else a new
    project. The system adds the app's display name after it (" — Prunella"), so the title
    itself never holds it and the name is not said twice."""
    if session.project_path:
        return Path(session.project_path).name
    if session.table is not None:
        return Path(session.table.provenance.path).name
    return "New project"


def cautions_text() -> str:
    return "\n".join(f"• {c}" for c in CAUTIONS)


class MainWindow(QMainWindow):
    def __init__(self, session: Session | None = None) -> None:
        super().__init__()
        self.session = session or Session(self)
        self.settings = QSettings()
        self.session.work_place = saved_work_place(self.settings)
        if ICON.is_file():
            self.setWindowIcon(QIcon(str(ICON)))
        self.setAcceptDrops(True)
        self.project_reading = JobRunner(self)

        self.panels = self._make_panels()
        central = QWidget()
        layout = QHBoxLayout(central)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(0)
        layout.addWidget(self._side())
        layout.addWidget(self._steps_with_navigation(), 1)
        self.setCentralWidget(central)
        self.fingerprints = QLabel()
        self.statusBar().addPermanentWidget(self.fingerprints)
        self.session.status_changed.connect(self._show_status)

        self._make_menus()
        # Every change of the session ends with state_changed (Session._announce).
        self.session.state_changed.connect(self.update_state)
        self.steps.setCurrentRow(0)
        self._restore()
        self.update_state()

    # --- building the window ----------------------------------------------------------------

    def _make_panels(self) -> dict:
        """The panels, one per step, and what they ask of each other."""
        panels = {
            "data": DataPanel(self.session),
            "outcome": OutcomePanel(self.session),
            "size": SizePanel(self.session),
            "tree": TreePanel(self.session),
            "checking": CheckingPanel(self.session),
            "chart": ChartPanel(self.session),
        }
        for panel in panels.values():
            panel.go_to.connect(self.go_to)
        panels["data"].opened.connect(self._remember)
        panels["data"].demo_button.clicked.connect(self.open_demo)
        panels["chart"].choose_size.connect(panels["size"].choose_size)
        return panels

    def _side(self) -> QFrame:
        """The steps down the side, with the first caution under them."""
        self.steps = QListWidget()
        self.steps.setAccessibleName("Steps")
        self.steps.setSpacing(2)
        font = QFont(self.steps.font())
        font.setPointSizeF(font.pointSizeF() * 1.08)
        self.steps.setFont(font)
        for number, step in enumerate(STEPS, start=1):
            item = QListWidgetItem(f"{number}   {STEP_TITLES[step]}")
            item.setData(Qt.UserRole, step)
            item.setSizeHint(QSize(0, self.steps.fontMetrics().height() * 2 + 4))
            self.steps.addItem(item)
        self.steps.currentRowChanged.connect(self._step_chosen)
        self.steps.setFrameShape(QFrame.NoFrame)
        self.steps.setStyleSheet("QListWidget { background: transparent; }")
        self.caution_note = QLabel(f"<b>{CAUTION_TITLE}.</b> {CAUTIONS[0]}")
        self.caution_note.setWordWrap(True)
        self.caution_note.setTextFormat(Qt.RichText)
        self.caution_button = QPushButton("Read the cautions")
        self.caution_button.setToolTip("What a chart from Prunella may and may not be used for.")
        self.caution_button.clicked.connect(self.show_cautions)
        side = QFrame()
        side.setObjectName("side")
        side.setStyleSheet("#side { background: #f1f4f6; border-right: 1px solid #d5dbe0; }")
        layout = QVBoxLayout(side)
        layout.setContentsMargins(8, 12, 8, 12)
        brand = QLabel("Prunella")
        brand.setFont(heading_font(self, 1.6))
        layout.addWidget(brand)
        layout.addWidget(self.steps, 1)
        layout.addWidget(self.caution_note)
        layout.addWidget(self.caution_button)
        side.setFixedWidth(max(210, self.fontMetrics().horizontalAdvance("M") * 17))
        return side

    def _steps_with_navigation(self) -> QWidget:
        """The current step's panel, with Back and Next under it."""
        self.stack = QStackedWidget()
        for step in STEPS:
            self.stack.addWidget(self.panels[step])
        self.back_button = QPushButton("◀  Back")
        self.next_button = QPushButton("Next  ▶")
        self.back_button.clicked.connect(lambda: self._move(-1))
        self.next_button.clicked.connect(lambda: self._move(+1))
        nav = QHBoxLayout()
        nav.setContentsMargins(16, 0, 16, 10)
        nav.addWidget(self.back_button)
        nav.addStretch(1)
        nav.addWidget(self.next_button)
        right = QWidget()
        layout = QVBoxLayout(right)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.stack, 1)
        layout.addLayout(nav)
        return right

    # --- menus ------------------------------------------------------------------------------

    def _action(self, text: str, slot, shortcut=None, tip: str = "") -> QAction:
        action = QAction(text, self)
        if shortcut is not None:
            action.setShortcut(QKeySequence(shortcut))
        if tip:
            action.setStatusTip(tip)
            action.setToolTip(tip)
        action.triggered.connect(slot)
        return action

    def _make_menus(self) -> None:
        menu = self.menuBar().addMenu("&File")
        self.new_action = self._action("&New project", self.new_project, QKeySequence.New,
                                       "Start again with nothing open.")
        self.open_action = self._action("&Open…", self.choose_open, QKeySequence.Open,
                                        "Open a project or a spreadsheet.")
        self.demo_action = self._action("Open the &demo cohort", self.open_demo,
                                        tip="The invented cohort of breathless patients.")
        self.save_action = self._action("&Save project", self.save, QKeySequence.Save,
                                        "Save the settings so the work can be redone exactly.")
        self.save_as_action = self._action("Save project &as…", self.save_as,
                                           QKeySequence.SaveAs)
        self.print_action = self._action("&Print chart…", self.print_chart, QKeySequence.Print)
        self.quit_action = self._action("&Quit", self.close, QKeySequence.Quit)
        self.recent_menu = menu.addMenu("Open &recent")
        menu.insertAction(self.recent_menu.menuAction(), self.new_action)
        menu.insertAction(self.recent_menu.menuAction(), self.open_action)
        menu.addAction(self.demo_action)
        menu.addSeparator()
        menu.addAction(self.save_action)
        menu.addAction(self.save_as_action)
        menu.addSeparator()
        chart = self.panels["chart"]
        export = menu.addMenu("&Export")
        export.addAction(self._action("Chart (PDF)…", chart.export_pdf))
        export.addAction(self._action("Model (JSON)…", chart.export_model))
        export.addAction(self._action("Rules (text)…", chart.export_rules))
        export.addAction(self._action("Scored spreadsheet (CSV)…", chart.export_scored))
        self.export_menu = export
        menu.addAction(self.print_action)
        menu.addSeparator()
        self.work_place_action = self._action(
            "&Where the work runs…", self.choose_work_place,
            tip="This computer's cores (all by default) or a Dask cluster.")
        menu.addAction(self.work_place_action)
        menu.addSeparator()
        menu.addAction(self.quit_action)
        help_menu = self.menuBar().addMenu("&Help")
        help_menu.addAction(self._action("&Cautions…", self.show_cautions))
        help_menu.addAction(self._action("&About Prunella", self.show_about))

    # --- steps ------------------------------------------------------------------------------

    def go_to(self, step: str) -> None:
        self.steps.setCurrentRow(STEPS.index(step))

    def current_step(self) -> str:
        return STEPS[self.stack.currentIndex()]

    def _step_chosen(self, row: int) -> None:
        if row >= 0:
            self.stack.setCurrentIndex(row)
            self._update_nav()

    def _move(self, delta: int) -> None:
        row = min(max(self.steps.currentRow() + delta, 0), len(STEPS) - 1)
        self.steps.setCurrentRow(row)

    def _update_nav(self) -> None:
        row = self.steps.currentRow()
        self.back_button.setEnabled(row > 0)
        self.next_button.setEnabled(row < len(STEPS) - 1)
        if row < len(STEPS) - 1:
            self.next_button.setText(f"Next: {STEP_TITLES[STEPS[row + 1]]}  ▶")
        else:
            self.next_button.setText("Next  ▶")

    def update_state(self) -> None:
        session = self.session
        stale = session.stale_steps()
        for row, step in enumerate(STEPS):
            item = self.steps.item(row)
            text = f"{row + 1}   {STEP_TITLES[step]}"
            if step in stale:
                text += "\n      ⚠ out of date"
                item.setToolTip("The data or choices changed after this was computed; run "
                                "step 3 again.")
            elif not session.ready(step):
                item.setToolTip("Needs the steps before it first.")
            else:
                item.setToolTip("")
            item.setText(text)
            item.setForeground(self.palette().text() if session.ready(step)
                               else self.palette().placeholderText())
        self.setWindowModified(session.dirty)
        self.setWindowTitle(f"{window_name(session)}[*]")  # Qt adds " — Prunella" once
        parts = []
        if session.table is not None:
            parts.append(f"Data {session.table.provenance.short_fingerprint}")
        if session.model is not None:
            parts.append(f"Tree {session.model.fingerprint[:12]}")
        self.fingerprints.setText("  ·  ".join(parts))
        self.fingerprints.setToolTip("Fingerprints (SHA-256) of the data file and of the tree: "
                                     "the same numbers mean exactly the same file and tree.")
        has_tree = session.model is not None
        self.print_action.setEnabled(has_tree)
        self.export_menu.setEnabled(has_tree)
        self._update_nav()

    # --- opening ----------------------------------------------------------------------------

    def _show_status(self, text: str, milliseconds: int) -> None:
        if text:
            self.statusBar().showMessage(text, milliseconds)
        else:
            self.statusBar().clearMessage()

    def choose_open(self) -> None:
        if not self._may_discard():
            return
        path = ask_open_path(self, "Open a spreadsheet or a project", OPEN_FILTER)
        if path:
            self.open_any(path, asked=True)

    def open_any(self, path: str, asked: bool = False) -> None:
        if not asked and not self._may_discard():
            return
        if path.lower().endswith(PROJECT_SUFFIX):
            self.open_project(path)
        else:
            self.go_to("data")
            self.session.project_path = None
            self.panels["data"].open_path(path)

    def open_demo(self) -> None:
        try:
            data, dictionary = demo_files()
        except InputError as exc:
            QMessageBox.warning(self, "Prunella", with_advice(str(exc)))
            return
        self.go_to("data")
        self.panels["data"].open_path(str(data), dictionary_path=str(dictionary))

    def open_project(self, path: str) -> None:
        """Read the project, check its data file's fingerprint, read the data, then rerun."""
        try:
            project = load_project(path)
        except InputError as exc:
            QMessageBox.warning(self, "The project could not be opened", with_advice(str(exc)))
            return
        if project.data_path is None:
            self.session.apply_project(project, None, None)
            self.session.mark_saved(path)
            self._remember(path)
            return
        check = check_data_file(project)
        data_path = project.data_path
        if not check.exists:
            QMessageBox.warning(self, "The data file has moved", with_advice(check.message))
            data_path, _ = QFileDialog.getOpenFileName(self, "Find the project's data file",
                                                       str(Path(path).parent), DATA_FILTER)
            if not data_path:
                return
            check = check_data_file(project, data_path)
        if check.exists and not check.same:
            QMessageBox.warning(self, "The data file has changed", with_advice(check.message))
        self.session.set_status(f"Reading {Path(data_path).name}…")
        self.project_reading.start(read_for_project, project, data_path, takes_progress=False,
                                   done=lambda result: self._project_data_read(
                                       project, path, check, result),
                                   failed=self._project_failed)

    def _project_data_read(self, project, path: str, check, result) -> None:
        table, dictionary, notes = result
        self.session.apply_project(project, table, dictionary, notes)
        if not check.same:
            self.session.expected_fingerprint = None  # a changed file makes another tree
        self.session.mark_saved(path)
        self._remember(path)
        self.session.set_status(check.message, 8000)
        if self.session.request() is not None:
            self.go_to("size")
            self.panels["size"].run()

    def _project_failed(self, message: str) -> None:
        self.session.set_status("")
        QMessageBox.warning(self, "The project's data could not be read", with_advice(message))

    # --- saving -----------------------------------------------------------------------------

    def save(self) -> bool:
        if self.session.project_path is None:
            return self.save_as()
        return self._save_to(self.session.project_path)

    def save_as(self) -> bool:
        # Saving over the project itself is what Save does; only the data is protected.
        path = ask_save_path(self, self.session, "Save the project", PROJECT_FILTER,
                             PROJECT_SUFFIX, PROJECT_SUFFIX, start=self.session.project_path,
                             protect_project=False)
        return False if path is None else self._save_to(path)

    def _save_to(self, path: str) -> bool:
        try:
            with saving(self):
                save_project(self.session.to_project(), path)
        except OSError as exc:
            QMessageBox.warning(self, "The project could not be saved", with_advice(
                say("app.not_saved", file=Path(path).name, reason=exc.strerror)))
            return False
        except InputError as exc:  # the write was refused (no room, no permission)
            QMessageBox.warning(self, "The project could not be saved", with_advice(str(exc)))
            return False
        self.session.mark_saved(path)
        self._remember(path)
        self.session.set_status(f"Saved {Path(path).name}.", 5000)
        return True

    def new_project(self) -> None:
        if self._may_discard():
            self.session.clear()
            self.go_to("data")

    def _may_discard(self) -> bool:
        """Ask before unsaved work is lost: save it, throw it away, or stay."""
        if not self.session.dirty:
            return True
        answer = QMessageBox.question(
            self, "Unsaved changes", "The project has changes that are not saved. Save them?",
            QMessageBox.Save | QMessageBox.Discard | QMessageBox.Cancel, QMessageBox.Save)
        if answer == QMessageBox.Save:
            return self.save()
        return answer == QMessageBox.Discard

    def print_chart(self) -> None:
        self.go_to("chart")
        self.panels["chart"].print_chart()

    # --- recent files and window geometry ----------------------------------------------------

    def recent_files(self) -> list[str]:
        """The files opened lately, newest first, each once (by its resolved path)."""
        value = self.settings.value("recent", [])
        if isinstance(value, str):
            value = [value]
        return list(dict.fromkeys(str(Path(v).resolve()) for v in (value or []) if v))

    def _remember(self, path: str) -> None:
        path = str(Path(path).resolve())
        if not is_demo_file(path):  # the open dialog starts where the user's own files are
            remember_folder(path)
        recent = [p for p in self.recent_files() if p != path]
        recent.insert(0, path)
        self.settings.setValue("recent", recent[:MAX_RECENT])
        self._fill_recent()

    def _fill_recent(self) -> None:
        self.recent_menu.clear()
        recent = [p for p in self.recent_files() if Path(p).exists()]
        for path, shown in recent_names(recent):
            action = self.recent_menu.addAction(shown)
            action.setToolTip(path)
            action.triggered.connect(lambda _checked=False, p=path: self.open_any(p))
        self.recent_menu.setEnabled(bool(recent))
        data_recent = [p for p in recent if not p.lower().endswith(PROJECT_SUFFIX)]
        self.panels["data"].set_recent(recent_names(data_recent), self.open_any)

    def _restore(self) -> None:
        geometry = self.settings.value("window/geometry")
        if geometry is not None:
            self.restoreGeometry(geometry)
        else:
            screen = self.screen().availableGeometry() if self.screen() else None
            width, height = 1280, 800
            if screen is not None:
                width, height = min(width, screen.width()), min(height, screen.height())
            self.resize(width, height)
        self._fill_recent()

    def closeEvent(self, event) -> None:  # noqa: N802
        if not self._may_discard():
            event.ignore()
            return
        for panel in self.panels.values():
            panel.stop_work()
        self.panels["chart"].discard_previews()
        self.project_reading.forget()
        self.settings.setValue("window/geometry", self.saveGeometry())
        self.settings.sync()
        event.accept()

    # --- drag and drop ----------------------------------------------------------------------

    def dragEnterEvent(self, event) -> None:  # noqa: N802
        urls = event.mimeData().urls()
        if len(urls) == 1 and urls[0].isLocalFile():
            event.acceptProposedAction()

    def dropEvent(self, event) -> None:  # noqa: N802
        urls = event.mimeData().urls()
        if urls and urls[0].isLocalFile():
            event.acceptProposedAction()
            self.open_any(urls[0].toLocalFile())

    # --- cautions ---------------------------------------------------------------------------

    def show_cautions(self) -> None:
        QMessageBox.information(self, CAUTION_TITLE, cautions_text())

    def first_start(self) -> None:
        """Show the cautions once, on the first start on this computer."""
        if self.settings.value("cautions_seen", False, type=bool):
            return
        self.show_cautions()
        self.settings.setValue("cautions_seen", True)

    def choose_work_place(self) -> None:
        """File ▸ Where the work runs: kept in the app's settings for the next runs."""
        dialog = WorkPlaceDialog(self.session.work_place, self)
        if dialog.exec() == QDialog.DialogCode.Accepted:
            self.session.work_place = dialog.place()
            save_work_place(self.settings, self.session.work_place)

    def show_about(self) -> None:
        QMessageBox.about(
            self, "About Prunella",
            f"<h3>Prunella {__version__}</h3><p>Small, honest decision trees from a spreadsheet "
            "of past patients: grown, pruned by cross-validated error, checked on patients they "
            "never saw, and printed as a one-page chart.</p>"
            f"<p>The method: {METHOD_NAME}.</p>"
            f"<p><b>{CAUTION_TITLE}.</b></p><ul>"
            + "".join(f"<li>{c}</li>" for c in CAUTIONS) + "</ul>")
