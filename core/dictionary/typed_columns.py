"""One column's values ready for analysis, parsed as its data dictionary entry says.

Numbers stay numbers (NaN where not recorded); categories become codes into the entry's levels
(-1 where not recorded). The notes of parsing (core/data/cells.py) travel with the values.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from ..data.cells import (
    YES_WORDS, counted, is_missing_text, level_text, parse_levels, parse_numbers,
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


def positive_level(spec: ColumnSpec) -> str:
    """The positive class of a binary outcome: as set, else 'yes'/'1'/the second level."""
    if spec.positive:
        if spec.positive not in spec.levels:
            raise InputError(say("variables.positive_not_level", positive=spec.positive,
                                 name=spec.display, levels=", ".join(spec.levels)))
        return spec.positive
    for level in spec.levels:
        if level.casefold() in YES_WORDS:
            return level
    return spec.levels[-1]
