"""Step 5, checking it: how the chosen tree does on patients it was not grown on — the
cross-validated error of its size beside the training error; the check on patients set aside
before growing or from another file (measures with intervals, calibration by box, ROC); the
honest error of the whole procedure (nested cross-validation); bootstrap stability; and the
methods report. Every number comes from core (validate, nested, stability, report)."""

from __future__ import annotations

from dataclasses import replace
from html import escape
from pathlib import Path

from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg
from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QCheckBox, QFrame, QGroupBox, QHBoxLayout, QLabel, QProgressBar, QPushButton,
    QSizePolicy, QSpinBox, QVBoxLayout, QWidget,
)

from core.cautions import UNCHECKED_BANNER, UNCHECKED_DETAIL
from core.checking import (
    DEFAULT_OUTER_FOLDS, DEFAULT_RESAMPLES, ClassificationMeasures, bootstrap_stability,
    check_table, nested_cross_validate,
)
from core.data import read_table
from core.model import error_text
from core.option_limits import spin_range
from core.phrases import plural, shared_patients, short_fingerprint
from core.safe_files import save_notes
from core.report import (
    DECISION_CURVE_READING, calibration_figure, decision_curve_figure, prepare_report,
    roc_figure, stability_figure, write_report,
)
from gui.binding import Bindings
from gui.panels.data import DATA_FILTER
from gui.panels.step_panel import (
    Banner, StepPanel, ask_open_path, scrolling, show_save_notes, with_tooltip,
)
from gui.panels.wording import SIZE_RULES, errors_beside, warning_html, whose_check


def _table(rows: list[tuple[str, str]], header: tuple[str, str] | None = None) -> str:
    head = (f"<tr><th align='left'>{escape(header[0])}</th><th align='left'>"
            f"{escape(header[1])}</th></tr>") if header else ""
    body = "".join(f"<tr><td>{escape(a)}</td><td><b>{escape(b)}</b></td></tr>" for a, b in rows)
    return f"<table cellpadding='3' cellspacing='0'>{head}{body}</table>"


def cross_validated_html(model) -> str:
    chosen, path = model.chosen, model.path
    folds = path.get("folds")
    return _table([
        ("Size", f"{plural(int(chosen['leaves']), 'outcome box', 'outcome boxes')} "
                 f"({SIZE_RULES[chosen['rule']]})"),
        ("Error measured as", model.error_measure),
        ("Error", errors_beside(model, sentence=True)),
        ("How it was checked", path["cv"] + (f", {folds} fits on parts of the data" if folds else "")),
        ("Grown on", model.rows_counted),
    ])


def check_html(result) -> str:
    """One check on separate patients: where from, how many, measures, confusion, calibration."""
    m = result.measures
    parts = [f"<p><b>{escape(result.source_and_file[0].upper() + result.source_and_file[1:])}</b>: "
             f"{result.counted} checked, on the tree with fingerprint "
             f"{short_fingerprint(result.model_fingerprint)}.</p>"]
    # Where the overlap cannot be told here (None), the check's own warning says so, once.
    if result.separate is False:
        parts.append(f"<p><b>Not a check on separate patients:</b> "
                     f"{shared_patients(result.overlap_patients)}.</p>")
    if result.n_excluded:
        parts.append(f"<p>{result.n_excluded:,} of {result.n_rows:,} rows were left out (outcome "
                     "not recorded or not a class the tree knows).</p>")
    if result.columns is not None:
        parts.append("<p>" + "<br>".join(escape(line) for line in result.columns.lines()) + "</p>")
    for warning in result.warnings:
        parts.append(warning_html(warning))
    parts.append(_table(m.rows(), ("Measure", "Value (95% interval)")))
    if isinstance(m, ClassificationMeasures):
        head = "".join(f"<th align='right'>{escape(c)}</th>" for c in m.classes)
        rows = "".join(f"<tr><td>{escape(label)}</td>" +
                       "".join(f"<td align='right'>{v:,}</td>" for v in row) + "</tr>"
                       for label, row in zip(m.classes, m.confusion))
        parts.append("<p><b>Who was sorted where</b> (rows: what happened; columns: what the "
                     f"tree said)</p><table cellpadding='3' border='1' cellspacing='0'>"
                     f"<tr><th></th>{head}</tr>{rows}</table>")
    if m.calibration:
        percent = isinstance(m, ClassificationMeasures)
        what = "rate" if percent else "mean"
        rows = []
        for r in m.calibration:
            places = getattr(m, "decimals", None)
            derived = r.derivation_text(percent, places)
            flag = {True: "inside", False: "OUTSIDE", None: "—"}[r.agrees]
            rows.append(f"<tr><td align='right'>{r.box}</td><td>{escape(r.label)}</td>"
                        f"<td align='right'>{derived} of {r.derivation_n:,}</td>"
                        f"<td>{escape(r.observed_text(percent, places))} of {r.n:,}</td>"
                        f"<td>{flag}</td></tr>")
        parts.append(f"<p><b>Calibration by outcome box</b>: the derivation {what} against the "
                     f"new patients' {what} with its 95% interval.</p><table cellpadding='3' "
                     "border='1' cellspacing='0'><tr><th>Box</th><th>Outcome</th>"
                     "<th>At derivation</th><th>New patients</th><th>Derivation value</th>"
                     "</tr>" + "".join(rows) + "</table>")
    return "\n".join(parts)


def read_and_check(model, path: str, leave_out_overlap: bool = False):
    """Read an external file and check the tree on it (core.checking). Runs in a worker."""
    return check_table(model, read_table(path), leave_out_overlap=leave_out_overlap)


def _figure_canvas(figure) -> FigureCanvasQTAgg:
    canvas = FigureCanvasQTAgg(figure)
    width, height = figure.get_size_inches()
    scale = min(1.0, 4.2 / width)  # core draws for a printed page; a panel column is narrower
    dpi = canvas.logicalDpiX() or 96
    canvas.setFixedSize(int(width * scale * dpi), int(height * scale * dpi))
    canvas.setSizePolicy(QSizePolicy.Fixed, QSizePolicy.Fixed)
    return canvas


class CheckingPanel(StepPanel):
    step = "checking"
    intro = ("How well the chosen tree does on patients it was not grown on. Cross-validation "
             "estimates it from the derivation data; patients set aside before growing, or from "
             "another site or period, check it for real.")

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self._shown: dict[str, object] = {}  # what each part shows now (to redraw only changes)
        self.bindings = Bindings()
        # Long work: one at a time, with progress and Cancel, shown only while it runs.
        self.progress = QProgressBar()
        self.cancel_button = with_tooltip(QPushButton("Cancel"), "Stop the computation; "
                                          "nothing is lost.")
        self.status = QLabel("")
        self.status.setWordWrap(True)
        work_row = QHBoxLayout()
        work_row.addWidget(self.progress, 1)
        work_row.addWidget(self.cancel_button)
        self.body.addLayout(work_row)
        self.body.addWidget(self.status)
        self.whose = Banner("⚠")  # a check on screen that belongs to an earlier tree
        self.body.addWidget(self.whose)
        self.work = self.runner(progress=self.progress, cancel_button=self.cancel_button,
                                hide_when_idle=True)
        self.work.busy_changed.connect(self._enable)
        inner = QWidget()
        inner_layout = QVBoxLayout(inner)
        inner_layout.setContentsMargins(0, 0, 6, 0)
        for box in (self._cv_box(), self._checks_box(), self._nested_box(),
                    self._stability_box(), self._report_box()):
            inner_layout.addWidget(box)
        inner_layout.addStretch(1)
        self.add_tree_content(scrolling(inner, across=True))  # wide tables may scroll sideways
        session.result_changed.connect(self._tree_changed)
        session.chosen_changed.connect(self._tree_changed)
        session.checks_changed.connect(self.refresh)
        self.refresh()

    # --- building the step ------------------------------------------------------------------

    def _cv_box(self) -> QGroupBox:
        """Cross-validation of this size."""
        self.cv_label = QLabel()
        self.cv_label.setTextFormat(Qt.RichText)
        self.cv_label.setWordWrap(True)
        self.cv_label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        box = QGroupBox("Cross-validated performance of this size")
        box.setToolTip("Cross-validation: the tree is regrown without part of the patients "
                       "and tested on that part, in turn.")
        QVBoxLayout(box).addWidget(self.cv_label)
        return box

    def _checks_box(self) -> QGroupBox:
        """Checks on separate patients: set aside before growing, or another file."""
        self.unchecked = Banner("⚠")
        self.checks_area = QVBoxLayout()
        self.external_button = with_tooltip(QPushButton("Check on another file…"),
                                            "External validation: check the tree on patients "
                                            "from another site or period, in a spreadsheet "
                                            "with the same columns.")
        self.external_button.clicked.connect(self.choose_external)
        self.on_chart = with_tooltip(QCheckBox("Print the latest check on the chart"),
                                     "The chart names where its check was made; untick to "
                                     "print the held-out check (or the 'not yet checked' "
                                     "banner) instead.")
        self.bindings.bind(self.on_chart, lambda: self.session.print_external,
                           self.session.set_print_external)
        self.leave_out_overlap = with_tooltip(
            QCheckBox("Leave out patients the tree was grown on"),
            "Rows of another file whose patient identifier was among the derivation patients "
            "are left out, so the check is on separate patients.")
        self.leave_out_overlap.toggled.connect(self._check_again)
        buttons = QHBoxLayout()
        buttons.addWidget(self.external_button)
        buttons.addWidget(self.leave_out_overlap)
        buttons.addWidget(self.on_chart)
        buttons.addStretch(1)
        box = QGroupBox("Checks on other patients")  # separate only where no one overlaps
        layout = QVBoxLayout(box)
        layout.addLayout(buttons)
        layout.addWidget(self.unchecked)
        layout.addLayout(self.checks_area)
        return box

    def _nested_box(self) -> QGroupBox:
        """Nested cross-validation: the honest error of the whole procedure."""
        self.outer_folds = with_tooltip(QSpinBox(), "How many outer parts the whole procedure "
                                        "is repeated on (each part is tested after growing and "
                                        "sizing on the rest).")
        self.outer_folds.setRange(*(int(v) for v in spin_range("outer_folds")))
        self.outer_folds.setValue(DEFAULT_OUTER_FOLDS)
        self.nested_button = with_tooltip(QPushButton("Run nested cross-validation"),
                                          "Nested cross-validation: repeat growing, sizing and "
                                          "testing inside each outer part, so the error "
                                          "reported did not help choose the size.")
        self.nested_button.clicked.connect(self.run_nested)
        self.nested_label = QLabel("Not run yet.")
        self.nested_label.setWordWrap(True)
        self.nested_label.setTextFormat(Qt.RichText)
        return self._run_box("Honest error of the whole procedure", "Outer parts:",
                             self.outer_folds, self.nested_button, self.nested_label)

    def _stability_box(self) -> QGroupBox:
        """Bootstrap stability of the questions."""
        self.resamples = with_tooltip(QSpinBox(), "How many bootstrap resamples (patients drawn "
                                      "again at random, with replacement) the whole procedure "
                                      "is refitted on; 200 is usual.")
        self.resamples.setRange(10, int(spin_range("bootstrap")[1]))  # 10: fewest useful
        self.resamples.setSingleStep(50)
        self.resamples.setValue(DEFAULT_RESAMPLES)
        self.stability_button = with_tooltip(QPushButton("Run stability check"),
                                             "Bootstrap stability: how often each question of "
                                             "the tree comes back when the patients are "
                                             "resampled.")
        self.stability_button.clicked.connect(self.run_stability)
        self.stability_label = QLabel("Not run yet.")
        self.stability_label.setWordWrap(True)
        self.stability_label.setTextFormat(Qt.RichText)
        box = self._run_box("How stable the questions are", "Resamples:", self.resamples,
                            self.stability_button, self.stability_label)
        self.stability_plot = QVBoxLayout()
        box.layout().addLayout(self.stability_plot)
        return box

    @staticmethod
    def _run_box(title: str, words: str, spin: QSpinBox, button: QPushButton,
                 label: QLabel) -> QGroupBox:
        row = QHBoxLayout()
        row.addWidget(QLabel(words))
        row.addWidget(spin)
        row.addWidget(button)
        row.addStretch(1)
        box = QGroupBox(title)
        layout = QVBoxLayout(box)
        layout.addLayout(row)
        layout.addWidget(label)
        return box

    def _report_box(self) -> QGroupBox:
        self.report_button = with_tooltip(QPushButton("Write the methods report…"),
                                          "A multi-page PDF for a methods section or a "
                                          "governance committee: data, settings, the pruning "
                                          "curve, the tree, every check above, stability and "
                                          "the cautions.")
        self.report_button.clicked.connect(self.write_report)
        self.report_note = QLabel("The report includes the nested cross-validation and the "
                                  "stability check; those not run yet are run first.")
        self.report_note.setWordWrap(True)
        box = QGroupBox("Methods report")
        layout = QVBoxLayout(box)
        layout.addWidget(self.report_note)
        layout.addWidget(self.report_button, 0, Qt.AlignLeft)
        return box

    # --- what is shown ----------------------------------------------------------------------

    @property
    def checks(self) -> tuple:
        return self.session.checks

    @property
    def nested(self):
        return self.session.nested

    @property
    def stability(self):
        return self.session.stability

    def _tree_changed(self) -> None:
        """A new tree: work for the old one is dropped; a file it was checked on is checked
        again for this one."""
        self.work.forget()
        self.status.setText("")
        path = self.session.external_path
        if self.session.chosen is not None and path is not None:
            self.check_file(path)

    def refresh(self) -> None:
        model = self.session.model
        if not self.show_tree_content():
            self._shown.clear()
            return
        self.cv_label.setText(cross_validated_html(model))
        session = self.session
        words, earlier = whose_check(session)
        if earlier:
            self.whose.show_text(escape(words))
        else:
            self.whose.hide()
        if self._shown.get("checks") != (session.checks, model.fingerprint):
            self._show_checks()
        self.on_chart.setVisible(any(r.kind == "external" for r in session.checks))
        self.bindings.show()
        if self._shown.get("nested", False) is not session.nested:
            self._show_nested()
        if self._shown.get("stability", False) is not session.stability:
            self._show_stability()
        self._enable()

    def _show_checks(self) -> None:
        checks = self.session.checks
        model = self.session.model
        self._shown["checks"] = (checks, model.fingerprint)
        _clear(self.checks_area)
        if not checks:
            self.unchecked.show_text(f"<b>{UNCHECKED_BANNER}.</b> {UNCHECKED_DETAIL} Set some "
                                     "patients aside on step 3 (“Set aside for checking”) and "
                                     "run again, or check on another file.")
            cv_points = model.chosen.get("cv_net_benefit")
            if cv_points:
                self.checks_area.addWidget(self._decision_curve(
                    cv_points, "Decision curve from the cross-validated predictions on the "
                    "derivation patients (no patients were set aside)."))
        else:
            self.unchecked.hide()
        for result in checks:
            # The measures on the left, the calibration and ROC plots beside them.
            label = QLabel(check_html(result))
            label.setTextFormat(Qt.RichText)
            label.setWordWrap(True)
            label.setTextInteractionFlags(Qt.TextSelectableByMouse)
            label.setAlignment(Qt.AlignTop | Qt.AlignLeft)
            plots = QVBoxLayout()
            if result.measures.calibration:
                plots.addWidget(_figure_canvas(calibration_figure(result.measures)))
            if isinstance(result.measures, ClassificationMeasures) and any(
                    c.roc is not None for c in result.measures.per_class):
                plots.addWidget(_figure_canvas(roc_figure(result.measures)))
            if isinstance(result.measures, ClassificationMeasures) and result.measures.net_benefit:
                plots.addWidget(self._decision_curve(result.measures.net_benefit,
                                                     "Decision curve on these patients."))
            plots.addStretch(1)
            row = QHBoxLayout()
            row.addWidget(label, 1)
            row.addLayout(plots)
            holder = QFrame()
            holder.setFrameShape(QFrame.StyledPanel)
            holder.setLayout(row)
            self.checks_area.addWidget(holder)

    def _decision_curve(self, points, heading: str) -> QFrame:
        """The decision curve with the sentence on how to read it (words from core)."""
        holder = QFrame()
        box = QVBoxLayout(holder)
        canvas = _figure_canvas(decision_curve_figure(points))
        box.addWidget(canvas)
        words = QLabel(f"{heading} {DECISION_CURVE_READING}")
        words.setWordWrap(True)
        # A wrapped label's height depends on its width, which a layout inside a scroll area
        # does not ask for: fix both, so the sentence sits under the plot, not over it.
        width = max(canvas.width(), 420)
        words.setFixedWidth(width)
        words.setMinimumHeight(words.heightForWidth(width))
        box.addWidget(words)
        return holder

    def _show_nested(self) -> None:
        result = self._shown["nested"] = self.session.nested
        if result is None:
            self.nested_label.setText("Not run yet.")
            return
        model = self.session.model
        rows = "".join(f"<tr><td align='right'>{f.fold}</td><td align='right'>{f.n_test:,}</td>"
                       f"<td align='right'>{f.leaves}</td><td align='right'>"
                       f"{escape(error_text(model, f.inner_cv_risk))}</td><td align='right'>"
                       f"{escape(error_text(model, f.test_risk))}</td></tr>" for f in result.folds)
        self.nested_label.setText(
            f"<p><b>{escape(result.summary())}</b></p><p>Beside it: "
            f"{escape(errors_beside(model))}, for the chosen size.</p>"
            "<table cellpadding='3' border='1' cellspacing='0'><tr><th>Outer part</th>"
            f"<th>{model.rows_word.capitalize()} tested</th><th>Size chosen inside</th><th>Its cross-validated error inside the part</th>"
            f"<th>Error on the outer part</th></tr>{rows}</table>"
            f"<p>{escape(result.measures.summary())}</p>")

    def _show_stability(self) -> None:
        result = self._shown["stability"] = self.session.stability
        _clear(self.stability_plot)
        if result is None:
            self.stability_label.setText("Not run yet.")
            return
        rows = "".join(f"<tr><td>{escape(q.text)}</td><td align='right'>{q.box}</td>"
                       f"<td align='right'>{q.share_anywhere:.0%}</td>"
                       f"<td align='right'>{q.share_in_place:.0%}</td></tr>"
                       for q in result.questions)
        self.stability_label.setText(
            f"<p><b>{escape(result.summary())}</b></p>"
            "<table cellpadding='3' border='1' cellspacing='0'><tr><th align='left'>Question"
            "</th><th>Box</th><th>Asked anywhere</th><th>Asked in the same place</th></tr>"
            f"{rows}</table>")
        self.stability_plot.addWidget(_figure_canvas(stability_figure(result)))

    def _enable(self, *_args) -> None:
        has_tree = self.session.chosen is not None
        for button in (self.external_button, self.nested_button, self.stability_button,
                       self.report_button):
            button.setEnabled(has_tree and not self.work.busy)

    # --- long work --------------------------------------------------------------------------

    @property
    def running(self) -> bool:
        return self.work.busy

    @property
    def job(self):
        return self.work.job

    def _start(self, what: str, fn, *args, done, **kwargs) -> None:
        if self.work.start(fn, *args, done=done, failed=self._failed,
                           cancelled=self._cancelled, **kwargs):
            self.status.setText(what)

    def _failed(self, message: str) -> None:
        self.status.setText("Stopped: " + message)
        self.warn(message, "The check could not be made")

    def _cancelled(self) -> None:
        self.status.setText("Cancelled; nothing was changed.")

    def cancel(self) -> None:
        if self.work.running:
            self.work.cancel()
            self.status.setText("Stopping after the current step…")

    # --- an external file -------------------------------------------------------------------

    def choose_external(self) -> None:
        path = ask_open_path(self, "Check the tree on another file", DATA_FILTER)
        if path:
            self.check_file(path)

    def check_file(self, path: str) -> None:
        if self.session.model is None:
            return

        def checked(result) -> None:
            self.session.add_external_check(result, path)
            self.status.setText(f"Checked on {result.counted} from {result.source_and_file}.")

        self._start(f"Checking the tree on {Path(path).name}…", read_and_check,
                    self.session.model, path, self.leave_out_overlap.isChecked(),
                    takes_progress=False, done=checked)

    def _check_again(self, *_args) -> None:
        """The overlap choice changed: the file already checked is checked again."""
        if self.session.external_path and self.session.model is not None:
            self.check_file(self.session.external_path)

    # --- nested cross-validation and stability ------------------------------------------------

    def run_nested(self) -> None:
        chosen = self.session.chosen
        if chosen is None:
            return

        def done(result) -> None:
            self.session.set_nested(result)
            self.status.setText("Nested cross-validation done.")

        self._start("Repeating the whole procedure inside each outer part…",
                    self.session.work_place.run, nested_cross_validate, chosen.data, self.session.report_request(),
                    outer_folds=self.outer_folds.value(), done=done)

    def run_stability(self) -> None:
        chosen = self.session.chosen
        if chosen is None:
            return

        def done(result) -> None:
            self.session.set_stability(result)
            self.status.setText("Stability check done.")

        self._start("Refitting on bootstrap resamples…", self.session.work_place.run,
                    bootstrap_stability, chosen.data,
                    self.session.report_request(), chosen.model,
                    resamples=self.resamples.value(), done=done)

    # --- the report -------------------------------------------------------------------------

    def write_report(self) -> None:
        session = self.session
        if session.chosen is None:
            return
        path = self.ask_save_path("Save the methods report", "PDF (*.pdf)",
                                  f"-{session.model.outcome.name}-report.pdf", ".pdf")
        if not path:
            return
        derivation = replace(session.chart_derivation(), request=session.report_request())
        external = tuple(r for r in session.checks if r.kind == "external")

        def done(result) -> None:
            contents, notes = result
            show_save_notes(self, notes)
            if session.nested is None:
                session.set_nested(contents.nested)
            if session.stability is None:
                session.set_stability(contents.stability)
            self.status.setText(f"Saved the report as {Path(path).name}.")

        self._start("Writing the methods report (running what it still needs)…",
                    session.work_place.run, make_report, derivation, external, self.outer_folds.value(), self.resamples.value(),
                    session.nested, session.stability, path, done=done)


def _clear(layout) -> None:
    while layout.count():
        item = layout.takeAt(0)
        widget = item.widget()
        if widget is not None:
            widget.hide()  # at once: deleteLater only acts on the next pass of the loop
            widget.deleteLater()
        elif item.layout() is not None:
            _clear(item.layout())


def make_report(derivation, external, outer_folds: int, resamples: int, nested, stability,
                path: str, jobs: int = 1, progress=None, cancel=None):
    """Run what the report still needs (core.report.prepare_report reuses what is done),
    then write it. In a worker; returns the contents and what saving noted (leftover
    temporary files removed), for the window to show."""
    contents = prepare_report(derivation, external, outer_folds=outer_folds, bootstrap=resamples,
                              nested_done=nested, stability_done=stability, jobs=jobs,
                              progress=progress, cancel=cancel)
    notes: list[str] = []
    with save_notes(notes.append):
        write_report(contents, path)
    return contents, tuple(notes)
