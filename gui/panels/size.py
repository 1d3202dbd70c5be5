"""Step 3, the tree's size: how the tree grows and how its size is checked; Run (in the
background, with progress and Cancel); the pruning curve; choosing the size."""

from __future__ import annotations

import time
from dataclasses import replace
from html import escape

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QCheckBox, QComboBox, QFormLayout, QGroupBox, QHBoxLayout, QLabel, QProgressBar, QPushButton,
    QSizePolicy, QSpinBox, QVBoxLayout, QWidget,
)

from core.chart import sizes_that_fit
from core.chart.options import PAPER_NAMES, default_min_text
from core.errors import InputError
from core.sizing import CVSettings, choose_model, derive
from gui import workers
from gui.panels.base import (
    SIZE_RULES, Banner, Panel, errors_beside, explain, scrolling, side_by_side, with_advice,
)
from gui.widgets.curve import CurveCanvas, CurveData

CRITERIA = {
    "classification": (("Gini impurity (usual)", None), ("Entropy (information gain)", "entropy")),
    "regression": (("Squared error (usual)", None), ("Friedman's improvement", "friedman_mse")),
}
PLANS = (
    ("Parts in turn (k-fold cross-validation)", "kfold"),
    ("One patient at a time (leave-one-out)", "loo"),
    ("One site at a time (leave-one-site-out)", "site"),
    ("One validation split", "split"),
)


def run_derivation(table, dictionary, request, size, progress=None, cancel=None):
    """Grow, prune and cross-validate (core.sizing.derive), then take the wanted size. In a worker."""
    derivation = derive(table, dictionary, request, progress=progress, cancel=cancel)
    if size == request.size:  # derive chose this size already (and checked it on held-out rows)
        return derivation, derivation
    try:
        chosen = choose_model(derivation, size)
    except InputError:  # a saved size that is not on this path: keep the 1-SE choice
        chosen = derivation
    return derivation, chosen


class SizePanel(Panel):
    step = "size"
    intro = ("Grow the largest sensible tree, then prune it back: the curve shows how well each "
             "size did on patients held out from growing. Smaller trees are easier to follow; "
             "choose a size by clicking the curve.")
    run_finished = Signal()

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self.stale_banner.button.hide()  # this is step 3: Run is right here
        self.job: workers.Job | None = None
        self._busy = False  # from Run until the result (or the stop) has been shown
        self._fit_job: workers.Job | None = None
        self._fit_waiting = False
        self._fit_sizes = None  # (key, sizes, label) for the shading of the curve
        self._writing = False
        self._started = 0.0

        # How the tree grows.
        self.min_leaf = explain(QSpinBox(), "The grower never makes an outcome box with fewer "
                                "patients than this (the minimum leaf size).")
        self.min_leaf.setRange(1, 100000)
        self.max_depth = explain(QSpinBox(), "The most questions in a row from box 1 to an "
                                 "outcome box; 'no limit' lets pruning decide.")
        self.max_depth.setRange(0, 40)
        self.max_depth.setSpecialValueText("no limit")
        self.criterion = explain(QComboBox(), "The split criterion: how the grower scores a "
                                 "candidate question; the usual one rarely needs changing.")
        self.risk = explain(QComboBox(), "The pruning risk: what pruning weighs against size; "
                            "misclassification cost follows the costs set on step 2.")
        self.risk.addItem("Misclassification cost (usual)", "cost")
        self.risk.addItem("Impurity, as scikit-learn prunes", "impurity")
        self.priors = explain(QComboBox(), "Class priors: how much each outcome group counts; "
                              "'equal' gives a rare outcome as much weight as a common one.")
        self.priors.addItem("As observed in the data", "observed")
        self.priors.addItem("Equal for every outcome group", "equal")
        grow_form = QFormLayout()
        grow_form.addRow("Fewest patients in an outcome box:", self.min_leaf)
        grow_form.addRow("Most questions in a row:", self.max_depth)
        grow_form.addRow("Split criterion:", self.criterion)
        self.risk_label = QLabel("Pruning weighs:")
        grow_form.addRow(self.risk_label, self.risk)
        self.priors_label = QLabel("Outcome groups count:")
        grow_form.addRow(self.priors_label, self.priors)
        grow_box = QGroupBox("How the tree grows")
        grow_box.setLayout(grow_form)

        # How the size is checked.
        self.plan = explain(QComboBox(), "Cross-validation: the tree is regrown without part of "
                            "the patients and tested on that part, in turn, to see how each size "
                            "does on patients it did not see.")
        for words, code in PLANS:
            self.plan.addItem(words, code)
        self.folds = explain(QSpinBox(), "How many parts (folds) the patients are split into; "
                             "10 is usual.")
        self.folds.setRange(2, 100)
        self.repeats = explain(QSpinBox(), "Repeat the whole split with other random parts and "
                               "average, for a steadier curve (takes longer).")
        self.repeats.setRange(1, 50)
        self.share = explain(QSpinBox(), "The share of patients kept out of growing to test on, "
                             "for a single validation split.")
        self.share.setRange(5, 60)
        self.share.setSuffix(" %")
        self.grouped = explain(QCheckBox("Keep each patient's visits in the same part"),
                               "Grouped cross-validation: a patient's repeat visits are never "
                               "split between growing and testing, which would flatter the tree.")
        self.stratified = explain(QCheckBox("Keep outcome shares alike in every part"),
                                  "Stratified folds: each part has about the same share of each "
                                  "outcome as the whole data.")
        self.seed = explain(QSpinBox(), "The seed: the number that fixes the random split into "
                            "parts, so the same settings always give the same tree.")
        self.seed.setRange(0, 2_000_000_000)
        self.holdout = explain(QSpinBox(), "Set these patients aside before anything is grown, "
                               "to check the finished tree on them (step 5); 0 keeps everyone "
                               "for growing.")
        self.holdout.setRange(0, 60)
        self.holdout.setSuffix(" %")
        self.holdout.setSpecialValueText("none")
        check_form = QFormLayout()
        check_form.addRow("Method:", self.plan)
        self.folds_label, self.repeats_label, self.share_label = (
            QLabel("Parts (folds):"), QLabel("Repeats:"), QLabel("Share held out:"))
        check_form.addRow(self.folds_label, self.folds)
        check_form.addRow(self.repeats_label, self.repeats)
        check_form.addRow(self.share_label, self.share)
        check_form.addRow(self.grouped)
        check_form.addRow(self.stratified)
        check_form.addRow("Seed:", self.seed)
        check_form.addRow("Set aside for checking:", self.holdout)
        check_box = QGroupBox("How the size is checked")
        check_box.setLayout(check_form)

        # Run.
        self.run_button = explain(QPushButton("Run"), "Grow, prune and cross-validate the tree "
                                  "with these settings (in the background).")
        self.run_button.setDefault(True)
        self.cancel_button = explain(QPushButton("Cancel"), "Stop the run; nothing is lost.")
        self.cancel_button.setEnabled(False)
        self.progress = QProgressBar()
        self.progress.setTextVisible(True)
        self.progress.setFormat("")
        self.progress.setValue(0)
        self.status = QLabel("")
        self.status.setWordWrap(True)
        run_row = QHBoxLayout()
        run_row.addWidget(self.run_button)
        run_row.addWidget(self.cancel_button)
        run_row.addWidget(self.progress, 1)

        for combo in (self.criterion, self.risk, self.priors, self.plan):
            combo.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
            combo.setMinimumContentsLength(16)
        for form in (grow_form, check_form):
            form.setFieldGrowthPolicy(QFormLayout.AllNonFixedFieldsGrow)
        settings = QWidget()
        settings_layout = QVBoxLayout(settings)
        settings_layout.setContentsMargins(0, 0, 6, 0)
        settings_layout.addWidget(grow_box)
        settings_layout.addWidget(check_box)
        settings_layout.addStretch(1)
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

        # The curve and the choice of size.
        self.curve = CurveCanvas()
        self.curve.setAccessibleName("Pruning curve")
        self.size_combo = explain(QComboBox(), "Choose the size of the tree: the number of "
                                  "outcome boxes (leaves) on the chart.")
        self.size_combo.setMinimumContentsLength(28)
        self.one_se_button = explain(QPushButton("Smallest within 1 SE"),
                                     "The 1-SE rule: the smallest tree whose cross-validated "
                                     "error is within one standard error of the lowest; the "
                                     "usual choice.")
        self.min_button = explain(QPushButton("Lowest error"), "The size with the lowest "
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
        right_layout = QVBoxLayout(right)
        right_layout.setContentsMargins(6, 0, 0, 0)
        right_layout.addWidget(self.curve, 1)
        right_layout.addLayout(size_row)
        right_layout.addWidget(self.choice)
        right_layout.addWidget(self.fit_note)

        splitter = side_by_side(left, right, stretch=(0, 1), sizes=(left.minimumWidth(), 800))
        self.body.addWidget(splitter, 1)
        self.not_ready = Banner("ℹ", "Go to step 2")
        self.not_ready.button.clicked.connect(lambda: self.go_to.emit("outcome"))
        self.body.insertWidget(3, self.not_ready)
        # What the guards of step 2 found, in one line, before anything is grown.
        self.guard_line = Banner("⚠", "Go to step 2")
        self.guard_line.setAccessibleName("Warnings from step 2")
        self.guard_line.button.clicked.connect(lambda: self.go_to.emit("outcome"))
        self.body.insertWidget(4, self.guard_line)
        self._queued = False  # Run was pressed while the checks of step 2 were under way

        for widget in (self.min_leaf, self.max_depth, self.folds, self.repeats, self.share,
                       self.seed, self.holdout):
            widget.valueChanged.connect(self._write_back)
        for widget in (self.criterion, self.risk, self.priors, self.plan):
            widget.currentIndexChanged.connect(self._write_back)
        for widget in (self.grouped, self.stratified):
            widget.toggled.connect(self._write_back)
        self.run_button.clicked.connect(self.run)
        self.cancel_button.clicked.connect(self.cancel)
        self.curve.size_clicked.connect(self.choose_size)
        self.size_combo.activated.connect(self._size_from_combo)
        self.one_se_button.clicked.connect(self._choose_one_se)
        self.min_button.clicked.connect(self._choose_min)
        session.design_changed.connect(self.refresh_settings)
        session.data_changed.connect(self.refresh_settings)
        session.result_changed.connect(self.refresh_result)
        session.chosen_changed.connect(self.refresh_chosen)
        session.chart_changed.connect(self.refresh_fits)
        session.guards_changed.connect(self.refresh_guards)
        self.refresh_settings()
        self.refresh_result()
        self.refresh_guards()

    # --- settings ---------------------------------------------------------------------------

    def _task(self) -> str:
        design = self.session.design
        return design.task if design is not None and design.task else "classification"

    def refresh_settings(self) -> None:
        if self._writing:
            return
        tree, cv, session = self.session.tree, self.session.cv, self.session
        task = self._task()
        self._writing = True
        try:
            widgets = (self.min_leaf, self.max_depth, self.criterion, self.risk, self.priors,
                       self.plan, self.folds, self.repeats, self.share, self.grouped,
                       self.stratified, self.seed, self.holdout)
            for widget in widgets:
                widget.blockSignals(True)
            self.min_leaf.setValue(tree.min_leaf)
            self.max_depth.setValue(tree.max_depth or 0)
            self.criterion.clear()
            for words, code in CRITERIA[task]:
                self.criterion.addItem(words, code)
            self.criterion.setCurrentIndex(max(0, self.criterion.findData(tree.criterion)))
            self.risk.setCurrentIndex(max(0, self.risk.findData(tree.risk)))
            self.priors.setCurrentIndex(max(0, self.priors.findData(
                tree.priors if isinstance(tree.priors, str) else "observed")))
            self.plan.setCurrentIndex(max(0, self.plan.findData(cv.plan)))
            self.folds.setValue(cv.folds)
            self.repeats.setValue(cv.repeats)
            self.share.setValue(round(cv.validation_share * 100))
            self.grouped.setChecked(cv.grouped)
            self.stratified.setChecked(cv.stratified)
            self.seed.setValue(cv.seed)
            self.holdout.setValue(round((session.holdout or 0) * 100))
            for widget in widgets:
                widget.blockSignals(False)
        finally:
            self._writing = False
        self._enable_settings()

    def _enable_settings(self) -> None:
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
        self.run_button.setEnabled(self.session.request() is not None and not self._busy)
        if self.session.request() is None:
            self.not_ready.show_text("Choose the outcome and at least one predictor on step 2 "
                                     "before running.")
        else:
            self.not_ready.hide()

    def _write_back(self, *_args) -> None:
        if self._writing:
            return
        tree = self.session.tree
        classification = self._task() == "classification"
        tree = replace(tree, min_leaf=self.min_leaf.value(),
                       max_depth=self.max_depth.value() or None,
                       criterion=self.criterion.currentData(),
                       risk=self.risk.currentData() if classification else tree.risk,
                       priors=self.priors.currentData() if classification else tree.priors,
                       seed=self.seed.value())
        cv = CVSettings(plan=self.plan.currentData(), folds=self.folds.value(),
                        repeats=self.repeats.value(), validation_share=self.share.value() / 100,
                        grouped=self.grouped.isChecked(), stratified=self.stratified.isChecked(),
                        seed=self.seed.value())
        holdout = self.holdout.value() / 100 or None
        self._writing = True
        self.session.set_settings(tree=tree, cv=cv, holdout=holdout)
        self._writing = False
        self._enable_settings()

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
            warnings = session.screen.warnings
            n = len(warnings) + (1 if session.screen.error else 0)
            what = []
            for kind, words in (("identity", "columns that may identify patients"),
                                ("leakage", "probable leakage"),
                                ("repeat_visits", "repeat visits"),
                                ("rare_class", "a rare outcome")):
                columns = [f.column for f in warnings if f.kind == kind and f.column]
                if columns and kind in ("identity", "leakage"):
                    names = ", ".join(f"“{escape(c)}”" for c in dict.fromkeys(columns))
                    what.append(f"{words} ({names})")
                elif any(f.kind == kind for f in warnings):
                    what.append(words)
            if session.screen.error:
                what.append("the checks could not be made")
            self.guard_line.symbol.setText("⚠")
            self.guard_line.show_text(
                f"<b>{n} warning{'s' if n != 1 else ''} on step 2</b>: " + "; ".join(what)
                + (". Read them" if n != 1 else ". Read it") + " before relying on the tree.")
        if self._queued and not session.guard_pending:
            self._queued = False
            self._start_run()

    # --- running ----------------------------------------------------------------------------

    def run(self) -> None:
        """Grow the tree; while step 2's checks are under way, wait for them first (they may
        leave identity-like columns out of the predictors)."""
        if self.session.request() is None or self._busy:
            return
        self._busy = True
        self.run_button.setEnabled(False)
        self.cancel_button.setEnabled(True)
        self._started = time.monotonic()
        if self.session.guard_pending:
            self._queued = True
            self.progress.setRange(0, 0)
            self.status.setText("Waiting for the checks of step 2 to finish…")
            return
        self._start_run()

    def _start_run(self) -> None:
        request = self.session.request()
        if request is None:  # the checks left no predictor
            self._busy = False
            self.status.setText("Nothing was grown: no predictor is left on step 2.")
            self._over()
            return
        session = self.session
        self.job = workers.Job(run_derivation, session.table, session.dictionary, request,
                               session.size)
        self.job.signals.progress.connect(self._progress)
        self.job.signals.done.connect(self._done)
        self.job.signals.failed.connect(self._failed)
        self.job.signals.cancelled.connect(self._cancelled)
        self.job.signals.finished.connect(self._over)
        self.progress.setRange(0, 0)
        self.status.setText("Growing the full tree…")
        self.run_button.setEnabled(False)
        self.cancel_button.setEnabled(True)
        workers.start(self.job)

    def cancel(self) -> None:
        if self._busy and self._queued:
            self._queued = False
            self._cancelled()
            self._over()
            return
        if self._busy and self.job is not None:
            self.job.cancel()
            self.status.setText("Stopping after the current step…")
            self.cancel_button.setEnabled(False)

    def stop_work(self) -> None:
        super().stop_work()
        if self._fit_job is not None and self._fit_job.running:
            self._fit_job.cancel()

    @property
    def running(self) -> bool:
        return self._busy

    def _progress(self, done: int, total: int) -> None:
        self.progress.setFormat("%v of %m steps")
        self.progress.setRange(0, total)
        self.progress.setValue(done)
        if done < total:
            self.status.setText(f"Checking on held-out patients: part {done} of {total - 1} done…")

    def _done(self, result) -> None:
        self._busy = False  # the fit is over; what follows only shows its result
        derivation, chosen = result
        expected = self.session.expected_fingerprint
        self.session.expected_fingerprint = None
        reproduced = expected is not None and chosen.model.fingerprint == expected
        self.session.set_result(derivation, chosen, changes_work=not reproduced)
        seconds = time.monotonic() - self._started
        text = f"Done in {seconds:.1f} s. {len(derivation.path.leaves)} sizes on the pruning path."
        for note in derivation.notes:
            text += " " + with_advice(note)
        if expected is not None:
            if reproduced:
                text += (" This is exactly the tree saved in the project (fingerprint "
                         f"{expected[:12]}).")
            else:
                self.warn("The tree grown again differs from the one saved in the project "
                          f"(fingerprint {chosen.model.fingerprint[:12]}, saved "
                          f"{expected[:12]}). The data file or Prunella's version may have "
                          "changed; check the data before relying on this tree.",
                          "Not the saved tree")
        self.status.setText(text)

    def _failed(self, message: str) -> None:
        self._busy = False
        self.status.setText("The run stopped: " + message)
        self.warn(message, "The tree could not be grown")

    def _cancelled(self) -> None:
        self._busy = False
        self.status.setText("Cancelled. Nothing was changed; press Run to start again.")

    def _over(self) -> None:
        self._busy = False
        self.progress.setRange(0, 1)
        self.progress.setValue(0)
        self.progress.setFormat("")
        self.cancel_button.setEnabled(False)
        self._enable_settings()
        self.run_finished.emit()

    # --- the curve and the size -------------------------------------------------------------

    def refresh_result(self) -> None:
        model = self.session.model
        self.size_combo.clear()
        enabled = model is not None
        for widget in (self.size_combo, self.one_se_button, self.min_button):
            widget.setEnabled(enabled)
        if model is None:
            self.curve.show_curve(None, None)
            self.choice.setText("")
            self.fit_note.setText("")
            return
        path = model.path
        for leaves in path["leaves"]:
            words = f"{leaves} outcome box" + ("" if leaves == 1 else "es")
            marks = []
            if leaves == path["one_se_leaves"]:
                marks.append("smallest within 1 SE")
            if leaves == path["min_leaves"]:
                marks.append("lowest error")
            if marks:
                words += " — " + ", ".join(marks)
            self.size_combo.addItem(words, int(leaves))
        fits, label = self._fits()
        self.curve.show_curve(CurveData.from_path(path), int(model.chosen["leaves"]), fits, label)
        self.refresh_chosen()

    def refresh_fits(self) -> None:
        if self.session.derivation is not None and (
                self._fit_sizes is None or self._fit_sizes[0] != self._fit_key()):
            self._start_fits()

    def _fits(self) -> tuple[tuple[int, ...] | None, str]:
        """The shading last computed for this run and paper (see _start_fits)."""
        if self._fit_sizes is None or self._fit_sizes[0] != self._fit_key():
            self._start_fits()
            return None, ""
        return self._fit_sizes[1], self._fit_sizes[2]

    @property
    def fit_sizes(self) -> tuple[int, ...] | None:
        """The sizes shaded on the curve as fitting the chosen paper (None until known)."""
        return None if self._fit_sizes is None else self._fit_sizes[1]

    def _fit_key(self):
        # Every chart setting: the title and subtitle change what fits, too.
        return (id(self.session.derivation), tuple(sorted(self.session.chart.items())))

    def _start_fits(self) -> None:
        """Ask the chart module, in the background, which sizes print legibly on the paper."""
        derivation = self.session.derivation
        if derivation is None:
            return
        key = self._fit_key()
        if self._fit_job is not None and self._fit_job.running:
            self._fit_waiting = True  # ask again when this one is done
            return
        self._fit_waiting = False
        job = workers.Job(sizes_that_fit, derivation, self.session.chart_options(),
                          takes_progress=False)
        job.key = key
        job.signals.done.connect(self._fits_done)
        job.signals.failed.connect(self._fits_failed)
        job.signals.finished.connect(self._fits_over)
        self._fit_job = job
        self.fit_note.setText("Finding the sizes that fit on the paper…")
        workers.start(job)

    def _fits_done(self, sizes) -> None:
        job = self._fit_job
        if job.key != self._fit_key():
            return  # the run or the paper changed meanwhile
        chart = self.session.chart
        paper = str(chart.get("paper") or "a4")
        text = chart.get("min_text") or default_min_text(paper)
        name = PAPER_NAMES.get(paper, paper.upper())
        label = f"Fits on {name} at {text:g} pt"
        self._fit_sizes = (job.key, tuple(int(n) for n in sizes), label)
        self.fit_note.setText(f"Shaded: sizes that print legibly on one {name} page with text of "
                              f"at least {text:g} pt (paper and text size are set on step 6)."
                              + ("" if sizes else " None does: choose larger paper or smaller "
                                 "text on step 6."))
        model = self.session.model
        if model is not None:
            self.curve.show_curve(CurveData.from_path(model.path), int(model.chosen["leaves"]),
                                  self._fit_sizes[1], label)

    def _fits_failed(self, message: str) -> None:
        self.fit_note.setText(message)

    def _fits_over(self) -> None:
        if self._fit_waiting:
            self._start_fits()

    def refresh_chosen(self) -> None:
        model = self.session.model
        if model is None:
            return
        chosen = model.chosen
        self.curve.set_chosen(int(chosen["leaves"]))
        index = self.size_combo.findData(int(chosen["leaves"]))
        blocker = self.size_combo.blockSignals(True)
        self.size_combo.setCurrentIndex(index)
        self.size_combo.blockSignals(blocker)
        self.choice.setText(
            f"<b>Chosen: {chosen['leaves']} outcome boxes</b> ({SIZE_RULES[chosen['rule']]}). "
            f"{errors_beside(chosen, sentence=True)}. Checked by {model.path['cv']}.")

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
