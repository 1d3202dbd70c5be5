"""Step 2, the outcome and predictors: what the tree predicts, which columns it may ask about,
who the patients and sites are, and (two classes) how bad a missed case is."""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QComboBox, QDoubleSpinBox, QFormLayout, QGroupBox, QHBoxLayout, QLabel, QSpinBox,
    QVBoxLayout, QWidget,
)

from core.design import default_design
from core.dictionary import CATEGORY_KINDS, PREDICTOR_KINDS, may_group_patients
from core.messages import app_advice, app_wording, say
from core.option_limits import spin_range
from core.phrases import plural
from core.sizing import chosen_in_words
from core.sizing.goal import Goal
from gui.binding import Bindings
from gui.guard_watch import GuardWatch, offered_columns
from gui.panels.step_panel import StepPanel, side_by_side, with_tooltip
from gui.widgets.checklist import Checklist
from gui.widgets.dictionary_model import KIND_WORDS
from gui.widgets.findings import Finding, FindingsView

TASK_WORDS = {
    "classification": "Sort patients into outcome groups (classification)",
    "regression": "Estimate a number (regression)",
}
NONE = ""


def column_text(spec) -> str:
    """A column as step 2 lists it: its label with its header in brackets, or the header
    alone when it starts with the label ("Age (yrs)", not "Age (Age (yrs))")."""
    if spec.name.casefold().startswith(spec.display.casefold()):
        return spec.name
    return f"{spec.display} ({spec.name})"


class OutcomePanel(StepPanel):
    step = "outcome"
    intro = ("Say what the tree should predict and which columns it may ask about. Leave out "
             "anything recorded only after the decision the chart is meant to support.")

    def __init__(self, session, parent=None) -> None:
        super().__init__(session, parent)
        self.bindings = Bindings()
        left = QWidget()
        left_layout = QVBoxLayout(left)
        left_layout.setContentsMargins(0, 0, 0, 0)
        left_layout.addWidget(self._choices_box())
        self.summary = QLabel()
        self.summary.setWordWrap(True)
        self.summary.setTextFormat(Qt.RichText)
        left_layout.addWidget(self.summary)
        left_layout.addWidget(self._checks_box(), 1)
        self.body.addWidget(side_by_side(left, self._predictors_box(), stretch=(3, 2)), 1)
        self._bind()
        # The guards run whenever the choices change (gui/guard_watch.py).
        self.watch = GuardWatch(session, parent=self)
        self.runners.append(self.watch.runner)
        session.state_changed.connect(self.refresh)  # once per change, whatever changed
        for signal in (session.result_changed, session.chosen_changed, session.opened):
            signal.connect(self._update_cost_words)
        session.guards_changed.connect(self.show_guards)
        self.refresh()
        self.show_guards()

    def _choices_box(self) -> QGroupBox:
        """The outcome, the kind of prediction, the outcome to catch and its cost, the
        patient number and the site."""
        self.outcome_combo = with_tooltip(QComboBox(), "The column the tree predicts, such as "
                                          "whether the patient was admitted.")
        self.task_combo = with_tooltip(QComboBox(), "Classification sorts patients into "
                                       "outcome groups; regression estimates a number such as "
                                       "hours of stay.")
        self.positive_combo = with_tooltip(QComboBox(), "The outcome the chart should catch "
                                           "(the 'positive' class); rates in the boxes are "
                                           "rates of this.")
        self.cost_spin = with_tooltip(QDoubleSpinBox(), "The misclassification cost: how many "
                                      "times worse it is to miss a patient with this outcome "
                                      "than to raise a needless alarm; above 1 makes the tree "
                                      "more cautious.")
        self.cost_spin.setRange(0.1, spin_range("miss_cost")[1])
        self.cost_spin.setSingleStep(0.5)
        self.cost_spin.setDecimals(1)
        self.cost_spin.setValue(1.0)
        self.cost_spin.setSuffix(" times")
        self.cost_before = QLabel()
        self.cost_before.setWordWrap(True)
        # A clinical goal instead of a guessed cost: core searches the costs for the smallest
        # tree whose cross-validated sensitivity (or specificity) reaches it.
        self.sizing_label = QLabel("Size the tree by:")
        self.goal_combo = with_tooltip(QComboBox(), "A miss cost you set, or a clinical goal: "
                                       "Prunella then tries a range of miss costs and keeps the "
                                       "smallest tree whose cross-validated catch rate "
                                       "(sensitivity) or spare rate (specificity) reaches it.")
        self.goal_spin = with_tooltip(QSpinBox(), "The least share the tree must reach under "
                                      "cross-validation.")
        low, high = spin_range("goal")
        self.goal_spin.setRange(max(1, int(round(low * 100)) + 1),
                                min(99, int(round(high * 100)) - 1))
        self.goal_spin.setValue(95)
        self.goal_spin.setSuffix(" %")
        self.goal_spin.setPrefix("at least ")
        self.cost_after = QLabel("as bad as a needless alarm")
        self.patient_combo = with_tooltip(QComboBox(), "The column that identifies the patient, "
                                          "so that a patient's repeat visits are kept together "
                                          "when the tree is checked.")
        self.site_combo = with_tooltip(QComboBox(), "The column naming the hospital or campus; "
                                       "it allows checking by leaving one site out at a time.")
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
        goal_row = QHBoxLayout()
        goal_row.addWidget(self.goal_combo, 1)
        goal_row.addWidget(self.goal_spin)
        form.addRow(self.sizing_label, goal_row)
        form.addRow(self.cost_before, cost_row)
        # What the cost (or goal) did to the chosen tree, in clinical words (core's counts).
        self.cost_words = QLabel()
        self.cost_words.setWordWrap(True)
        self.cost_words.setObjectName("cost_words")
        form.addRow(self.cost_words)
        form.addRow("Patient number:", self.patient_combo)
        form.addRow("Site:", self.site_combo)
        box = QGroupBox("The outcome")
        box.setLayout(form)
        return box

    def _checks_box(self) -> QGroupBox:
        self.findings = FindingsView()
        self.findings.status.setTextFormat(Qt.RichText)
        self.findings.setAccessibleName("Checks on these choices")
        self.findings.acted.connect(self._act)
        box = QGroupBox("Checks on these choices")
        box.setToolTip("Prunella checks the choices for columns that identify patients, "
                       "columns that give the outcome away (leakage), repeat visits and "
                       "rare outcomes, in the background.")
        QVBoxLayout(box).addWidget(self.findings)
        return box

    def _predictors_box(self) -> QGroupBox:
        self.checklist = Checklist()
        self.checklist.setToolTip("Predictors: the columns the tree may ask a question about.")
        box = QGroupBox("Questions the tree may ask about (predictors)")
        box.setToolTip("Predictors: the columns the tree may ask a question about.")
        QVBoxLayout(box).addWidget(self.checklist)
        return box

    # --- the widgets and the session --------------------------------------------------------

    def _bind(self) -> None:
        s, bind = self.session, self.bindings.bind
        design = lambda: s.design  # noqa: E731 - read when shown, not now
        bind(self.outcome_combo, lambda: design().outcome if design() else NONE,
             lambda name: name and s.choose_outcome(name), self._outcome_choices)
        bind(self.task_combo, lambda: design().task if design() else "classification",
             self._task_chosen, lambda: tuple((w, c) for c, w in TASK_WORDS.items()))
        bind(self.positive_combo, lambda: design().positive if design() else None,
             lambda level: self._change(positive=level), self._positive_choices)
        bind(self.cost_spin, lambda: s.tree.miss_cost or 1.0, self._cost_chosen)
        bind(self.goal_combo, lambda: s.goal.measure if s.goal else "cost", self._goal_chosen,
             self._goal_choices)
        bind(self.goal_spin, lambda: round((s.goal.at_least if s.goal else 0.95) * 100),
             self._goal_share_chosen)
        bind(self.patient_combo, lambda: (design().patient_id if design()
                                          else self._dictionary_role("patient_id")) or NONE,
             lambda name: self._role_chosen("patient_id", name),
             lambda: self._column_choices("(none: every row is a different patient)",
                                          may_group_patients))
        bind(self.site_combo, lambda: (design().site if design()
                                       else self._dictionary_role("site")) or NONE,
             lambda name: self._role_chosen("site", name),
             lambda: self._column_choices("(none: one site)", lambda spec: spec.kind in
                                          CATEGORY_KINDS or spec.kind == "identifier"))
        bind(self.checklist, lambda: design().predictors if design() else tuple(
                 c.name for c in s.dictionary.by_role("predictor")) if s.dictionary else (),
             lambda ticked: s.choose_predictors(ticked, self.checklist.names(),
                                                self.checklist.bulk),
             self._predictor_choices)

    def _dictionary_role(self, role: str) -> str | None:
        """Before an outcome is chosen, step 1's roles are shown, so the two steps agree."""
        dictionary = self.session.dictionary
        found = () if dictionary is None else dictionary.by_role(role)
        return found[0].name if found else None

    def _column_choices(self, none_words: str, fits) -> tuple:
        dictionary = self.session.dictionary
        specs = () if dictionary is None else dictionary.columns
        return ((none_words, NONE),) + tuple((column_text(c), c.name) for c in specs if fits(c))

    def _outcome_choices(self) -> tuple:
        dictionary, design = self.session.dictionary, self.session.design
        specs = () if dictionary is None else dictionary.columns
        columns = tuple((column_text(c), c.name) for c in specs if c.kind in PREDICTOR_KINDS)
        # "Choose…" only while nothing is chosen: an outcome, once chosen, is changed, not unset.
        return ((("Choose a column…", NONE),) if design is None else ()) + columns

    def _outcome_spec(self):
        design, dictionary = self.session.design, self.session.dictionary
        if design is None or dictionary is None or design.outcome not in dictionary:
            return None
        return dictionary.get(design.outcome)

    def _positive_choices(self) -> tuple:
        return tuple((level, level) for level in self._outcome_spec().levels) \
            if self.session.two_classes() else ()

    def _predictor_choices(self) -> tuple:
        dictionary, design = self.session.dictionary, self.session.design
        if dictionary is None:
            return ((), ())
        items = []
        for name in offered_columns(dictionary, design):
            spec = dictionary.get(name)
            tip = f"{spec.name}: {KIND_WORDS[spec.kind]}"
            if spec.unit:
                tip += f", in {spec.unit}"
            if spec.note:
                tip += f". {spec.note}"
            items.append((spec.name, column_text(spec), tip))
        taken = set() if design is None else {design.outcome, design.patient_id, design.site}
        suggested = tuple(c.name for c in dictionary.by_role("predictor") if c.name not in taken)
        return (tuple(items), suggested)

    def _change(self, **changes) -> None:
        if self.session.design is not None:
            self.session.set_design(replace(self.session.design, **changes))

    def _task_chosen(self, task: str) -> None:
        """Another kind of prediction: the outcome to catch is suggested afresh for it."""
        design = self.session.design
        if design is not None:
            self.session.set_design(default_design(
                self.session.dictionary, design.outcome, predictors=design.predictors,
                patient_id=design.patient_id, site=design.site, task=task))

    def _role_chosen(self, role: str, name: str) -> None:
        """A patient number or site chosen (or none): it is no longer a predictor."""
        design = self.session.design
        if design is not None:
            self._change(**{role: name or None},
                         predictors=tuple(p for p in design.predictors if p != name))

    def _cost_chosen(self, value: float) -> None:
        cost = None if abs(value - 1.0) < 1e-9 else float(value)
        self.session.set_settings(tree=replace(self.session.tree, miss_cost=cost))

    def _goal_choices(self) -> tuple:
        positive = (self.session.design.positive if self.session.design else None) or "yes"
        return (("the miss cost below", "cost"),
                (f"a goal: catch patients with “{positive}” (rule out)", "sensitivity"),
                (f"a goal: spare patients without “{positive}” the test (rule in)",
                 "specificity"))

    def _goal_chosen(self, measure: str) -> None:
        share = self.goal_spin.value() / 100
        self.session.set_goal(None if measure == "cost" else Goal(measure, share))

    def _goal_share_chosen(self, percent: int) -> None:
        goal = self.session.goal
        if goal is not None:
            self.session.set_goal(Goal(goal.measure, percent / 100))

    def refresh(self) -> None:
        """Show the session's choices (the widgets are filled by their bindings)."""
        self.bindings.show()
        two = self.session.two_classes()
        if two:
            self.cost_before.setText(f"Missing a patient with “{self.session.design.positive}” "
                                     "is:")
        for widget in (self.positive_label, self.positive_combo, self.cost_before,
                       self.cost_spin, self.cost_after, self.sizing_label, self.goal_combo,
                       self.goal_spin):
            widget.setVisible(two)
        by_goal = self.session.goal is not None
        self.goal_spin.setEnabled(by_goal)
        for widget in (self.cost_before, self.cost_spin, self.cost_after):
            widget.setEnabled(not by_goal)  # the goal search tries the costs itself
        self._update_marks()
        self._update_summary()
        self._update_cost_words()

    def _update_cost_words(self) -> None:
        """The chosen tree's cross-validated catches and needless alarms, named by the
        outcome's own levels; said to belong to the earlier tree once the choices change."""
        chosen, text = self.session.chosen, None
        words = chosen_in_words(chosen) if chosen is not None and self.session.two_classes() else None
        if words:
            boxes = plural(len(chosen.model.leaves), "outcome box", "outcome boxes")
            old = "size" in self.session.stale_steps()
            words = words[0].lower() + words[1:]  # it follows a colon
            text = say("app.cost_in_words_old" if old else "app.cost_in_words", boxes=boxes,
                       words=words)
        self.cost_words.setText(text or "")
        self.cost_words.setVisible(bool(text))

    def keep_column(self, name: str) -> None:
        """Tick a column the guards left out, on purpose (the button beside its warning)."""
        self.session.choose_predictors(self.checklist.checked() + (name,),
                                       self.checklist.names())

    def leave_out(self, name: str) -> None:
        """Untick a column (the button beside a leakage or identity warning)."""
        self.session.choose_predictors(tuple(p for p in self.checklist.checked() if p != name),
                                       self.checklist.names())

    def _act(self, action: str, column: str) -> None:
        if action == "keep":
            self.keep_column(column)
        elif action == "leave":
            self.leave_out(column)
        elif action == "patient":
            self._role_chosen("patient_id", column)
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
                kept = say("app.identity_kept", column=f.column, what=what)
                rows.append(Finding("warning", kept, app_advice(kept), "leave", "Leave it out",
                                    f.column, "identity_kept"))
        actions = {"leakage": ("leave", "Leave it out"), "period": ("leave", "Leave it out"),
                   "repeats_no_id": ("patient", "Use as patient number"),
                   "repeats_not_grouped": ("group", "Keep visits together")}
        for f in screen.other_findings:
            key = f.code.split(".")[-1] if f.kind == "repeat_visits" else f.kind
            action, words = actions.get(key, (None, ""))
            rows.append(Finding(f.severity, app_wording(f.message), app_advice(f.message),
                                action, words, f.column, f.kind))
        if screen.error:
            failed = say("app.checks_failed", problem=screen.error)
            rows.append(Finding("refused", failed, app_advice(screen.error), kind="error"))
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
