"""Sensible data-dictionary defaults inferred from the cells (see core/dictionary/columns.py).

Each column gets a kind and a role, and a note for every decision a user should know about
(and the rows concerned, when the caller passes the spreadsheet row numbers). Columns that
identify patients (core/dictionary/identity.py) are left out of the predictors. Numeric
columns are judged on their numbers and text columns on their distinct texts, so a million rows
cost little more than a thousand.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import replace

import numpy as np
import pandas as pd

from ..data.cells import (
    missing_texts, parse_numbers, probable_missing, profile_cells, same_unit, serial_dates,
    yes_no_levels,
)
from ..document_checks import NAME_LENGTH
from ..messages.message import say
from ..phrases import rows_phrase
from .columns import MAX_NOMINAL_LEVELS, ColumnSpec, DataDictionary, canonical_levels
from .dates import looks_like_serial_dates, mostly_dates, names_a_date
from .typed_columns import event_level
from .identity import GROUPING_IDENTITIES, identity_hint, looks_like_record_numbers

_ORDINAL_HINT = re.compile(r"(level|grade|score|stage|class|category|triage|scale|rank)", re.I)
_SITE_HINT = re.compile(r"(site|campus|hospital|centre|center|clinic|facility)", re.I)
_PATIENT_HINT = re.compile(r"(patient|person|subject|mrn|nhs|medical.?record|client)", re.I)
_ID_HINT = re.compile(r"(^id$|_id$|^id_|\bid\b|number|record|^no$|code$)", re.I)
_UNIT_IN_HEADER = re.compile(r"^(?P<label>.*?)\s*[\(\[](?P<unit>[^\)\]]{1,20})[\)\]]\s*$")
_SENTINELS = (-9, -99, -999, -9999)
_FEW_WORDS = 5  # a numeric column may hold up to this many different words (read as missing)


# A unit written after a measurement's name without brackets ("Haemoglobin g/L", "lactate_mmol",
# "weight kg"): a rate like g/L or /min, or one of the usual clinical units.
_TRAILING_UNIT = re.compile(
    r"^(?P<label>.*?[A-Za-z\)])[\s_]+(?P<unit>(?:[a-zA-Zµμ%°]+)?/[a-zA-Z0-9µμ.]+|mmHg|mmol|"
    r"umol|µmol|μmol|mg|mcg|ug|µg|g|kg|cm|mm|ml|mL|L|bpm|%|°C|degC|C|h|hrs|hours|min|mins|"
    r"days|yrs|years|IU|U)$")


def _unit_after_name(base: dict) -> dict:
    """A numeric column's unit from a header that writes it after the name without brackets;
    the label keeps the name alone, so a question reads "Haemoglobin above 110 g/L?"."""
    if base.get("unit"):
        return base
    match = _TRAILING_UNIT.match(str(base["name"]).strip())
    if not match:
        return base
    label, unit = _label_and_unit(match.group("label"))
    return {**base, "label": label, "unit": match.group("unit")}


def _label_and_unit(name: str) -> tuple[str, str]:
    match = _UNIT_IN_HEADER.match(name)
    if match and match.group("label"):
        label, unit = match.group("label"), match.group("unit").strip()
    else:
        label, unit = name, ""
    label = re.sub(r"[_\.]+", " ", label).strip()
    if label and label == label.lower():
        label = label[0].upper() + label[1:]
    return label or name, unit


def infer_column(name: str, values: pd.Series,
                 rows: Sequence[int] | np.ndarray | None = None) -> tuple[ColumnSpec, list[str]]:
    """A sensible dictionary entry for one column, and notes on what was decided and why.

    ``rows`` (optional) are the spreadsheet row numbers of the cells, for the notes.
    """
    rows = None if rows is None or len(rows) != len(values) else np.asarray(rows)
    spec, notes = _infer(name, values, rows)
    if spec.kind in ("binary", "ordinal", "nominal") and spec.note != "no recorded values" \
            and not any(getattr(n, "code", "") == "infer.sentinel" for n in notes):
        notes.extend(_probable_missing_note(name, values, spec, rows))
    if spec.note in ("no recorded values", "constant"):
        return spec, notes
    hint = identity_hint(name, values)
    if spec.role == "patient_id" and (hint is None or hint.what in GROUPING_IDENTITIES):
        return spec, notes
    if hint is not None and hint.what == "record numbers" and spec.role != "patient_id" \
            and _repeats(values):
        # Record numbers that repeat: the patient number of repeat visits (proposed).
        notes = [n for n in notes if getattr(n, "code", "") not in ("infer.identifier",
                                                                     "infer.too_many_levels")]
        notes.append(say("infer.patient_id", column=name))
        return replace(spec, kind="identifier", role="patient_id", levels=()), notes
    if hint is not None:
        # Names, addresses, phone numbers, e-mails: identifying, never the patient number.
        # The privacy reason says more than "unique per row" or "too many texts".
        notes = [n for n in notes if getattr(n, "code", "") not in (
            "infer.identifier", "infer.patient_id", "infer.too_many_levels")]
        notes.append(say("infer.identity", column=name, reason=hint.reason))
        spec = replace(spec, role="ignore", note=f"identity: {hint.what}")
    return spec, notes


def _repeats(values: pd.Series) -> bool:
    present = values.dropna()
    return 0 < present.nunique() < len(present)


def _probable_missing_note(name: str, values: pd.Series, spec: ColumnSpec, rows) -> list[str]:
    """A category column's answers that may mean "not recorded" ("unknown", "n/a", "NR",
    "-99"), proposed with their counts; they stay answers until confirmed."""
    profile = profile_cells(values)
    found = probable_missing(profile.texts, profile.counts, spec.missing_codes)
    if not found:
        return []
    folded = {t.casefold() for t, _ in found}
    hit = np.append(np.array([t.casefold() in folded for t in profile.texts], bool),
                    False)[profile.index]
    where = None if rows is None else rows[np.flatnonzero(hit)[:1000]]
    return [say("infer.probable_missing", column=name,
                found=_and(f"{t!r} ({n} cell{'s' if n != 1 else ''})" for t, n in found),
                codes=tuple(t for t, _ in found), rows=rows_phrase(where))]


def _and(parts) -> str:
    parts = list(parts)
    return parts[0] if len(parts) == 1 else ", ".join(parts[:-1]) + " and " + parts[-1]


def _infer(name: str, values: pd.Series, rows) -> tuple[ColumnSpec, list[str]]:
    notes: list[str] = []
    label, unit = _label_and_unit(name)
    base = dict(name=name, label=label, unit=unit)
    if pd.api.types.is_datetime64_any_dtype(values.dtype):
        if values.notna().any():
            return ColumnSpec(kind="date", role="ignore", note="date", **base), notes
        notes.append(say("infer.all_missing", column=name))
        return ColumnSpec(kind="numeric", role="ignore", note="no recorded values", **base), notes
    numeric_dtype = pd.api.types.is_numeric_dtype(values.dtype) and \
        not pd.api.types.is_bool_dtype(values.dtype)
    profile = None if numeric_dtype else profile_cells(values)
    numbers = parse_numbers(values, label=name, rows=rows, profile=profile)
    if numeric_dtype:
        n_present = int(values.notna().sum())
    else:
        missing_u = missing_texts(profile.texts)
        n_present = int(profile.counts[~missing_u].sum())
    if n_present == 0:
        notes.append(say("infer.all_missing", column=name))
        return ColumnSpec(kind="numeric", role="ignore", note="no recorded values", **base), notes
    if numbers.mixed_units:
        # Values in several units are never converted quietly: text, left out, with a warning.
        notes.extend(n for n in numbers.notes if n.code != "values.not_numbers")
        return ColumnSpec(kind="text", role="ignore", **base), notes
    header_unit = base["unit"] or _unit_after_name(base)["unit"]
    if numbers.unit and header_unit and not same_unit(numbers.unit, header_unit):
        notes.append(say("infer.unit_disagrees", column=name, header=header_unit,
                         found=numbers.unit))
        return ColumnSpec(kind="text", role="ignore", **base), notes
    if numbers.unit and not base["unit"]:
        base = {**base, "unit": numbers.unit}  # the unit the cells wrote: "38.2 °C"
    readable_share = 1.0 - numbers.n_unreadable / n_present
    finite = numbers.values[np.isfinite(numbers.values)]
    few_words = 0 < numbers.n_unreadable_texts <= _FEW_WORDS and pd.unique(finite).size > 10
    if readable_share >= 0.95 and not few_words:
        return _numeric(name, base, numbers, n_present, notes, rows)
    if readable_share >= 0.5 and few_words:
        words = tuple(numbers.unreadable_texts)
        notes.append(say("infer.numbers_and_words", column=name,
                         words=", ".join(repr(w) for w in words),
                         n=numbers.n_unreadable, rows=rows_phrase(numbers.unreadable_rows
                                                                  if rows is not None else None)))
        # The words are now missing codes, so the "not numbers" note no longer applies.
        notes.extend(n for n in numbers.notes if n.code != "values.not_numbers")
        dated = _serial_date(name, base, numbers.values, notes, rows)
        if dated is not None:
            return replace(dated[0], missing_codes=words), dated[1]
        return ColumnSpec(kind="numeric", missing_codes=words, **base), notes

    # Texts: counted per distinct trimmed text, and per spelling regardless of capitals.
    by_text: dict[str, int] = {}
    for text, count, gone in zip(profile.texts, profile.counts, missing_u):
        if not gone and count:
            by_text[text] = by_text.get(text, 0) + int(count)
    by_folded: dict[str, int] = {}
    for text, count in by_text.items():
        key = text.casefold()
        by_folded[key] = by_folded.get(key, 0) + count
    levels_seen = sorted(by_folded, key=lambda k: -by_folded[k])
    longest = max(map(len, by_text), default=0)
    if longest > NAME_LENGTH:  # free text: no chart question, and no model file could hold it
        notes.append(say("infer.long_texts", column=name, length=f"{longest:,}", limit=f"{NAME_LENGTH:,}"))
        return ColumnSpec(kind="text", role="ignore", **base), notes
    n_unique = len(by_text)
    distinct = pd.Series(list(by_text), dtype=object)
    if len(levels_seen) == 1:
        notes.append(say("infer.constant", column=name))
        return ColumnSpec(kind="nominal", role="ignore", note="constant",
                          levels=tuple(_levels(by_text)), **base), notes
    if len(levels_seen) == 2 or (len(levels_seen) <= 20 and yes_no_levels(levels_seen)):
        if yes_no_levels(levels_seen):
            if len(by_text) > 2:
                notes.append(say("infer.yes_no_spellings", column=name,
                                 spellings=", ".join(repr(s) for s in list(by_text)[:6])))
            return ColumnSpec(kind="binary", levels=("no", "yes"), positive=None, **base), notes
        role = "site" if _SITE_HINT.search(name) else "predictor"
        levels = tuple(_levels(by_text))
        # The event to catch if this is the outcome: "fell" over "no fall", else the rarer.
        positive = event_level(levels, [by_folded[level.casefold()] for level in levels])
        return ColumnSpec(kind="binary", levels=levels, role=role, positive=positive,
                          **base), notes
    if n_unique >= 0.95 * n_present and n_present >= 20:
        if mostly_dates(distinct):
            return _date(name, base, distinct, notes)
        notes.append(say("infer.identifier", column=name))
        return ColumnSpec(kind="identifier", role="ignore", **base), notes
    if mostly_dates(distinct):
        return _date(name, base, distinct, notes)
    if _PATIENT_HINT.search(name) and n_unique < n_present:
        notes.append(say("infer.patient_id", column=name))
        return ColumnSpec(kind="identifier", role="patient_id", **base), notes
    if len(by_folded) > MAX_NOMINAL_LEVELS:
        notes.append(say("infer.too_many_levels", column=name, n=len(by_folded),
                         limit=MAX_NOMINAL_LEVELS))
        return ColumnSpec(kind="text", role="ignore", **base), notes
    levels = _levels(by_text)
    if 0.25 <= readable_share < 0.95 and numbers.n_unreadable < n_present:
        word_rows = rows_phrase(numbers.unreadable_rows) if rows is not None else ""
        notes.append(say("infer.mixed_categories", column=name, rows=word_rows))
    role = "site" if _SITE_HINT.search(name) and len(levels) >= 2 else "predictor"
    if len(levels) < len(by_text):
        notes.append(say("infer.capitals", column=name))
    nothing = [level for level in levels if level.casefold() in _NOTHING_WORDS]
    if len(nothing) > 1:  # "none" and "nil": split apart, each box of the tree sees half
        notes.append(say("infer.one_answer_twice", column=name,
                         levels=", ".join(repr(level) for level in nothing),
                         all="both" if len(nothing) == 2 else "all"))
    return ColumnSpec(kind="nominal", levels=tuple(levels), role=role, **base), notes


# Words that all answer "nothing of this" (common practice in clinical forms, no one source).
_NOTHING_WORDS = frozenset({"none", "nil", "nothing", "no", "not any", "absent"})


def _levels(by_text: dict[str, int]) -> list[str]:
    """Levels from counted texts (see variables.canonical_levels)."""
    return canonical_levels(sorted(by_text, key=lambda t: -by_text[t]))  # commonest first


_DATE_STYLES = (("year first", r"^\d{4}[-/.]\d{1,2}[-/.]\d{1,2}"),
                ("day or month first", r"^\d{1,2}[-/.]\d{1,2}[-/.]\d{2,4}"),
                ("month name", r"[A-Za-z]{3}"))


def _date(name: str, base: dict, text: pd.Series, notes: list[str]):
    """A date column (left out of the predictors); several writing styles are reported."""
    uniques = pd.Series(pd.unique(text.iloc[:: max(1, len(text) // 5000)]), dtype=object)
    styles = []
    for style, pattern in _DATE_STYLES:
        hits = uniques[uniques.str.contains(pattern, regex=True)]
        if len(hits):
            styles.append(str(hits.iloc[0]))
    if len(styles) > 1:
        notes.append(say("infer.date_formats", column=name,
                         examples=", ".join(repr(s) for s in styles)))
    return ColumnSpec(kind="date", role="ignore", note="date", **base), notes


def _serial_date(name: str, base: dict, numbers: np.ndarray, notes: list[str], rows):
    """A column named as a date whose numbers are spreadsheet serial dates (45650 for 24
    December 2024): a date column, left out of the predictors, with a note showing the
    reading; None for any other column."""
    if not (names_a_date(name) and looks_like_serial_dates(numbers)):
        return None
    finite = np.isfinite(numbers)
    dates = serial_dates(numbers[finite])
    first = int(np.flatnonzero(finite)[0])
    example = numbers[first]
    where = None if rows is None else rows[[first]]
    notes.append(say("infer.serial_dates", column=name,
                     example=f"{example:.12g}", date=_day(dates.iloc[0]),
                     first=_day(dates.min()), last=_day(dates.max()),
                     rows=rows_phrase(where)))
    return ColumnSpec(kind="date", role="ignore", note="date", **{**base, "unit": ""}), notes


def _day(stamp) -> str:
    return f"{stamp.day} {stamp:%B %Y}"


def _numeric(name: str, base: dict, numbers, n_present: int, notes: list[str], rows):
    base = _unit_after_name(base)
    finite = numbers.values[np.isfinite(numbers.values)]
    distinct = np.sort(pd.unique(finite))  # hashing: cheaper than sorting a million values
    if len(distinct) <= 1:
        notes.append(say("infer.constant", column=name))
        return ColumnSpec(kind="numeric", role="ignore", note="constant", **base), notes
    if len(distinct) == 2 and set(distinct.tolist()) <= {0.0, 1.0}:
        return ColumnSpec(kind="binary", levels=("0", "1"), **base), notes
    dated = _serial_date(name, base, numbers.values, notes, rows)
    if dated is not None:
        return dated
    whole = bool(np.all(distinct == np.round(distinct)))
    # A negative code such as -99 in a column whose other values are all >= 0.
    sentinels = tuple(str(int(v)) for v in distinct[np.isin(distinct, _SENTINELS)]
                      if not (finite[finite != v] < 0).any()
                      and np.sum(finite == v) < 0.5 * len(finite))
    sentinel_note = []
    if sentinels:
        # Only proposed: the value stays a number until the user or the dictionary names it
        # as "not recorded" (an ordinal column's level, too).
        hit = np.isin(numbers.values, [float(v) for v in sentinels])
        where = None if rows is None else rows[np.flatnonzero(hit)]
        sentinel_note = [say("infer.sentinel", column=name, code=", ".join(sentinels),
                             n=int(hit.sum()), rows=rows_phrase(where), codes=sentinels)]
    if whole and len(distinct) <= 10 and _ORDINAL_HINT.search(name):
        levels = tuple(str(int(v)) for v in distinct)
        return ColumnSpec(kind="ordinal", levels=levels, **base), notes + sentinel_note
    if looks_like_record_numbers(numbers.values, n_present, bool(_ID_HINT.search(name))):
        notes.append(say("infer.record_numbers", column=name))
        return ColumnSpec(kind="identifier", role="ignore", **base), notes
    notes.extend(numbers.notes)
    return ColumnSpec(kind="numeric", **base), notes + sentinel_note


def infer_dictionary(frame: pd.DataFrame,
                     row_numbers: Sequence[int] | np.ndarray | None = None,
                     ) -> tuple[DataDictionary, list[str]]:
    """Infer a dictionary entry for every column; returns the dictionary and notes.

    ``row_numbers`` (e.g. ``LoadedTable.row_numbers``) lets the notes say which rows.
    """
    specs, notes = [], []
    for name in frame.columns:
        spec, col_notes = infer_column(str(name), frame[name], row_numbers)
        specs.append(spec)
        notes.extend(col_notes)
    return DataDictionary(tuple(specs)), notes
