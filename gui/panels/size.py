"""Step 3, the tree's size: how the tree grows and how its size is checked; Run (in the
background, with progress and Cancel); the pruning curve; choosing the size."""

from __future__ import annotations

import time
from dataclasses import replace
from html import escape

from PySide6.QtCore import QSignalBlocker, Qt, Signal
from PySide6.QtWidgets import (
    QCheckBox, QComboBox, QFormLayout, QGroupBox, QHBoxLayout, QLabel, QProgressBar, QPushButton,
    QSizePolicy, QSpinBox, QVBoxLayout, QWidget,
)

from core.chart import sizes_that_fit
from core.design import findings_from_notes, findings_record, rows_word_of_table
from core.errors import InputError
from core.messages import say
from core.option_limits import spin_range
from core.phrases import plural
from core.sizing import choose_model, derive
from core.sizing.goal_words import goal_text
from gui.binding import Bindings
from gui.panels.step_panel import Banner, StepPanel, scrolling, side_by_side, with_tooltip
from gui.panels.wording import SIZE_RULES, errors_beside, size_choice, with_advice
from gui.session import Shading
from gui.widgets.curve import CurveCanvas, CurveData

CRITERIA = {
    "classification": (("Gini impurity (usual)", None), ("Entropy (information gain)", "entropy")),
    "regression": (("Squared error (usual)", None), ("Friedman's improvement", "friedman_mse")),
}
RISKS = (("Misclassification cost (usual)", "cost"), ("How mixed the boxes are (impurity)", "impurity"))
PRIORS = (("As common as in the data", "observed"), ("Equal for every outcome (rare ones count more)", "equal"))
PLANS = (
    ("Parts in turn (k-fold cross-validation)", "kfold"),
    ("One patient at a time (leave-one-out)", "loo"),
    ("One site at a time (leave-one-site-out)", "site"),
    ("One validation split", "split"),
)


def _spin(setting: str) -> tuple[int, int]:
    """A spin box's range from core's one table of limits."""
    low, high = spin_range(setting)
    return int(low), int(high)


def guard_summary(screen) -> str:
    """What step 2's checks found, in one line for step 3 (columns named for identity and
    leakage)."""
    warnings = screen.warnings
    n = len(warnings) + (1 if screen.error else 0)
    what = []
    for kind, words in (("identity", "columns that may identify patients"),
                        ("leakage", "probable leakage"), ("repeat_visits", "repeat visits"),
                        ("rare_class", "a rare outcome"), ("period", "dates asked about")):
        columns = [f.column for f in warnings if f.kind == kind and f.column]
        if columns and kind in ("identity", "leakage", "period"):
            names = ", ".join(f"“{escape(c)}”" for c in dict.fromkeys(columns))
            what.append(f"{words} ({names})")
        elif any(f.kind == kind for f in warnings):
            what.append(words)
    if screen.error:
        what.append("the checks could not be made")
    return (f"<b>{n} warning{'s' if n != 1 else ''} on step 2</b>: " + "; ".join(what)
            + (". Read them" if n != 1 else ". Read it") + " before relying on the tree.")


def run_derivation(table, dictionary, request, size, place, progress=None, cancel=None,
                   findings=()):
    """Grow, prune and cross-validate (core.sizing.derive) where the work runs (``place``, a
    core.work_place.WorkPlace), then take the wanted size; the guards' findings go into the
    model. In a worker."""
    derivation = place.run(derive, table, dictionary, request, progress=progress, cancel=cancel,
                           findings=findings)
    if size == request.size:  # derive chose this size already (and checked it on held-out rows)
        return derivation, derivation
    try:
        chosen = choose_model(derivation, size)
    except InputError:  # a saved size that is not on this path: keep the 1-SE choice
        chosen = derivation
    return derivation, chosen


class SizePanel(StepPanel):
    step = "size"
    intro = ("Grow the largest sensible tree, then prune it back: the curve shows how well each "
             "size did on patients held out from growing. Smaller trees are easier to follow; "
             "choose a size by clicking the curve.")
    run_finished = Signal()

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self.stale_banner.button.hide()  # this is step 3: Run is right here
        self.bindings = Bindings()
        self._started = 0.0
        self._rows_word_for: tuple = (None, "patients")  # (which file and patient column, word)
        left = self._settings_side()
        splitter = side_by_side(left, self._curve_side(), stretch=(0, 1),
                                sizes=(left.minimumWidth(), 800))
        self.body.addWidget(splitter, 1)
        self.not_ready = Banner("ℹ", "Go to step 2")
        self.not_ready.button.clicked.connect(lambda: self.go_to.emit("outcome"))
        self.body.insertWidget(3, self.not_ready)
        # What the guards of step 2 found, in one line, before anything is grown.
        self.guard_line = Banner("⚠", "Go to step 2")
        self.guard_line.setAccessibleName("Warnings from step 2")
        self.guard_line.button.clicked.connect(lambda: self.go_to.emit("outcome"))
        self.body.insertWidget(4, self.guard_line)
        self.running_job = self.runner(progress=self.progress, cancel_button=self.cancel_button)
        self.running_job.busy_changed.connect(self._enable_settings)
        self.running_job.progressed.connect(self._progress)
        self.fitting = self.runner(latest_wins=True)  # which sizes fit the paper
        self._bind()
        self.run_button.clicked.connect(self.run)
        self.cancel_button.clicked.connect(self._cancel_pressed)
        self.curve.size_clicked.connect(self.choose_size)
        self.size_combo.activated.connect(self._size_from_combo)
        self.one_se_button.clicked.connect(self._choose_one_se)
        self.min_button.clicked.connect(self._choose_min)
        for signal in (session.design_changed, session.data_changed):
            signal.connect(self.refresh_settings)
        session.result_changed.connect(self.refresh_result)
        session.chosen_changed.connect(self.refresh_chosen)
        session.chart_changed.connect(self.refresh_fits)
        session.shading_changed.connect(self.show_shading)
        session.guards_changed.connect(self.refresh_guards)
        self.refresh_settings()
        self.refresh_result()
        self.refresh_guards()

    # --- building the step ------------------------------------------------------------------

    def _growth_box(self) -> QGroupBox:
        """How the tree grows."""
        self.min_leaf = QSpinBox()  # label and tooltip say visits or patients (_show_rows_word)
        self.min_leaf.setRange(*_spin("min_leaf"))
        self.max_depth = with_tooltip(QSpinBox(), "The most questions in a row from box 1 to an "
                                      "outcome box; 'no limit' lets pruning decide.")
        self.max_depth.setRange(0, _spin("max_depth")[1])  # 0: no limit
        self.max_depth.setSpecialValueText("no limit")
        self.criterion = with_tooltip(QComboBox(), "How the grower judges a candidate question; "
                                      "the usual one rarely needs changing.")
        self.risk = with_tooltip(QComboBox(), "What pruning weighs against the tree's "
                                 "size; misclassification cost follows the costs set on step 2.")
        self.priors = with_tooltip(QComboBox(), "Class priors: how much each outcome group "
                                   "counts; 'equal' gives a rare outcome as much weight as a "
                                   "common one.")
        self.coarsen = with_tooltip(QSpinBox(), "Coarsen measurements: each measurement with "
                                    "more than this many different values is grown on this "
                                    "many quantile levels, which is much faster on large files "
                                    "(e.g. 256 above 200,000 rows); thresholds are still set "
                                    "between observed values. 'off' searches every value.")
        self.coarsen.setRange(1, int(_spin("coarsen")[1]))  # 1: off (one level asks nothing)
        self.coarsen.setSpecialValueText("off")
        form = QFormLayout()
        self.min_leaf_label = QLabel()
        form.addRow(self.min_leaf_label, self.min_leaf)
        form.addRow("Most questions in a row:", self.max_depth)
        form.addRow("Split criterion:", self.criterion)
        self.risk_label = QLabel("Pruning weighs:")
        form.addRow(self.risk_label, self.risk)
        self.priors_label = QLabel("Weight of each outcome:")
        form.addRow(self.priors_label, self.priors)
        form.addRow("Coarsen measurements:", self.coarsen)
        return self._group("How the tree grows", form)

    def _checking_box(self) -> QGroupBox:
        """How the size is checked."""
        self.plan = with_tooltip(QComboBox(), "Cross-validation: the tree is regrown without "
                                 "part of the patients and tested on that part, in turn, to see "
                                 "how each size does on patients it did not see.")
        self.folds = with_tooltip(QSpinBox(), "How many parts (folds) the patients are split "
                                  "into; 10 is usual.")
        self.folds.setRange(*_spin("folds"))
        self.repeats = with_tooltip(QSpinBox(), "Repeat the whole split with other random parts "
                                    "and average, for a steadier curve (takes longer).")
        self.repeats.setRange(*_spin("repeats"))
        self.share = with_tooltip(QSpinBox(), "The share of patients kept out of growing to "
                                  "test on, for a single validation split.")
        self.share.setRange(5, 60)
        self.share.setSuffix(" %")
        self.grouped = with_tooltip(QCheckBox("Keep each patient's visits in the same part"),
                                    "Grouped cross-validation: a patient's repeat visits are "
                                    "never split between growing and testing, which would "
                                    "flatter the tree.")
        self.stratified = with_tooltip(QCheckBox("Keep outcome shares alike in every part"),
                                       "Stratified folds: each part has about the same share of "
                                       "each outcome as the whole data.")
        self.seed = with_tooltip(QSpinBox(), "The seed: the number that fixes the random split "
                                 "into parts, so the same settings always give the same tree.")
        self.seed.setRange(*_spin("seed"))
        self.holdout = with_tooltip(QSpinBox(), "Set these patients aside before anything is "
                                    "grown, to check the finished tree on them (step 5); 0 "
                                    "keeps everyone for growing.")
        self.holdout.setRange(0, 60)
        self.holdout.setSuffix(" %")
        self.holdout.setSpecialValueText("none")
        form = QFormLayout()
        form.addRow("Method:", self.plan)
        self.folds_label, self.repeats_label, self.share_label = (
            QLabel("Parts (folds):"), QLabel("Repeats:"), QLabel("Share held out:"))
        form.addRow(self.folds_label, self.folds)
        form.addRow(self.repeats_label, self.repeats)
        form.addRow(self.share_label, self.share)
        form.addRow(self.grouped)
        form.addRow(self.stratified)
        form.addRow("Seed:", self.seed)
        form.addRow("Set aside for checking:", self.holdout)
        return self._group("How the size is checked", form)

    @staticmethod
    def _group(title: str, form: QFormLayout) -> QGroupBox:
        form.setFieldGrowthPolicy(QFormLayout.AllNonFixedFieldsGrow)
        box = QGroupBox(title)
        box.setLayout(form)
        return box

    def _settings_side(self) -> QWidget:
        """The settings (scrolling), Run, Cancel, the progress and what the run said."""
        settings = QWidget()
        layout = QVBoxLayout(settings)
        layout.setContentsMargins(0, 0, 6, 0)
        layout.addWidget(self._growth_box())
        layout.addWidget(self._checking_box())
        layout.addStretch(1)
        for combo in (self.criterion, self.risk, self.priors, self.plan):
            combo.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
            combo.setMinimumContentsLength(16)
        self.run_button = with_tooltip(QPushButton("Run"), "Grow, prune and cross-validate the "
                                       "tree with these settings (in the background).")
        self.run_button.setDefault(True)
        self.cancel_button = with_tooltip(QPushButton("Cancel"), "Stop the run; nothing is "
                                          "lost.")
        self.progress = QProgressBar()
        self.progress.setTextVisible(True)
        self.status = QLabel("")
        self.status.setWordWrap(True)
        run_row = QHBoxLayout()
        run_row.addWidget(self.run_button)
        run_row.addWidget(self.cancel_button)
        run_row.addWidget(self.progress, 1)
        scroll = scrolling(settings)
        left = QWidget()
        left_layout = QVBoxLayout(left)
        left_layout.setContentsMargins(0, 0, 0, 0)
        left_layout.addWidget(scroll, 1)
        left_layout.addLayout(run_row)
        left_layout.addWidget(self.status)
        # Wide enough for every setting: the scroll area only ever scrolls vertically.
        left.setMinimumWidth(settings.sizeHint().width()
                             + scroll.verticalScrollBar().sizeHint().width() + 8)
        return left

    def _curve_side(self) -> QWidget:
        """The pruning curve and the choice of size."""
        self.curve = CurveCanvas()
        self.curve.setAccessibleName("Pruning curve")
        self.view_combo = with_tooltip(QComboBox(), "What the curve shows for each size: the "
                                       "cross-validated error, or (two outcome groups) the "
                                       "cross-validated sensitivity and specificity with "
                                       "their 95% intervals and the goal, if one was set.")
        self.view_combo.addItem("Error by size", "error")
        self.view_combo.addItem("Sensitivity and specificity by size", "measures")
        self.view_combo.currentIndexChanged.connect(
            lambda _i: self.curve.set_view(self.view_combo.currentData()))
        self.size_combo = with_tooltip(QComboBox(), "Choose the size of the tree: the number of "
                                       "outcome boxes on the chart, with each size's "
                                       "cross-validated error ± SE and its training error.")
        self.size_combo.setMinimumContentsLength(28)
        self.one_se_button = with_tooltip(QPushButton("Smallest within 1 SE"),
                                          "The 1-SE rule: the smallest tree whose "
                                          "cross-validated error is within one standard error "
                                          "of the lowest; the usual choice.")
        self.min_button = with_tooltip(QPushButton("Lowest error"), "The size with the lowest "
                                       "cross-validated error; often larger than needed.")
        size_row = QHBoxLayout()
        size_row.addWidget(QLabel("Size:"))
        size_row.addWidget(self.size_combo, 1)
        size_row.addWidget(self.one_se_button)
        size_row.addWidget(self.min_button)
        self.fit_note = QLabel("")
        self.fit_note.setWordWrap(True)
        self.choice = QLabel("")
        self.choice.setWordWrap(True)
        self.choice.setTextFormat(Qt.RichText)
        self.choice.setSizePolicy(QSizePolicy.Preferred, QSizePolicy.Minimum)
        right = QWidget()
        layout = QVBoxLayout(right)
        layout.setContentsMargins(6, 0, 0, 0)
        view_row = QHBoxLayout()
        view_row.addWidget(QLabel("The curve shows:"))
        view_row.addWidget(self.view_combo)
        view_row.addStretch(1)
        layout.addLayout(view_row)
        layout.addWidget(self.curve, 1)
        layout.addLayout(size_row)
        layout.addWidget(self.choice)
        layout.addWidget(self.fit_note)
        return right

    # --- settings ---------------------------------------------------------------------------

    def _task(self) -> str:
        design = self.session.design
        return design.task if design is not None and design.task else "classification"

    def _bind(self) -> None:
        s, bind = self.session, self.bindings.bind
        bind(self.min_leaf, lambda: s.tree.min_leaf,
             lambda v: s.set_settings(tree=replace(s.tree, min_leaf=v)))
        bind(self.max_depth, lambda: s.tree.max_depth or 0,
             lambda v: s.set_settings(tree=replace(s.tree, max_depth=v or None)))
        bind(self.coarsen, lambda: s.tree.coarsen or 1,
             lambda v: s.set_settings(tree=replace(s.tree, coarsen=v if v > 1 else None)))
        bind(self.criterion, lambda: s.tree.criterion,
             lambda v: s.set_settings(tree=replace(s.tree, criterion=v)),
             lambda: CRITERIA[self._task()])
        bind(self.risk, lambda: s.tree.risk, lambda v: s.set_settings(tree=replace(s.tree, risk=v)),
             lambda: RISKS)
        bind(self.priors, lambda: s.tree.priors if isinstance(s.tree.priors, str) else "observed",
             lambda v: s.set_settings(tree=replace(s.tree, priors=v)), lambda: PRIORS)
        bind(self.plan, lambda: s.cv.plan, lambda v: s.set_settings(cv=replace(s.cv, plan=v)),
             lambda: PLANS)
        bind(self.folds, lambda: s.cv.folds, lambda v: s.set_settings(cv=replace(s.cv, folds=v)))
        bind(self.repeats, lambda: s.cv.repeats,
             lambda v: s.set_settings(cv=replace(s.cv, repeats=v)))
        bind(self.share, lambda: round(s.cv.validation_share * 100),
             lambda v: s.set_settings(cv=replace(s.cv, validation_share=v / 100)))
        bind(self.grouped, lambda: s.cv.grouped,
             lambda v: s.set_settings(cv=replace(s.cv, grouped=v)))
        bind(self.stratified, lambda: s.cv.stratified,
             lambda v: s.set_settings(cv=replace(s.cv, stratified=v)))
        bind(self.seed, lambda: s.cv.seed, s.set_seed)
        bind(self.holdout, lambda: round((s.holdout or 0) * 100),
             lambda v: s.set_settings(holdout=v / 100 or None))

    def refresh_settings(self) -> None:
        self.bindings.show()
        self._show_rows_word()
        self._enable_settings()

    def _show_rows_word(self) -> None:
        """The smallest box counts rows: visits where a patient number is set and patients
        came back, else patients, as the fit will say it afterwards."""
        session, design = self.session, self.session.design
        if design is not None:
            patient_id = design.patient_id
        else:  # no outcome chosen yet: the patient number step 1's dictionary names
            named = session.dictionary.by_role("patient_id") if session.dictionary else ()
            patient_id = named[0].name if named else None
        key = (session.serial if session.table is not None else None, patient_id)
        if self._rows_word_for[0] != key:  # a large file: count once per file and column
            word = "patients" if session.table is None else rows_word_of_table(
                session.table.frame, key[1])
            self._rows_word_for = (key, word)
        word = self._rows_word_for[1]
        self.min_leaf_label.setText(f"Fewest {word} in an outcome box:")
        self.min_leaf.setToolTip(f"The grower never makes an outcome box with fewer {word} "
                                 "than this.")

    def _enable_settings(self, *_args) -> None:
        design = self.session.design
        classification = self._task() == "classification"
        for widget in (self.risk, self.risk_label, self.priors, self.priors_label):
            widget.setVisible(classification)
        self.stratified.setEnabled(classification)
        plan = self.plan.currentData()
        for widget in (self.folds, self.folds_label, self.repeats, self.repeats_label):
            widget.setVisible(plan == "kfold")
        self.share.setVisible(plan == "split")
        self.share_label.setVisible(plan == "split")
        has_patient = design is not None and design.patient_id is not None
        self.grouped.setEnabled(has_patient and plan != "site")
        site_item = self.plan.model().item(self.plan.findData("site"))
        site_item.setEnabled(design is not None and design.site is not None)
        request = self.session.request()
        self.run_button.setEnabled(request is not None and not self.running_job.busy)
        if request is None:
            self.not_ready.show_text("Choose the outcome and at least one predictor on step 2 "
                                     "before running.")
        else:
            self.not_ready.hide()

    # --- the guards of step 2 ---------------------------------------------------------------

    def refresh_guards(self) -> None:
        """One line saying what step 2's checks found (or that they are under way)."""
        session = self.session
        if session.guard_pending:
            self.guard_line.symbol.setText("…")
            self.guard_line.show_text("Checking the choices of step 2 (identity, leakage, "
                                      "repeat visits, rare outcomes)…")
        elif session.screen is None or not session.screen.warnings and not session.screen.error:
            self.guard_line.hide()
        else:
            self.guard_line.symbol.setText("⚠")
            self.guard_line.show_text(guard_summary(session.screen))
        if self.running_job.holding and not session.guard_pending:
            self._start_run()

    # --- running ----------------------------------------------------------------------------

    @property
    def running(self) -> bool:
        return self.running_job.busy

    def run(self) -> None:
        """Grow the tree; while step 2's checks are under way, wait for them first (they may
        leave identity-like columns out of the predictors)."""
        if self.session.request() is None or self.running_job.busy:
            return
        self._started = time.monotonic()
        if self.session.guard_pending:
            self.running_job.hold(cancelled=self._cancelled)
            self.status.setText("Waiting for the checks of step 2 to finish…")
            return
        self._start_run()

    def _start_run(self) -> None:
        request = self.session.request()
        if request is None:  # the checks left no predictor
            self.running_job.forget()
            self.status.setText("Nothing was grown: no predictor is left on step 2.")
            self.run_finished.emit()
            return
        session = self.session
        self.status.setText("Growing the full tree…")
        screen = session.screen
        findings = findings_from_notes(session.notes) + (() if screen is None else findings_record(
            screen.left_out + screen.kept + screen.other_findings))
        self.running_job.start(run_derivation, session.table, session.dictionary, request,
                               session.size, session.work_place, done=self._done,
                               failed=self._failed, cancelled=self._cancelled, findings=findings)

    def _cancel_pressed(self) -> None:
        if self.running_job.running:
            self.status.setText("Stopping after the current step…")

    def cancel(self) -> None:
        self.running_job.cancel()

    def _progress(self, done: int, total: int) -> None:
        if done < total:
            self.status.setText(f"Checking on held-out patients: part {done} of {total - 1} done…")

    def _done(self, result) -> None:
        derivation, chosen = result
        session = self.session
        expected = session.expected_fingerprint
        session.expected_fingerprint = None
        # A project of Prunella 0.1 named the tree with its held-out check inside.
        reproduced = chosen.model.is_named_by(expected)
        session.set_result(derivation, chosen, changes_work=not reproduced)
        seconds = time.monotonic() - self._started
        text = f"Done in {seconds:.1f} s. {len(derivation.path.leaves)} sizes on the pruning path."
        for note in dict.fromkeys(derivation.notes + derivation.told_once):  # each said once
            text += " " + with_advice(note)
        if expected is not None:
            if reproduced:
                text += (" This is exactly the tree saved in the project (fingerprint "
                         f"{chosen.model.short_fingerprint}).")
            else:
                self.warn(say("app.not_the_saved_tree", fingerprint=chosen.model.fingerprint[:12],
                              saved=expected[:12]), "Not the saved tree")
        self.status.setText(text)
        self.run_finished.emit()

    def _failed(self, message: str) -> None:
        self.status.setText("The run stopped: " + message)
        self.warn(message, "The tree could not be grown")
        self.run_finished.emit()

    def _cancelled(self) -> None:
        self.status.setText("Cancelled. Nothing was changed; press Run to start again.")
        self.run_finished.emit()

    # --- the curve and the size -------------------------------------------------------------

    def refresh_result(self) -> None:
        model = self.session.model
        if self.session.derivation is None and not self.running_job.busy:
            self.status.setText("")  # nothing grown for this file yet
        enabled = model is not None
        for widget in (self.size_combo, self.one_se_button, self.min_button):
            widget.setEnabled(enabled)
        self.size_combo.clear()
        if model is None:
            self.curve.show_curve(None, None)
            self.choice.setText("")
            self.fit_note.setText("")
            return
        path = model.path
        for k, leaves in enumerate(path["leaves"]):
            self.size_combo.addItem(size_choice(model, k), int(leaves))
        # The open list is as wide as its longest line: every size's errors are read whole
        # (the chosen size's are also in full under the list).
        view = self.size_combo.view()
        view.setMinimumWidth(view.sizeHintForColumn(0) + view.verticalScrollBar().sizeHint().width())
        self.refresh_fits()
        self.show_shading()
        self.refresh_chosen()

    def refresh_fits(self) -> None:
        """Ask the chart module, in the background, which sizes print legibly on the paper."""
        session = self.session
        derivation, options = session.derivation, session.chart
        if derivation is None or session.current_shading() is not None:
            return
        self.fit_note.setText("Finding the sizes that fit on the paper…")
        self.fitting.start(sizes_that_fit, derivation, options, takes_progress=False,
                           done=lambda sizes: session.set_shading(
                               Shading(derivation, options, tuple(int(n) for n in sizes))),
                           failed=self.fit_note.setText)

    def show_shading(self) -> None:
        model, shading = self.session.model, self.session.current_shading()
        if model is None:
            return
        fits, label = None, ""
        if shading is not None:
            options = shading.options.checked()
            label = f"Fits on {options.paper_name} at {options.min_text:g} pt"
            self.fit_note.setText(
                f"Shaded: sizes that print legibly on one {options.paper_name} page with text "
                f"of at least {options.min_text:g} pt (paper and text size are set on step 6)."
                + ("" if shading.sizes else " None does: choose larger paper or smaller text "
                   "on step 6."))
            fits = shading.sizes
        derivation = self.session.derivation
        counts = None if derivation is None else derivation.path.counts
        measures = None if counts is None or derivation.data.task != "classification" \
            or len(derivation.data.classes) != 2 else counts.measures_by_size()
        self.view_combo.setEnabled(measures is not None)
        if measures is None and self.view_combo.currentData() != "error":
            self.view_combo.setCurrentIndex(0)
        self.curve.show_curve(CurveData.from_path(model.path, measures, model.chosen.get("goal"),
                                                   model.error_measure),
                              int(model.chosen["leaves"]), fits, label)

    @property
    def fit_sizes(self) -> tuple[int, ...] | None:
        """The sizes shaded on the curve as fitting the chosen paper (None until known)."""
        shading = self.session.current_shading()
        return None if shading is None else shading.sizes

    def refresh_chosen(self) -> None:
        model = self.session.model
        if model is None:
            return
        chosen = model.chosen
        self.curve.set_chosen(int(chosen["leaves"]))
        with QSignalBlocker(self.size_combo):
            self.size_combo.setCurrentIndex(self.size_combo.findData(int(chosen["leaves"])))
        self.choice.setText(
            f"<b>Chosen: {plural(chosen['leaves'], 'outcome box', 'outcome boxes')}</b> "
            f"({SIZE_RULES[chosen['rule']]}). "
            f"{errors_beside(model, sentence=True)}. Checked by {model.path['cv']}."
            + (f" {escape(goal_text(chosen))}" if chosen.get("goal") else ""))

    def choose_size(self, leaves: int) -> None:
        """Take another size from the same run (no refit): the tree view updates at once."""
        derivation = self.session.derivation
        if derivation is None:
            return
        path = derivation.model.path
        size: str | int = leaves
        if leaves == path["one_se_leaves"]:
            size = "1se"
        elif leaves == path["min_leaves"]:
            size = "min"
        if self.session.model is not None and self.session.model.chosen["leaves"] == leaves \
                and self.session.size == size:
            return
        try:
            chosen = choose_model(derivation, size)
        except InputError as exc:
            self.warn(str(exc))
            return
        self.session.set_chosen(chosen)

    def _size_from_combo(self, index: int) -> None:
        leaves = self.size_combo.itemData(index)
        if leaves is not None:
            self.choose_size(int(leaves))

    def _choose_one_se(self) -> None:
        if self.session.derivation is not None:
            self.choose_size(int(self.session.derivation.model.path["one_se_leaves"]))

    def _choose_min(self) -> None:
        if self.session.derivation is not None:
            self.choose_size(int(self.session.derivation.model.path["min_leaves"]))

    def update_stale(self) -> None:
        super().update_stale()
        self._enable_settings()
