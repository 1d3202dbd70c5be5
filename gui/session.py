"""The work in progress, in one place: the data, the user's choices, and everything each step
shows (the run, the chosen size, its checks, nested cross-validation, stability, the curve's
shading, the chart options). It computes nothing; it holds core's objects, says what changed
(Qt signals) and which steps are out of date, and turns itself into a project file.

Opening another file or project starts every step afresh: no result, check, size, chart title
or status message of the previous one survives. Step 1's "Use" column and step 2's choices are
kept in agreement here (the outcome, the patient number, the site), whichever step changed.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, replace

from PySide6.QtCore import QObject, Signal

from core.chart import ChartOptions
from core.data import LoadedTable
from core.design import DesignSpec, default_design
from core.design.guards import kept_on_purpose
from core.dictionary import CATEGORY_KINDS, PREDICTOR_KINDS, DataDictionary
from core.project import Project, chart_options, chart_settings
from core.sizing import CVSettings, Derivation, DerivationRequest, TreeSettings
from core.sizing.goal import Goal
from core.work_place import WorkPlace

STEPS = ("data", "outcome", "size", "tree", "checking", "chart")
STEP_TITLES = {
    "data": "The data",
    "outcome": "Outcome and predictors",
    "size": "Size of the tree",
    "tree": "The tree",
    "checking": "Checking it",
    "chart": "The chart",
}
ROLES = ("outcome", "patient_id", "site")  # the roles step 1 and step 2 both show
_SERIALS = itertools.count(1)  # one number per file opened: never the same twice


@dataclass(frozen=True)
class Shading:
    """The sizes of one run that print legibly with one set of chart options."""

    derivation: Derivation
    options: ChartOptions
    sizes: tuple[int, ...]


def _roles_of(design: DesignSpec | None) -> dict[str, str | None]:
    if design is None:
        return dict.fromkeys(ROLES)
    return {"outcome": design.outcome, "patient_id": design.patient_id, "site": design.site}


class Session(QObject):
    """Everything the user has loaded, chosen and computed, with change signals."""

    opened = Signal()  # another file or project: every step starts afresh
    data_changed = Signal()  # a new table or dictionary
    design_changed = Signal()  # outcome, predictors or settings
    result_changed = Signal()  # a new run finished (or the results were cleared)
    chosen_changed = Signal()  # another size was chosen from the same run
    checks_changed = Signal()  # checks on separate patients, nested CV, stability
    shading_changed = Signal()  # the sizes shaded on the curve as fitting the paper
    chart_changed = Signal()  # chart options
    guards_changed = Signal()  # the checks of the outcome step started or came back
    status_changed = Signal(str, int)  # the status bar's message and how long (ms; 0: stays)
    state_changed = Signal()  # out-of-date steps or unsaved changes

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.chart = ChartOptions()
        # Where folds, nested CV and bootstrap resamples run (all cores unless the user said
        # otherwise in "Where the work runs"); a setting of this computer, not of the project.
        self.work_place = WorkPlace()
        self.project_path: str | None = None
        self.dirty = False
        self._forget_data()

    def _forget_data(self) -> None:
        """Nothing of a previous file: no data, choices, results, checks, title or status."""
        self.table: LoadedTable | None = None
        self.dictionary: DataDictionary | None = None
        self.notes: tuple[str, ...] = ()  # what reading and inference had to decide
        self.serial = 0  # which file is open (a new number for each one opened)
        self.design: DesignSpec | None = None
        self.goal: Goal | None = None  # a clinical goal sizes the tree instead of a miss cost
        # Every setting of steps 2 and 3 starts at its default: a miss cost, priors or a loss
        # belong to the previous outcome's classes, and a new file is a new piece of work.
        self.tree, self.cv, self.holdout = TreeSettings(), CVSettings(), None
        # The guards of step 2 (gui/guard_watch.py): identity columns the user chose to keep
        # although they look like they identify patients, the latest result for the current
        # choices, and whether a check is under way.
        self.kept: frozenset[str] = frozenset()
        self.screen = None  # a gui.guard_watch.Screen
        self.guard_pending = False
        self.expected_fingerprint: str | None = None  # from a reopened project
        self.chart = replace(self.chart, title=None, subtitle=None)  # they belong to the file
        self.status = ""
        self._forget_results()

    def _forget_results(self) -> None:
        self.derivation: Derivation | None = None  # the run, as it came back
        self.chosen: Derivation | None = None  # the run with the chosen size
        self.size: str | int = "1se"
        self.external_path: str | None = None  # the other file checked on (redone per size)
        self.shading: Shading | None = None
        self.earlier_check = None  # the last tree's check on another file, until redone
        self._forget_checks()

    def _forget_checks(self) -> None:
        """A new tree: its checks start afresh (the held-out one is made by core with it)."""
        chosen = self.chosen
        # Only a check that names the chosen tree by its fingerprint counts as its check.
        self.checks: tuple = () if chosen is None or chosen.heldout_check is None \
            or not chosen.heldout_check.names(chosen.model) \
            else (chosen.heldout_check,)  # CheckResults, held-out first
        self.print_external = True  # the chart prints the latest external check
        self.nested = None  # a core.checking.nested.NestedResult for the chosen tree
        self.stability = None  # a core.checking.stability.Stability for the chosen tree

    def _announce(self, *signals) -> None:
        for signal in signals:
            signal.emit()
        self.state_changed.emit()

    def _opened(self) -> None:
        """Every step hears that the work is a different one now."""
        self.opened.emit()
        self.status_changed.emit(self.status, 0)
        self._announce(self.data_changed, self.design_changed, self.result_changed,
                       self.checks_changed, self.shading_changed, self.chart_changed,
                       self.guards_changed)

    # --- what the user changes ------------------------------------------------------------

    def set_data(self, table: LoadedTable, dictionary: DataDictionary,
                 notes: tuple[str, ...] = ()) -> None:
        """A file was read (another file: everything starts afresh, with the dictionary's
        choices), or the same file's dictionary was read again."""
        if table is not self.table:
            self._forget_data()
            self.table, self.serial = table, next(_SERIALS)
            self.design = default_design(dictionary)
            if self.design is not None:
                dictionary = dictionary.with_roles(*_roles_of(self.design).values())
            self.dictionary, self.notes = dictionary, tuple(notes)
            self.dirty = True
            self._opened()
            return
        # The same file guessed again: step 2's choices stay, the roles say them.
        self.notes = tuple(notes)
        design = (default_design(dictionary) if self.design is None
                  else self._design_following(dictionary, dictionary))
        self._take_dictionary(dictionary, design)

    def set_dictionary(self, dictionary: DataDictionary,
                       notes: tuple[str, ...] | None = None) -> None:
        """A dictionary edited on step 1 or loaded from a file: step 2's choices follow its
        roles."""
        if notes is not None:
            self.notes = tuple(notes)
        self._take_dictionary(dictionary, self._design_following(self.dictionary, dictionary))

    def _take_dictionary(self, dictionary: DataDictionary, design: DesignSpec | None) -> None:
        if design is not None:
            dictionary = dictionary.with_roles(*_roles_of(design).values())
        changed = design != self.design
        if dictionary == self.dictionary and not changed:
            self._announce(self.data_changed)  # the notes may be new
            return
        self.dictionary, self.design, self.dirty = dictionary, design, True
        self._announce(self.data_changed, *((self.design_changed,) if changed else ()))

    def _design_following(self, before: DataDictionary | None,
                          after: DataDictionary) -> DesignSpec | None:
        """Step 2's choices after a dictionary edit: a column newly given the outcome,
        patient-number or site role takes it; one that lost it leaves it; a predictor whose
        kind a tree cannot ask about leaves the predictors. ``before is after``: the same
        file guessed again, where only what is no longer there changes."""
        design, roles = self.design, _roles_of(self.design)
        for role in ROLES:
            newly = [c.name for c in after.by_role(role) if before is not after and (
                before is None or c.name not in before or before.get(c.name).role != role)]
            held = roles[role]
            if newly:
                roles[role] = newly[0]
            elif held is not None and (held not in after or (
                    before is not after and after.get(held).role != role)):
                roles[role] = None
        if roles["outcome"] is None:
            return None
        asked = tuple(p for p in (design.predictors if design else ())
                      if p in after and after.get(p).kind in PREDICTOR_KINDS)
        if design is None or roles["outcome"] != design.outcome:
            return default_design(after, roles["outcome"], predictors=asked if design else None,
                                  patient_id=roles["patient_id"], site=roles["site"])
        taken = {roles["patient_id"], roles["site"]}
        return replace(design, predictors=tuple(p for p in asked if p not in taken),
                       patient_id=roles["patient_id"], site=roles["site"])

    def set_design(self, design: DesignSpec | None, by_user: bool = True) -> None:
        """Step 2's choices (``by_user=False`` for ones made for the user, such as the guards
        leaving a column out: nothing new to save). The dictionary's roles follow; another
        outcome gets the chart's default title and subtitle."""
        if design == self.design:
            return
        old = self.design
        signals = [self.design_changed]
        if design is not None and self.dictionary is not None:
            dictionary = self.dictionary.with_roles(*_roles_of(design).values())
            if dictionary != self.dictionary:
                self.dictionary = dictionary
                signals.insert(0, self.data_changed)
        if old is not None and (design is None or design.outcome != old.outcome) \
                and (self.chart.title, self.chart.subtitle) != (None, None):
            self.chart = replace(self.chart, title=None, subtitle=None)
            signals.append(self.chart_changed)
        self.design = design
        self.dirty = self.dirty or by_user
        self._announce(*signals)

    def choose_outcome(self, outcome: str) -> None:
        """Another outcome on step 2: the same predictors (less the new outcome), patient
        number and site; the task and the outcome to catch suggested afresh."""
        old = self.design
        if self.dictionary is None or (old is not None and old.outcome == outcome):
            return
        self.set_design(default_design(
            self.dictionary, outcome, predictors=None if old is None else old.predictors,
            patient_id=None if old is None else old.patient_id,
            site=None if old is None else old.site))

    def choose_predictors(self, ticked: tuple[str, ...], offered: tuple[str, ...],
                          many_at_once: bool = False) -> None:
        """The columns ticked on step 2; an identity-like column ticked back on purpose is
        kept (core.design.guards.kept_on_purpose)."""
        if self.design is None:
            return
        left_out = () if self.screen is None else self.screen.left_out_columns
        self.set_kept(kept_on_purpose(self.kept, ticked, offered, left_out, many_at_once))
        self.set_design(replace(self.design, predictors=tuple(ticked)))

    def set_settings(self, tree: TreeSettings | None = None, cv: CVSettings | None = None,
                     holdout: float | None | str = "keep") -> None:
        tree = self.tree if tree is None else tree
        cv = self.cv if cv is None else cv
        holdout = self.holdout if holdout == "keep" else holdout
        if (tree, cv, holdout) == (self.tree, self.cv, self.holdout):
            return
        self.tree, self.cv, self.holdout = tree, cv, holdout
        self.dirty = True
        self._announce(self.design_changed)

    def set_goal(self, goal: Goal | None) -> None:
        """Size the tree by a clinical goal (or, with None, by the miss cost again)."""
        if goal != self.goal:
            self.goal, self.dirty = goal, True
            self._announce(self.design_changed)

    def two_classes(self) -> bool:
        """Whether the outcome is a two-class one, for which a goal or a miss cost means
        something."""
        design, dictionary = self.design, self.dictionary
        if design is None or dictionary is None or design.outcome not in dictionary:
            return False
        spec = dictionary.get(design.outcome)
        return (design.task == "classification" and spec.kind in CATEGORY_KINDS
                and len(spec.levels) == 2)

    def set_seed(self, seed: int) -> None:
        """One seed for growing and for the fold plan."""
        self.set_settings(tree=replace(self.tree, seed=seed), cv=replace(self.cv, seed=seed))

    def set_kept(self, kept) -> None:
        """The identity-like columns the user ticked back deliberately (like naming them in
        --predictors on the command line)."""
        kept = frozenset(kept)
        if kept != self.kept:
            self.kept, self.dirty = kept, True

    def set_screen(self, screen, pending: bool = False) -> None:
        """The guards' latest result (None: nothing to check), and whether one is under way.
        Identity-like columns the guards left out leave the predictors before anyone hears
        of the result, so a Run waiting for it grows without them."""
        if screen is self.screen and pending == self.guard_pending:
            return
        self.screen, self.guard_pending = screen, pending
        if screen is not None and screen.design is not None and screen.design != self.design:
            self.set_design(screen.design, by_user=False)
        self.guards_changed.emit()

    def set_guard_pending(self, pending: bool) -> None:
        if pending != self.guard_pending:
            self.guard_pending = pending
            self.guards_changed.emit()

    def set_chart(self, **options) -> None:
        """Change chart options (ChartOptions fields; None: the chart's own default)."""
        chart = replace(self.chart, **options)
        if chart != self.chart:
            self.chart, self.dirty = chart, True
            self._announce(self.chart_changed)

    def set_status(self, text: str, milliseconds: int = 0) -> None:
        """What the status bar says (an empty text clears it)."""
        self.status = text
        self.status_changed.emit(text, milliseconds)

    # --- results ----------------------------------------------------------------------------

    def set_result(self, derivation: Derivation | None, chosen: Derivation | None = None,
                   changes_work: bool = True) -> None:
        """``changes_work=False`` when the run only reproduced a reopened project's tree."""
        self.derivation = derivation
        self.chosen = chosen if chosen is not None else derivation
        if self.chosen is not None:
            self.size = self._size_of(self.chosen)
        self.shading = None
        self._keep_earlier_check()
        self._forget_checks()
        self.dirty = self.dirty or (derivation is not None and changes_work)
        self._announce(self.result_changed, self.checks_changed, self.shading_changed)

    def set_chosen(self, chosen: Derivation) -> None:
        self.chosen = chosen
        self.size = self._size_of(chosen)
        self._keep_earlier_check()
        self._forget_checks()
        self.dirty = True
        self._announce(self.chosen_changed, self.checks_changed)

    @staticmethod
    def _size_of(derivation: Derivation) -> str | int:
        chosen = derivation.model.chosen
        return chosen["rule"] if chosen["rule"] in ("1se", "min", "goal") \
            else int(chosen["leaves"])

    @property
    def model(self):
        return None if self.chosen is None else self.chosen.model

    def add_external_check(self, result, path: str) -> None:
        """A check of the chosen tree on another file (it replaces an earlier one)."""
        self.checks = tuple(r for r in self.checks if r.kind != "external") + (result,)
        self.external_path = path
        if self.model is not None and result.names(self.model):
            self.earlier_check = None
        self._announce(self.checks_changed)

    def _keep_earlier_check(self) -> None:
        """Before another tree takes this one's place: its check on another file, so that the
        app can say whose check it was until the file is checked again for the new tree."""
        external = [r for r in self.checks if r.kind == "external"]
        if external:
            self.earlier_check = external[-1]

    @property
    def check_of_earlier_tree(self):
        """The check on another file made on an earlier tree, not on the one chosen now
        (None when there is none, or once the file is checked again)."""
        check = self.earlier_check
        if check is None or self.model is None or check.names(self.model):
            return None
        return check

    def set_print_external(self, printed: bool) -> None:
        """Whether the chart prints the latest external check (else the held-out one)."""
        if printed != self.print_external:
            self.print_external = printed
            self._announce(self.checks_changed)

    def set_nested(self, result) -> None:
        self.nested = result
        self._announce(self.checks_changed)

    def set_stability(self, result) -> None:
        self.stability = result
        self._announce(self.checks_changed)

    def set_shading(self, shading: Shading | None) -> None:
        self.shading = shading
        self.shading_changed.emit()

    def current_shading(self) -> Shading | None:
        """The shading, if it was computed for this run and these chart options."""
        s = self.shading
        if s is None or s.derivation is not self.derivation or s.options != self.chart:
            return None
        return s

    @property
    def chart_check(self):
        """The check the chart prints instead of the model's own record (None: the model's
        own, i.e. the held-out check or none)."""
        external = [r for r in self.checks if r.kind == "external"]
        return external[-1] if external and self.print_external else None

    def chart_derivation(self) -> Derivation | None:
        """The chosen run, its model carrying the check the chart should print."""
        check = self.chart_check
        if self.chosen is None or check is None:
            return self.chosen
        from core.checking import with_check

        return replace(self.chosen, model=with_check(self.chosen.model, check))

    def report_request(self) -> DerivationRequest:
        """The request as the user sized the tree: nested CV and stability repeat that rule."""
        return replace(self.chosen.request, size=self.size)

    # --- derived state ------------------------------------------------------------------------

    def request(self) -> DerivationRequest | None:
        """The request a Run would send now, or None while the outcome step is incomplete."""
        if self.design is None or not self.design.outcome or not self.design.predictors:
            return None
        goal = self.goal if self.two_classes() else None
        return DerivationRequest(design=self.design, tree=self.tree, cv=self.cv,
                                 holdout=self.holdout or None, size="1se", goal=goal)

    def is_stale(self) -> bool:
        """True when the shown result came from other data or other choices than the current."""
        if self.derivation is None:
            return False
        return (self.derivation.table is not self.table
                or self.derivation.dictionary != self.dictionary
                or self.derivation.request != self.request())

    def stale_steps(self) -> set[str]:
        return {"size", "tree", "checking", "chart"} if self.is_stale() else set()

    def ready(self, step: str) -> bool:
        """Whether a step has what it needs to show something."""
        if step == "data":
            return True
        if step == "outcome":
            return self.table is not None
        if step == "size":
            return self.request() is not None or self.derivation is not None
        return self.chosen is not None

    def mark_saved(self, path: str | None) -> None:
        self.project_path = path
        self.dirty = False
        self.state_changed.emit()

    # --- projects -------------------------------------------------------------------------

    def to_project(self) -> Project:
        provenance = None if self.table is None else self.table.provenance
        return Project(
            data_path=None if provenance is None else provenance.path,
            data_sheet=None if provenance is None else provenance.sheet,
            data_sha256=None if provenance is None else provenance.sha256,
            dictionary=self.dictionary, request=self.request(), size=self.size,
            chart=chart_settings(self.chart),
            model_fingerprint=(None if self.model is None or self.is_stale()
                               else self.model.fingerprint))

    def apply_project(self, project: Project, table: LoadedTable | None,
                      dictionary: DataDictionary | None, notes: tuple[str, ...] = ()) -> None:
        """Take over a reopened project's data and choices (the run is redone separately)."""
        self._forget_data()
        self.table, self.dictionary, self.notes = table, dictionary, tuple(notes)
        self.serial = 0 if table is None else next(_SERIALS)
        request = project.request
        if request is not None:
            self.design, self.tree, self.cv = request.design, request.tree, request.cv
            self.holdout, self.goal = request.holdout, request.goal
        # The saved predictors were the user's choices: any identity-like column among them was
        # kept deliberately, so the reopened project grows the same tree (the app still says so).
        self.kept = frozenset(() if request is None else request.design.predictors)
        self.size = project.size
        self.chart = chart_options(project.chart)
        self.expected_fingerprint = project.model_fingerprint
        self.dirty = False
        self._opened()

    def clear(self) -> None:
        """A new, empty project."""
        self.apply_project(Project(), None, None)
        self.mark_saved(None)
