"""What a goal or cost means on the cohort, in clinical words, from cross-validated counts
("catches about 95 of every 100 admitted patients; sends about 40 of every 100 not admitted
for the test"), and what a goal's tree reached. The app's step 2 and step 3 show these; they
are worded here, not in the gui."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from ..messages.message import say
from ..phrases import patients_among, rows_word
from .goal import cost_words

if TYPE_CHECKING:
    from .cross_validated_path import CrossValidatedPath
    from .derivation import Derivation

YES = {"yes", "y", "true", "1", "positive", "present"}
NO = {"no", "n", "false", "0", "negative", "absent"}
AIMS = ("sensitivity", "specificity", "cost")  # rule out, rule in, a plain miss cost


def group_name(outcome: str, level: str, unit: str = "patients", noun: bool = True) -> str:
    """Patients (or visits) of one outcome level in words: 'admitted patients' for yes, 'not
    admitted' for no ('visits with PICU transfer', 'without PICU transfer' for an outcome
    named as an event), else 'patients with “ward”' (the level's own name). ``noun=False``
    leaves the noun out where the sentence has already said it ('with “no fall”')."""
    word = str(level).strip().lower()
    # "admitted" describes patients ("admitted patients", "not admitted"); "PICU transfer"
    # names an event they have or not ("visits with PICU transfer", "without PICU transfer").
    describes = outcome.strip().split(" ")[-1].lower().endswith("ed")
    if word in YES:
        if describes:
            return f"{outcome} {unit}" if noun else outcome
        return f"{unit} with {outcome}" if noun else f"with {outcome}"
    if word in NO:
        if describes:
            return f"not {outcome}"
        return f"{unit} without {outcome}" if noun else f"without {outcome}"
    return f"{unit} with “{level}”" if noun else f"with “{level}”"


def counts_in_words(caught: int, positives: int, alarmed: int, negatives: int,
                    outcome: str, positive: str, negative: str, aim: str = "sensitivity",
                    miss_cost: float | None = None, unit: str = "patients") -> str:
    """The sentence for cross-validated counts: of ``positives`` patients with the outcome
    ``caught`` were called positive; of ``negatives`` without it ``alarmed`` were. ``aim``
    says what the tree was sized for: a least sensitivity (a rule-out chart: who is sent for
    the test), a least specificity (a rule-in chart: who is picked out) or a plain miss cost;
    ``unit`` is "visits" where patients came more than once."""
    per_100 = (lambda k, n: round(100 * k / n) if n else 0)
    caught_100, alarmed_100 = per_100(caught, positives), per_100(alarmed, negatives)
    if aim == "sensitivity":
        return say("goal.in_words", caught=caught_100,
                   positive=group_name(outcome, positive, unit), alarmed=alarmed_100,
                   negative=group_name(outcome, negative, unit, noun=False))
    if aim == "specificity":
        return say("goal.in_words_rule_in", spared=100 - alarmed_100 if negatives else 0,
                   negative=group_name(outcome, negative, unit), alarmed=alarmed_100,
                   caught=caught_100, positive=group_name(outcome, positive, unit, noun=False))
    cost = say("goal.costs_alike") if miss_cost is None or abs(miss_cost - 1) < 1e-9 \
        else cost_words(miss_cost)
    return say("goal.in_words_cost", cost=cost, caught=caught_100,
               positive=group_name(outcome, positive, unit),
               missed=100 - caught_100 if positives else 0, alarmed=alarmed_100,
               negative=group_name(outcome, negative, unit, noun=False))


def size_index(path: "CrossValidatedPath", leaves: int) -> int:
    """Where a size (its number of outcome boxes) sits on the pruning path."""
    return int(np.flatnonzero(np.asarray(path.leaves) == int(leaves))[0])


def chosen_in_words(derivation: "Derivation") -> str | None:
    """The chosen tree's cross-validated counts in clinical words, named by the outcome's own
    levels (None unless the outcome has two classes)."""
    path, data, request = derivation.path, derivation.data, derivation.request
    counts = path.counts
    if counts is None or data.task != "classification" or len(data.classes) != 2:
        return None
    k = size_index(path, derivation.model.chosen["leaves"])
    confusion = counts.confusion[k]
    # Rows are visits where patients came more than once (as the boxes count them).
    unit = rows_word(data.n, patients_among(data.groups))
    if request.goal is not None:
        aim, cost = request.goal.measure, None
    else:
        aim, cost = "cost", request.tree.miss_cost
    negative, positive = data.classes
    return counts_in_words(int(round(confusion[1, 1])), int(round(confusion[1].sum())),
                           int(round(confusion[0, 1])), int(round(confusion[0].sum())),
                           data.outcome.display, positive, negative, aim=aim, miss_cost=cost,
                           unit=unit)


def goal_text(chosen: dict) -> str:
    """One sentence on the goal a tree was built for and what it reached under
    cross-validation, with 95% Wilson intervals (from a model's ``chosen`` record)."""
    goal = chosen["goal"]
    sens, spec = chosen["cv_sensitivity_interval"], chosen["cv_specificity_interval"]
    return say("goal.reached", measure=goal["measure"], at_least=f"{goal['at_least']:.0%}",
               sensitivity=f"{chosen['cv_sensitivity']:.1%}", sens_low=f"{sens[0]:.1%}",
               sens_high=f"{sens[1]:.1%}", specificity=f"{chosen['cv_specificity']:.1%}",
               spec_low=f"{spec[0]:.1%}", spec_high=f"{spec[1]:.1%}",
               cost=cost_words(chosen["miss_cost"]), grid=chosen["grid_description"])
