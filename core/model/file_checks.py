"""Checking a model file's contents before a model is built from them.

A model file may have been edited by hand, cut short or written by another program. The whole
document is checked here, once, by every command and the app before anything else, so a file
one command refuses is refused by all, naming the field by its path (``nodes[3].counts``):

- the tree (this module): the task, outcome and classes, the predictors' entries, and every
  box: numbered 1, 2, 3, … in order, each but the first reached from exactly one question, a
  question's column among the predictors and of a kind its question fits ("above" a number
  asks about a numeric column, "in" levels about a category), counts of whole patients, one
  per class, adding up to the box's ``n``, and the two boxes below a question sharing its
  patients;
- the records beside it (core/model/record_checks.py): the pruning path and the chosen size
  on it, the settings within the limits of core/option_limits.py, the data, cohort, costs,
  findings and checks;
- values of the right type that no tree can have (core/model/value_checks.py): negative SDs,
  shares above 1, intervals the wrong way round.

Texts, lists and nesting are limited by core/document_checks.py, so no file can make a
command work for minutes.
"""

from __future__ import annotations

from ..design.analysis import TASKS
from ..dictionary.columns import CATEGORY_KINDS, KINDS, PREDICTOR_KINDS, ROLES
from ..document_checks import LONG_TEXT_LENGTH, TEXT_LENGTH, Field, check_nesting
from ..errors import InputError
from ..messages.message import say
from ..safe_files import is_whole_number
from .record_checks import check_chosen_on_path, check_records
from .value_checks import check_possible_values

SPLIT_KINDS = ("above", "in", "missing")
MAX_BOXES = 100_000  # far more than any tree Prunella grows
MAX_CLASSES = 1_000


def check_model_document(data: dict, file: str = "(not saved)") -> None:
    """Refuse (InputError) a parsed model file whose contents do not make a usable tree, or
    ask for more than the limits allow; ``file`` names the file in the message."""
    def refuse(where: str, problem: str) -> InputError:
        return InputError(say("model.damaged", file=file, where=where, problem=problem))

    check_nesting(data, refuse)
    top = Field(data, "", refuse)
    for key in ("task", "outcome_spec", "predictors", "nodes", "path", "chosen"):
        if not top.has(key):
            top[key].fail("it is missing")
    task = top["task"]
    task.text(optional=False, choices=TASKS)
    classes = _check_outcome(top)
    predictors = _check_predictors(top["predictors"])
    nodes = top["nodes"]
    nodes.list(optional=False, least=1, most=MAX_BOXES)
    top["n_rows"].whole(optional=False, least=1)
    _check_boxes(nodes, task.value, classes, predictors)
    root = nodes.value[0]
    if root["n"] != top.value["n_rows"]:
        top["n_rows"].fail(f"it must equal the patients of box 1 ({root['n']:,})")
    check_records(top, classes, predictors)
    check_possible_values(data, refuse)  # values of the right type that no tree can have
    check_chosen_on_path(top)


# --- the outcome and the predictors ------------------------------------------------------------


def check_column_entry(entry: Field, kinds: tuple[str, ...] = KINDS) -> None:
    """A column's dictionary entry as a model keeps it: a name, a role and kind, texts of
    sane length, and lists of levels and missing-value codes."""
    entry.object(optional=False)
    entry["name"].text(optional=False)
    entry["role"].text(choices=ROLES)
    entry["kind"].text(choices=kinds)
    for key in ("label", "unit", "positive"):
        entry[key].text(empty=True)
    entry["note"].text(empty=True, longest=TEXT_LENGTH)
    entry["levels"].texts(unique=True)
    entry["missing_codes"].texts()


def _check_outcome(top: Field) -> list:
    """The outcome's entry and the classes; the classes (empty for a regression tree)."""
    check_column_entry(top["outcome_spec"])
    if top.has("outcome") and top["outcome"].value != top["outcome_spec"]["name"].value:
        top["outcome"].fail("it must be the name in 'outcome_spec'")
    classes = top["classes"]
    classes.texts(optional=classes.unsaid, unique=True, most=MAX_CLASSES)
    found = classes.value or []
    if top["task"].value == "classification" and len(found) < 2:
        classes.fail("a classification tree needs at least two classes")
    if top["task"].value == "regression" and found:
        classes.fail("a regression tree has no classes")
    positive = top["positive"]
    if positive.value is not None and positive.value not in found:
        positive.fail("it must be one of the classes, or null")
    return found


def _check_predictors(predictors: Field) -> dict[str, dict]:
    """Each predictor's entry; the entries by name."""
    predictors.list(optional=False, least=1)
    for entry in predictors.items():
        check_column_entry(entry, PREDICTOR_KINDS)
    names = [p["name"] for p in predictors.value]
    if len(set(names)) != len(names):
        predictors.fail("a predictor is listed twice")
    return {p["name"]: p for p in predictors.value}


# --- the boxes ---------------------------------------------------------------------------------


def _check_boxes(nodes: Field, task: str, classes: list, predictors: dict) -> None:
    parents: dict[int, int] = {}
    boxes = list(nodes.items(note=lambda i: f"box {i + 1}"))
    for position, box in enumerate(boxes, start=1):
        _check_box(box, position, len(boxes), task, classes, predictors)
        for child in box.value.get("children") or ():
            if child in parents:
                box["children"].fail(f"box {child} is reached from two questions")
            parents[child] = position
    unreached = [i for i in range(2, len(boxes) + 1) if i not in parents]
    if unreached:
        boxes[unreached[0] - 1].fail("no question leads to it")
    for box in boxes:
        _check_below(box, nodes.value, task)


def _check_box(box: Field, position: int, total: int, task: str, classes: list,
               predictors: dict) -> None:
    """One box on its own: its number, patients, children, question or outcome, counts."""
    box.object(optional=False)
    if box.value.get("id") != position or isinstance(box.value.get("id"), bool):
        box["id"].fail(f"boxes must be numbered 1, 2, 3, … in order (this is box {position})")
    box["n"].whole(optional=False, least=1)
    box["depth"].whole(optional=box["depth"].unsaid, most=total)
    children = box["children"]  # absent (older files) for an outcome box, never null
    children.list(optional=children.unsaid, most=2)
    if len(children.value or ()) == 1:
        children.fail("it must list two box numbers, or none for an outcome box")
    for child in children.items():
        child.whole(optional=False, least=position + 1, most=total)
    internal = bool(children.value)
    if box.has("leaf") and box["leaf"].truth() and box.value["leaf"] == internal:
        box["leaf"].fail("it must be true exactly when the box has no children")
    if internal:
        _check_split(box["split"], predictors, box.value["n"])
        box["question"].text(longest=LONG_TEXT_LENGTH)
    else:
        if box.value.get("split") is not None:
            box["split"].fail("an outcome box asks no question")
        box["outcome"].text(longest=LONG_TEXT_LENGTH, empty=True)
    _check_prediction(box["prediction"], task, classes, optional=internal)
    if task == "classification":
        _check_counts(box["counts"], classes, box.value["n"])
    else:
        _check_spread(box)


def _check_prediction(prediction: Field, task: str, classes: list, optional: bool) -> None:
    if task == "classification":
        if not (optional and prediction.value is None) and prediction.value not in classes:
            prediction.fail("it must be one of the classes")
    else:
        prediction.number(optional=optional)


def _check_counts(counts: Field, classes: list, n: int) -> None:
    """Whole numbers of patients, one per class, adding up to the box's n."""
    counts.list(optional=False, length=len(classes))
    if not all(is_whole_number(c) and c >= 0 for c in counts.value):
        counts.fail("they must be whole numbers of patients, 0 or more")
    if sum(counts.value) != n:
        counts.fail(f"they add up to {sum(counts.value):,}, not to the box's n ({n:,})")


def _check_spread(box: Field) -> None:
    """A regression box: its mean, SD and quartiles; no class counts."""
    if box.value.get("counts") or (box["counts"].given and box.value["counts"] != []):
        box["counts"].fail("a regression tree's boxes have no class counts")
    box["mean"].number(optional=False)
    if box["sd"].number() and box.value["sd"] < 0:
        box["sd"].fail("'sd' cannot be negative")
    quartiles = box["quartiles"]
    if quartiles.numbers(length=2) and quartiles.value[0] > quartiles.value[1]:
        quartiles.fail("they must be two numbers, the lower first")


def _check_split(split: Field, predictors: dict, n: int) -> None:
    """A question: a predictor's column, a kind that fits the column, its threshold or
    levels, and where a value that is not recorded goes."""
    split.object(optional=False)
    column = split["column"]
    column.text(optional=False)
    if column.value not in predictors:
        column.fail("it names a column that is not among the predictors")
    entry = predictors[column.value]
    kind = split["kind"]
    kind.text(optional=False, choices=SPLIT_KINDS)
    if kind.value == "above":
        if entry.get("kind", "numeric") != "numeric":
            kind.fail(f"a question 'above' a number needs a numeric column, and "
                      f"{column.value[:40]!r} is {entry.get('kind')}")
        split["threshold"].number(optional=False)
    elif split.value.get("threshold") is not None:
        split["threshold"].fail(f"a question of kind {kind.value!r} has no threshold")
    yes, no = split["yes_levels"], split["no_levels"]
    yes.texts(optional=yes.unsaid, unique=True)
    no.texts(optional=no.unsaid, unique=True)
    if kind.value == "in":
        if entry.get("kind") not in CATEGORY_KINDS:
            kind.fail(f"a question about levels needs a category column, and "
                      f"{column.value[:40]!r} is {entry.get('kind', 'numeric')}")
        if not yes.value:
            yes.fail("a question about levels needs at least one YES level")
        known = set(entry.get("levels") or ())
        for levels in (yes, no):
            unknown = [lv for lv in levels.value or () if lv not in known]
            if unknown:
                levels.fail(f"{unknown[0][:40]!r} is not a level of {column.value[:40]!r}")
        if set(yes.value) & set(no.value or ()):
            no.fail("a level cannot be both YES and NO")
    elif yes.value or no.value:
        (yes if yes.value else no).fail(f"a question of kind {kind.value!r} has no levels")
    split["missing_goes"].text(choices=("yes", "no"))
    split["missing_in_derivation"].whole(most=n)


def _check_below(box: Field, nodes: list, task: str) -> None:
    """The two boxes below a question share its patients (and, per class, its counts), and
    lie one level deeper."""
    children = box.value.get("children") or ()
    if not children:
        return
    below = [nodes[c - 1] for c in children]
    if sum(b["n"] for b in below) != box.value["n"]:
        box["n"].fail(f"boxes {children[0]} and {children[1]} below it hold "
                      f"{sum(b['n'] for b in below):,} patients, not {box.value['n']:,}")
    if task == "classification":
        shared = [a + b for a, b in zip(below[0]["counts"], below[1]["counts"])]
        if shared != box.value["counts"]:
            box["counts"].fail(f"they must add up the counts of boxes {children[0]} and "
                               f"{children[1]} below it")
    depth = box.value.get("depth")
    if depth is not None and any(b.get("depth", depth + 1) != depth + 1 for b in below):
        box["depth"].fail(f"boxes {children[0]} and {children[1]} below it must be one "
                          "level deeper")

