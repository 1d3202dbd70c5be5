"""Step 6, the chart: title, subtitle, paper, orientation and smallest text; a preview that is
the real PDF page (rendered by QtPdf from the file that will be printed); Export PDF, Print,
and the model, its rules and a scored spreadsheet as files. The cautions stand beside it."""

from __future__ import annotations

from dataclasses import dataclass
from html import escape
from pathlib import Path

from PySide6.QtCore import Qt, QTemporaryDir, QTimer, Signal
from PySide6.QtPdf import QPdfDocument
from PySide6.QtPrintSupport import QPrintDialog, QPrinter
from PySide6.QtWidgets import (
    QCheckBox, QComboBox, QDialog, QDoubleSpinBox, QFormLayout, QGroupBox, QHBoxLayout, QLabel,
    QLineEdit, QPushButton, QStackedWidget, QVBoxLayout, QWidget,
)

from core.cautions import CAUTION_TITLE, CAUTIONS
from core.chart import ChartOptions, ChartTooLarge, write_chart
from core.errors import InputError
from core.messages import app_wording, say
from core.model import scored_table
from core.safe_files import write_bytes_atomic, write_csv_safely, write_text_atomic
from gui.binding import Bindings
from gui.panels.step_panel import (
    StepPanel, heading_font, saving, scrolling, side_by_side, tool_buttons, with_tooltip,
)
from gui.panels.wording import warning_html, whose_check
from gui.widgets.chart_printing import chart_plan, page_layout, print_plan
from gui.widgets.pdf_preview import PdfPreview

PAPERS = (("A4", "a4"), ("US Letter", "letter"), ("A3", "a3"), ("Tabloid", "tabloid"))
ORIENTATIONS = (("Best fit for the tree", "auto"), ("Portrait (upright)", "portrait"),
                ("Landscape (sideways)", "landscape"))
FORMS = (("Tree of boxes and arrows", "tree"), ("Numbered rules, one row per box", "rules"))


@dataclass(frozen=True)
class ChartResult:
    """A drawn chart (its file), or why it could not be drawn and the size that would fit."""

    path: str | None
    message: str = ""
    largest_fitting: int | None = None
    target: str = ""  # the file it was asked to write (names the request it answers)


def draw_chart(model, options: ChartOptions, path: str) -> ChartResult:
    """Write the one-page chart PDF of ``model`` with core.chart. Runs in a worker."""
    if not Path(path).parent.is_dir():  # the window closed meanwhile: leave no folder behind
        return ChartResult(None, "", target=path)
    try:
        write_chart(model, path, options)
    except ChartTooLarge as exc:
        return ChartResult(None, str(exc), exc.largest_fitting, target=path)
    return ChartResult(path, target=path)


def cautions_widget(parent=None) -> QWidget:
    box = QGroupBox(CAUTION_TITLE, parent)
    box.setObjectName("cautions")
    box.setStyleSheet("#cautions { font-weight: bold; }")
    layout = QVBoxLayout(box)
    for sentence in CAUTIONS:
        label = QLabel("•  " + sentence)
        label.setWordWrap(True)
        label.setStyleSheet("font-weight: normal;")
        layout.addWidget(label)
    return box


class ChartPanel(StepPanel):
    step = "chart"
    choose_size = Signal(int)  # the largest size that fits, for step 3 to take
    intro = ("The one-page chart to print and pin up. The preview is the PDF itself, exactly "
             "as it will print.")

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self.bindings = Bindings()
        self._temp: QTemporaryDir | None = None  # made at the first preview, removed on closing
        self._serial = 0
        self.pdf_path: str | None = None  # the file the preview shows
        self.preview_error: str | None = None
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(350)  # wait for typing to pause
        self._timer.timeout.connect(self.render_preview)
        self._outdated = True  # the preview does not show the current tree and options yet
        self._after_render = None  # (action, title) waiting for the chart to be drawn
        self._fitting: int | None = None
        self.drawing = self.runner(latest_wins=True)  # the newest options are drawn
        splitter = side_by_side(self._options_side(), self._preview_side(), stretch=(0, 1),
                                sizes=(360, 800))
        self.add_tree_content(splitter)
        self._bind()
        session.chart_changed.connect(self.bindings.show)
        session.chart_changed.connect(self.schedule_preview)
        session.checks_changed.connect(self.schedule_preview)
        session.result_changed.connect(self.refresh)
        session.chosen_changed.connect(self.refresh)
        self.bindings.show()
        self.refresh()

    def _options_side(self) -> QWidget:
        """The chart's options, Export and Print, the cautions and the other files."""
        self.title_edit = with_tooltip(QLineEdit(), "The chart's heading; leave blank for one "
                                       "made from the outcome.")
        self.subtitle_edit = with_tooltip(QLineEdit(), "A second line, such as the population "
                                          "and where the chart applies; leave blank for the "
                                          "default.")
        self.paper_combo = with_tooltip(QComboBox(), "The sheet the chart is printed on.")
        self.orientation_combo = with_tooltip(QComboBox(), "Upright or sideways; 'best fit' "
                                              "chooses whichever suits the tree's shape.")
        self.form_combo = with_tooltip(QComboBox(), "The tree drawn as boxes and arrows, or "
                                       "as numbered rules: each outcome box as a row beside the "
                                       "answers that lead to it, for a tree too large to draw "
                                       "legibly.")
        self.min_text = with_tooltip(QDoubleSpinBox(), "No text on the chart is smaller than "
                                     "this (in points); a tree too big to fit at this size is "
                                     "refused.")
        self.min_text.setRange(5.5, 40.0)  # 5.5 stands for "usual": core refuses below 6
        self.min_text.setSingleStep(0.5)
        self.min_text.setDecimals(1)
        self.min_text.setSuffix(" pt")
        self.min_text.setSpecialValueText("usual for the paper")
        form = QFormLayout()
        form.setFieldGrowthPolicy(QFormLayout.AllNonFixedFieldsGrow)
        form.addRow("Title:", self.title_edit)
        form.addRow("Subtitle:", self.subtitle_edit)
        form.addRow("Paper:", self.paper_combo)
        form.addRow("Orientation:", self.orientation_combo)
        form.addRow("Smallest text:", self.min_text)
        form.addRow("Form:", self.form_combo)
        self.file_name_box = with_tooltip(
            QCheckBox("Print the data file's name"), "Off by default: a file's name may hold a "
            "patient's name, a date of birth or a record number. The data's fingerprint is "
            "always printed, so the chart can be matched to its file.")
        form.addRow("", self.file_name_box)
        options = QGroupBox("The chart")
        options.setLayout(form)
        self.export_button = with_tooltip(QPushButton("Export PDF…"), "Save the chart as a PDF "
                                          "file.")
        self.print_button = with_tooltip(QPushButton("Print…"), "Print the chart through the "
                                         "system's print dialog, as sharp as the PDF.")
        self.model_button = with_tooltip(QPushButton("Model (JSON)…"), "Save the tree as a "
                                         "model file that Prunella's command line can score "
                                         "patients with.")
        self.rules_button = with_tooltip(QPushButton("Rules (text)…"), "Save the tree as "
                                         "numbered IF … THEN rules in plain text.")
        self.scored_button = with_tooltip(QPushButton("Scored spreadsheet…"), "Save the data "
                                          "with each row's outcome box and prediction added "
                                          "(CSV).")
        self.export_button.clicked.connect(self.export_pdf)
        self.print_button.clicked.connect(self.print_chart)
        self.model_button.clicked.connect(self.export_model)
        self.rules_button.clicked.connect(self.export_rules)
        self.scored_button.clicked.connect(self.export_scored)
        main_buttons = QHBoxLayout()
        main_buttons.addWidget(self.export_button)
        main_buttons.addWidget(self.print_button)
        other = QGroupBox("Other files")
        other_layout = QVBoxLayout(other)
        for button in (self.model_button, self.rules_button, self.scored_button):
            other_layout.addWidget(button)
        self.message = QLabel("")
        self.message.setWordWrap(True)
        self.message.setTextInteractionFlags(Qt.TextSelectableByMouse)
        left = QWidget()
        layout = QVBoxLayout(left)
        layout.setContentsMargins(0, 0, 6, 0)
        layout.addWidget(options)
        layout.addLayout(main_buttons)
        layout.addWidget(self.message)
        # Which tree the chart is of, and which tree its check was made on.
        self.whose = QLabel("")
        self.whose.setWordWrap(True)
        self.whose.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.whose.setAccessibleName("Which tree the chart and its check belong to")
        layout.addWidget(self.whose)
        layout.addWidget(cautions_widget())
        layout.addWidget(other)
        layout.addStretch(1)
        scroll = scrolling(left)
        scroll.setMinimumWidth(330)
        return scroll

    def _preview_side(self) -> QWidget:
        """The page as printed (zoomable), or why it cannot be drawn."""
        self.document = QPdfDocument(self)
        self.pdf_view = PdfPreview(self.document)
        self.pdf_view.setAccessibleName("Chart preview")
        self.pdf_view.setToolTip("The chart exactly as it will print (the PDF file itself); "
                                 "Ctrl and the mouse wheel zoom.")
        self.preview_note = QLabel("")
        self.preview_note.setAlignment(Qt.AlignCenter)
        self.preview_note.setWordWrap(True)
        self.preview_note.setFont(heading_font(self, 1.05))
        self.fit_button = with_tooltip(QPushButton(), "Take the largest tree of the pruning "
                                       "sequence that fits on this paper at this text size.")
        self.fit_button.hide()
        self.fit_button.clicked.connect(self._choose_fitting)
        note_page = QWidget()
        note_layout = QVBoxLayout(note_page)
        note_layout.addStretch(1)
        note_layout.addWidget(self.preview_note)
        note_layout.addWidget(self.fit_button, 0, Qt.AlignHCenter)
        note_layout.addStretch(1)
        self.preview_stack = QStackedWidget()
        self.preview_stack.addWidget(note_page)
        self.preview_stack.addWidget(self.pdf_view)
        zoom = QHBoxLayout()
        tool_buttons(zoom, (("Zoom in", "Enlarge the page to read it (Ctrl and the mouse "
                             "wheel).", self.pdf_view.zoom_in),
                            ("Zoom out", "Make the page smaller.", self.pdf_view.zoom_out),
                            ("Whole page", "Show the whole page.", self.pdf_view.fit)))
        zoom.addStretch(1)
        self.zoom_row = QWidget()  # shown with the page only
        self.zoom_row.setLayout(zoom)
        zoom.setContentsMargins(0, 0, 0, 0)
        self.preview_stack.currentChanged.connect(
            lambda index: self.zoom_row.setVisible(index == 1))
        self.zoom_row.hide()
        side = QWidget()
        layout = QVBoxLayout(side)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.zoom_row)
        layout.addWidget(self.preview_stack, 1)
        return side

    # --- options ----------------------------------------------------------------------------

    def _bind(self) -> None:
        s, bind = self.session, self.bindings.bind
        bind(self.title_edit, lambda: s.chart.title,
             lambda text: s.set_chart(title=text if text.strip() else None))
        bind(self.subtitle_edit, lambda: s.chart.subtitle,
             lambda text: s.set_chart(subtitle=text if text.strip() else None))
        bind(self.paper_combo, lambda: s.chart.paper, lambda code: s.set_chart(paper=code),
             lambda: PAPERS)
        bind(self.orientation_combo, lambda: s.chart.orientation,
             lambda code: s.set_chart(orientation=code), lambda: ORIENTATIONS)
        bind(self.form_combo, lambda: s.chart.form, lambda code: s.set_chart(form=code),
             lambda: FORMS)
        bind(self.file_name_box, lambda: s.chart.show_file_name,
             lambda shown: s.set_chart(show_file_name=bool(shown)))
        bind(self.min_text, lambda: s.chart.min_text,
             lambda size: s.set_chart(min_text=None if size == self.min_text.minimum()
                                      else float(size)))

    # --- the preview ------------------------------------------------------------------------

    def refresh(self) -> None:
        has_tree = self.show_tree_content()
        for button in (self.export_button, self.print_button, self.model_button,
                       self.rules_button, self.scored_button):
            button.setEnabled(has_tree)
        if not has_tree:
            self.document.close()
            self.pdf_path = None
            self.message.setText("")
            return
        self.schedule_preview()

    def schedule_preview(self) -> None:
        """Draw the preview soon, but only while the step is on screen (drawing takes a
        moment; export and print draw it if it is missing)."""
        self._say_whose()
        self._outdated = True
        if self.session.model is not None and self.isVisible():
            self._timer.start()

    def _say_whose(self) -> None:
        if self.session.model is None:
            self.whose.setText("")
            return
        words, earlier = whose_check(self.session)
        self.whose.setText(warning_html(words) if earlier else escape(words))

    def showEvent(self, event) -> None:  # noqa: N802
        super().showEvent(event)
        if self._outdated and self.session.model is not None:
            self._timer.start()

    def render_preview(self) -> None:
        """Write the chart to a fresh temporary PDF in the background, then show that file;
        options changed meanwhile are drawn next (the older drawing is dropped)."""
        if self.session.chosen is None:
            return
        self._serial += 1
        self._outdated = False
        path = str(self._preview_folder() / f"preview-{self._serial}.pdf")
        self.preview_note.setText("Drawing the chart…")
        self.drawing.start(draw_chart, self.session.chart_derivation().model, self.session.chart,
                           path, takes_progress=False, done=self._preview_ready,
                           failed=self._preview_failed)

    def _preview_ready(self, result: ChartResult) -> None:
        if result.path is None:  # too big for the page at this text size
            self._preview_failed(result.message)
            self._fitting = result.largest_fitting
            if result.largest_fitting is not None:
                self.fit_button.setText(f"Choose {result.largest_fitting} outcome boxes")
                self.fit_button.show()
            return
        self.fit_button.hide()
        self.export_button.setEnabled(True)
        self.print_button.setEnabled(True)
        self.document.close()
        self.document.load(result.path)
        self.pdf_path = result.path
        for old in Path(result.path).parent.glob("preview-*.pdf"):  # only the shown one is kept
            if str(old) != result.path:
                old.unlink(missing_ok=True)
        self.preview_error = None
        self.preview_stack.setCurrentIndex(1)
        self.message.setText("")
        self._render_over()

    def _preview_folder(self) -> Path:
        """The temporary folder the previews are drawn into (one per panel, made when first
        needed)."""
        if self._temp is None or not self._temp.isValid() or not Path(self._temp.path()).is_dir():
            self._temp = QTemporaryDir()
        return Path(self._temp.path())

    def discard_previews(self) -> None:
        """Remove the preview folder and its file (the window calls this on closing), so no
        empty folder is left in the system's temporary place."""
        self.drawing.forget()
        self.document.close()
        self.pdf_path = None
        self._outdated = True
        if self._temp is not None:
            self._temp.remove()
            self._temp = None

    def _choose_fitting(self) -> None:
        if self._fitting is not None:
            self.choose_size.emit(self._fitting)

    def _preview_failed(self, message: str) -> None:
        # Nothing to export or print: the reason is shown where the page would be.
        self.export_button.setEnabled(False)
        self.print_button.setEnabled(False)
        self.document.close()
        self.pdf_path = None
        self.preview_error = message
        self.preview_note.setText(app_wording(message) or message)  # not the command line's
        self.preview_stack.setCurrentIndex(0)
        self._render_over()

    def _render_over(self) -> None:
        waiting, self._after_render = self._after_render, None
        if waiting is None:
            return
        if self._outdated:  # options changed while drawing: draw again, then act
            self._after_render = waiting
            self._timer.start()
            return
        action, title = waiting
        if self.pdf_path is not None:
            action()
        else:
            self.warn(self.preview_error or say("app.chart_not_drawn"), title)

    @property
    def preview_busy(self) -> bool:
        """Drawing is due or under way (until its result has been shown, on this thread)."""
        return self._timer.isActive() or self.drawing.busy

    # --- files ------------------------------------------------------------------------------

    def _save_name(self, caption: str, suffix: str, filter_text: str) -> str | None:
        return self.ask_save_path(caption, filter_text,
                                  f"-{self.session.model.outcome.name}{suffix}", suffix)

    def _with_pdf(self, action, title: str) -> None:
        """Run ``action`` on the current chart, drawing it first if it is not drawn yet."""
        if self.session.model is None:
            return
        if self.pdf_path is not None and not self._outdated and not self.preview_busy:
            action()
            return
        if not self._outdated and not self.preview_busy and self.preview_error:
            self.warn(self.preview_error, title)  # it was drawn, and it cannot be
            return
        self._after_render = (action, title)
        self._timer.stop()
        self.render_preview()

    def export_pdf(self) -> None:
        self._with_pdf(self._export_pdf, "No chart to save")

    def _export_pdf(self) -> None:
        target = self._save_name("Save the chart", ".pdf", "PDF (*.pdf)")
        if target:
            self._copy_pdf(target)

    def _copy_pdf(self, target: str) -> None:
        try:  # the preview file is complete: its bytes are the chart
            with saving(self):
                write_bytes_atomic(target, Path(self.pdf_path).read_bytes())
        except OSError as exc:
            self.warn(say("app.not_saved", file=Path(target).name, reason=exc.strerror))
            return
        except InputError as exc:  # the write was refused (no room, no permission)
            self.warn(str(exc))
            return
        self.message.setText(f"Saved {Path(target).name}.")

    def print_chart(self) -> None:
        self._with_pdf(self._print_chart, "No chart to print")

    def _print_chart(self) -> None:
        plan = chart_plan(self.session.chart_derivation().model, self.session.chart)
        printer = QPrinter(QPrinter.HighResolution)
        printer.setPageLayout(page_layout(plan))
        printer.setDocName(plan.text.title)
        dialog = QPrintDialog(printer, self)
        dialog.setWindowTitle("Print the chart")
        if dialog.exec() != QDialog.Accepted:
            return
        self.print_to(printer, plan)

    def print_to(self, printer: QPrinter, plan=None) -> None:
        """Print the chart on ``printer`` as vector text and shapes (the chart's own page
        plan, painted by QPainter), scaled to the printer's paper if it is another."""
        if plan is None:
            plan = chart_plan(self.session.chart_derivation().model, self.session.chart)
        if not print_plan(plan, printer):
            self.warn(say("app.printer_failed"))
            return
        self.message.setText("Sent to the printer.")

    def export_model(self) -> None:
        target = self._save_name("Save the model", ".json", "Prunella model (*.json)")
        if target:
            model = self.session.chart_derivation().model  # with the check it records
            self._write(lambda: model.save(target), target)

    def export_rules(self) -> None:
        target = self._save_name("Save the rules", ".txt", "Text (*.txt)")
        if target:
            self._write(lambda: write_text_atomic(target, self.session.model.rules()), target)

    def export_scored(self) -> None:
        if self.session.table is None:
            return
        target = self._save_name("Save the scored spreadsheet", ".csv", "CSV (*.csv)")
        if not target:
            return

        notes: list[str] = []

        def write() -> None:
            table, raised = scored_table(self.session.model, self.session.table.frame)
            write_csv_safely(table, target)
            notes.extend(raised)

        if self._write(write, target) and notes:
            # What scoring had to decide about the values (as the command line prints it).
            self.message.setText(f"<p>Saved {escape(Path(target).name)}.</p>"
                                 + "".join(warning_html(n) for n in dict.fromkeys(notes)))

    def _write(self, action, target: str) -> bool:
        try:
            with saving(self):
                action()
        except InputError as exc:
            self.warn(str(exc))
            return False
        except OSError as exc:
            self.warn(say("app.not_saved", file=Path(target).name, reason=exc.strerror))
            return False
        self.message.setText(f"Saved {Path(target).name}.")
        return True

