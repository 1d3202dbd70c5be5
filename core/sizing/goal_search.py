"""A tree built for a clinical goal: the smallest tree whose cross-validated sensitivity (or
specificity) reaches what the user asked for.

Instead of guessing how much worse missing a yes is than a needless alarm, the user states the
goal. The pruning path is grown and cross-validated for each miss cost of a log-spaced grid
(one path CV per cost, every fold of every cost in one parallel pool); the pooled held-out
counts of each path give every size's cross-validated sensitivity and specificity. Among the
trees that ask at least one question and call some patients each way, the smallest that
reaches the goal wins; ties go to the better other measure, then to the cost nearest 1.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np
from joblib import Parallel, delayed

from ..design.analysis import AnalysisData
from ..errors import InputError
from ..messages.message import say
from ..progress import CancelFlag, Progress, stop_if_cancelled
from ..work_place import sent_once
from .cross_validated_path import CrossValidatedPath, PathTally, fold_losses, grown_for_return
from .folds import CVSettings, fold_plan
from .goal import Goal, cost_words, miss_cost_grid
from .grow import TreeSettings, class_costs

@dataclass(frozen=True)
class GoalSearch:
    """Every path of the search and the tree chosen for the goal."""

    goal: Goal
    miss_costs: np.ndarray
    paths: tuple[CrossValidatedPath, ...] = field(repr=False)
    cost_index: int
    size_index: int

    @property
    def path(self) -> CrossValidatedPath:
        """The chosen miss cost's cross-validated path (sizes are chosen from it afterwards)."""
        return self.paths[self.cost_index]

    @property
    def miss_cost(self) -> float:
        return float(self.miss_costs[self.cost_index])

    def describe_grid(self) -> str:
        c = self.miss_costs
        return (f"{len(c)} miss costs from {_cost(c.min())} to {_cost(c.max())}, "
                f"each √2 times the one before")

    def chosen_record(self) -> dict:
        """What the model file records about the goal (``chosen`` entries)."""
        measures = self.path.counts.measures_at(self.size_index)
        return {"rule": "goal", "goal": self.goal.to_dict(), "miss_cost": self.miss_cost,
                "miss_cost_grid": [float(c) for c in self.miss_costs],
                "grid_description": self.describe_grid(), **measures}


def _cost(value: float) -> str:
    return f"{value:.3g}" if value >= 1 else f"1/{1 / value:.3g}"


def search_goal(data: AnalysisData, settings: TreeSettings, cv: CVSettings, goal: Goal,
                jobs: int | None = 1, progress: Progress | None = None,
                cancel: CancelFlag | None = None) -> GoalSearch:
    """Cross-validate the pruning path for every miss cost of the grid and choose the
    smallest tree reaching ``goal``; refused, naming the best reached, when none does."""
    if data.task != "classification" or len(data.classes) != 2:
        raise InputError(say("goal.two_classes"))
    if settings.loss is not None or settings.miss_cost is not None:
        raise InputError(say("goal.with_cost"))
    priors = class_costs(settings, data.y, 2).priors
    grid = miss_cost_grid(goal, priors)
    folds = fold_plan(cv, data.n, y=data.y, groups=data.groups, sites=data.sites)
    total = len(grid) * (len(folds) + 1)
    stop_if_cancelled(cancel)
    each = [replace(settings, miss_cost=float(c)) for c in grid]
    done = 0
    grown = [None] * len(grid)
    # Full-data trees first (their pruning sequences fix each path's sizes), then every fold
    # of every cost in one pool, so the cores stay busy across costs. In task order, so the
    # sums are made in the same order for any worker count (identical results).
    sent = data.for_workers()  # the numbers only: what a cluster's workers receive
    with sent_once(sent):  # on a cluster, the rows travel to each worker once
        parallel = Parallel(n_jobs=jobs, return_as="generator")
        for i, tree in parallel(delayed(_grown)(i, sent, s) for i, s in enumerate(each)):
            stop_if_cancelled(cancel)
            grown[i] = replace(tree, data=data)  # the whole analysis again, notes included
            done += 1
            if progress:
                progress(done, total)
        tallies = [PathTally(data.n, len(g.sequence.grid)) for g in grown]
        tasks = (delayed(_fold)(i, sent, each[i], grown[i].costs, f.train, f.test,
                                grown[i].sequence.grid)
                 for i in range(len(grid)) for f in folds)
        for i, result in parallel(tasks):
            stop_if_cancelled(cancel)
            tallies[i].add(*result)
            done += 1
            if progress:
                progress(done, total)
    paths = tuple(t.path(g, cv, data, len(folds)) for t, g in zip(tallies, grown))
    cost_index, size_index = choose_for_goal(paths, grid, goal)
    return GoalSearch(goal, grid, paths, cost_index, size_index)


def _grown(i, data, settings):
    return i, grown_for_return(data, settings)


def _fold(i, *args):
    return i, fold_losses(*args)


def choose_for_goal(paths: tuple[CrossValidatedPath, ...], miss_costs: np.ndarray,
                    goal: Goal) -> tuple[int, int]:
    """(cost, size) positions of the smallest tree whose CV ``goal.measure`` reaches the goal,
    among trees with two or more boxes whose other measure is above 0; ties by the other
    measure, then by the cost nearest 1, then by the lower CV error."""
    best = None
    reached = None  # the best value of the goal's measure among the candidates
    for i, path in enumerate(paths):
        counts = path.counts
        wanted = getattr(counts, goal.measure)
        other = getattr(counts, goal.other)
        for k in range(len(path.leaves)):
            if path.leaves[k] < 2 or not other[k] > 0:
                continue
            candidate = (float(wanted[k]), -int(path.leaves[k]), float(other[k]), i, k)
            if reached is None or candidate[:3] > reached[:3]:
                reached = candidate
            if wanted[k] < goal.at_least - 1e-12:
                continue
            key = (int(path.leaves[k]), -float(other[k]), abs(math.log(miss_costs[i])),
                   float(path.cv_risk[k]))
            if best is None or key < best[0]:
                best = (key, i, k)
    if best is None:
        if reached is None:
            raise InputError(say("goal.no_tree", goal=goal.describe()))
        value, minus_leaves, other_value, i, _ = reached
        raise InputError(say("goal.not_reached", goal=goal.describe(), measure=goal.measure,
                             best=f"{value:.1%}", leaves=-minus_leaves,
                             other=goal.other, other_value=f"{other_value:.1%}",
                             cost=cost_words(float(miss_costs[i]))))
    return best[1], best[2]
