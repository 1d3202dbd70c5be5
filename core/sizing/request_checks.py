"""Checking a saved derivation request (a project's ``request``, a model's ``settings``).

Both files keep the same record of what was chosen before Run: the design, the growth and
cross-validation settings, the size and the goal. It is checked here once, field by field
(core/document_checks.py), every number inside the one table of limits
(core/option_limits.py), so that a file can never ask for ten million repeats or a million
folds, and a project and a model are held to the same rules.
"""

from __future__ import annotations

from ..design.analysis import TASKS
from ..document_checks import Field
from ..option_limits import allowed
from .folds import PLANS
from .goal import MEASURES as GOAL_MEASURES
from .grow import CLASSIFICATION_CRITERIA, REGRESSION_CRITERIA, RISKS

SIZE_WORDS = ("1se", "min", "goal")


def check_request_document(request: Field) -> None:
    """Refuse (InputError) a saved request whose fields have the wrong type or a value
    outside the limits; ``request`` must already be known to be an object."""
    _check_design(request["design"])
    if request["tree"].object():
        _check_tree(request["tree"])
    if request["cv"].object():
        _check_cv(request["cv"])
    if request.has("holdout"):
        request["holdout"].limited("holdout")
    check_size(request["size"])
    goal = request["goal"]
    if goal.object():
        goal["measure"].text(optional=False, choices=GOAL_MEASURES)
        goal["at_least"].limited("goal")


def check_size(size: Field) -> None:
    """'1se', 'min', 'goal' or a whole number of outcome boxes inside the limits."""
    if size.value is not None and not (size.value in SIZE_WORDS or allowed("size", size.value)):
        size.fail("it must be '1se', 'min', 'goal' or a whole number of outcome boxes")


def _check_design(design: Field) -> None:
    design.object(optional=False)
    design["outcome"].text(optional=False)
    design["predictors"].texts(optional=False, unique=True, empty=False)
    design["task"].text(choices=TASKS)
    for key in ("positive", "patient_id", "site"):
        design[key].text()


def _check_tree(tree: Field) -> None:
    for key in ("min_leaf", "max_depth", "miss_cost", "seed", "coarsen"):
        if tree.has(key):
            tree[key].limited(key)
    tree["criterion"].text(choices=CLASSIFICATION_CRITERIA + REGRESSION_CRITERIA)
    tree["risk"].text(choices=RISKS)
    priors = tree["priors"]
    if priors.value is not None and priors.value not in ("observed", "equal") and not (
            isinstance(priors.value, list) and 0 < len(priors.value) <= 1000 and
            all(allowed("prior", p) for p in priors.value)):
        priors.fail("it must be 'observed', 'equal' or a list of numbers")
    loss = tree["loss"]
    if loss.value is not None and not (
            isinstance(loss.value, list) and 0 < len(loss.value) <= 1000 and
            all(isinstance(r, list) and len(r) == len(loss.value) and
                all(allowed("cost", v) for v in r) for r in loss.value)):
        loss.fail("it must be a square table (list of lists) of numbers")


def _check_cv(cv: Field) -> None:
    cv["plan"].text(choices=PLANS)
    for key in ("folds", "repeats", "validation_share", "seed"):
        if cv.has(key):
            cv[key].limited(key)
    cv["grouped"].truth()
    cv["stratified"].truth()
