"""Patients an external file shares with the derivation data.

A check on "separate patients" is separate only if none of them helped grow the tree. The
model file keeps, for its patient identifier column, a salted SHA-256 digest of every
derivation patient's identifier (never the identifiers themselves), so ``prunella check``,
which reads only the model and the new file, can count the patients both share.
"""

from __future__ import annotations

import hashlib

import numpy as np
import pandas as pd

DIGEST_CHARS = 16  # 64 bits of each digest: collisions are negligible for any cohort size


def _clean(cells: pd.Series) -> pd.Series:
    return cells.astype("string").str.strip()


def identifier_digests(cells: pd.Series, salt: str) -> np.ndarray:
    """The salted digest of each identifier (None where it is blank)."""
    out = []
    for value in _clean(cells):
        if value is pd.NA or value == "":
            out.append(None)
        else:
            out.append(hashlib.sha256(f"{salt}:{value}".encode("utf-8")).hexdigest()[:DIGEST_CHARS])
    return np.array(out, dtype=object)


def derivation_ids(cells: pd.Series, column: str, salt: str) -> dict:
    """The record the model file keeps: the column, the salt and the sorted digests."""
    digests = sorted({d for d in identifier_digests(cells, salt) if d is not None})
    return {"column": column, "salt": salt, "digests": digests}


def overlapping_rows(record: dict | None, frame: pd.DataFrame) -> tuple[np.ndarray, int]:
    """Rows of ``frame`` whose patient was among the derivation patients, and how many such
    patients there are (no record, or no such column: none)."""
    if not record or record.get("column") not in frame.columns:
        return np.zeros(len(frame), dtype=bool), 0
    digests = identifier_digests(frame[record["column"]], record["salt"])
    known = set(record.get("digests", ()))
    rows = np.array([d is not None and d in known for d in digests], dtype=bool)
    return rows, len({d for d, r in zip(digests, rows) if r})
