"""Turning raw spreadsheet cells into values: numbers, levels, dates and missing codes.

Spreadsheets written by hand hold "NA", "not recorded", "<5", "1,234" and "Yes"/"y"/"TRUE" side
by side. Each parser here returns the parsed values plus plain-language notes of what it had
to interpret, so nothing is dropped silently.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
import pandas as pd

# Cell texts read as "not recorded" in every column (compared case-insensitively, trimmed).
DEFAULT_MISSING_CODES: tuple[str, ...] = (
    "", "na", "n/a", "n.a.", "nan", "null", "none", ".", "-", "?", "unknown", "not known",
    "not recorded", "missing", "#n/a",
)
_DEFAULT_MISSING = frozenset(DEFAULT_MISSING_CODES)

YES_WORDS = frozenset({"yes", "y", "true", "t", "1", "positive", "pos", "present"})
NO_WORDS = frozenset({"no", "n", "false", "f", "0", "negative", "neg", "absent"})

_NUMBER = re.compile(r"^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$")
_CENSORED = re.compile(r"^([<>]=?|≤|≥)\s*([+-]?(\d+\.?\d*|\.\d+))$")
_THOUSANDS = re.compile(r"^[+-]?\d{1,3}(,\d{3})+(\.\d+)?$")


@dataclass(frozen=True)
class ParsedNumbers:
    values: np.ndarray  # float64, NaN where missing or unreadable
    n_missing: int
    n_unreadable: int
    unreadable_examples: tuple[str, ...]
    notes: tuple[str, ...]


def is_missing_text(values: pd.Series, extra_codes: tuple[str, ...] = ()) -> np.ndarray:
    """True where a cell is empty or one of the missing-value codes."""
    codes = _DEFAULT_MISSING | {c.strip().casefold() for c in extra_codes}
    text = values.astype("string").str.strip().str.casefold()
    return (values.isna() | text.isin(codes).fillna(False)).to_numpy(dtype=bool)


def level_text(values: pd.Series) -> pd.Series:
    """Cells as trimmed text; whole numbers lose their '.0' so 1 and 1.0 are one level."""
    if pd.api.types.is_float_dtype(values.dtype):
        finite = values.where(np.isfinite(values))
        whole = finite.notna() & (finite == np.round(finite))
        text = values.astype("string")
        text[whole] = finite[whole].astype("int64").astype("string")
        return text.str.strip()
    if pd.api.types.is_bool_dtype(values.dtype):
        return values.map({True: "TRUE", False: "FALSE"}).astype("string")
    if values.dtype == object:
        values = values.map(_cell_text)
    return values.astype("string").str.strip()


def _cell_text(cell):
    if isinstance(cell, float) and np.isfinite(cell) and cell == round(cell):
        return str(int(cell))
    if isinstance(cell, (pd.Timestamp,)) or hasattr(cell, "isoformat"):
        return cell.isoformat()
    return cell


def parse_numbers(values: pd.Series, extra_codes: tuple[str, ...] = (),
                  label: str = "") -> ParsedNumbers:
    """Numbers from a column, with missing codes, censored lab values and thousands commas."""
    missing = is_missing_text(values, extra_codes)
    notes: list[str] = []
    if pd.api.types.is_numeric_dtype(values.dtype) and not pd.api.types.is_bool_dtype(values.dtype):
        out = values.to_numpy(dtype="float64", na_value=np.nan).copy()
        codes = _numeric_codes(extra_codes)
        if codes:
            out[np.isin(out, codes)] = np.nan
        out[missing] = np.nan
        return ParsedNumbers(*_finish(out, missing, 0, (), notes, label))
    text = values.astype("string").str.strip()
    out = pd.to_numeric(text.where(~missing), errors="coerce").to_numpy(dtype="float64",
                                                                         na_value=np.nan)
    failed = np.isnan(out) & ~missing
    if failed.any():
        raw = text[failed]
        # Decimal commas ("7,5") in a file that otherwise uses points.
        comma = raw.str.fullmatch(r"[+-]?\d+,\d+").fillna(False) & \
            ~raw.str.fullmatch(r"[+-]?\d{1,3}(,\d{3})+").fillna(False)
        thousands = raw.str.fullmatch(_THOUSANDS.pattern).fillna(False)
        censored = raw.str.extract(_CENSORED.pattern)[1]
        fixed = pd.Series(np.nan, index=raw.index, dtype="float64")
        if thousands.any():
            fixed[thousands] = pd.to_numeric(raw[thousands].str.replace(",", ""), errors="coerce")
            notes.append(f"{int(thousands.sum())} value(s) written with thousands separators "
                         "(e.g. '1,234') were read as plain numbers.")
        if comma.any():
            fixed[comma] = pd.to_numeric(raw[comma].str.replace(",", "."), errors="coerce")
            notes.append(f"{int(comma.sum())} value(s) written with a decimal comma were read "
                         "as decimals.")
        has_censor = censored.notna()
        if has_censor.any():
            fixed[has_censor] = pd.to_numeric(censored[has_censor], errors="coerce")
            example = raw[has_censor].iloc[0]
            notes.append(
                f"{int(has_censor.sum())} value(s) written as limits (e.g. {example!r}) were "
                f"read as the limit itself; check that this is acceptable for {label or 'this column'}."
            )
        positions = np.flatnonzero(failed)
        out[positions] = fixed.to_numpy()
        failed = np.isnan(out) & ~missing
    examples = tuple(pd.unique(text[failed].astype(str))[:3]) if failed.any() else ()
    codes = _numeric_codes(extra_codes)
    if codes:
        out[np.isin(out, codes)] = np.nan
    return ParsedNumbers(*_finish(out, missing, int(failed.sum()), examples, notes, label))


def _finish(out, missing, n_failed, examples, notes, label):
    infinite = np.isinf(out)
    if infinite.any():
        notes.append(f"{int(infinite.sum())} infinite value(s) were treated as not recorded.")
        out[infinite] = np.nan
    if n_failed:
        notes.append(
            f"{n_failed} cell(s) in {label or 'this column'} are not numbers (e.g. "
            + ", ".join(repr(e) for e in examples)
            + ") and were treated as not recorded; correct them or add them to the column's "
            "missing-value codes."
        )
    n_missing = int(np.isnan(out).sum())
    return out, n_missing, n_failed, tuple(examples), tuple(notes)


def _numeric_codes(codes: tuple[str, ...]) -> list[float]:
    found = []
    for code in codes:
        try:
            found.append(float(code))
        except ValueError:
            continue
    return found


def yes_no_levels(levels: list[str]) -> bool:
    """True when every level is a spelling of yes or no (and both occur)."""
    folded = {lv.casefold() for lv in levels}
    return bool(folded) and folded <= (YES_WORDS | NO_WORDS) and \
        bool(folded & YES_WORDS) and bool(folded & NO_WORDS)


def parse_levels(values: pd.Series, levels: tuple[str, ...], extra_codes: tuple[str, ...] = (),
                 label: str = "") -> tuple[pd.Categorical, tuple[str, ...]]:
    """Cells as a categorical over ``levels``; unknown cells become missing with a note.

    Matching ignores case and surrounding spaces. A yes/no column accepts every common
    spelling of yes and no ("Y", "TRUE", "1").
    """
    missing = is_missing_text(values, extra_codes)
    text = level_text(values).where(~missing)
    folded = text.str.casefold()
    lookup = {lv.casefold(): lv for lv in levels}
    if set(lookup) in ({"yes", "no"},):
        lookup.update({w: lookup["yes"] for w in YES_WORDS})
        lookup.update({w: lookup["no"] for w in NO_WORDS})
    mapped = folded.map(lookup)
    unknown = mapped.isna() & text.notna()
    notes: list[str] = []
    if unknown.any():
        examples = ", ".join(repr(x) for x in pd.unique(text[unknown].astype(str))[:3])
        notes.append(
            f"{int(unknown.sum())} cell(s) in {label or 'this column'} hold values that are not "
            f"among its levels ({examples}); they were treated as not recorded. Add them to the "
            "levels in the data dictionary if they are real categories."
        )
    cat = pd.Categorical(mapped.astype(object).where(mapped.notna(), None), categories=list(levels))
    return cat, tuple(notes)


def parse_dates(values: pd.Series) -> pd.Series:
    """Dates from cells in ISO, day-first or month-name formats; NaT where unreadable."""
    if pd.api.types.is_datetime64_any_dtype(values.dtype):
        return values
    text = level_text(values)
    iso = pd.to_datetime(text, errors="coerce", format="ISO8601")
    if iso.notna().mean() >= 0.9 * max(text.notna().mean(), 1e-9):
        return iso
    # Day-first is the common clinical convention outside the USA; try it before month-first.
    day_first = pd.to_datetime(text, errors="coerce", dayfirst=True, format="mixed")
    return day_first
