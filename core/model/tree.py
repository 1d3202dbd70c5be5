"""The chosen tree as plain nodes: questions in words, outcomes with counts; JSON in and out.

The model is what the chart prints and what scores new patients. It carries no scikit-learn
object: thresholds are the round numbers of core/model/thresholds.py, chosen so that every
derivation patient is routed exactly as the grower routed them, and it routes new rows itself.
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Iterable
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np
import pandas as pd

from ..checking.intervals import Proportion, mean_interval, proportion
from ..dictionary.columns import ColumnSpec
from ..dictionary.typed_columns import TypedColumn, typed_column
from ..errors import InputError
from ..messages.message import say
from ..phrases import names_phrase, rows_and_patients, rows_word, short_fingerprint
from ..safe_files import check_format, read_json_document, write_text_atomic
from .file_checks import check_model_document
from ..precision import MAX_DECIMALS, error_number, summary_number
from .thresholds import format_number

MODEL_FORMAT = "prunella-model/1"
MODEL_VERSIONS = (1,)  # format versions this Prunella reads
_NO_SPACE_UNITS = ("%", "°C", "°F", "°")


@dataclass(frozen=True)
class Question:
    """One yes/no question. YES when the value is above ``threshold`` or in ``yes_levels``."""

    column: str
    kind: str  # "above" (numeric), "in" (levels) or "missing" (is it not recorded?)
    threshold: float | None = None
    yes_levels: tuple[str, ...] = ()
    no_levels: tuple[str, ...] = ()
    # "yes" or "no": the branch for a value that is not recorded; None when the derivation
    # patients at this box gave no evidence (none had the value missing): measure it instead.
    missing_goes: str | None = "no"
    # Derivation patients reaching the box whose value was not recorded; None in model files
    # written before it was counted.
    missing_in_derivation: int | None = None

    @property
    def routes_missing(self) -> bool:
        """Whether a value that is not recorded is sent down a branch at all.

        Only where the derivation patients at this box had missing values is there evidence
        for a branch. A model file that does not say how many had (written before the count
        was kept) is read the safe way: no evidence, so the value must be measured."""
        if self.kind == "missing":
            return True
        return self.missing_goes in ("yes", "no") and bool(self.missing_in_derivation)

    def takes_missing(self, branch: int) -> bool:
        """Whether branch ``branch`` (0 = YES, 1 = NO) also takes a value that is not recorded.

        A question that asks "not recorded?" says so itself, so neither branch adds it."""
        return (self.kind != "missing" and self.routes_missing
                and self.missing_goes == ("yes" if branch == 0 else "no"))

    def to_dict(self) -> dict:
        data = {"column": self.column, "kind": self.kind, "threshold": self.threshold,
                "yes_levels": list(self.yes_levels), "no_levels": list(self.no_levels),
                "missing_goes": self.missing_goes}
        if self.missing_in_derivation is not None:  # absent from older files: kept absent
            data["missing_in_derivation"] = self.missing_in_derivation
        return data

    @classmethod
    def from_dict(cls, data: dict) -> "Question":
        count = data.get("missing_in_derivation")
        return cls(column=data["column"], kind=data["kind"], threshold=data.get("threshold"),
                   yes_levels=tuple(data.get("yes_levels", ())),
                   no_levels=tuple(data.get("no_levels", ())),
                   missing_goes=data.get("missing_goes", "no"),
                   missing_in_derivation=None if count is None else int(count))


def question_text(question: Question, spec: ColumnSpec) -> str:
    """The question as a clinician would say it, with the unit."""
    label = spec.display
    if question.kind == "above":
        number = format_number(question.threshold)
        unit = spec.unit
        if unit:
            number = f"{number}{unit}" if unit in _NO_SPACE_UNITS else f"{number} {unit}"
        return f"{label} above {number}?"
    if question.kind == "missing":
        return f"{label} not recorded?"
    levels = list(question.yes_levels)
    if len(levels) == 1:
        return f"{label}: {levels[0]}?"
    return f"{label}: {', '.join(levels[:-1])} or {levels[-1]}?"


def questions_from_splits(nodes: tuple[Node, ...],
                          predictors: tuple[ColumnSpec, ...]) -> tuple[Node, ...]:
    """The boxes with each question worded from its split (column, kind, threshold or levels)
    and the column's label and unit, never from the words a file stores: a file edited to say
    "above 70%" over a split at 91 still prints the question the tree asks."""
    specs = {spec.name: spec for spec in predictors}
    return tuple(replace(node, text=question_text(node.question, specs[node.question.column]))
                 if node.question is not None and node.question.column in specs else node
                 for node in nodes)


ANSWERS = ("YES", "NO")  # the words on a question's branches, children in this order
# Said once on a chart (and in the rules) whose questions have no branch for a missing value.
MEASURE_FIRST = "If a value asked for is not recorded, measure it before using this chart."
# Said where the chosen tree's cross-validated error is not lower than one box's by one SE.
NO_BETTER = {"classification": "This tree predicts no better than giving everyone the most "
                               "common outcome.",
             "regression": "This tree predicts no better than giving everyone the average "
                           "outcome."}
# When the miss cost (or goal) makes a single box answer a rarer outcome, "the most common
# outcome" would name the wrong answer for the tree it is compared with.
NO_BETTER_TREAT_ALL = ("This tree predicts no better than treating everyone as {answer}, the "
                       "answer its miss cost gives when no question is asked.")


def better_than_no_tree(leaves, cv_risk, index: int) -> bool:
    """Whether the tree at ``index`` of a pruning path is better than no tree: more than one
    box, and a cross-validated error lower than the one-box tree's by at least its own SE
    (``cv_risk`` and ``cv_se`` as pairs of lists, the one-box tree the last of the path).

    One SE, as the 1-SE rule of Breiman et al. (1984, §3.4.3) judges a difference in error."""
    risk, se = cv_risk
    return int(leaves[index]) > 1 and float(risk[-1]) - float(risk[index]) >= float(se[index])


def shared_count(counts: tuple[int, ...], classes: tuple[str, ...], prediction) -> int:
    """The patients of a box that its share counts: those with the positive class of a
    yes/no outcome, else those with the class the box expects."""
    if len(classes) == 2:
        return int(counts[1])
    return int(counts[classes.index(str(prediction))])


def answer_verb(counts: tuple[int, ...], classes: tuple[str, ...], prediction) -> str:
    """How a box's answer is said: "expect" when it is the box's most common outcome, "treat
    as" when the costs or the goal the tree was built with make it the answer although fewer
    of the box's patients have it (a rule-out box of 6% falls is not where falls are expected,
    but where they are not ruled out)."""
    if not counts or len(counts) != len(classes) or str(prediction) not in classes:
        return "expect"
    return "expect" if counts[classes.index(str(prediction))] >= max(counts) else "treat as"


def expected_outcome(outcome: ColumnSpec, task: str, prediction, mean: float | None,
                     counts: tuple[int, ...] = (), classes: tuple[str, ...] = (),
                     decimals: int | None = None) -> str:
    """A box's expected outcome in words, without its counts: 'Admitted: expect yes',
    'Fell: treat as fell' (see :func:`answer_verb`), 'Length of stay: mean 31.2 h' (to the
    precision of an outcome recorded with ``decimals`` decimals)."""
    if task == "regression":
        return f"{outcome.display}: mean {summary_number(float(mean), decimals, outcome.unit)}"
    return f"{outcome.display}: {answer_verb(counts, classes, prediction)} {prediction}"


@dataclass(frozen=True)
class Step:
    """One question on the way to a box, and the answer that leads on."""

    box: int  # the question's box number
    question: str
    answer: str  # "YES" or "NO"
    includes_missing: bool  # this branch also takes a value that is not recorded
    to: int  # the box this answer leads to

    def phrase(self) -> str:
        """The question and its answer, as the rules print it."""
        note = " (or not recorded)" if self.includes_missing else ""
        return f"{self.question} {self.answer}{note}"

    def text(self) -> str:
        return f"Box {self.box}: {self.phrase()}"


@dataclass(frozen=True)
class Node:
    """A box of the tree. Internal nodes have a question and children (yes, no)."""

    id: int
    depth: int
    n: int  # derivation patients (rows) reaching the node
    question: Question | None = None
    children: tuple[int, ...] = ()
    counts: tuple[int, ...] = ()  # classification: patients per class
    mean: float | None = None  # regression: mean outcome
    sd: float | None = None
    # Regression: the middle half of the box's derivation patients (25th and 75th
    # percentiles), the spread one patient may expect, beside the interval of the mean.
    quartiles: tuple[float, float] | None = None
    prediction: str | float | None = None
    text: str = ""  # the question or the outcome, in words

    @property
    def leaf(self) -> bool:
        return not self.children

    def to_dict(self) -> dict:
        data = {"id": self.id, "leaf": self.leaf, "depth": self.depth, "n": self.n,
                "children": list(self.children)}
        if self.leaf:
            data["outcome"] = self.text
        else:
            data["question"] = self.text
            data["split"] = self.question.to_dict()
        if self.counts:
            data["counts"] = list(self.counts)
        if self.mean is not None:
            data["mean"] = self.mean
            data["sd"] = self.sd
        if self.quartiles is not None:
            data["quartiles"] = list(self.quartiles)
        data["prediction"] = self.prediction
        return data

    @classmethod
    def from_dict(cls, data: dict) -> "Node":
        split = data.get("split")
        return cls(id=int(data["id"]), depth=int(data.get("depth", 0)), n=int(data["n"]),
                   question=Question.from_dict(split) if split else None,
                   children=tuple(int(c) for c in data.get("children", ())),
                   counts=tuple(int(c) for c in data.get("counts", ())),
                   mean=data.get("mean"), sd=data.get("sd"),
                   quartiles=tuple(float(q) for q in data["quartiles"])
                   if isinstance(data.get("quartiles"), list) else None,
                   prediction=data.get("prediction"),
                   text=data.get("question") or data.get("outcome") or "")


def column_values(numbers: np.ndarray | None, codes: np.ndarray | None,
                  spec: ColumnSpec) -> np.ndarray:
    """A typed column as the model reads it: numbers, or level names (None = not recorded)."""
    if numbers is not None:
        return numbers
    names = np.array(list(spec.levels) + [None], dtype=object)
    return names[codes]


@dataclass(frozen=True)
class Scored:
    """The result of routing rows through a model."""

    leaf: np.ndarray  # box number of the outcome box reached; 0 where a value is needed
    prediction: np.ndarray  # class label or mean (None or NaN where a value is needed)
    warnings: tuple[str, ...] = ()
    needs: np.ndarray | None = None  # the column whose value must be measured, else None
    waiting: np.ndarray | None = None  # the question box where that row waits, else 0


# Parts of a model file that are not the tree: the guards' notes about the data, the check
# recorded on separate patients (which names the tree by this fingerprint itself), and the
# digests of the derivation patients' identifiers, keyed with the growing computer's own key
# (the same tree grown elsewhere has other digests, and is the same tree).
NOT_THE_TREE = ("findings", "validation", "derivation_ids")


def _digest(document: dict) -> str:
    canonical = json.dumps(document, sort_keys=True, separators=(",", ":"),
                           ensure_ascii=False, allow_nan=False)
    return hashlib.sha256(canonical.encode("utf-8")).hexdigest()


@dataclass(frozen=True)
class TreeModel:
    """The chosen tree and everything needed to print, score and reproduce it."""

    task: str
    outcome: ColumnSpec
    classes: tuple[str, ...]
    predictors: tuple[ColumnSpec, ...]
    nodes: tuple[Node, ...]
    n_rows: int
    path: dict
    chosen: dict
    extra: dict = field(default_factory=dict)  # settings, provenance, cohort, validation

    @property
    def positive(self) -> str | None:
        return self.classes[1] if self.task == "classification" and len(self.classes) == 2 else None

    @property
    def root(self) -> Node:
        return self.nodes[0]

    def node(self, node_id: int) -> Node:
        return self.nodes[node_id - 1]

    @property
    def leaves(self) -> tuple[Node, ...]:
        return tuple(n for n in self.nodes if n.leaf)

    def mean_interval(self, node: Node) -> tuple[float, float]:
        """95% interval of a box's mean outcome (regression), kept within the outcome's
        observed range in the derivation data."""
        span = self.extra.get("cohort", {}).get("outcome_range")
        return mean_interval(float(node.mean), float(node.sd or 0.0), node.n,
                             within=tuple(span) if span else None)

    def box_share(self, node: Node) -> Proportion:
        """The share a box shows (classification): its patients with the positive class of a
        yes/no outcome, else with the class it expects, as k of n with a Wilson interval."""
        if self.task != "classification":
            raise ValueError("box_share is for classification trees; use mean_interval")
        return proportion(shared_count(node.counts, self.classes, node.prediction), node.n)

    def expected_outcome(self, node: Node) -> str:
        """A box's expected outcome in words, without its counts (see :func:`expected_outcome`)."""
        return expected_outcome(self.outcome, self.task, node.prediction, node.mean,
                                node.counts, self.classes, self.outcome_decimals)

    @property
    def outcome_decimals(self) -> int | None:
        """The decimals the outcome was recorded with (regression; ``cohort.outcome_decimals``),
        which every printed mean, quartile, interval and error follows (core/precision.py).
        None for a file written before it was recorded: three significant figures, as then."""
        cohort = self.extra.get("cohort")
        value = cohort.get("outcome_decimals") if isinstance(cohort, dict) else None
        if isinstance(value, int) and not isinstance(value, bool) and 0 <= value <= MAX_DECIMALS:
            return value
        return None

    @property
    def rows_word(self) -> str:
        """What a derivation row is: "visits" where some patients came more than once (the
        cohort counts patients apart from visits), else "patients" (core/phrases.py)."""
        cohort = self.extra.get("cohort")
        cohort = cohort if isinstance(cohort, dict) else {}
        patients = cohort.get("patients")
        return rows_word(int(cohort.get("visits", self.n_rows)),
                         patients if isinstance(patients, int) else None)

    @property
    def rows_counted(self) -> str:
        """The derivation rows counted: '412 visits of 300 patients', or '300 patients'."""
        cohort = self.extra.get("cohort")
        cohort = cohort if isinstance(cohort, dict) else {}
        patients = cohort.get("patients")
        return rows_and_patients(int(cohort.get("visits", self.n_rows)),
                                 patients if isinstance(patients, int) else None)

    @property
    def error_measure(self) -> str:
        """What the error of the pruning path measures, in the rows' own word: "expected
        misclassification cost per visit" where the rows are visits (the file says "per
        patient" whatever the rows were)."""
        measure = str(self.path.get("risk_measure", "error"))
        return measure.replace("per patient", f"per {self.rows_word[:-1]}")

    @property
    def better_than_no_tree(self) -> bool:
        """False when this tree predicts no better than one box for everyone (see
        :func:`better_than_no_tree`). A file written before it was recorded is judged from its
        own pruning path."""
        recorded = self.chosen.get("better_than_no_tree")
        if recorded is not None:
            return bool(recorded)
        judged = self._judged_from_path()
        return True if judged is None else judged  # nothing to judge by: as the file says

    def _judged_from_path(self) -> bool | None:
        """Whether the tree is better than no tree by its own pruning path (None when the
        path cannot say)."""
        if len(self.leaves) <= 1:
            return False
        leaves, risk, se = (self.path.get(k) for k in ("leaves", "cv_risk", "cv_se"))
        if not leaves or not risk or not se or self.chosen.get("leaves") not in leaves:
            return None
        return better_than_no_tree(leaves, (risk, se), leaves.index(self.chosen["leaves"]))

    @property
    def no_better_statement(self) -> str | None:
        """The sentence saying this tree is no better than no tree, or None when it is."""
        return None if self.better_than_no_tree else self.no_tree_statement

    @property
    def no_tree_statement(self) -> str:
        """What a one-box tree does for everyone, as said where this tree is no better: the
        most common outcome, or the rarer one its costs make the single box's answer."""
        root = self.root
        if self.task == "classification" and root.counts and root.prediction is not None:
            most_common = self.classes[max(range(len(root.counts)), key=root.counts.__getitem__)]
            if str(root.prediction) != str(most_common):
                return NO_BETTER_TREAT_ALL.format(answer=root.prediction)
        return NO_BETTER[self.task]

    def coarsening(self) -> str | None:
        """Whether the tree was grown on coarsened measurements, in one sentence (the chart's
        side panel, the report and the app), or None when it was not."""
        record = self.extra.get("coarsened")
        if not isinstance(record, dict) or not record.get("levels"):
            return None
        levels, names = int(record["levels"]), list(record.get("columns") or [])
        if not names:
            return (f"Coarsening to {levels} levels was asked for; no measurement had more "
                    "values, so none was coarsened.")
        known = {spec.name: spec.display for spec in self.predictors}
        shown = [known.get(n, n) for n in names]
        return (f"Coarsened: {names_phrase(shown)} {'was' if len(names) == 1 else 'were'} grown "
                f"on {levels} quantile levels (faster on large files); each threshold is still "
                "set between observed values.")

    def no_better_warning(self) -> str | None:
        """The warning that this tree is no better than no tree, with its numbers (the app's
        banner and the command line's output), or None when it is better."""
        if self.better_than_no_tree:
            return None
        chosen, risk = self.chosen, self.path.get("cv_risk") or [float("nan")]
        one_box = chosen.get("one_box_cv_risk", risk[-1])
        def error(value: float) -> str:  # as the app's and the path table's errors print
            return error_number(value, self.task, self.outcome_decimals)

        return say("size.no_better_than_no_tree", statement=self.no_tree_statement,
                   error=error(chosen["cv_risk"]), one_box=error(one_box),
                   se=error(chosen["cv_se"]))

    def spec(self, column: str) -> ColumnSpec:
        for spec in self.predictors:
            if spec.name == column:
                return spec
        raise KeyError(column)

    # --- JSON ---------------------------------------------------------------------------

    def to_dict(self) -> dict:
        data = {
            "format": MODEL_FORMAT,
            "task": self.task,
            "outcome": self.outcome.name,
            "outcome_spec": self.outcome.to_dict(),
            "classes": list(self.classes),
            "positive": self.positive,
            "n_rows": self.n_rows,
            "predictors": [p.to_dict() for p in self.predictors],
            "nodes": [n.to_dict() for n in self.nodes],
            "path": self.path,
            "chosen": self.chosen,
        }
        data.update(self.extra)
        return data

    def to_json(self) -> str:
        return json.dumps(self.to_dict(), indent=1, ensure_ascii=False, allow_nan=False) + "\n"

    @property
    def fingerprint(self) -> str:
        """SHA-256 of the model's canonical JSON (keys sorted, no whitespace), without the
        guards' ``findings`` (notes about the data) and without its recorded check
        (``validation``): the fingerprint names the tree, so checking it does not change it,
        and a check carries the same fingerprint as the tree it was made on."""
        return _digest({k: v for k, v in self.to_dict().items() if k not in NOT_THE_TREE})

    @property
    def fingerprint_with_check(self) -> str:
        """The fingerprint as Prunella 0.1 computed it, with the recorded check inside: only
        to recognise a tree in a project saved by that version."""
        return _digest({k: v for k, v in self.to_dict().items() if k != "findings"})

    @property
    def fingerprint_with_digests(self) -> str:
        """The fingerprint as computed before the identifier digests were left out of it
        (they were salted then): only to recognise a tree, or its check, saved that way."""
        return _digest({k: v for k, v in self.to_dict().items()
                        if k not in ("findings", "validation")})

    @property
    def earlier_fingerprints(self) -> tuple[str, ...]:
        """The fingerprints earlier versions gave this very tree (an earlier project or check
        names it by one of these)."""
        if "derivation_ids" not in self.extra:
            return (self.fingerprint_with_check,)
        return (self.fingerprint_with_digests, self.fingerprint_with_check)

    def is_named_by(self, fingerprint: str | None) -> bool:
        """Whether ``fingerprint`` (from a project or a check) names this tree, as this
        version or an earlier one (Prunella 0.1's held the check, a later one the
        digests) computed it."""
        return fingerprint is not None and fingerprint in (self.fingerprint,
                                                           *self.earlier_fingerprints)

    @property
    def short_fingerprint(self) -> str:
        """The fingerprint as pages and screens print it (its first 12 digits)."""
        return short_fingerprint(self.fingerprint)

    @property
    def recorded_check(self) -> dict | None:
        """The recorded check on separate patients (``extra["validation"]``), only when it
        names this very tree by its fingerprint. A check edited into a file, copied from
        another tree or written by Prunella 0.1 (which did not name the tree) does not count:
        the chart, the report and the app then say the tree is not yet checked."""
        record = self.extra.get("validation")
        if not isinstance(record, dict):
            return None  # nothing stored: no fingerprint to compute
        named = (self.fingerprint,) + (
            (self.fingerprint_with_digests,) if "derivation_ids" in self.extra else ())
        # (a check saved before the digests left the fingerprint still counts)
        return record if record.get("model_fingerprint") in named else None

    @property
    def stored_check_refused(self) -> str | None:
        """The sentence saying a stored check does not name this tree, or None when there is
        no stored check or it does."""
        if "validation" not in self.extra or self.recorded_check is not None:
            return None
        return say("model.check_not_this_tree")

    def save(self, path: str | Path) -> None:
        write_text_atomic(path, self.to_json())

    @classmethod
    def from_dict(cls, data: dict, name: str | None = None) -> "TreeModel":
        """A model from parsed JSON; damaged, foreign or newer files are refused (InputError)
        naming the file ``name`` (if it has one) and the field."""
        check_format(data, "model", MODEL_VERSIONS, name or "This file")
        return cls._from_checked_format(data, name or "(not saved)")

    @classmethod
    def _from_checked_format(cls, data: dict, name: str) -> "TreeModel":
        """A model from parsed JSON whose format and version were already checked; the whole
        document is checked (core/model/file_checks.py) before any of it is used."""
        check_model_document(data, name)
        try:
            known = {"format", "task", "outcome", "outcome_spec", "classes", "positive", "n_rows",
                     "predictors", "nodes", "path", "chosen"}
            predictors = tuple(ColumnSpec.from_dict(p) for p in data["predictors"])
            model = cls(task=data["task"], outcome=ColumnSpec.from_dict(data["outcome_spec"]),
                        classes=tuple(data.get("classes", ())), predictors=predictors,
                        nodes=questions_from_splits(
                            tuple(Node.from_dict(n) for n in data["nodes"]), predictors),
                        n_rows=int(data["n_rows"]), path=data["path"], chosen=data["chosen"],
                        extra={k: v for k, v in data.items() if k not in known})
        except (KeyError, TypeError, ValueError, AttributeError) as exc:
            raise InputError(say("model.damaged_detail", kind=type(exc).__name__, detail=str(exc))
                             ) from None
        model._check()
        model._check_judgement(name)
        return model

    @classmethod
    def load(cls, path: str | Path) -> "TreeModel":
        """Read a model file written by :meth:`save` (JSON only; nothing in it is executed)."""
        # read_json_document refuses a missing, foreign or newer file with the catalogue's message.
        return cls._from_checked_format(read_json_document(path, "model", MODEL_VERSIONS),
                                        Path(path).name)

    def _check_judgement(self, name: str) -> None:
        """A file saying its tree is better than no tree (or not) must agree with its own
        pruning path: the chart's "no better than no tree" statement hangs on it."""
        recorded, judged = self.chosen.get("better_than_no_tree"), self._judged_from_path()
        if recorded is None or judged is None or bool(recorded) == judged:
            return
        says = "better than" if recorded else "no better than"
        raise InputError(say("model.damaged", file=name, where="chosen.better_than_no_tree",
                             problem=f"it says the tree is {says} no tree, but its pruning "
                                     "path says otherwise (its cross-validated error against "
                                     "one box's, by one standard error)"))

    def _check(self) -> None:
        ids = [n.id for n in self.nodes]
        if ids != list(range(1, len(ids) + 1)):
            raise InputError(say("model.numbering"))
        for node in self.nodes:
            if node.children and (len(node.children) != 2 or node.question is None or
                                  any(c <= node.id or c > len(ids) for c in node.children)):
                raise InputError(say("model.damaged_box", box=node.id))
            if node.question is not None and node.question.column not in {p.name for p in self.predictors}:
                raise InputError(say("model.unknown_column", box=node.id))

    # --- scoring ------------------------------------------------------------------------

    def apply(self, frame: pd.DataFrame) -> Scored:
        """Route each row to an outcome box. Unseen levels are treated as not recorded."""
        used = self.columns_asked()
        absent = [c for c in used if c not in frame.columns]
        if absent:
            raise InputError(say("check.columns_absent", columns=", ".join(
                f"{c!r} ({self.spec(c).display})" for c in absent)))
        warnings: list[str] = []
        values: dict[str, np.ndarray] = {}
        for column in used:
            spec = self.spec(column)
            typed = typed_column(frame[column].reset_index(drop=True), spec)
            warnings.extend(typed.notes)
            values[column] = column_values(typed.numbers, typed.codes, spec)
        at, waiting = self.route_waiting(values, len(frame))
        return Scored(leaf=at, prediction=self.predictions(at), warnings=tuple(warnings),
                      needs=self.needed_columns(waiting), waiting=waiting)

    def columns_asked(self) -> list[str]:
        return sorted({n.question.column for n in self.nodes if n.question is not None})

    def asked_values(self, columns: Iterable[TypedColumn]) -> dict[str, np.ndarray]:
        """The values of the typed columns this tree asks about, as :meth:`route` reads them
        (e.g. the predictors of an analysis's rows)."""
        asked = set(self.columns_asked())
        return {t.spec.name: column_values(t.numbers, t.codes, t.spec) for t in columns
                if t.spec.name in asked}

    def route(self, values: dict[str, np.ndarray], n: int) -> np.ndarray:
        """Box number reached by each of ``n`` rows, given each asked column's values; 0 for a
        row stopped at a question whose value is not recorded and has no branch (see
        :meth:`route_waiting`)."""
        return self.route_waiting(values, n)[0]

    def route_waiting(self, values: dict[str, np.ndarray],
                      n: int) -> tuple[np.ndarray, np.ndarray]:
        """The boxes reached (0 = none) and, per row, the question box where it waits for a
        value to be measured (0 = it reached an outcome box)."""
        at = np.ones(n, dtype=np.int64)
        waiting = np.zeros(n, dtype=np.int64)
        for node in self.nodes:  # parents come before children
            if node.leaf:
                continue
            here = np.flatnonzero(at == node.id)
            if here.size == 0:
                continue
            yes, unknown = self._answers(node.question, values[node.question.column][here])
            at[here] = np.where(yes, node.children[0], node.children[1])
            stopped = here[unknown]
            at[stopped] = 0
            waiting[stopped] = node.id
        return at, waiting

    def needed_columns(self, waiting: np.ndarray) -> np.ndarray:
        """The column each row must have measured (None where it reached a box)."""
        table = np.array([None] + [n.question.column if n.question else None
                                   for n in self.nodes], dtype=object)
        return table[np.asarray(waiting)]

    def predictions(self, leaves: np.ndarray) -> np.ndarray:
        # Box 0 (no box: a value must be measured first) predicts nothing.
        empty = np.nan if self.task == "regression" else None
        table = np.array([empty] + [n.prediction for n in self.nodes], dtype=object)
        out = table[leaves]
        return out.astype(float) if self.task == "regression" else out

    @staticmethod
    def _answers(question: Question, values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """YES per row, and which rows cannot be answered (not recorded, no branch for it)."""
        if question.kind == "missing":
            answer = pd.isna(values)
            return answer, np.zeros(len(answer), dtype=bool)
        missing_yes = question.missing_goes == "yes"
        if question.kind == "above":
            values = values.astype(float)
            missing = np.isnan(values)
            with np.errstate(invalid="ignore"):
                answer = values > question.threshold
        else:
            missing = pd.isna(values)
            answer = np.isin(values.astype(object), list(question.yes_levels))
            # A level the tree never saw at derivation is treated as not recorded.
            known = np.isin(values.astype(object), list(question.yes_levels + question.no_levels))
            missing = missing | ~known
        missing = np.asarray(missing, dtype=bool)
        unknown = missing if not question.routes_missing else np.zeros(len(missing), dtype=bool)
        return np.where(missing, missing_yes, answer), unknown

    # --- plain text ---------------------------------------------------------------------

    def steps_to(self, box: int) -> tuple[Step, ...]:
        """The questions and answers that lead from box 1 to ``box``, in order."""
        self.node(box)  # raises IndexError for a box that does not exist
        parents = {c: (n, i) for n in self.nodes for i, c in enumerate(n.children)}
        steps = []
        current = box
        while current in parents:
            node, branch = parents[current]
            steps.append(Step(node.id, node.text, ANSWERS[branch],
                              node.question.takes_missing(branch), current))
            current = node.id
        return tuple(reversed(steps))

    def asks_unroutable(self) -> bool:
        """Whether some question has no branch for a value that is not recorded (so the value
        must be measured before the tree is used)."""
        return any(n.question is not None and not n.question.routes_missing for n in self.nodes)

    def rules(self) -> str:
        """The tree as numbered plain-text rules, one line per path to an outcome box."""
        lines = [f"Outcome: {self.outcome.display}", ""]
        if self.asks_unroutable():
            lines[1:1] = [MEASURE_FIRST]
        if self.no_better_statement:
            lines[1:1] = [self.no_better_statement]
        for leaf in self.leaves:
            condition = " AND ".join(s.phrase() for s in self.steps_to(leaf.id)) or "(every patient)"
            lines.append(f"Box {leaf.id}: IF {condition}")
            lines.append(f"    THEN {leaf.text}")
        return "\n".join(lines) + "\n"
