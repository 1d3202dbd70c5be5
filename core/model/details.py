"""The details of one box of a tree, and one patient's way through it.

The app's tree view shows these when a box is clicked or a patient is looked up; they are
plain functions over a TreeModel so the numbers come from core, not from a widget.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..checking.intervals import wilson_interval
from ..precision import summary_number
from .tree import Step, TreeModel


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


def route_patient(model: TreeModel, values: dict[str, object]) -> PatientRoute:
    """Route one patient given as {column: value}; a value left out or None is not recorded.

    Where a value is not recorded at a question with no branch for it (no derivation patient
    there lacked it), the route stops at that question and ``needs`` names the column.

    Values are read as the model reads any spreadsheet cell (text like "92" or "ambulance"
    is fine), so the lookup and scoring a file agree.
    """
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
                        warnings=scored.warnings, needs=needs, waiting_box=waiting)
