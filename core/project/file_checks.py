"""Checking a project file's contents before a project is built from them.

A project file may have been edited by hand, cut short or written by another program. Every
field is checked for its type and its range (a size is "1se", "min" or a whole number of
boxes; folds are a whole number of 2 or more; a seed is a whole number; …) so that a damaged
file is refused, naming the field, when it is opened, instead of failing later while a tree is
grown or a chart is printed. Booleans are not numbers here: JSON's ``true`` is not a size.
"""

from __future__ import annotations

from ..design.analysis import TASKS
from ..errors import InputError
from ..messages.message import say
from ..option_limits import allowed, problem_with
from ..safe_files import is_finite_number, is_whole_number
from ..sizing.folds import PLANS
from ..sizing.goal import MEASURES as GOAL_MEASURES
from ..sizing.grow import CLASSIFICATION_CRITERIA, REGRESSION_CRITERIA, RISKS


def _damaged(file: str, where: str, problem: str) -> InputError:
    return InputError(say("project.damaged", file=file, where=where, problem=problem))


class _Checker:
    """Checks fields of one JSON object and names them by their path in the file."""

    def __init__(self, file: str, data: dict, where: str) -> None:
        self.file, self.data, self.where = file, data, where

    def fail(self, key: str, problem: str) -> None:
        raise _damaged(self.file, f"{self.where}{key}", problem)

    def object(self, key: str, optional: bool = True) -> "_Checker | None":
        value = self.data.get(key)
        if value is None and optional:
            return None
        if not isinstance(value, dict):
            self.fail(key, "it must be a JSON object")
        return _Checker(self.file, value, f"{self.where}{key} → ")

    def text(self, key: str, optional: bool = True, choices: tuple[str, ...] = ()) -> None:
        value = self.data.get(key)
        if value is None and optional:
            return
        if not isinstance(value, str) or not value:
            self.fail(key, "it must be a text (not empty)")
        if choices and value not in choices:
            self.fail(key, f"{value[:40]!r} is not one of {', '.join(choices)}")

    def whole(self, key: str, least: int, optional: bool = True) -> None:
        value = self.data.get(key)
        if value is None and optional:
            return
        if not is_whole_number(value) or value < least:
            self.fail(key, f"it must be a whole number of {least} or more")

    def limited(self, key: str, setting: str | None = None) -> None:
        """A number inside the table of limits (core/option_limits.py)."""
        if key not in self.data:
            return
        problem = problem_with(setting or key, self.data[key])
        if problem is not None:
            self.fail(key, problem)

    def number(self, key: str, low: float, high: float | None = None,
               optional: bool = True) -> None:
        value = self.data.get(key)
        if value is None and optional:
            return
        if not is_finite_number(value) or value <= low or (high is not None and value >= high):
            span = f"above {low:g}" if high is None else f"between {low:g} and {high:g}"
            self.fail(key, f"it must be a number {span}")

    def truth(self, key: str) -> None:
        if key in self.data and not isinstance(self.data[key], bool):
            self.fail(key, "it must be true or false")

    def texts(self, key: str) -> None:
        value = self.data.get(key)
        if not isinstance(value, list) or not all(isinstance(v, str) and v for v in value):
            self.fail(key, "it must be a list of column names")


def check_project_document(data: dict, file: str = "The project") -> None:
    """Refuse (InputError) a project dict of the current layout whose fields have the wrong
    type or an impossible value; ``file`` names the file in the message."""
    top = _Checker(file, data, "")
    entry = top.object("data")
    if entry is not None:
        entry.text("path", optional=False)
        entry.text("sheet")
        entry.text("relative_path")
        sha = entry.data.get("sha256")
        if sha is not None and (not isinstance(sha, str) or len(sha) != 64 or
                                any(ch not in "0123456789abcdef" for ch in sha)):
            entry.fail("sha256", "it must be the 64 hexadecimal digits of a SHA-256")
    if data.get("dictionary") is not None and not isinstance(data["dictionary"], dict):
        top.fail("dictionary", "it must be a JSON object")
    request = top.object("request")
    if request is not None:
        _check_request(request)
    size = data.get("size", "1se")
    if not (size in ("1se", "min", "goal") or allowed("size", size)):
        top.fail("size", "it must be '1se', 'min' or a whole number of outcome boxes")
    top.limited("seed")
    chart = top.object("chart")
    if chart is not None:
        for key in ("title", "subtitle"):
            value = chart.data.get(key)
            if value is not None and not isinstance(value, str):
                chart.fail(key, "it must be a text")
        chart.text("paper")
        chart.text("orientation")
        chart.number("min_text", 0)
        chart.text("form", choices=("tree", "rules"))
        chart.truth("show_file_name")
    top.text("model_fingerprint")
    top.text("saved_by")


def _check_request(request: _Checker) -> None:
    design = request.object("design", optional=False)
    design.text("outcome", optional=False)
    design.texts("predictors")
    design.text("task", choices=TASKS)
    for key in ("positive", "patient_id", "site"):
        design.text(key)
    tree = request.object("tree")
    if tree is not None:
        tree.limited("min_leaf")
        tree.limited("max_depth")
        tree.text("criterion", choices=CLASSIFICATION_CRITERIA + REGRESSION_CRITERIA)
        tree.text("risk", choices=RISKS)
        tree.limited("miss_cost")
        tree.limited("seed")
        tree.limited("coarsen")
        priors = tree.data.get("priors")
        if priors is not None and priors not in ("observed", "equal") and not (
                isinstance(priors, list) and priors and
                all(allowed("prior", p) for p in priors)):
            tree.fail("priors", "it must be 'observed', 'equal' or a list of numbers")
        loss = tree.data.get("loss")
        if loss is not None and not (
                isinstance(loss, list) and loss and
                all(isinstance(r, list) and all(allowed("cost", v) for v in r)
                    for r in loss)):
            tree.fail("loss", "it must be a table (list of lists) of numbers")
    cv = request.object("cv")
    if cv is not None:
        cv.text("plan", choices=PLANS)
        cv.limited("folds")
        cv.limited("repeats")
        cv.limited("validation_share")
        cv.truth("grouped")
        cv.truth("stratified")
        cv.limited("seed")
    request.limited("holdout")
    size = request.data.get("size", "1se")
    if not (size in ("1se", "min", "goal") or allowed("size", size)):
        request.fail("size", "it must be '1se', 'min', 'goal' or a whole number of outcome "
                     "boxes")
    goal = request.object("goal")
    if goal is not None:
        goal.text("measure", optional=False, choices=GOAL_MEASURES)
        goal.limited("at_least", "goal")
