"""Step 5, checking it: how the chosen tree does on patients it was not grown on — the
cross-validated error of its size beside the training error; the check on patients set aside
before growing or from another file (measures with intervals, calibration by box, ROC); the
honest error of the whole procedure (nested cross-validation); bootstrap stability; and the
methods report. Every number comes from core (validate, nested, stability, report)."""

from __future__ import annotations

from html import escape
from pathlib import Path

from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg
from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QCheckBox, QFileDialog, QFrame, QGroupBox, QHBoxLayout, QLabel, QProgressBar, QPushButton,
    QSizePolicy, QSpinBox, QVBoxLayout, QWidget,
)

from core.cautions import UNCHECKED_BANNER, UNCHECKED_DETAIL
from core.checking import (
    DEFAULT_OUTER_FOLDS, DEFAULT_RESAMPLES, ClassificationMeasures, bootstrap_stability,
    check_table, nested_cross_validate,
)
from core.data import read_table
from core.report import (
    ReportContents, calibration_figure, roc_figure, stability_figure, write_report,
)
from gui import workers
from gui.panels.base import (
    SIZE_RULES, Banner, Panel, errors_beside, explain, scrolling, warning_html,
)
from gui.panels.data import DATA_FILTER


def _table(rows: list[tuple[str, str]], header: tuple[str, str] | None = None) -> str:
    head = (f"<tr><th align='left'>{escape(header[0])}</th><th align='left'>"
            f"{escape(header[1])}</th></tr>") if header else ""
    body = "".join(f"<tr><td>{escape(a)}</td><td><b>{escape(b)}</b></td></tr>" for a, b in rows)
    return f"<table cellpadding='3' cellspacing='0'>{head}{body}</table>"


def cross_validated_html(model) -> str:
    chosen, path = model.chosen, model.path
    folds = path.get("folds")
    return _table([
        ("Size", f"{chosen['leaves']} outcome boxes ({SIZE_RULES[chosen['rule']]})"),
        ("Error measured as", path["risk_measure"]),
        ("Error", errors_beside(chosen, sentence=True)),
        ("How it was checked", path["cv"] + (f", {folds} fits on parts of the data" if folds else "")),
        ("Grown on", f"{model.n_rows:,} rows"),
    ])


def check_html(result) -> str:
    """One check on separate patients: where from, how many, measures, confusion, calibration."""
    m = result.measures
    patients = f" ({result.patients:,} patients)" if result.patients else ""
    parts = [f"<p><b>{escape(result.source[0].upper() + result.source[1:])}</b>: "
             f"{result.n:,} visits checked{patients}.</p>"]
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
            derived = f"{r.derivation_value:.0%}" if percent else f"{r.derivation_value:.3g}"
            flag = {True: "inside", False: "OUTSIDE", None: "—"}[r.agrees]
            rows.append(f"<tr><td align='right'>{r.box}</td><td>{escape(r.label)}</td>"
                        f"<td align='right'>{derived} of {r.derivation_n:,}</td>"
                        f"<td>{escape(r.observed_text(percent))} of {r.n:,}</td>"
                        f"<td>{flag}</td></tr>")
        parts.append(f"<p><b>Calibration by outcome box</b>: the derivation {what} against the "
                     f"new patients' {what} with its 95% interval.</p><table cellpadding='3' "
                     "border='1' cellspacing='0'><tr><th>Box</th><th>Outcome</th>"
                     "<th>At derivation</th><th>New patients</th><th>Derivation value</th>"
                     "</tr>" + "".join(rows) + "</table>")
    return "\n".join(parts)


def read_and_check(model, path: str):
    """Read an external file and check the tree on it (core.checking). Runs in a worker."""
    return check_table(model, read_table(path))


def _figure_canvas(figure) -> FigureCanvasQTAgg:
    canvas = FigureCanvasQTAgg(figure)
    width, height = figure.get_size_inches()
    scale = min(1.0, 4.2 / width)  # core draws for a printed page; a panel column is narrower
    dpi = canvas.logicalDpiX() or 96
    canvas.setFixedSize(int(width * scale * dpi), int(height * scale * dpi))
    canvas.setSizePolicy(QSizePolicy.Fixed, QSizePolicy.Fixed)
    return canvas


class CheckingPanel(Panel):
    step = "checking"
    intro = ("How well the chosen tree does on patients it was not grown on. Cross-validation "
             "estimates it from the derivation data; patients set aside before growing, or from "
             "another site or period, check it for real.")

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self.job: workers.Job | None = None
        self._busy = False
        self._pending_path: str | None = None
        self.checks: list = []  # CheckResults for the chosen tree (held-out first)
        self._external_path: str | None = None  # the file checked on, redone for a new size
        self.nested = None
        self.stability = None

        # Long work: one at a time, with progress and Cancel.
        self.progress = QProgressBar()
        self.progress.setFormat("")
        self.cancel_button = explain(QPushButton("Cancel"), "Stop the computation; nothing is "
                                     "lost.")
        self.cancel_button.setEnabled(False)
        self.cancel_button.clicked.connect(self.cancel)
        self.status = QLabel("")
        self.status.setWordWrap(True)
        work_row = QHBoxLayout()
        work_row.addWidget(self.progress, 1)
        work_row.addWidget(self.cancel_button)

        # Cross-validation of this size.
        self.cv_label = QLabel()
        self.cv_label.setTextFormat(Qt.RichText)
        self.cv_label.setWordWrap(True)
        self.cv_label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        cv_box = QGroupBox("Cross-validated performance of this size")
        cv_box.setToolTip("Cross-validation: the tree is regrown without part of the patients "
                          "and tested on that part, in turn.")
        QVBoxLayout(cv_box).addWidget(self.cv_label)

        # Checks on separate patients.
        self.unchecked = Banner("⚠")
        self.checks_area = QVBoxLayout()
        self.external_button = explain(QPushButton("Check on another file…"),
                                       "External validation: check the tree on patients from "
                                       "another site or period, in a spreadsheet with the same "
                                       "columns.")
        self.external_button.clicked.connect(self.choose_external)
        self.on_chart = explain(QCheckBox("Print the latest check on the chart"),
                                "The chart names where its check was made; untick to print the "
                                "held-out check (or the 'not yet checked' banner) instead.")
        self.on_chart.setChecked(True)
        self.on_chart.toggled.connect(self._chart_check_changed)
        check_buttons = QHBoxLayout()
        check_buttons.addWidget(self.external_button)
        check_buttons.addWidget(self.on_chart)
        check_buttons.addStretch(1)
        checks_box = QGroupBox("Checked on separate patients")
        checks_layout = QVBoxLayout(checks_box)
        checks_layout.addLayout(check_buttons)
        checks_layout.addWidget(self.unchecked)
        checks_layout.addLayout(self.checks_area)

        # Nested cross-validation.
        self.outer_folds = explain(QSpinBox(), "How many outer parts the whole procedure is "
                                   "repeated on (each part is tested after growing and sizing "
                                   "on the rest).")
        self.outer_folds.setRange(2, 20)
        self.outer_folds.setValue(DEFAULT_OUTER_FOLDS)
        self.nested_button = explain(QPushButton("Run nested cross-validation"),
                                     "Nested cross-validation: repeat growing, sizing and "
                                     "testing inside each outer part, so the error reported did "
                                     "not help choose the size.")
        self.nested_button.clicked.connect(self.run_nested)
        self.nested_label = QLabel("Not run yet.")
        self.nested_label.setWordWrap(True)
        self.nested_label.setTextFormat(Qt.RichText)
        nested_row = QHBoxLayout()
        nested_row.addWidget(QLabel("Outer parts:"))
        nested_row.addWidget(self.outer_folds)
        nested_row.addWidget(self.nested_button)
        nested_row.addStretch(1)
        nested_box = QGroupBox("Honest error of the whole procedure")
        nested_layout = QVBoxLayout(nested_box)
        nested_layout.addLayout(nested_row)
        nested_layout.addWidget(self.nested_label)

        # Stability.
        self.resamples = explain(QSpinBox(), "How many bootstrap resamples (patients drawn "
                                 "again at random, with replacement) the whole procedure is "
                                 "refitted on; 200 is usual.")
        self.resamples.setRange(10, 2000)
        self.resamples.setSingleStep(50)
        self.resamples.setValue(DEFAULT_RESAMPLES)
        self.stability_button = explain(QPushButton("Run stability check"),
                                        "Bootstrap stability: how often each question of the tree "
                                        "comes back when the patients are resampled.")
        self.stability_button.clicked.connect(self.run_stability)
        self.stability_label = QLabel("Not run yet.")
        self.stability_label.setWordWrap(True)
        self.stability_label.setTextFormat(Qt.RichText)
        self.stability_plot = QVBoxLayout()
        stability_row = QHBoxLayout()
        stability_row.addWidget(QLabel("Resamples:"))
        stability_row.addWidget(self.resamples)
        stability_row.addWidget(self.stability_button)
        stability_row.addStretch(1)
        stability_box = QGroupBox("How stable the questions are")
        stability_layout = QVBoxLayout(stability_box)
        stability_layout.addLayout(stability_row)
        stability_layout.addWidget(self.stability_label)
        stability_layout.addLayout(self.stability_plot)

        # The report.
        self.report_button = explain(QPushButton("Write the methods report…"),
                                     "A multi-page PDF for a methods section or a governance "
                                     "committee: data, settings, the pruning curve, the tree, "
                                     "every check above, stability and the cautions.")
        self.report_button.clicked.connect(self.write_report)
        self.report_note = QLabel("The report includes the nested cross-validation and the "
                                  "stability check; those not run yet are run first.")
        self.report_note.setWordWrap(True)
        report_box = QGroupBox("Methods report")
        report_layout = QVBoxLayout(report_box)
        report_layout.addWidget(self.report_note)
        report_layout.addWidget(self.report_button, 0, Qt.AlignLeft)

        inner = QWidget()
        inner_layout = QVBoxLayout(inner)
        inner_layout.setContentsMargins(0, 0, 6, 0)
        for box in (cv_box, checks_box, nested_box, stability_box, report_box):
            inner_layout.addWidget(box)
        inner_layout.addStretch(1)
        scroll = scrolling(inner, across=True)  # wide tables and plots may scroll sideways
        self.add_tree_content(scroll)
        self.body.addLayout(work_row)
        self.body.addWidget(self.status)
        self.body.addWidget(scroll, 1)
        self._work_widgets = (self.progress, self.cancel_button)
        for widget in self._work_widgets:  # shown only while something runs
            widget.hide()

        session.result_changed.connect(self._result_changed)
        session.chosen_changed.connect(self._chosen_changed)
        self._result_changed()

    # --- what is shown ----------------------------------------------------------------------

    def _result_changed(self) -> None:
        if self.session.chosen is None:  # a new or reopened project: its own checks only
            self._external_path = None
            self._pending_path = None
        self._chosen_changed()

    def _chosen_changed(self) -> None:
        """A new tree: the checks are redone for it; nested CV and stability start afresh."""
        self.cancel()
        self.nested = self.stability = None
        self.nested_label.setText("Not run yet.")
        self.stability_label.setText("Not run yet.")
        self._clear(self.stability_plot)
        chosen = self.session.chosen
        self.checks = []
        if chosen is not None and chosen.heldout_check is not None:
            self.checks.append(chosen.heldout_check)  # made by core when the size was chosen
        self.session.set_check(None)
        self.refresh()
        if chosen is not None and self._external_path is not None:
            # The file is checked again for the new tree, once the panel is free.
            self._pending_path, self._external_path = self._external_path, None
            if not self._busy:
                self._start_pending()

    def _start_pending(self) -> None:
        path, self._pending_path = self._pending_path, None
        if path is not None:
            self.check_file(path)

    def refresh(self) -> None:
        model = self.session.model
        if not self.show_tree_content():
            return
        self.cv_label.setText(cross_validated_html(model))
        self._show_checks()
        self._enable()

    def _show_checks(self) -> None:
        self._clear(self.checks_area)
        if not self.checks:
            self.unchecked.show_text(f"<b>{UNCHECKED_BANNER}.</b> {UNCHECKED_DETAIL} Set some "
                                     "patients aside on step 3 (“Set aside for checking”) and "
                                     "run again, or check on another file.")
        else:
            self.unchecked.hide()
        for result in self.checks:
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
            plots.addStretch(1)
            row = QHBoxLayout()
            row.addWidget(label, 1)
            row.addLayout(plots)
            holder = QFrame()
            holder.setFrameShape(QFrame.StyledPanel)
            holder.setLayout(row)
            self.checks_area.addWidget(holder)
        self.on_chart.setVisible(any(r.kind == "external" for r in self.checks))

    @staticmethod
    def _clear(layout) -> None:
        while layout.count():
            item = layout.takeAt(0)
            widget = item.widget()
            if widget is not None:
                widget.hide()  # at once: deleteLater only acts on the next pass of the loop
                widget.deleteLater()
            elif item.layout() is not None:
                CheckingPanel._clear(item.layout())

    def _enable(self) -> None:
        has_tree = self.session.chosen is not None
        for button in (self.external_button, self.nested_button, self.stability_button,
                       self.report_button):
            button.setEnabled(has_tree and not self._busy)
        self.cancel_button.setEnabled(self._busy)

    def _chart_check_changed(self) -> None:
        external = [r for r in self.checks if r.kind == "external"]
        self.session.set_check(external[-1] if external and self.on_chart.isChecked() else None)

    # --- long work --------------------------------------------------------------------------

    @property
    def running(self) -> bool:
        return self._busy

    def _start(self, job: workers.Job, what: str, on_done) -> None:
        if self._busy:
            return
        self._busy = True
        self.job = job
        job.signals.progress.connect(self._progress)
        job.signals.done.connect(on_done)
        job.signals.failed.connect(self._failed)
        job.signals.cancelled.connect(self._cancelled)
        job.signals.finished.connect(self._over)
        self.progress.setRange(0, 0)
        for widget in self._work_widgets:
            widget.show()
        self.status.setText(what)
        self._enable()
        workers.start(job)

    def _progress(self, done: int, total: int) -> None:
        self.progress.setFormat("%v of %m")
        self.progress.setRange(0, total)
        self.progress.setValue(done)

    def _failed(self, message: str) -> None:
        self.status.setText("Stopped: " + message)
        self.warn(message, "The check could not be made")

    def _cancelled(self) -> None:
        self.status.setText("Cancelled; nothing was changed.")

    def _over(self) -> None:
        self._busy = False
        self.progress.setRange(0, 1)
        self.progress.setValue(0)
        self.progress.setFormat("")
        for widget in self._work_widgets:
            widget.hide()
        self._enable()
        if self._pending_path is not None:
            self._start_pending()

    def cancel(self) -> None:
        if self._busy and self.job is not None:
            self.job.cancel()
            self.status.setText("Stopping after the current step…")

    # --- an external file -------------------------------------------------------------------

    def choose_external(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Check the tree on another file", "",
                                              DATA_FILTER)
        if path:
            self.check_file(path)

    def check_file(self, path: str) -> None:
        model = self.session.model
        if model is None:
            return
        job = workers.Job(read_and_check, model, path, takes_progress=False)
        job.path = path
        self._checking_model = model
        self._start(job, f"Checking the tree on {Path(path).name}…", self._checked)

    def _checked(self, result) -> None:
        if self.session.model is None or self._checking_model is not self.session.model:
            return  # the tree changed meanwhile; this check belongs to the old one
        self.checks = [r for r in self.checks if r.kind != "external"] + [result]
        self._external_path = self.job.path
        self.status.setText(f"Checked on {result.n:,} visits from {result.source}.")
        self._show_checks()
        self._chart_check_changed()

    # --- nested cross-validation and stability ------------------------------------------------

    def _request(self):
        """The request as the user sized the tree: nested CV repeats that same size rule."""
        from dataclasses import replace

        chosen = self.session.chosen
        return replace(chosen.request, size=self.session.size)

    def run_nested(self) -> None:
        chosen = self.session.chosen
        if chosen is None:
            return
        job = workers.Job(nested_cross_validate, chosen.data, self._request(),
                          outer_folds=self.outer_folds.value())
        self._start(job, "Repeating the whole procedure inside each outer part…",
                    self._nested_done)

    def _nested_done(self, result) -> None:
        self.nested = result
        rows = "".join(f"<tr><td align='right'>{f.fold}</td><td align='right'>{f.n_test:,}</td>"
                       f"<td align='right'>{f.leaves}</td><td align='right'>{f.inner_cv_risk:.3f}"
                       f"</td><td align='right'>{f.test_risk:.3f}</td></tr>" for f in result.folds)
        cv = self.session.model.chosen
        self.nested_label.setText(
            f"<p><b>{escape(result.summary())}</b></p><p>Beside it: "
            f"{escape(errors_beside(cv))}, for the chosen size.</p>"
            "<table cellpadding='3' border='1' cellspacing='0'><tr><th>Outer part</th>"
            "<th>Patients tested</th><th>Size chosen inside</th><th>Error promised inside</th>"
            f"<th>Error on the outer part</th></tr>{rows}</table>"
            f"<p>{escape(result.measures.summary())}</p>")
        self.status.setText("Nested cross-validation done.")

    def run_stability(self) -> None:
        chosen = self.session.chosen
        if chosen is None:
            return
        job = workers.Job(bootstrap_stability, chosen.data, self._request(), chosen.model,
                          resamples=self.resamples.value())
        self._start(job, "Refitting on bootstrap resamples…", self._stability_done)

    def _stability_done(self, result) -> None:
        self.stability = result
        rows = "".join(f"<tr><td>{escape(q.text)}</td><td align='right'>{q.box}</td>"
                       f"<td align='right'>{q.share_anywhere:.0%}</td>"
                       f"<td align='right'>{q.share_in_place:.0%}</td></tr>"
                       for q in result.questions)
        self.stability_label.setText(
            f"<p><b>{escape(result.summary())}</b></p>"
            "<table cellpadding='3' border='1' cellspacing='0'><tr><th align='left'>Question"
            "</th><th>Box</th><th>Asked anywhere</th><th>Asked in the same place</th></tr>"
            f"{rows}</table>")
        self._clear(self.stability_plot)
        self.stability_plot.addWidget(_figure_canvas(stability_figure(result)))
        self.status.setText("Stability check done.")

    # --- the report -------------------------------------------------------------------------

    def write_report(self) -> None:
        chosen = self.session.chosen
        if chosen is None:
            return
        path = self.ask_save_path("Save the methods report", "PDF (*.pdf)",
                                  f"-{chosen.model.outcome.name}-report.pdf", ".pdf")
        if not path:
            return
        derivation = self.session.chart_derivation()
        job = workers.Job(make_report, derivation, self._request(), tuple(self.checks),
                          self.nested, self.stability, self.outer_folds.value(),
                          self.resamples.value(), path)
        self._report_path = path
        self._start(job, "Writing the methods report (running what it still needs)…",
                    self._report_done)

    def _report_done(self, result) -> None:
        nested, stability = result
        if self.nested is None:
            self._nested_done(nested)
        if self.stability is None:
            self._stability_done(stability)
        self.status.setText(f"Saved the report as {Path(self._report_path).name}.")


def make_report(derivation, request, checks, nested, stability, outer_folds: int,
                resamples: int, path: str, progress=None, cancel=None):
    """Run what the report still needs (nested CV, stability), then write it. In a worker."""
    steps = (0 if nested else outer_folds) + (0 if stability else resamples)
    done = [0]

    def step(k: int, _total: int) -> None:
        if progress:
            progress(done[0] + k, steps)

    if nested is None:
        nested = nested_cross_validate(derivation.data, request, outer_folds=outer_folds,
                                       progress=step, cancel=cancel)
        done[0] = outer_folds
    if stability is None:
        stability = bootstrap_stability(derivation.data, request, derivation.model,
                                        resamples=resamples, progress=step, cancel=cancel)
    write_report(ReportContents(derivation, tuple(checks), nested, stability), path)
    return nested, stability
