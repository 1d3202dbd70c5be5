"""Columns that identify a person: names, record numbers, dates of birth, addresses, phone
numbers, e-mail addresses, and identifiers that differ in every row.

Such a column must never become a question on a wall chart (it would print a patient's
identity, and it predicts nothing beyond the patients it came from), so the data dictionary
leaves it out of the predictors by default and the guards (core/design/guards.py) say why. Each
column is judged by its header *and* by its contents, so a column named "contact" that holds
phone numbers is caught, and so is a column of e-mail addresses named "notes".
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
import pandas as pd

_SAMPLE = 2000  # cells looked at per column

# Header words, matched on the header in lower case with separators turned into spaces.
_HEADER_RULES: tuple[tuple[str, re.Pattern], ...] = (
    ("e-mail addresses", re.compile(r"\b(e ?mail|email address)\b")),
    ("phone numbers", re.compile(r"\b(phone|telephone|tel|mobile|cell ?phone|fax|"
                                 r"contact (no|number))\b")),
    ("dates of birth", re.compile(r"\b(dob|d o b|date of birth|birth ?date|birthday|"
                                  r"born on)\b")),
    ("addresses", re.compile(r"\b(address|street|post ?code|postal ?code|zip ?code|zip|"
                             r"house (no|number))\b")),
    ("names", re.compile(r"\b(first|last|given|family|full|middle|maiden|patient|person|"
                         r"client|pt)\s?names?\b|\b(sur|fore)names?\b|^names?$|^initials$")),
    ("record numbers", re.compile(r"\b(mrn|urn|medical record|record (no|number)|"
                                  r"(hospital|hosp|unit|chart) (no|number|num)|hosp ?no|"
                                  r"nhs (no|number)|chi (no|number)|ssn|"
                                  r"social security|insurance (no|number)|passport|"
                                  r"national id|health card|case (no|number))\b")),
)

_EMAIL = re.compile(r"^[^@\s]+@[^@\s]+\.[A-Za-z]{2,}$")
_PHONE = re.compile(r"^(\+|00)?[\d\s().\-/]{7,22}$")
_NAME_TOKEN = re.compile(r"^[A-Z][a-zA-Z'’\-]*\.?,?$")
_STREET = re.compile(r"^\d+[A-Za-z]?,?\s+.*\b(street|st|road|rd|avenue|ave|lane|ln|drive|dr|"
                     r"close|way|place|pl|court|ct|crescent|terrace|boulevard|blvd|square|"
                     r"grove|gardens|hill|row|parade|highway|hwy)\b\.?", re.IGNORECASE)
_POSTCODE = re.compile(r"^[A-Z]{1,2}\d[A-Z\d]?\s*\d[A-Z]{2}$")  # UK style
_PHONE_PUNCTUATION = re.compile(r".*[\s\-()+/.]")
_DATE_LIKE = re.compile(r".*\d{1,4}[-/.]\d{1,2}[-/.]\d{1,4}")


@dataclass(frozen=True)
class IdentityHint:
    """Why a column looks like it identifies patients."""

    what: str  # "names", "e-mail addresses", ... or "an identifier unique to each row"
    basis: str  # "header" or "contents"

    @property
    def reason(self) -> str:
        if self.basis == "header":
            return f"its name suggests {self.what}"
        return f"its cells look like {self.what}"


def normalised_header(name: str) -> str:
    """A header in lower case with camelCase, underscores, dots and dashes turned into spaces."""
    spaced = re.sub(r"(?<=[a-z])(?=[A-Z])", " ", str(name))
    return re.sub(r"[\s_.\-:/]+", " ", spaced).strip().lower()


def identity_by_header(name: str) -> IdentityHint | None:
    """A hint from the column name alone."""
    header = normalised_header(name)
    for what, rule in _HEADER_RULES:
        if rule.search(header):
            return IdentityHint(what, "header")
    return None


def _share(texts: list[str], rule: re.Pattern) -> float:
    return sum(1 for t in texts if rule.match(t)) / len(texts) if texts else 0.0


def identity_by_contents(values: pd.Series) -> IdentityHint | None:
    """A hint from what the cells hold (a sample of the recorded cells is enough)."""
    present = values.dropna()
    if len(present) < 5:
        return None
    if pd.api.types.is_datetime64_any_dtype(present.dtype):
        return _birth_dates(present)
    if pd.api.types.is_numeric_dtype(present.dtype) or pd.api.types.is_bool_dtype(present.dtype):
        return None
    sample = present.to_numpy(dtype=object)[:: max(1, len(present) // _SAMPLE)][:_SAMPLE]
    distinct_cells = pd.unique(sample)
    distinct = len(distinct_cells) / len(sample)
    # Patterns are judged on distinct texts: a few hundred at most, however long the column.
    texts = [v.strip() for v in distinct_cells[:500] if isinstance(v, str) and v.strip()]
    if len(texts) < 5:
        return None
    if _share(texts, _EMAIL) >= 0.5:
        return IdentityHint("e-mail addresses", "contents")
    if _share(texts, _DATE_LIKE) >= 0.9:
        # Dates first: a dd/mm/yyyy date is written with digits and slashes like a phone
        # number, but only dates spread over decades identify (dates of birth).
        dates = pd.to_datetime(pd.Series(texts, dtype=object), errors="coerce", format="mixed",
                               dayfirst=True)
        if dates.notna().mean() >= 0.9:
            return _birth_dates(dates.dropna())
    if distinct >= 0.5 and _share(texts, _PHONE) >= 0.8 and \
            float(np.median([sum(ch.isdigit() for ch in t) for t in texts])) >= 7 and \
            (_share(texts, _PHONE_PUNCTUATION) >= 0.5 or
             sum(t.startswith("0") for t in texts) >= 0.5 * len(texts)):
        return IdentityHint("phone numbers", "contents")
    if _share(texts, _STREET) >= 0.5 or _share([t.upper() for t in texts], _POSTCODE) >= 0.8:
        return IdentityHint("addresses", "contents")
    # Names repeat (a patient seen often, a common name), so many distinct texts shaped like
    # names are enough; a clinical category seldom has thirty capitalised two-word levels.
    if len(texts) >= 10 and (distinct >= 0.5 or len(texts) >= 30) and \
            _person_names(texts) >= 0.8:
        return IdentityHint("names", "contents")
    return None


def _person_names(texts: list[str]) -> float:
    """Share of cells written like a person's name: 2–4 capitalised words, e.g. 'Ada Lovelace'."""
    def looks(text: str) -> bool:
        tokens = text.replace(",", ", ").split()
        return 2 <= len(tokens) <= 4 and all(_NAME_TOKEN.match(t) for t in tokens) and \
            sum(len(t.strip(".,")) >= 2 for t in tokens) >= 2
    return sum(map(looks, texts)) / len(texts)


def _birth_dates(dates: pd.Series) -> IdentityHint | None:
    """Dates spread over decades and all in the past: how dates of birth look in a cohort."""
    try:
        years = pd.DatetimeIndex(dates).year
    except (TypeError, ValueError):
        return None
    if len(years) < 5:
        return None
    span = int(np.max(years)) - int(np.min(years))
    if span >= 30 and int(np.min(years)) >= 1880 and pd.Timestamp(np.max(dates)) <= pd.Timestamp.now():
        return IdentityHint("dates of birth", "contents")
    return None


# What a patient-number column may hold: record numbers (one per person, never shared).
GROUPING_IDENTITIES = ("record numbers", "an identifier unique to each row")


def may_group_patients(spec) -> bool:
    """Whether a column (its dictionary entry) may be the patient number that keeps a patient's
    rows together: record numbers may; names, addresses, phone numbers, e-mail addresses and
    dates of birth never (different people share them, and one person's are written in
    several ways)."""
    hint = identity_by_header(spec.name)
    if hint is not None and hint.what not in GROUPING_IDENTITIES:
        return False
    note = getattr(spec, "note", "") or ""
    return not (note.startswith("identity: ") and
                note[len("identity: "):] not in GROUPING_IDENTITIES)


def identity_hint(name: str, values: pd.Series) -> IdentityHint | None:
    """Why the column looks like it identifies patients, or None."""
    return identity_by_header(name) or identity_by_contents(values)


def looks_like_record_numbers(numbers: np.ndarray, n_present: int, hinted: bool) -> bool:
    """Whole numbers that differ in every row and are laid out like record numbers.

    Real measurements in whole units rarely differ in every one of many rows; record numbers
    do, and are either numbered densely (1, 2, 3, …), long (6 digits or more), or named so.
    """
    finite = numbers[np.isfinite(numbers)]
    if len(finite) < 20 or len(finite) != n_present:
        return False
    if not np.all(finite == np.round(finite)) or pd.unique(finite).size != len(finite):
        return False
    if hinted:
        return True
    dense = (finite.max() - finite.min() + 1) <= 1.5 * len(finite)
    long = bool(np.all(np.abs(finite) >= 100_000))
    return len(finite) >= 50 and (dense or long)
