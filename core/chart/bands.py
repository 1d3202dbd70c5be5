"""Risk bands: the word (and shade) each outcome box carries, and the key that explains them.

Default: relative to the derivation cohort. A box is HIGHER when its rate (or mean) is at
least ``ratio`` times the cohort's, LOWER when at most the cohort's divided by ``ratio``,
otherwise AVERAGE. With absolute cut-points the words are LOW / (MODERATE) / HIGH. An outcome
of several classes is banded by the class the box expects.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..precision import summary_number
from ..model.tree import Node, TreeModel
from .style import BandStyle, band_style, class_style


@dataclass(frozen=True)
class Band:
    """One band: the printed word, its style, and its line in the key."""

    word: str
    style: BandStyle
    meaning: str


@dataclass(frozen=True)
class Banding:
    """The bands of a chart and the value each outcome box is banded by."""

    bands: tuple[Band, ...]  # in order, low to high (or class order)
    kind: str  # "relative", "absolute" or "class"
    limits: tuple[float, ...] = ()  # value < limits[k] falls in band k (ordered bands)

    def band_of(self, model: TreeModel, node: Node) -> Band:
        if self.kind == "class":
            return self.bands[model.classes.index(str(node.prediction))]
        value = box_value(model, node)
        return self.bands[self._position(value)]

    def _position(self, value: float) -> int:
        for k, limit in enumerate(self.limits):
            if value < limit:
                return k
        return len(self.limits)


def box_value(model: TreeModel, node: Node) -> float:
    """What a box is banded by: its share (:meth:`TreeModel.box_share`), or its mean."""
    if model.task == "regression":
        return float(node.mean)
    return model.box_share(node).value or 0.0


def percent(value: float) -> str:
    """A share as a whole percent, with one decimal below 1% and above 99%."""
    pct = 100 * value
    if 0 < pct < 1 or 99 < pct < 100:
        return f"{pct:.1f}%"
    return f"{pct:.0f}%"


def number(value: float, unit: str = "", data_decimals: int | None = None) -> str:
    """A mean, quartile or limit as printed: to the data's precision (``data_decimals``, the
    decimals the outcome was recorded with; see :mod:`core.precision`), with its unit."""
    return summary_number(value, data_decimals, unit)


def rate_phrase(model: TreeModel) -> str:
    """Who the rate counts, e.g. 'admitted to hospital' (yes/no outcomes) or 'with Ward: ICU'."""
    from ..data.cells import YES_WORDS

    positive = model.positive
    label = model.outcome.display
    if positive is not None and positive.strip().lower() in YES_WORDS:
        if len(label) > 1 and not label[1].isupper():
            label = label[0].lower() + label[1:]
        return label
    return f"with {model.outcome.display}: {positive}"


def banding(model: TreeModel, cuts: tuple[float, ...] | None = None,
            ratio: float = 1.25) -> Banding:
    """The bands for ``model``: relative to its cohort by default, or at absolute ``cuts``
    (percent for two-class rates, outcome units for means)."""
    if model.task == "classification" and len(model.classes) > 2:
        # The class name as the data spell it: upper-casing would turn "72 h" into "72 H".
        bands = tuple(Band(word=c, style=class_style(k), meaning="expected")
                      for k, c in enumerate(model.classes))
        return Banding(bands=bands, kind="class")
    regression = model.task == "regression"
    unit = model.outcome.unit if regression else ""

    def show(v: float) -> str:
        return number(v, unit, model.outcome_decimals) if regression else percent(v)

    what = "mean" if regression else "rate"
    if cuts:
        limits = tuple(c if regression else c / 100 for c in cuts)
        words = ("LOW", "HIGH") if len(limits) == 1 else ("LOW", "MODERATE", "HIGH")
        meanings = [f"{what} below {show(limits[0])}"]
        if len(limits) == 2:
            meanings.append(f"{what} {show(limits[0])} up to {show(limits[1])}")
        meanings.append(f"{what} {show(limits[-1])} or more")
        kind = "absolute"
    else:
        overall = box_value(model, model.root)
        if overall > 0:
            limits = (overall / ratio, overall * ratio)
            meanings = [f"{what} ≤ {show(limits[0])} (cohort {show(overall)} ÷ {ratio:g})",
                        "in between",
                        f"{what} ≥ {show(limits[1])} (cohort {show(overall)} × {ratio:g})"]
        else:  # a mean at or below zero: a ratio means nothing, use half a cohort SD
            spread = 0.5 * float(model.root.sd or 0.0)
            limits = (overall - spread, overall + spread)
            meanings = [f"{what} ≤ {show(limits[0])} (cohort {show(overall)} − ½ SD)",
                        "in between",
                        f"{what} ≥ {show(limits[1])} (cohort {show(overall)} + ½ SD)"]
        # One short word in the strip (a narrow box); the key says it is the rate or mean.
        words = ("LOWER", "AVERAGE", "HIGHER")
        # LOWER below limits[0]·(1+ε) so that "at most" is honest at the exact boundary.
        limits = (math.nextafter(limits[0], math.inf), limits[1])
        kind = "relative"
    bands = tuple(Band(word=w, style=band_style(k, len(words)), meaning=m)
                  for k, (w, m) in enumerate(zip(words, meanings)))
    return Banding(bands=bands, kind=kind, limits=limits)
