"""Turning raw spreadsheet cells into values: numbers, levels, dates and missing codes.

Spreadsheets written by hand hold "NA", "not recorded", "<5", "1,234" and "Yes"/"y"/"TRUE" side
by side. Each parser here returns the parsed values plus plain-language notes of what it had
to interpret, so nothing is dropped silently. When the caller passes the spreadsheet row
numbers of the cells, the notes say which rows.

Text is interpreted once per distinct cell text (``pd.factorize``) and mapped back, so a
million-row column with a few hundred distinct texts costs a few hundred string operations.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np
import pandas as pd

from ..messages.message import say
from ..phrases import rows_phrase

# Cell texts read as "not recorded" in every column (compared case-insensitively, trimmed):
# only texts that say so and mean nothing else. "none", "nil", "no", "absent" and "normal" are
# answers (levels), never missing.
DEFAULT_MISSING_CODES: tuple[str, ...] = (
    "", "na", "nan", "null", "#n/a", "not recorded", "missing",
)
_DEFAULT_MISSING = frozenset(DEFAULT_MISSING_CODES)
# Texts that often, but not always, mean "not recorded" ("unknown" may be an answer). They stay
# values until the user or the data dictionary names them as missing codes; reading proposes
# them (core/dictionary/inference.py) with their counts.
PROBABLE_MISSING_CODES = frozenset({
    "n/a", "n.a.", "n.a", "unknown", "unk", "not known", "nk", "nr", "n.r.", "not stated",
    "not available", "not applicable", ".", "-", "--", "?", "??", "-9", "-99", "-999", "-9999",
    "999", "9999",
})
# What spreadsheet programs write in a cell whose formula failed.
SPREADSHEET_ERRORS = frozenset({"#div/0!", "#value!", "#ref!", "#name?", "#num!", "#null!",
                                "#spill!", "#calc!", "#getting_data", "#field!", "#blocked!"})

YES_WORDS = frozenset({"yes", "y", "true", "t", "1", "positive", "pos", "present"})
NO_WORDS = frozenset({"no", "n", "false", "f", "0", "negative", "neg", "absent"})

# Spreadsheets store a date as days since 30 December 1899 (the 1900 date system as they count
# it today); serial numbers of 1 January 1920 to 31 December 2099 are plausible clinical dates.
SERIAL_ORIGIN = pd.Timestamp("1899-12-30")
FIRST_SERIAL = 7306
LAST_SERIAL = 73050

# The grower works in float32 (scikit-learn casts X); larger magnitudes would become infinite.
LARGEST_NUMBER = float(np.finfo(np.float32).max)

_NUMBER = re.compile(r"^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$")
_CENSORED = re.compile(r"^([<>]=?|≤|≥)\s*([+-]?(\d+\.?\d*|\.\d+))$")
_THOUSANDS = re.compile(r"^[+-]?\d{1,3}(,\d{3})+(\.\d+)?$")
_DECIMAL_COMMA = re.compile(r"^[+-]?\d+,\d+$")
_PERCENT = re.compile(r"^([+-]?(\d+\.?\d*|\.\d+))\s*%$")
# A number followed by its unit ("38.2 °C", "120 mmHg", "5.4 mmol/L"): the unit is a known one
# (UNIT_SPELLINGS) or a rate such as "mg/L" or "/min".
_WITH_UNIT = re.compile(r"^([+-]?(?:\d+\.?\d*|\.\d+))\s*([^\d\s+\-.,].{0,15})$")
_RATE_UNIT = re.compile(r"^(?:[a-zA-Zµμ]+(?:\^?\d+)?)?/[a-zA-Zµμ]+(?:/[a-zA-Zµμ]+)?$")
# Spellings of the usual clinical units (compared in lower case, spaces taken out), and how
# Prunella writes each.
UNIT_SPELLINGS = {
    "°c": "°C", "ºc": "°C", "degc": "°C", "c": "°C", "celsius": "°C",
    "°f": "°F", "ºf": "°F", "degf": "°F", "f": "°F", "fahrenheit": "°F",
    "mmhg": "mmHg", "kpa": "kPa", "%": "%", "bpm": "bpm", "/min": "/min", "kg": "kg", "g": "g",
    "lb": "lb", "lbs": "lb", "cm": "cm", "mm": "mm", "m": "m", "ml": "mL", "l": "L",
    "h": "h", "hr": "h", "hrs": "h", "hours": "h", "min": "min", "mins": "min", "days": "days",
    "yrs": "years", "years": "years", "mg": "mg", "mcg": "mcg", "µg": "µg", "iu": "IU",
    "u": "U", "mmol": "mmol",
}
# Everything _text_number can read starts like this; one test spares the others.
_MAYBE_NUMBER = re.compile(r"^([<>]=?|≤|≥)?\s*[+-]?[\d.,]|^[+-]?inf", re.IGNORECASE)


@dataclass(frozen=True)
class ParsedNumbers:
    values: np.ndarray  # float64, NaN where missing or unreadable
    n_missing: int
    n_unreadable: int
    unreadable_examples: tuple[str, ...]
    notes: tuple[str, ...]
    unreadable_texts: tuple[str, ...] = ()  # distinct unreadable texts, commonest first (≤ 20)
    n_unreadable_texts: int = 0  # how many distinct unreadable texts there are
    unreadable_rows: tuple[int, ...] = ()  # spreadsheet rows of unreadable cells (≤ 20)
    unit: str = ""  # the one unit written in the cells beside the numbers ("°C"), if any
    mixed_units: tuple[str, ...] = ()  # the units seen, when the cells write several


@dataclass(frozen=True)
class CellProfile:
    """A text column's distinct cells, hashed once, so every later question about the column
    (missing? a number? which levels?) is asked once per distinct cell."""

    index: np.ndarray  # per cell: position among the distinct cells, -1 for an empty cell
    texts: np.ndarray  # their trimmed text (object array of str)
    counts: np.ndarray  # how many cells hold each


def profile_cells(values: pd.Series) -> CellProfile:
    """The distinct cells of a column and how often each occurs (one hashing pass)."""
    index, uniques = _factorize(values)
    counts = np.bincount(index[index >= 0], minlength=len(uniques))
    return CellProfile(index, _unique_texts(uniques), counts)


def counted(values: pd.Series) -> tuple[list, np.ndarray]:
    """Distinct non-missing values, commonest first (ties in order of first appearance), and
    their counts; hashing once, without value_counts' overhead on small columns."""
    codes, uniques = pd.factorize(values, use_na_sentinel=True)
    codes = np.asarray(codes)
    counts = np.bincount(codes[codes >= 0], minlength=len(uniques))
    order = np.argsort(-counts, kind="stable")
    return np.asarray(uniques, dtype=object)[order].tolist(), counts[order]


def _rows_where(mask: np.ndarray, rows: np.ndarray | None) -> np.ndarray | None:
    if rows is None:
        return None
    return np.asarray(rows)[np.flatnonzero(mask)[:1000]]


def _is_numeric(values: pd.Series) -> bool:
    return pd.api.types.is_numeric_dtype(values.dtype) and \
        not pd.api.types.is_bool_dtype(values.dtype)


def _factorize(values: pd.Series) -> tuple[np.ndarray, np.ndarray]:
    codes, uniques = pd.factorize(values, use_na_sentinel=True)
    return np.asarray(codes), np.asarray(uniques, dtype=object)


def _cell_text(cell):
    if isinstance(cell, (bool, np.bool_)):
        return "TRUE" if cell else "FALSE"
    if isinstance(cell, float) and np.isfinite(cell) and cell == round(cell) and abs(cell) < 1e15:
        return str(int(cell))
    if isinstance(cell, (int, np.integer)):
        return str(int(cell))
    if hasattr(cell, "isoformat"):
        return cell.isoformat()
    return str(cell)


def _unique_texts(uniques: np.ndarray) -> np.ndarray:
    """Trimmed text of each distinct cell (object array of str)."""
    try:  # the common case, a text column: every distinct cell is already a str
        return np.array([u.strip() for u in uniques], dtype=object)
    except AttributeError:
        return np.array([_cell_text(u).strip() for u in uniques], dtype=object)


def _numeric_codes(codes: tuple[str, ...]) -> list[float]:
    found = []
    for code in codes:
        try:
            found.append(float(code))
        except ValueError:
            continue
    return found


def missing_texts(texts: np.ndarray, extra_codes: tuple[str, ...] = (),
                  levels: tuple[str, ...] = ()) -> np.ndarray:
    """For trimmed texts, True where the text is a missing-value code; a text listed among
    ``levels`` is a level, never missing."""
    codes = (_DEFAULT_MISSING | {c.strip().casefold() for c in extra_codes}) - \
        {lv.strip().casefold() for lv in levels}
    return np.array([t.casefold() in codes for t in texts], dtype=bool)


def probable_missing(texts: np.ndarray, counts: np.ndarray, extra_codes: tuple[str, ...] = (),
                     levels: tuple[str, ...] = ()) -> list[tuple[str, int]]:
    """Texts that may mean "not recorded" but are not named as such (nor listed as levels),
    with how many cells hold each (spellings differing in capitals counted together)."""
    named = {c.strip().casefold() for c in extra_codes} | {lv.strip().casefold() for lv in levels}
    found: dict[str, list] = {}
    for text, count in zip(texts, counts):
        folded = text.casefold()
        if count and folded in PROBABLE_MISSING_CODES and folded not in named:
            entry = found.setdefault(folded, [text, 0])
            entry[1] += int(count)
    return sorted(((t, n) for t, n in found.values()), key=lambda tn: -tn[1])


def is_missing_text(values: pd.Series, extra_codes: tuple[str, ...] = ()) -> np.ndarray:
    """True where a cell is empty or one of the missing-value codes."""
    missing = values.isna().to_numpy(dtype=bool, copy=True)
    if _is_numeric(values):
        numeric = _numeric_codes(extra_codes)
        if numeric:
            missing |= np.isin(values.to_numpy(dtype="float64", na_value=np.nan), numeric)
        return missing
    index, uniques = _factorize(values)
    return _missing_cells(index, _unique_texts(uniques), extra_codes)


def _missing_cells(index: np.ndarray, texts: np.ndarray, extra_codes: tuple[str, ...],
                   levels: tuple[str, ...] = ()) -> np.ndarray:
    """Per cell of a factorised text column: empty, or a missing-value code (not a level)."""
    return (index < 0) | np.append(missing_texts(texts, extra_codes, levels), True)[index]


def level_text(values: pd.Series) -> pd.Series:
    """Cells as trimmed text; whole numbers lose their '.0' so 1 and 1.0 are one level."""
    if pd.api.types.is_bool_dtype(values.dtype):
        return values.map({True: "TRUE", False: "FALSE"}).astype("string")
    index, uniques = _factorize(values)
    texts = np.append(_unique_texts(uniques), None) if len(uniques) else np.array([None], object)
    return pd.Series(texts[index], index=values.index, dtype="string")


def parse_numbers(values: pd.Series, extra_codes: tuple[str, ...] = (), label: str = "",
                  rows: Sequence[int] | np.ndarray | None = None,
                  profile: CellProfile | None = None) -> ParsedNumbers:
    """Numbers from a column, with missing codes, censored lab values and thousands commas.

    ``rows`` (optional) are the spreadsheet row numbers of the cells, for the notes;
    ``profile`` (optional) is the column's :func:`profile_cells`, if the caller has it.
    """
    label = label or "this column"
    rows = None if rows is None else np.asarray(rows)
    if rows is not None and len(rows) != len(values):
        rows = None
    notes: list[str] = []
    if _is_numeric(values):
        missing = is_missing_text(values, extra_codes)
        out = values.to_numpy(dtype="float64", na_value=np.nan).copy()
        out[missing] = np.nan
        return _finish(out, missing, np.zeros(len(out), bool), None, notes, label, rows)
    profile = profile or profile_cells(values)
    index, texts = profile.index, profile.texts
    code_missing = missing_texts(texts, extra_codes)
    missing = (index < 0) | np.append(code_missing, True)[index]
    parsed = pd.to_numeric(pd.Series(texts, dtype=object), errors="coerce").to_numpy(
        dtype="float64", na_value=np.nan).copy() if len(texts) else np.zeros(0)
    # 0 plain, 1 thousands, 2 comma, 3 limit, 4 %, 5 with another unit
    kind = np.zeros(len(texts), dtype=np.int8)
    unit_of: dict[int, str] = {}  # distinct text → the unit written beside its number
    for i in np.flatnonzero(np.isnan(parsed)):  # only the texts pandas could not read
        if _MAYBE_NUMBER.match(texts[i]):
            parsed[i], kind[i] = _text_number(texts[i])
            if kind[i] == 4:
                unit_of[i] = "%"
            elif np.isnan(parsed[i]):
                parsed[i], unit = _number_with_unit(texts[i])
                if unit:
                    kind[i], unit_of[i] = 5, unit
    parsed[code_missing] = np.nan
    unit, mixed = _units_seen(unit_of, profile.counts, code_missing)
    if mixed:
        # Never converted: the cells with a unit stay unreadable, the column stays text.
        for i in unit_of:
            parsed[i], kind[i] = np.nan, 0
    lookup = np.append(parsed, np.nan)
    out = lookup[index]
    failed_u = np.isnan(parsed) & ~code_missing
    failed = np.append(failed_u, False)[index] & ~missing
    kinds = np.append(kind, 0)[index]
    kinds[missing] = 0
    for code, template in ((1, "values.thousands"), (2, "values.decimal_comma"),
                           (3, "values.limits"), (4, "values.percent"), (5, "values.units")):
        hit = kinds == code
        if hit.any():
            example = texts[np.flatnonzero(kind == code)[0]]
            notes.append(say(template, n=int(hit.sum()), column=label, example=example,
                             rows=rows_phrase(_rows_where(hit, rows)), unit=unit))
    if mixed:
        hit = np.isin(index, list(unit_of))
        notes.append(say("values.mixed_units", column=label, n=int(hit.sum()),
                         units=", ".join(mixed), rows=rows_phrase(_rows_where(hit, rows))))
    numeric = _numeric_codes(extra_codes)
    if numeric:
        out[np.isin(out, numeric)] = np.nan
    parsed_numbers = _finish(out, missing, failed, (index, texts, failed_u), notes, label, rows)
    return replace(parsed_numbers, unit=unit, mixed_units=mixed)


def unit_spelling(text: str) -> str:
    """How Prunella writes a unit ("degC" → "°C", "mmhg" → "mmHg", "mg/L" as it is); '' for
    text that is not a unit."""
    folded = re.sub(r"\s+", "", text).casefold()
    if folded in UNIT_SPELLINGS:
        return UNIT_SPELLINGS[folded]
    squeezed = re.sub(r"\s+", "", text)
    if not _RATE_UNIT.match(squeezed):
        return ""
    # One spelling per rate: litres with a capital L, micro as µ ("umol/l" → "µmol/L").
    top, *under = squeezed.split("/")
    top = re.sub(r"^(u|μ)(?=[a-z])", "µ", top)
    under = [_PER_SPELLINGS.get(part.casefold(), part) for part in under]
    return "/".join([top] + under)


def same_unit(first: str, second: str) -> bool:
    """Whether two written units are one ("mmol/l" and "mmol/L", "bpm" and "beats/min")."""
    return _unit_key(first) == _unit_key(second)


def _unit_key(unit: str) -> str:
    written = unit_spelling(unit) or re.sub(r"\s+", "", unit)
    per_minute = {"/min", "bpm", "breaths/min", "beats/min", "permin", "min-1", "min⁻¹"}
    return "/min" if written.casefold() in per_minute else written.casefold()


_PER_SPELLINGS = {"l": "L", "dl": "dL", "ml": "mL", "min": "min", "h": "h", "hr": "h",
                  "kg": "kg", "day": "day", "d": "day", "s": "s"}


def _number_with_unit(text: str) -> tuple[float, str]:
    """'38.2 °C' → (38.2, '°C'); (NaN, '') when the text is not a number and a unit."""
    match = _WITH_UNIT.match(text)
    if match:
        unit = unit_spelling(match.group(2))
        if unit:
            return float(match.group(1)), unit
    return np.nan, ""


def _units_seen(unit_of: dict[int, str], counts: np.ndarray, gone: np.ndarray,
                ) -> tuple[str, tuple[str, ...]]:
    """The one unit the cells write beside their numbers (or ''), and all the units seen,
    commonest first, when they write several."""
    tally: dict[str, int] = {}
    for i, unit in unit_of.items():
        if not gone[i] and counts[i]:
            tally[unit] = tally.get(unit, 0) + int(counts[i])
    if len(tally) > 1:
        return "", tuple(sorted(tally, key=lambda u: -tally[u]))
    return (next(iter(tally)) if tally else ""), ()


def _text_number(text: str) -> tuple[float, int]:
    """The number a trimmed cell text stands for, and how it was written (see kind codes)."""
    if _NUMBER.match(text):
        return float(text), 0
    folded = text.casefold()
    if folded in ("inf", "+inf", "-inf", "infinity", "+infinity", "-infinity"):
        return (float("-inf") if folded.startswith("-") else float("inf")), 0
    if _THOUSANDS.match(text):
        return float(text.replace(",", "")), 1
    if _DECIMAL_COMMA.match(text):
        return float(text.replace(",", ".")), 2
    match = _CENSORED.match(text)
    if match:
        return float(match.group(2)), 3
    match = _PERCENT.match(text)
    if match:
        return float(match.group(1)), 4
    return np.nan, 0


def _finish(out, missing, failed, unique_info, notes, label, rows) -> ParsedNumbers:
    infinite = np.isinf(out)
    if infinite.any():
        notes.append(say("values.infinite", n=int(infinite.sum()), column=label,
                         rows=rows_phrase(_rows_where(infinite, rows))))
        out[infinite] = np.nan
    with np.errstate(invalid="ignore"):
        huge = np.abs(out) > LARGEST_NUMBER
    if huge.any():
        notes.append(say("values.huge", n=int(huge.sum()), column=label,
                         rows=rows_phrase(_rows_where(huge, rows))))
        out[huge] = np.nan
    n_failed = int(failed.sum())
    texts: tuple[str, ...] = ()
    n_texts = 0
    failed_rows: tuple[int, ...] = ()
    if n_failed:
        index, unique_texts, failed_u = unique_info
        counts = np.bincount(index[failed], minlength=len(unique_texts))
        order = [i for i in np.argsort(-counts, kind="stable") if counts[i] > 0]
        n_texts = len(order)
        texts = tuple(str(unique_texts[i]) for i in order[:20])
        where = _rows_where(failed, rows)
        failed_rows = () if where is None else tuple(int(r) for r in where[:20])
        notes.append(say("values.not_numbers", n=n_failed, column=label,
                         examples=", ".join(repr(t) for t in texts[:3]),
                         rows=rows_phrase(where)))
    n_missing = int(np.isnan(out).sum())
    return ParsedNumbers(out, n_missing, n_failed, texts[:3], tuple(notes), texts, n_texts,
                         failed_rows)


def yes_no_levels(levels: list[str]) -> bool:
    """True when every level is a spelling of yes or no (and both occur)."""
    folded = {lv.casefold() for lv in levels}
    return bool(folded) and folded <= (YES_WORDS | NO_WORDS) and \
        bool(folded & YES_WORDS) and bool(folded & NO_WORDS)


def parse_levels(values: pd.Series, levels: tuple[str, ...], extra_codes: tuple[str, ...] = (),
                 label: str = "", rows: Sequence[int] | np.ndarray | None = None,
                 ) -> tuple[pd.Categorical, tuple[str, ...]]:
    """Cells as a categorical over ``levels``; unknown cells become missing with a note.

    Matching ignores case and surrounding spaces. A yes/no column accepts every common
    spelling of yes and no ("Y", "TRUE", "1"). A cell matching a listed level is that level
    even where a missing-value code spells the same.
    """
    index, uniques = _factorize(values)  # hashed once: for the missing codes and the levels
    texts = _unique_texts(uniques)
    kept_codes = tuple(c for c in extra_codes
                       if c.strip().casefold() not in {lv.casefold() for lv in levels})
    missing = is_missing_text(values, kept_codes) if _is_numeric(values) else \
        _missing_cells(index, texts, kept_codes, levels)
    lookup = {lv.casefold(): lv for lv in levels}
    if set(lookup) == {"yes", "no"}:
        lookup.update({w: lookup["yes"] for w in YES_WORDS})
        lookup.update({w: lookup["no"] for w in NO_WORDS})
    position = {lv: i for i, lv in enumerate(levels)}
    unique_codes = np.array([position.get(lookup.get(t.casefold()), -1) for t in texts] + [-1],
                            dtype=np.int64)
    codes = unique_codes[index]
    codes[missing] = -1
    unknown = (codes < 0) & ~missing
    notes: list[str] = []
    if unknown.any():
        seen = pd.unique(index[unknown])
        examples = ", ".join(repr(str(texts[i])) for i in seen[:3])
        if rows is not None and len(rows) != len(values):
            rows = None
        notes.append(say("values.unknown_levels", n=int(unknown.sum()),
                         column=label or "this column", examples=examples,
                         rows=rows_phrase(_rows_where(unknown, None if rows is None
                                                       else np.asarray(rows)))))
    cat = pd.Categorical.from_codes(codes, categories=list(levels)) if levels else \
        pd.Categorical([None] * len(values), categories=[])
    return cat, tuple(notes)


def serial_dates(numbers) -> pd.Series:
    """Spreadsheet serial day numbers (a time of day as the fraction) as dates; NaT where not
    recorded or outside the plausible serials."""
    days = pd.Series(numbers, dtype="float64")
    days = days.where((days >= FIRST_SERIAL) & (days <= LAST_SERIAL + 1))
    return SERIAL_ORIGIN + pd.to_timedelta(days, unit="D")


def parse_dates(values: pd.Series) -> pd.Series:
    """Dates from cells in ISO, day-first or month-name formats, or spreadsheet serial day
    numbers (a column of numbers); NaT where unreadable."""
    if pd.api.types.is_datetime64_any_dtype(values.dtype):
        return values
    if _is_numeric(values):
        return pd.Series(serial_dates(values.to_numpy(dtype="float64", na_value=np.nan)).to_numpy(),
                         index=values.index)
    text = level_text(values)
    if text.notna().sum() == 0:
        return pd.Series(pd.NaT, index=values.index, dtype="datetime64[ns]")
    # Cells written as plain numbers in the serial range are serial dates (a text column
    # with a few words among the numbers); everything else is read as written dates.
    serial = serial_dates(pd.to_numeric(text.astype(object), errors="coerce").to_numpy(
        dtype="float64", na_value=np.nan))
    serial.index = values.index
    if serial.notna().any():
        rest = parse_dates(text.where(serial.isna()).astype(object)) if \
            (text.notna() & serial.isna()).any() else serial
        return serial.fillna(rest) if rest is not serial else serial
    iso = pd.to_datetime(text, errors="coerce", format="ISO8601")
    rest = iso.isna() & text.notna()
    if not rest.any():
        return iso
    # Day-first is the common clinical convention outside the USA; try it before month-first.
    try:
        other = pd.to_datetime(text[rest], errors="coerce", dayfirst=True, format="mixed")
    except (ValueError, OverflowError, TypeError):
        return iso
    combined = iso.copy()
    combined[rest] = other.astype(iso.dtype) if len(other) else other
    return combined
