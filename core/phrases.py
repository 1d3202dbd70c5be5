"""Small wording helpers shared by the messages, the chart, the report and the command line:
counts with their nouns, row lists, short fingerprints."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

# The method, always spelled out: its four-letter acronym is also a commercial program's name.
METHOD = "classification and regression trees"
METHOD_SOURCE = "Breiman, Friedman, Olshen and Stone, 1984"
METHOD_NAME = f"{METHOD} ({METHOD_SOURCE})"


def in_sentence(label: str) -> str:
    """A label as it reads inside a sentence: 'Length of stay' → 'length of stay', while
    abbreviations keep their capitals ('PICU transfer' → 'PICU transfer', 'Systolic BP' →
    'systolic BP', 'SpO2' stays): lower-casing all of it printed 'picu transfer'."""
    def word(w: str) -> str:
        rest = w[1:]
        return w if any(ch.isupper() or ch.isdigit() for ch in rest) else w[:1].lower() + rest
    return " ".join(word(w) for w in label.split(" "))


def plural(n: int, singular: str, plural: str) -> str:
    """A count with its noun: '1 outcome box', '2,104 outcome boxes'.

    Both forms are given: English plurals are not made by one rule (box, boxes; patient,
    patients), and cutting a letter off the plural gave '1 outcome boxe'."""
    return f"{n:,} {singular if n == 1 else plural}"


def rows_word(rows: int, patients: int | None) -> str:
    """What one row of the data is, in the plural: "visits" when a patient-number column is
    set and some patients have more than one row, else "patients" (every row is a patient).

    The one place that decides the word: the chart, rules, report, command line and app all
    count rows with it, so "visits" and "patients" never disagree about the same rows."""
    return "visits" if patients is not None and patients < rows else "patients"


def rows_count(n: int, word: str) -> str:
    """'1 visit', '412 visits', '1 patient': a count of rows in their word (:func:`rows_word`)."""
    return plural(n, {"visits": "visit", "patients": "patient"}[word], word)


def rows_and_patients(rows: int, patients: int | None) -> str:
    """'412 visits of 300 patients' where patients came more than once, else '300 patients'."""
    word = rows_word(rows, patients)
    if word == "visits":
        return f"{rows_count(rows, word)} of {plural(int(patients), 'patient', 'patients')}"
    return rows_count(rows, word)


def patients_among(groups) -> int | None:
    """How many patients the rows hold, by their patient codes (None: no patient number)."""
    return None if groups is None else int(np.unique(np.asarray(groups)).size)


def shared_patients(n: int) -> str:
    """'1 of these patients was among the derivation patients' (or 'N … were …')."""
    return f"{n:,} of these patients {'was' if n == 1 else 'were'} among the derivation patients"


def short_fingerprint(digest: str) -> str:
    """The first 12 hexadecimal digits of a SHA-256, as every page and screen shows it."""
    return str(digest)[:12]


def rows_phrase(rows: Sequence[int] | np.ndarray | None, limit: int = 5,
                word: str = "row") -> str:
    """' (row 4)', ' (rows 4, 9 and 22)' or ' (rows 4, 9, 22, 31, 40 and 12 more)'; '' if none.
    ``word`` names what the numbers count ('file line' where they are file lines)."""
    if rows is None:
        return ""
    rows = [int(r) for r in np.asarray(rows).ravel()[: limit + 1000]]
    total = len(rows)
    if total == 0:
        return ""
    if total == 1:
        return f" ({word} {rows[0]})"
    shown, words = rows[:limit], word + "s"
    if total <= limit:
        return f" ({words} {', '.join(map(str, shown[:-1]))} and {shown[-1]})"
    return f" ({words} {', '.join(map(str, shown))} and {total - limit} more)"



def names_phrase(names: Sequence[str], limit: int = 5) -> str:
    """Names as a sentence lists them: 'A', 'A and B', 'A, B and C', the rest counted."""
    names = list(names)
    if len(names) > limit:
        rest = len(names) - limit + 1
        names = names[:limit - 1] + [f"{rest} more"]
    if len(names) <= 1:
        return "".join(names)
    return ", ".join(names[:-1]) + " and " + names[-1]
