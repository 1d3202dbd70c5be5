"""The details of one box of a tree, and one patient's way through it.

The app's tree view shows these when a box is clicked or a patient is looked up; they are
plain functions over a TreeModel so the numbers come from core, not from a widget.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..checking.intervals import wilson_interval
from ..data.cells import is_missing_text
from ..dictionary.typed_columns import typed_column
from ..errors import InputError
from ..messages.message import say
from ..precision import summary_number
from .tree import Step, TreeModel

# Values no patient can have, whatever the cohort, where the data dictionary gives no
# plausible values: a percentage lies within 0 to 100 (common practice; SpO2 250 is a slip of
# the keyboard).
_POSSIBLE = {"%": ("a percentage", 0.0, 100.0)}


@dataclass(frozen=True)
class ClassShare:
    """How many of a box's patients had one outcome class, with a 95% Wilson interval."""

    label: str
    count: int
    share: float
    low: float
    high: float


@dataclass(frozen=True)
class BoxDetails:
    """Everything the app shows about one box."""

    box: int
    leaf: bool
    text: str  # the question or the expected outcome, in words
    n: int  # derivation patients reaching the box
    share_of_all: float  # of all derivation patients
    steps: tuple[Step, ...]  # from box 1 to here
    classes: tuple[ClassShare, ...] = ()  # classification
    mean: float | None = None  # regression
    sd: float | None = None
    mean_low: float | None = None
    mean_high: float | None = None
    quartiles: tuple[float, float] | None = None  # regression: the middle half of the patients
    decimals: int | None = None  # regression: the decimals the outcome was recorded with
    unit: str = ""

    def number(self, value: float, with_unit: bool = False) -> str:
        """A mean, SD, interval end or quartile as the app prints it: to the outcome's
        precision (core/precision.py), with the unit when asked."""
        return summary_number(value, self.decimals, self.unit if with_unit else "")


def box_details(model: TreeModel, box: int) -> BoxDetails:
    """Patients, outcome distribution (with intervals) and the path of questions of a box."""
    node = model.node(box)
    common = dict(box=box, leaf=node.leaf, text=node.text, n=node.n,
                  share_of_all=node.n / max(model.n_rows, 1), steps=model.steps_to(box))
    if model.task == "regression":
        low, high = model.mean_interval(node)
        return BoxDetails(mean=float(node.mean), sd=float(node.sd or 0.0), mean_low=low,
                          mean_high=high, quartiles=node.quartiles,
                          decimals=model.outcome_decimals, unit=model.outcome.unit, **common)
    shares = []
    for label, count in zip(model.classes, node.counts):
        low, high = wilson_interval(int(count), node.n)
        shares.append(ClassShare(label, int(count), count / max(node.n, 1), low, high))
    return BoxDetails(classes=tuple(shares), **common)


@dataclass(frozen=True)
class PatientRoute:
    """Where one patient's values lead: the boxes passed, the answers, the outcome box."""

    boxes: tuple[int, ...]  # box 1 ... outcome box (or the question still to answer)
    steps: tuple[Step, ...]
    outcome_box: int  # 0 when a value must be measured first
    prediction: str | float | None
    warnings: tuple[str, ...] = ()
    needs: str | None = None  # the column to measure: not recorded, and no branch for it
    waiting_box: int = 0  # the question box where the patient waits for that value
    refused: tuple[str, ...] = ()  # typed words or impossible numbers: no route is given


def observed_ranges(columns) -> dict[str, tuple[float, float]]:
    """The least and greatest recorded value of each numeric typed column (e.g. the
    predictors of the rows a tree was grown on), by column name."""
    ranges = {}
    for column in columns:
        numbers = column.numbers
        if numbers is None or not np.isfinite(numbers).any():
            continue
        ranges[column.spec.name] = (float(np.nanmin(numbers)), float(np.nanmax(numbers)))
    return ranges


def _shown(value: float) -> str:
    return f"{value:.6g}"


def _typed_numbers(model: TreeModel, values: dict[str, object],
                   ranges: dict[str, tuple[float, float]]):
    """Each numeric value typed for the lookup as a number, with what is wrong with it: a
    word or a number outside what is possible is refused, and a number outside the patients
    the tree was grown on is flagged, in the lookup's own words (not a file's)."""
    numbers, refused, flags = {}, [], []
    for column in model.columns_asked():
        spec, value = model.spec(column), values.get(column)
        if spec.kind != "numeric" or value is None:
            continue
        cell = pd.Series([value], dtype=object)
        if is_missing_text(cell, spec.missing_codes)[0]:
            numbers[column] = None  # blank or a code for not recorded
            continue
        label = spec.display
        try:
            number = float(typed_column(cell, spec).numbers[0])
        except InputError as error:  # a unit other than the tree's ("100.4 °F" for °C)
            refused.append(str(error))
            continue
        if not np.isfinite(number):
            low = ranges.get(column, (None,))[0]
            example = "" if low is None else f" (for example {_shown(round(low))})"
            refused.append(say("app.lookup_not_a_number", label=label,
                               value=str(value).strip()[:40], example=example))
            continue
        numbers[column] = number
        unit = spec.unit.strip()

        def with_unit(x: float) -> str:
            return _shown(x) + (unit if unit == "%" else f" {unit}" if unit else "")

        # A value no patient can have gets no box, as a word does: a confident answer for a
        # slip of the keyboard would be read at the bedside before the flag beneath it.
        if spec.plausible is not None:  # the data dictionary's own limits come first
            low, high = spec.plausible
            if not low <= number <= high:
                refused.append(say("app.lookup_implausible", label=label,
                                   value=with_unit(number), low=_shown(low),
                                   high=with_unit(high)))
                continue
        elif unit in _POSSIBLE:
            what, low, high = _POSSIBLE[unit]
            if not low <= number <= high:
                refused.append(say("app.lookup_impossible", label=label,
                                   value=with_unit(number), what=what, low=_shown(low),
                                   high=with_unit(high)))
                continue
        if column in ranges:
            low, high = ranges[column]
            if not low <= number <= high:
                flags.append(say("app.lookup_outside_cohort", label=label,
                                 value=with_unit(number), low=_shown(low),
                                 high=with_unit(high)))
    return numbers, tuple(refused), tuple(flags)


def route_patient(model: TreeModel, values: dict[str, object],
                  ranges: dict[str, tuple[float, float]] | None = None) -> PatientRoute:
    """Route one patient given as {column: value}; a value left out or None is not recorded.

    Where a value is not recorded at a question with no branch for it (no derivation patient
    there lacked it), the route stops at that question and ``needs`` names the column.

    Values are read as the model reads any spreadsheet cell (text like "92" or "ambulance"
    is fine), so the lookup and scoring a file agree. A typed word where a number is asked
    for, or a number outside what is possible (the dictionary's plausible values, else 0 to
    100 for a percentage), is refused (``refused``, no route); a possible number outside
    ``ranges`` (the derivation patients' values, :func:`observed_ranges`) is routed and
    flagged in ``warnings``.
    """
    numbers, refused, flags = _typed_numbers(model, values, ranges or {})
    if refused:
        return PatientRoute(boxes=(), steps=(), outcome_box=0, prediction=None,
                            refused=refused)
    values = {**values, **numbers}
    row = {c: [values.get(c)] for c in model.columns_asked()}
    frame = pd.DataFrame({c: pd.Series(v, dtype=object) for c, v in row.items()})
    scored = model.apply(frame)
    leaf = int(scored.leaf[0])
    needs = scored.needs[0] if scored.needs is not None else None
    waiting = int(scored.waiting[0]) if scored.waiting is not None else 0
    steps = model.steps_to(waiting or leaf)
    boxes = tuple([1] + [s.to for s in steps]) if steps else (1,)
    prediction = scored.prediction[0] if leaf else None
    if isinstance(prediction, (np.floating, float)):
        prediction = float(prediction)
    return PatientRoute(boxes=boxes, steps=steps, outcome_box=leaf, prediction=prediction,
                        warnings=flags + scored.warnings, needs=needs, waiting_box=waiting)
