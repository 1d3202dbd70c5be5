"""Checking a model file's contents before a model is built from them.

A model file may have been edited by hand, cut short or written by another program. Every
field the model relies on is checked for its type and its meaning (boxes numbered 1, 2, 3, …;
each box but the first reached from exactly one question; a question's column among the
predictors; counts matching the classes) so a damaged file is refused with the box and the
field concerned, instead of failing later while a chart is printed or patients are scored.
"""

from __future__ import annotations

from ..design.analysis import TASKS
from ..errors import InputError
from ..messages.message import say
from ..safe_files import is_finite_number, is_whole_number
from .value_checks import check_possible_values

SPLIT_KINDS = ("above", "in", "missing")


def _damaged(where: str, problem: str) -> InputError:
    return InputError(say("model.damaged", where=where, problem=problem))


def _texts(value, where: str, key: str) -> None:
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise _damaged(where, f"'{key}' must be a list of texts")


def check_model_document(data: dict) -> None:
    """Refuse (InputError) a parsed model file whose contents do not make a usable tree."""
    for key, kind in (("task", str), ("outcome_spec", dict), ("predictors", list),
                      ("nodes", list), ("path", dict), ("chosen", dict)):
        if key not in data:
            raise _damaged("the file", f"'{key}' is missing")
        if not isinstance(data[key], kind):
            raise _damaged("the file", f"'{key}' has the wrong type")
    if data["chosen"].get("better_than_no_tree") not in (None, True, False):
        raise _damaged("the file", "'chosen.better_than_no_tree' must be true or false")
    ids = data.get("derivation_ids")
    if ids is not None and not (isinstance(ids, dict) and isinstance(ids.get("column"), str)
                                and isinstance(ids.get("salt"), str)
                                and isinstance(ids.get("digests"), list)
                                and all(isinstance(d, str) for d in ids["digests"])):
        raise _damaged("the file", "'derivation_ids' must name a column, a salt and digests")
    if data["task"] not in TASKS:
        raise _damaged("the file", f"the task {str(data['task'])[:40]!r} is unknown")
    _check_findings(data.get("findings", []))
    if not is_whole_number(data.get("n_rows")) or data["n_rows"] < 0:
        raise _damaged("the file", "'n_rows' must be a whole number")
    classes = data.get("classes", [])
    _texts(classes, "the file", "classes")
    classification = data["task"] == "classification"
    if classification and len(classes) < 2:
        raise _damaged("the file", "a classification tree needs at least two classes")
    if not all(isinstance(p, dict) and isinstance(p.get("name"), str) for p in data["predictors"]):
        raise _damaged("the file", "every predictor needs a name")
    predictors = {p["name"] for p in data["predictors"]}
    nodes = data["nodes"]
    if not nodes:
        raise _damaged("the file", "it has no boxes")
    if len(nodes) > 100_000:
        raise _damaged("the file", "it has far more boxes than any tree Prunella grows")
    parents: dict[int, int] = {}
    for position, node in enumerate(nodes, start=1):
        where = f"box {position}"
        if not isinstance(node, dict):
            raise _damaged(where, "the box is not a JSON object")
        if node.get("id") != position or not is_whole_number(node.get("id")):
            raise _damaged(where, "boxes must be numbered 1, 2, 3, … in order")
        if not is_whole_number(node.get("n")) or node["n"] < 0:
            raise _damaged(where, "'n' (patients in the box) must be a whole number")
        if "depth" in node and (not is_whole_number(node["depth"]) or node["depth"] < 0):
            raise _damaged(where, "'depth' must be a whole number")
        children = node.get("children", [])
        if not isinstance(children, list) or len(children) not in (0, 2) or \
                not all(is_whole_number(c) for c in children):
            raise _damaged(where, "'children' must list two box numbers, or none for an "
                                  "outcome box")
        for child in children:
            if child <= position or child > len(nodes):
                raise _damaged(where, f"it points to box {child}, which does not follow it")
            if child in parents:
                raise _damaged(where, f"box {child} is reached from two questions")
            parents[child] = position
        if children:
            _check_split(node.get("split"), where, predictors)
        else:
            _check_leaf(node, where, classification, classes)
        if "counts" in node:
            counts = node["counts"]
            if not isinstance(counts, list) or not all(is_whole_number(c) and c >= 0 for c in counts):
                raise _damaged(where, "'counts' must be whole numbers")
            if classification and len(counts) != len(classes):
                raise _damaged(where, "'counts' must have one number per class")
        for key in ("mean", "sd"):
            if node.get(key) is not None and not is_finite_number(node[key]):
                raise _damaged(where, f"'{key}' must be a number")
        if node.get("sd") is not None and node["sd"] < 0:
            raise _damaged(where, "'sd' cannot be negative")
        if "quartiles" in node:
            quartiles = node["quartiles"]
            if not (isinstance(quartiles, list) and len(quartiles) == 2
                    and all(is_finite_number(q) for q in quartiles)
                    and quartiles[0] <= quartiles[1]):
                raise _damaged(where, "'quartiles' must be two numbers, the lower first")
        for key in ("question", "outcome"):
            if key in node and not isinstance(node[key], str):
                raise _damaged(where, f"'{key}' must be a text")
    unreached = [i for i in range(2, len(nodes) + 1) if i not in parents]
    if unreached:
        raise _damaged(f"box {unreached[0]}", "no question leads to it")
    check_possible_values(data, _damaged)  # values of the right type that no tree can have


def _check_split(split, where: str, predictors: set) -> None:
    if not isinstance(split, dict):
        raise _damaged(where, "a box with children needs its question ('split')")
    if not isinstance(split.get("column"), str) or split["column"] not in predictors:
        raise _damaged(where, "it asks about a column that is not among the predictors")
    kind = split.get("kind")
    if kind not in SPLIT_KINDS:
        raise _damaged(where, f"the question kind {str(kind)[:20]!r} is unknown")
    if kind == "above" and not is_finite_number(split.get("threshold")):
        raise _damaged(where, "a question 'above' needs a number as its threshold")
    for key in ("yes_levels", "no_levels"):
        if key in split:
            _texts(split[key], where, key)
    if kind == "in" and not split.get("yes_levels"):
        raise _damaged(where, "a question about levels needs at least one YES level")
    if split.get("missing_goes", "no") not in ("yes", "no", None):
        raise _damaged(where, "'missing_goes' must be 'yes', 'no' or null")
    count = split.get("missing_in_derivation")
    if count is not None and (not is_whole_number(count) or count < 0):
        raise _damaged(where, "'missing_in_derivation' must be a whole number")


def _check_leaf(node: dict, where: str, classification: bool, classes: list) -> None:
    prediction = node.get("prediction")
    if classification:
        if prediction not in classes:
            raise _damaged(where, "its prediction is not one of the classes")
    elif not is_finite_number(prediction):
        raise _damaged(where, "its prediction must be a number")


def _check_findings(findings) -> None:
    """The guards' findings: a list of {kind, column (or null), message}, of sane size."""
    if not isinstance(findings, list) or len(findings) > 1000:
        raise _damaged("the file", "'findings' must be a list of at most 1000 findings")
    for position, finding in enumerate(findings):
        where = f"findings[{position}]"
        if not isinstance(finding, dict) or not isinstance(finding.get("kind"), str) or \
                not isinstance(finding.get("message"), str) or \
                not (finding.get("column") is None or isinstance(finding.get("column"), str)):
            raise _damaged(where, "a finding needs a kind and a message as texts, and a column "
                                  "named by a text (or null)")
        if len(finding["message"]) > 5000 or len(finding["kind"]) > 100 or \
                len(finding.get("column") or "") > 1000:
            raise _damaged(where, "the finding is far longer than any Prunella writes")
