"""Step 2, the outcome and predictors: what the tree predicts, which columns it may ask about,
who the patients and sites are, and (two classes) how bad a missed case is."""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QComboBox, QDoubleSpinBox, QFormLayout, QGroupBox, QHBoxLayout, QLabel,
    QVBoxLayout, QWidget,
)

from core.design import DesignSpec, suggest_task
from core.dictionary import CATEGORY_KINDS, PREDICTOR_KINDS, positive_level
from core.messages import app_advice, app_wording
from gui.guard_watch import GuardWatch, offered_columns
from gui.panels.base import Panel, explain, side_by_side
from gui.widgets.checklist import Checklist
from gui.widgets.dictionary_model import KIND_WORDS
from gui.widgets.findings import Finding, FindingsView

TASK_WORDS = {
    "classification": "Sort patients into outcome groups (classification)",
    "regression": "Estimate a number (regression)",
}
NONE = ""


def column_text(spec) -> str:
    return spec.display if spec.display == spec.name else f"{spec.display} ({spec.name})"


class OutcomePanel(Panel):
    step = "outcome"
    intro = ("Say what the tree should predict and which columns it may ask about. Leave out "
             "anything recorded only after the decision the chart is meant to support.")

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self._writing = False

        self.outcome_combo = explain(QComboBox(), "The column the tree predicts, such as "
                                     "whether the patient was admitted.")
        self.task_combo = explain(QComboBox(), "Classification sorts patients into outcome "
                                  "groups; regression estimates a number such as hours of stay.")
        for code, words in TASK_WORDS.items():
            self.task_combo.addItem(words, code)
        self.positive_combo = explain(QComboBox(), "The outcome the chart should catch (the "
                                      "'positive' class); rates in the boxes are rates of this.")
        self.cost_spin = explain(QDoubleSpinBox(), "The misclassification cost: how many times "
                                 "worse it is to miss a patient with this outcome than to raise "
                                 "a needless alarm; above 1 makes the tree more cautious.")
        self.cost_spin.setRange(0.1, 100.0)
        self.cost_spin.setSingleStep(0.5)
        self.cost_spin.setDecimals(1)
        self.cost_spin.setValue(1.0)
        self.cost_spin.setSuffix(" times")
        self.cost_before = QLabel()
        self.cost_after = QLabel("as bad as a needless alarm")
        self.patient_combo = explain(QComboBox(), "The column that identifies the patient, so "
                                     "that a patient's repeat visits are kept together when the "
                                     "tree is checked.")
        self.site_combo = explain(QComboBox(), "The column naming the hospital or campus; it "
                                  "allows checking by leaving one site out at a time.")
        for combo in (self.outcome_combo, self.positive_combo, self.patient_combo,
                      self.site_combo):
            combo.setMinimumContentsLength(18)
            combo.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)

        form = QFormLayout()
        form.setFieldGrowthPolicy(QFormLayout.AllNonFixedFieldsGrow)
        form.addRow("What should the tree predict?", self.outcome_combo)
        form.addRow("Kind of prediction:", self.task_combo)
        self.positive_label = QLabel("The outcome to catch:")
        form.addRow(self.positive_label, self.positive_combo)
        cost_row = QHBoxLayout()
        cost_row.addWidget(self.cost_spin)
        cost_row.addWidget(self.cost_after, 1)
        self.cost_before.setWordWrap(True)
        form.addRow(self.cost_before, cost_row)
        form.addRow("Patient number:", self.patient_combo)
        form.addRow("Site:", self.site_combo)
        choices = QGroupBox("The outcome")
        choices.setLayout(form)
        self.summary = QLabel()
        self.summary.setWordWrap(True)
        self.summary.setTextFormat(Qt.RichText)
        left = QWidget()
        left_layout = QVBoxLayout(left)
        left_layout.setContentsMargins(0, 0, 0, 0)
        left_layout.addWidget(choices)
        left_layout.addWidget(self.summary)
        self.findings = FindingsView()
        self.findings.status.setTextFormat(Qt.RichText)
        self.findings.setAccessibleName("Checks on these choices")
        checks = QGroupBox("Checks on these choices")
        checks.setToolTip("Prunella checks the choices for columns that identify patients, "
                          "columns that give the outcome away (leakage), repeat visits and "
                          "rare outcomes, in the background.")
        checks_layout = QVBoxLayout(checks)
        checks_layout.addWidget(self.findings)
        left_layout.addWidget(checks, 1)

        self.checklist = Checklist()
        self.checklist.setToolTip("Predictors: the columns the tree may ask a question about.")
        predictors = QGroupBox("Questions the tree may ask about (predictors)")
        predictors.setToolTip("Predictors: the columns the tree may ask a question about.")
        box = QVBoxLayout(predictors)
        box.addWidget(self.checklist)

        splitter = side_by_side(left, predictors, stretch=(3, 2))
        self.body.addWidget(splitter, 1)

        self.outcome_combo.currentIndexChanged.connect(self._outcome_chosen)
        for combo in (self.task_combo, self.positive_combo, self.patient_combo, self.site_combo):
            combo.currentIndexChanged.connect(self._write_back)
        self.checklist.changed.connect(self._write_back)
        self.cost_spin.valueChanged.connect(self._cost_changed)
        self.findings.acted.connect(self._act)
        # The guards run whenever the choices change (gui/guard_watch.py).
        self.watch = GuardWatch(session, parent=self)
        session.data_changed.connect(self._data_changed)
        session.design_changed.connect(self.refresh)
        session.guards_changed.connect(self.show_guards)
        self._data_changed()
        self.show_guards()

    @property
    def job(self):
        """The guards' latest check (Panel.stop_work cancels it when the window closes)."""
        return self.watch.job

    # --- from the session to the widgets ----------------------------------------------------

    def _data_changed(self) -> None:
        dictionary = self.session.dictionary
        if dictionary is None:
            self._fill(None)
            return
        design = self.session.design
        if design is None or design.outcome not in dictionary:
            design = self.default_design()
        elif any(p not in dictionary or dictionary.get(p).kind not in PREDICTOR_KINDS
                 for p in design.predictors):
            # A column that changed to a kind a tree cannot ask about leaves the predictors.
            design = replace(design, predictors=tuple(
                p for p in design.predictors
                if p in dictionary and dictionary.get(p).kind in PREDICTOR_KINDS))
        if design is not self.session.design:
            self._writing = True
            self.session.set_design(design, by_user=False)
            self._writing = False
        self._fill(design)

    def default_design(self) -> DesignSpec | None:
        """The choices the data dictionary suggests (its outcome, predictors, patient, site)."""
        dictionary = self.session.dictionary
        outcomes = dictionary.by_role("outcome")
        if not outcomes:
            return None
        outcome = outcomes[0]
        patient = next((c.name for c in dictionary.by_role("patient_id")), None)
        site = next((c.name for c in dictionary.by_role("site")), None)
        predictors = tuple(c.name for c in dictionary.by_role("predictor")
                           if c.kind in PREDICTOR_KINDS and c.name not in (patient, site))
        task = suggest_task(outcome)
        positive = self._default_positive(outcome) if task == "classification" else None
        return DesignSpec(outcome.name, predictors, task=task, positive=positive,
                          patient_id=patient, site=site)

    @staticmethod
    def _default_positive(spec) -> str | None:
        if spec.kind in CATEGORY_KINDS and len(spec.levels) == 2:
            return positive_level(spec)
        return None

    def refresh(self) -> None:
        if not self._writing:
            self._fill(self.session.design)

    def _fill(self, design: DesignSpec | None) -> None:
        dictionary = self.session.dictionary
        self._writing = True
        try:
            widgets = (self.outcome_combo, self.task_combo, self.positive_combo,
                       self.patient_combo, self.site_combo)
            for widget in widgets:
                widget.blockSignals(True)
            self.outcome_combo.clear()
            self.patient_combo.clear()
            self.site_combo.clear()
            self.outcome_combo.addItem("Choose a column…", NONE)
            self.patient_combo.addItem("(none: every row is a different patient)", NONE)
            self.site_combo.addItem("(none: one site)", NONE)
            if dictionary is not None:
                for spec in dictionary.columns:
                    if spec.kind in PREDICTOR_KINDS:
                        self.outcome_combo.addItem(column_text(spec), spec.name)
                    self.patient_combo.addItem(column_text(spec), spec.name)
                    if spec.kind in CATEGORY_KINDS or spec.kind == "identifier":
                        self.site_combo.addItem(column_text(spec), spec.name)
            if design is not None:
                self._select(self.outcome_combo, design.outcome)
                self._select(self.patient_combo, design.patient_id or NONE)
                self._select(self.site_combo, design.site or NONE)
                self._select(self.task_combo, design.task or "classification")
            self._fill_positive(design)
            self._fill_predictors(design)
            self._update_marks()
            self.cost_spin.blockSignals(True)
            self.cost_spin.setValue(self.session.tree.miss_cost or 1.0)
            self.cost_spin.blockSignals(False)
            for widget in widgets:
                widget.blockSignals(False)
        finally:
            self._writing = False
        self._update_summary()

    @staticmethod
    def _select(combo: QComboBox, code) -> None:
        index = combo.findData(code)
        combo.setCurrentIndex(index if index >= 0 else 0)

    def _fill_positive(self, design: DesignSpec | None) -> None:
        self.positive_combo.blockSignals(True)
        self.positive_combo.clear()
        spec = None
        if design is not None and self.session.dictionary is not None \
                and design.outcome in self.session.dictionary:
            spec = self.session.dictionary.get(design.outcome)
        two = (spec is not None and design.task == "classification"
               and spec.kind in CATEGORY_KINDS and len(spec.levels) == 2)
        if two:
            for level in spec.levels:
                self.positive_combo.addItem(level, level)
            self._select(self.positive_combo, design.positive or self._default_positive(spec))
            positive = self.positive_combo.currentData()
            self.cost_before.setText(f"Missing a patient with “{positive}” is:")
        for widget in (self.positive_label, self.positive_combo, self.cost_before,
                       self.cost_spin, self.cost_after):
            widget.setVisible(two)
        self.positive_combo.blockSignals(False)

    def _fill_predictors(self, design: DesignSpec | None) -> None:
        dictionary = self.session.dictionary
        if dictionary is None:
            self.checklist.set_items([], ())
            return
        taken = set() if design is None else {design.outcome, design.patient_id, design.site}
        items = []
        specs = {spec.name: spec for spec in dictionary.columns}
        for name in offered_columns(dictionary, design):
            spec = specs[name]
            tip = f"{spec.name}: {KIND_WORDS[spec.kind]}"
            if spec.unit:
                tip += f", in {spec.unit}"
            if spec.note:
                tip += f". {spec.note}"
            items.append((spec.name, column_text(spec), tip))
        suggested = tuple(c.name for c in dictionary.by_role("predictor") if c.name not in taken)
        checked = () if design is None else design.predictors
        self.checklist.set_items(items, checked, suggested)

    # --- from the widgets to the session ----------------------------------------------------

    def _outcome_chosen(self) -> None:
        if self._writing:
            return
        name = self.outcome_combo.currentData()
        dictionary = self.session.dictionary
        if not name or dictionary is None:
            design = None
        else:
            spec = dictionary.get(name)
            old = self.session.design
            task = suggest_task(spec)
            predictors = tuple(p for p in (old.predictors if old else
                                           tuple(c.name for c in dictionary.by_role("predictor")))
                               if p != name)
            design = DesignSpec(
                name, predictors, task=task,
                positive=self._default_positive(spec) if task == "classification" else None,
                patient_id=None if old is None or old.patient_id == name else old.patient_id,
                site=None if old is None or old.site == name else old.site)
        self._writing = True  # the form is filled once, below, not again by refresh()
        try:
            self.session.set_design(design)
        finally:
            self._writing = False
        self._fill(design)

    def _write_back(self, *_args) -> None:
        if self._writing or self.session.dictionary is None:
            return
        name = self.outcome_combo.currentData()
        if not name:
            return
        task = self.task_combo.currentData()
        patient = self.patient_combo.currentData() or None
        site = self.site_combo.currentData() or None
        taken = {name, patient, site}
        predictors = tuple(p for p in self.checklist.checked() if p not in taken)
        self._update_kept(predictors)
        spec = self.session.dictionary.get(name)
        positive = self.positive_combo.currentData() if task == "classification" else None
        if task == "classification" and positive is None:
            positive = self._default_positive(spec)
        design = DesignSpec(name, predictors, task=task, positive=positive, patient_id=patient,
                            site=site)
        rebuild = self.session.design is None or (
            (design.patient_id, design.site, design.task) !=
            (self.session.design.patient_id, self.session.design.site, self.session.design.task))
        self._writing = True
        self.session.set_design(design)
        self._writing = False
        if rebuild:  # the predictor list and the positive choice depend on these
            self._fill(design)
        else:
            self._fill_positive(design)
            self._update_summary()

    def _update_kept(self, predictors: tuple[str, ...]) -> None:
        """A column the guards left out and the user ticked back, one at a time, is kept on
        purpose; a kept column that is unticked is left out again. Ticking every column with
        a button keeps nothing that identifies patients."""
        screen, kept = self.session.screen, set(self.session.kept)
        if screen is not None and not self.checklist.bulk:
            kept |= {p for p in predictors if p in screen.left_out_columns}
        offered = set(self.checklist.names())
        kept -= {k for k in kept if k in offered and k not in predictors}
        self.session.set_kept(kept)

    def keep_column(self, name: str) -> None:
        """Tick a column the guards left out, on purpose (the button beside its warning)."""
        self.checklist.set_checked(tuple(self.checklist.checked()) + (name,))
        self._write_back()

    def leave_out(self, name: str) -> None:
        """Untick a column (the button beside a leakage or identity warning)."""
        self.checklist.set_checked(tuple(p for p in self.checklist.checked() if p != name))
        self._write_back()

    def _act(self, action: str, column: str) -> None:
        if action == "keep":
            self.keep_column(column)
        elif action == "leave":
            self.leave_out(column)
        elif action == "patient":
            self._select(self.patient_combo, column)  # announces the change itself
        elif action == "group":
            self.session.set_settings(cv=replace(self.session.cv, grouped=True))

    # --- the guards' findings ---------------------------------------------------------------

    def guard_findings(self) -> list[Finding]:
        """The guards' findings in plain words, with what to do; warnings first."""
        screen, design = self.session.screen, self.session.design
        if screen is None or design is None:
            return []
        rows = []
        for f in screen.left_out:
            rows.append(Finding("warning", app_wording(f.message), app_advice(f.message),
                                "keep", "Keep it anyway", f.column, "identity"))
        for f in screen.kept:
            if f.column in design.predictors:
                what = f.measures.get("what", "an identity")
                rows.append(Finding(
                    "warning", f"“{f.column}” is asked about because you ticked it, although it "
                    f"looks like {what}. The chart prints every question the tree asks: keep it "
                    "only if it identifies no one.", app_advice(f.message), "leave",
                    "Leave it out", f.column, "identity_kept"))
        actions = {"leakage": ("leave", "Leave it out"),
                   "repeats_no_id": ("patient", "Use as patient number"),
                   "repeats_not_grouped": ("group", "Keep visits together")}
        for f in screen.other_findings:
            key = f.code.split(".")[-1] if f.kind == "repeat_visits" else f.kind
            action, words = actions.get(key, (None, ""))
            rows.append(Finding(f.severity, app_wording(f.message), app_advice(f.message),
                                action, words, f.column, f.kind))
        if screen.error:
            rows.append(Finding("refused", "The checks could not be made: " + screen.error,
                                None, kind="error"))
        return rows  # FindingsView puts the most serious first

    def show_guards(self) -> None:
        session = self.session
        if session.guard_pending:
            status = ("Checking these choices for columns that identify patients, columns "
                      "that give the outcome away, repeat visits and rare outcomes…")
            rows = []
        elif session.screen is None:
            status = "The choices are checked once the outcome is chosen."
            rows = []
        else:
            rows = self.guard_findings()
            warnings = sum(r.severity != "note" for r in rows)
            if warnings:
                status = f"<b>{warnings} warning{'s' if warnings != 1 else ''}</b> about these " \
                         "choices; read each before growing the tree."
            else:
                status = ("No warnings: no ticked column identifies patients or gives the "
                          "outcome away on its own.")
        self.findings.show_findings(status, rows)
        self._update_marks()

    def _update_marks(self) -> None:
        screen, design = self.session.screen, self.session.design
        marks: dict[str, tuple[str, str]] = {}
        if screen is not None and design is not None:
            for f in screen.left_out:
                marks[f.column] = ("⚠ left out: may identify patients",
                                   "Left out because it looks like it identifies patients; "
                                   "tick it to keep it anyway, only if it identifies no one.")
            for f in screen.kept:
                if f.column in design.predictors:
                    marks[f.column] = ("⚠ kept: may identify patients",
                                       "You ticked it although it looks like it identifies "
                                       "patients.")
            for f in screen.other_findings:
                if f.kind == "leakage":
                    marks[f.column] = ("⚠ probable leakage",
                                       "On its own it predicts the outcome almost perfectly: "
                                       "check when it is recorded.")
        self.checklist.set_marks(marks)

    def _cost_changed(self, value: float) -> None:
        if self._writing:
            return
        cost = None if abs(value - 1.0) < 1e-9 else float(value)
        self._writing = True
        self.session.set_settings(tree=replace(self.session.tree, miss_cost=cost))
        self._writing = False

    def _update_summary(self) -> None:
        design, dictionary, table = self.session.design, self.session.dictionary, self.session.table
        if design is None or dictionary is None or table is None:
            self.summary.setText("Choose the outcome to go on.")
            return
        spec = dictionary.get(design.outcome)
        what = (f"whether a patient had “{design.positive}”" if design.positive
                else ("a number" if design.task == "regression" else "the outcome group"))
        parts = [f"The tree will predict <b>{spec.display}</b> ({what}) from "
                 f"<b>{len(design.predictors)}</b> of the columns, on {table.provenance.n_rows:,} "
                 "rows."]
        if not design.predictors:
            parts = ["Tick at least one column the tree may ask about."]
        if design.patient_id:
            parts.append("Each patient's visits stay together when the tree is checked.")
        self.summary.setText(" ".join(parts))
