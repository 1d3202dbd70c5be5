"""Columns that hold dates or periods: headers that name a date, and numbers that are dates as a
spreadsheet stores them (serial day numbers).

A spreadsheet keeps a date as the number of days since 30 December 1899 and only shows it as a
date through the cell's format; an export that loses the format writes 45650 for 24 December
2024. Such a column read as numbers would become the bedside question "Arrival date above
45650?", which splits patients by when they came, not by anything about them.
"""

from __future__ import annotations

import re

import numpy as np
import pandas as pd

from ..data.cells import FIRST_SERIAL, LAST_SERIAL, is_missing_text, parse_dates
from .identity import normalised_header

# A header that names a date or a calendar period ("Arrival date", "date_of_admission",
# "Admission year", "Month seen"); durations ("days in hospital", "age in years") do not match.
_DATE_HEADER = re.compile(r"\b(date|dates|dated|datetime|timestamp|time stamp|year|month|"
                          r"week|quarter|calendar|day of (the )?(week|month|year))\b|"
                          r"\b(seen|admitted|arrived|attended|discharged|referred|triaged|"
                          r"registered|operated|died) on\b")


def names_a_date(name: str) -> bool:
    """Whether a column's header names a date or a calendar period."""
    return bool(_DATE_HEADER.search(normalised_header(name)))


def looks_like_serial_dates(numbers: np.ndarray) -> bool:
    """Whether recorded numbers are all spreadsheet serial dates of 1920–2099 (a time of day
    may be kept as the fraction), with at least two different days."""
    finite = numbers[np.isfinite(numbers)]
    if len(finite) < 2 or finite.min() < FIRST_SERIAL or finite.max() > LAST_SERIAL + 1:
        return False
    return np.unique(np.floor(finite)).size >= 2


def mostly_dates(text: pd.Series) -> bool:
    """Whether distinct cell texts are (at least 90%) written dates ("03/01/2024", "2024-01-03",
    "3 Jan 2024")."""
    sample = text.iloc[:: max(1, len(text) // 5000)]
    if sample.str.contains(r"\d[-/.]\d|\d{1,2} [A-Za-z]{3}", regex=True).mean() <= 0.9:
        return False
    uniques = pd.Series(pd.unique(sample))
    return parse_dates(uniques).notna().mean() >= 0.9


def holds_dates(name: str, values: pd.Series) -> bool:
    """Whether a column is a date or a period, by its header, or by its cells: written dates,
    or serial dates under a header that names a date."""
    if names_a_date(name):
        return True
    if pd.api.types.is_datetime64_any_dtype(values.dtype):
        return True
    if pd.api.types.is_numeric_dtype(values.dtype) or pd.api.types.is_bool_dtype(values.dtype):
        return False
    # Judged on distinct cells (hashed once), never on every row of a long column.
    distinct = pd.Series(pd.unique(values.dropna()), dtype=object)
    distinct = distinct[~is_missing_text(distinct)].astype(str).str.strip()[:500]
    return len(distinct) >= 2 and mostly_dates(distinct.reset_index(drop=True))
