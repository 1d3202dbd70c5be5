"""The whole derivation in one call: table → analysis → grown tree → CV path → chosen model,
checked on the patients set aside before growing (if any).

The GUI, the command line and the tests all call :func:`derive` and :func:`choose_model`, so
each user path runs exactly the same code.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from ..checking.identifier_key import first_identifier_key
from ..checking.new_patients import CheckResult, check_heldout, with_check
from ..data.table import LoadedTable
from ..design.analysis import AnalysisData, prepare_analysis
from ..dictionary.columns import DataDictionary
from ..errors import InputError
from ..messages.message import say
from ..model.tree import TreeModel
from ..option_limits import check_request_limits
from ..phrases import names_phrase
from ..progress import CancelFlag, Progress
from .chosen_tree import build_model
from .cross_validated_path import CrossValidatedPath, cross_validate_path
from .folds import holdout_split
from .goal import cost_words
from .goal_search import GoalSearch, search_goal
from .request import DerivationRequest

# Above this many derivation rows, the fit suggests coarsening (growing is then slow).
COARSEN_SUGGESTED_ABOVE = 200_000


@dataclass(frozen=True)
class Derivation:
    """The result of a run: the CV path, the chosen model, and the held-out rows if any."""

    request: DerivationRequest
    table: LoadedTable = field(repr=False)
    dictionary: DataDictionary = field(repr=False)
    data: AnalysisData = field(repr=False)  # derivation rows
    heldout: AnalysisData | None = field(repr=False)
    path: CrossValidatedPath = field(repr=False)
    model: TreeModel = field(repr=False)
    notes: tuple[str, ...] = ()
    # The chosen tree's check on the held-out rows, made once here so no caller redoes it.
    heldout_check: CheckResult | None = field(default=None, repr=False)
    # A goal's search over miss costs (``path`` is then the chosen cost's path).
    goal_search: GoalSearch | None = field(default=None, repr=False)
    # What the guards found before growing (core.design.guards.findings_record), recorded in
    # the model file as ``findings`` whatever size is chosen.
    findings: tuple[dict, ...] = ()
    # Said to the user once, at this run, and never recorded (not in the report nor the model
    # file): a new identifier key and where it is kept.
    told_once: tuple[str, ...] = ()

    def check_on_heldout(self) -> CheckResult:
        """The chosen tree checked on the rows set aside before growing (refused when none
        were); what ``heldout_check`` holds, made anew."""
        return check_heldout(self.model, self.heldout, self.request.holdout,
                             self.table.provenance.sha256)


def derive(table: LoadedTable, dictionary: DataDictionary, request: DerivationRequest,
           jobs: int = 1, progress: Progress | None = None,
           cancel: CancelFlag | None = None, findings: tuple[dict, ...] = ()) -> Derivation:
    """Grow, prune and cross-validate a tree and choose its size as the request says.
    ``findings`` (the guards' findings as records) are kept in the model file."""
    check_request_limits(request)  # every number inside the table, before any work
    # The identifier key is made, or refused, before growing; a new one is said once.
    made_key = first_identifier_key() if request.design.patient_id else None
    full = prepare_analysis(table.frame, dictionary, request.design)
    notes = list(full.notes)
    told = (say("check.key_made", path=str(made_key)),) if made_key is not None else ()
    heldout = None
    data = full
    if request.holdout:
        strat = full.y if full.task == "classification" else None
        keep, out = holdout_split(full.n, request.holdout, request.cv.seed, y=strat,
                                  groups=full.groups)
        data, heldout = full.subset(keep), full.subset(out)
        notes.append(say("holdout.set_aside", n=len(out), total=full.n))
    if data.task == "classification" and np.unique(data.y).size < len(data.classes):
        raise InputError(say("holdout.class_left_out"))
    if request.tree.coarsen is None and data.n > COARSEN_SUGGESTED_ABOVE:
        notes.append(say("coarsen.suggested", count=f"{data.n:,}"))
    if request.goal is not None:
        search = search_goal(data, request.tree, request.cv, request.goal, jobs=jobs,
                             progress=progress, cancel=cancel)
        path = search.path
        notes.extend(coarsening_notes(path))
        model = build_model(path, search.size_index, "goal", table, dictionary, request,
                            chosen_extra=search.chosen_record())
        notes.append(say("goal.searched", goal=request.goal.describe(),
                         grid=search.describe_grid(), cost=cost_words(search.miss_cost)))
        return _checked(Derivation(request, table, dictionary, data, heldout, path, model,
                                   tuple(notes), goal_search=search,
                                   findings=tuple(findings), told_once=told))
    path = cross_validate_path(data, request.tree, request.cv, jobs=jobs, progress=progress,
                               cancel=cancel)
    notes.extend(coarsening_notes(path))
    index, rule = path.index_for(request.size)
    notes.extend(note for note in [path.size_note(request.size, index)] if note)
    model = build_model(path, index, rule, table, dictionary, request)
    return _checked(Derivation(request, table, dictionary, data, heldout, path, model,
                               tuple(notes), findings=tuple(findings), told_once=told))


def coarsening_notes(path: CrossValidatedPath) -> list[str]:
    """What coarsening did to the grown tree's measurements, in a note (none when it was off)."""
    levels = path.grown.settings.coarsen
    if levels is None:
        return []
    names = coarsened_columns(path)
    if not names:
        return [say("coarsen.none_needed", levels=levels)]
    return [say("coarsen.used", columns=names_phrase(names), levels=levels,
                were="was" if len(names) == 1 else "were")]


def coarsened_columns(path: CrossValidatedPath) -> tuple[str, ...]:
    """The displayed names of the measurements the full tree was grown on as quantile levels."""
    return tuple(c.spec.display for c in path.grown.encoding.columns if c.edges is not None)


def choose_model(derivation: Derivation, size: str | int) -> Derivation:
    """The same run with another size chosen from the pruning path (no refitting); "goal"
    returns to the goal's own tree when the run searched for one."""
    search = derivation.goal_search
    if size == "goal" and search is not None:
        model = build_model(search.path, search.size_index, "goal", derivation.table,
                            derivation.dictionary, derivation.request,
                            chosen_extra=search.chosen_record())
        notes = tuple(n for n in derivation.notes if getattr(n, "code", "") not in _SIZE_NOTES)
        return _checked(replace(derivation, model=model, heldout_check=None, notes=notes,
                                told_once=()))
    index, rule = derivation.path.index_for(size)
    extra = None if search is None else {"miss_cost": search.miss_cost}
    model = build_model(derivation.path, index, rule, derivation.table, derivation.dictionary,
                        derivation.request, chosen_extra=extra)
    note = derivation.path.size_note(size, index)
    notes = tuple(n for n in derivation.notes if getattr(n, "code", "") not in _SIZE_NOTES)
    return _checked(replace(derivation, model=model, heldout_check=None,
                            notes=notes + ((note,) if note else ()), told_once=()))


_SIZE_NOTES = ("size.not_on_path_smaller", "size.not_on_path_largest")  # one per chosen size


def _checked(derivation: Derivation) -> Derivation:
    """The run with the chosen tree checked on the rows set aside before growing (if any):
    the check kept beside the model and recorded in it; the guards' findings recorded too."""
    if derivation.findings:
        extra = dict(derivation.model.extra, findings=[dict(f) for f in derivation.findings])
        derivation = replace(derivation, model=replace(derivation.model, extra=extra))
    if derivation.heldout is None:
        return derivation
    check = derivation.check_on_heldout()
    return replace(derivation, model=with_check(derivation.model, check), heldout_check=check)
