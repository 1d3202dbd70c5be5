"""The work in progress, as one object the panels share: the data, the user's choices, the
run's result and the chosen size. It computes nothing; it holds core's objects, says what
changed (Qt signals) and which steps are out of date, and turns itself into a project file.
"""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtCore import QObject, Signal

from core.chart import ChartOptions
from core.data import LoadedTable
from core.design import DesignSpec
from core.dictionary import DataDictionary
from core.project import Project
from core.sizing import CVSettings, Derivation, DerivationRequest, TreeSettings

STEPS = ("data", "outcome", "size", "tree", "checking", "chart")
STEP_TITLES = {
    "data": "The data",
    "outcome": "Outcome and predictors",
    "size": "Size of the tree",
    "tree": "The tree",
    "checking": "Checking it",
    "chart": "The chart",
}
DEFAULT_CHART = {"title": None, "subtitle": None, "paper": "a4", "orientation": "auto",
                 "min_text": None, "form": "tree"}  # None: the chart's own default


class Session(QObject):
    """Everything the user has loaded, chosen and computed, with change signals."""

    data_changed = Signal()  # a new table or dictionary
    design_changed = Signal()  # outcome, predictors or settings
    result_changed = Signal()  # a new run finished (or the result was cleared)
    chosen_changed = Signal()  # another size was chosen from the same run
    chart_changed = Signal()  # chart options
    check_changed = Signal()  # which check on separate patients the chart prints
    guards_changed = Signal()  # the checks of the outcome step started or came back
    state_changed = Signal()  # out-of-date steps or unsaved changes

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.table: LoadedTable | None = None
        self.dictionary: DataDictionary | None = None
        self.notes: tuple[str, ...] = ()  # what reading and inference had to decide
        self.design: DesignSpec | None = None
        self.tree = TreeSettings()
        self.cv = CVSettings()
        self.holdout: float | None = None
        self.derivation: Derivation | None = None  # the run, as it came back
        self.chosen: Derivation | None = None  # the run with the chosen size
        self.size: str | int = "1se"
        self.chart: dict = dict(DEFAULT_CHART)
        self.check = None  # a CheckResult the chart prints instead of the model's own
        self.project_path: str | None = None
        self.dirty = False
        self.expected_fingerprint: str | None = None  # from a reopened project
        # The guards of step 2 (gui/guard_watch.py): identity columns the user chose to keep
        # although they look like they identify patients, the latest result for the current
        # choices, and whether a check is under way.
        self.kept: frozenset[str] = frozenset()
        self.screen = None  # a gui.guard_watch.Screen
        self.guard_pending = False

    # --- what the user changes ------------------------------------------------------------

    def set_data(self, table: LoadedTable, dictionary: DataDictionary,
                 notes: tuple[str, ...] = ()) -> None:
        if table is not self.table:
            self.design = None  # another file: its outcome and predictors are chosen afresh
            self.kept, self.screen = frozenset(), None
        self.table, self.dictionary, self.notes = table, dictionary, tuple(notes)
        self._touch()
        self.data_changed.emit()

    def set_dictionary(self, dictionary: DataDictionary) -> None:
        if dictionary == self.dictionary:
            return
        self.dictionary = dictionary
        self._touch()
        self.data_changed.emit()

    def set_design(self, design: DesignSpec | None, by_user: bool = True) -> None:
        """``by_user=False`` for defaults taken from the dictionary (nothing to save yet)."""
        if design == self.design:
            return
        self.design = design
        self._touch(dirty=by_user)
        self.design_changed.emit()

    def set_settings(self, tree: TreeSettings | None = None, cv: CVSettings | None = None,
                     holdout: float | None | str = "keep") -> None:
        tree = self.tree if tree is None else tree
        cv = self.cv if cv is None else cv
        holdout = self.holdout if holdout == "keep" else holdout
        if (tree, cv, holdout) == (self.tree, self.cv, self.holdout):
            return
        self.tree, self.cv, self.holdout = tree, cv, holdout
        self._touch()
        self.design_changed.emit()

    def set_kept(self, kept) -> None:
        """The identity-like columns the user ticked back deliberately (like naming them in
        --predictors on the command line)."""
        kept = frozenset(kept)
        if kept == self.kept:
            return
        self.kept = kept
        self._touch()

    def set_screen(self, screen, pending: bool = False) -> None:
        """The guards' latest result (None: nothing to check), and whether one is under way."""
        if screen is self.screen and pending == self.guard_pending:
            return
        self.screen, self.guard_pending = screen, pending
        self.guards_changed.emit()

    def set_guard_pending(self, pending: bool) -> None:
        if pending != self.guard_pending:
            self.guard_pending = pending
            self.guards_changed.emit()

    def set_seed(self, seed: int) -> None:
        self.set_settings(tree=replace(self.tree, seed=seed), cv=replace(self.cv, seed=seed))

    def chart_options(self) -> ChartOptions:
        """The chart settings as core's ChartOptions (None: the chart's own default)."""
        chart = self.chart
        return ChartOptions(paper=chart.get("paper") or "a4",
                            orientation=chart.get("orientation") or "auto",
                            title=chart.get("title") or None,
                            subtitle=chart.get("subtitle") or None,
                            min_text=chart.get("min_text"),
                            form=chart.get("form") or "tree")

    def set_chart(self, **options) -> None:
        merged = {**self.chart, **options}
        if merged == self.chart:
            return
        self.chart = merged
        self._touch()
        self.chart_changed.emit()

    # --- results ----------------------------------------------------------------------------

    def set_result(self, derivation: Derivation | None, chosen: Derivation | None = None,
                   changes_work: bool = True) -> None:
        """``changes_work=False`` when the run only reproduced a reopened project's tree."""
        self.derivation = derivation
        self.chosen = chosen if chosen is not None else derivation
        if chosen is not None:
            self.size = self._size_of(chosen)
        self._touch(dirty=derivation is not None and changes_work)
        self.result_changed.emit()

    def set_chosen(self, chosen: Derivation) -> None:
        self.chosen = chosen
        self.size = self._size_of(chosen)
        self._touch()
        self.chosen_changed.emit()

    @staticmethod
    def _size_of(derivation: Derivation) -> str | int:
        chosen = derivation.model.chosen
        return chosen["rule"] if chosen["rule"] in ("1se", "min") else int(chosen["leaves"])

    @property
    def model(self):
        return None if self.chosen is None else self.chosen.model

    def set_check(self, check) -> None:
        """Which check on separate patients the chart and exports record (None: the model's
        own record, i.e. the held-out check or none)."""
        if check is self.check:
            return
        self.check = check
        self.check_changed.emit()

    def chart_derivation(self) -> Derivation | None:
        """The chosen run, its model carrying the check the chart should print."""
        if self.chosen is None or self.check is None:
            return self.chosen
        from core.checking import with_check

        return replace(self.chosen, model=with_check(self.chosen.model, self.check))

    # --- derived state ------------------------------------------------------------------------

    def request(self) -> DerivationRequest | None:
        """The request a Run would send now, or None while the outcome step is incomplete."""
        if self.design is None or not self.design.outcome or not self.design.predictors:
            return None
        return DerivationRequest(design=self.design, tree=self.tree, cv=self.cv,
                                 holdout=self.holdout or None, size="1se")

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

    def _touch(self, dirty: bool = True) -> None:
        if dirty:
            self.dirty = True
        self.state_changed.emit()

    # --- projects -------------------------------------------------------------------------

    def to_project(self) -> Project:
        provenance = None if self.table is None else self.table.provenance
        request = self.request()
        return Project(
            data_path=None if provenance is None else provenance.path,
            data_sheet=None if provenance is None else provenance.sheet,
            data_sha256=None if provenance is None else provenance.sha256,
            dictionary=self.dictionary, request=request, size=self.size,
            chart=dict(self.chart),
            model_fingerprint=(None if self.model is None or self.is_stale()
                               else self.model.fingerprint))

    def apply_project(self, project: Project, table: LoadedTable | None,
                      dictionary: DataDictionary | None, notes: tuple[str, ...] = ()) -> None:
        """Take over a reopened project's data and choices (the run is redone separately)."""
        self.table, self.dictionary, self.notes = table, dictionary, tuple(notes)
        request = project.request
        if request is not None:
            self.design, self.tree, self.cv = request.design, request.tree, request.cv
            self.holdout = request.holdout
        else:
            self.design, self.tree, self.cv, self.holdout = None, TreeSettings(), CVSettings(), None
        # The saved predictors were the user's choices: any identity-like column among them was
        # kept deliberately, so the reopened project grows the same tree (the app still says so).
        self.kept = frozenset(() if request is None else request.design.predictors)
        self.screen = None
        self.size = project.size
        self.chart = {**DEFAULT_CHART, **project.chart}
        self.derivation = self.chosen = None
        self.expected_fingerprint = project.model_fingerprint
        self.data_changed.emit()
        self.design_changed.emit()
        self.result_changed.emit()
        self.chart_changed.emit()
        self.state_changed.emit()

    def clear(self) -> None:
        """A new, empty project."""
        self.apply_project(Project(), None, None)
        self.project_path = None
        self.dirty = False
        self.expected_fingerprint = None
        self.state_changed.emit()
