"""One column's values ready for analysis, parsed as its data dictionary entry says.

Numbers stay numbers (NaN where not recorded); categories become codes into the entry's levels
(-1 where not recorded). The notes of parsing (core/data/cells.py) travel with the values.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from ..data.cells import (
    NO_WORDS, YES_WORDS, counted, is_missing_text, level_text, parse_levels, parse_numbers,
    same_unit,
)
from ..errors import InputError
from ..messages.message import say
from .columns import CATEGORY_KINDS, ColumnSpec, canonical_levels


@dataclass(frozen=True)
class TypedColumn:
    """One column's values ready for analysis."""

    spec: ColumnSpec
    numbers: np.ndarray | None = field(default=None, repr=False)  # numeric kind
    codes: np.ndarray | None = field(default=None, repr=False)  # category kinds, -1 = missing
    notes: tuple[str, ...] = ()

    @property
    def missing(self) -> np.ndarray:
        if self.numbers is not None:
            return np.isnan(self.numbers)
        return self.codes < 0


def typed_column(values: pd.Series, spec: ColumnSpec) -> TypedColumn:
    """Parse one column according to its dictionary entry."""
    # Notes name the column by its header, as the user finds it in the spreadsheet.
    if spec.kind == "numeric":
        parsed = parse_numbers(values, spec.missing_codes, spec.name)
        found = parsed.unit or ", ".join(parsed.mixed_units)
        if found and spec.unit.strip() and not (parsed.unit and same_unit(parsed.unit, spec.unit)):
            # Never read 100.4 °F against a question in °C: the units are not converted.
            raise InputError(say("values.unit_disagrees", column=spec.name, found=found,
                                 unit=spec.unit.strip()))
        return TypedColumn(spec, numbers=parsed.values, notes=parsed.notes)
    if spec.kind in CATEGORY_KINDS:
        levels = spec.levels
        if not levels:
            present = level_text(values[~is_missing_text(values, spec.missing_codes)])
            levels = tuple(canonical_levels(str(v) for v in counted(present)[0]))
            spec = replace(spec, levels=levels)
        cat, notes = parse_levels(values, levels, spec.missing_codes, spec.name)
        return TypedColumn(spec, codes=np.asarray(cat.codes, dtype=np.int32), notes=notes)
    raise InputError(say("variables.kind_not_in_tree", name=spec.display, kind=spec.kind))


# A level that says the event did not happen: "no", "none", "negative", "no fall", "not
# admitted", "non-smoker", "without delirium", "normal" (common practice in coding outcomes).
_NOT_EVENT_WORDS = NO_WORDS | {"none", "nil", "never", "normal", "not", "non", "without"}
_NEGATED = re.compile(r"^(no|not|non|without|never)[\s_\-]+\S")


def says_no_event(level: str) -> bool:
    """Whether ``level`` names the absence of an event ("no", "no fall", "not admitted")."""
    folded = str(level).strip().casefold()
    return folded in _NOT_EVENT_WORDS or bool(_NEGATED.match(folded))


def event_level(levels: Sequence[str], counts: Sequence[int] | None = None) -> str:
    """The level of a two-class outcome a tree should catch: the event. Where one level is
    a negation ("no fall") the other is the event ("fell"); else a yes-word ("yes", "1",
    "positive"); else the rarer level, when ``counts`` (one per level) are given and differ;
    else the second level."""
    levels = list(levels)
    negated = [says_no_event(level) for level in levels]
    if len(levels) == 2 and sum(negated) == 1:
        return levels[negated.index(False)]
    for level in levels:
        if level.strip().casefold() in YES_WORDS:
            return level
    if counts is not None and len(counts) == len(levels) and len(set(counts)) == len(counts):
        return levels[int(np.argmin(counts))]
    return levels[-1]


def positive_level(spec: ColumnSpec, counts: Sequence[int] | None = None) -> str:
    """The positive class of a binary outcome: as set, else the event (:func:`event_level`;
    ``counts`` per level let the rarer level be the event)."""
    if spec.positive:
        if spec.positive not in spec.levels:
            raise InputError(say("variables.positive_not_level", positive=spec.positive,
                                 name=spec.display, levels=", ".join(spec.levels)))
        return spec.positive
    return event_level(spec.levels, counts)
