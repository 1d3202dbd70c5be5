"""Patients an external file shares with the derivation data.

A check on "separate patients" is separate only if none of them helped grow the tree. The
model file keeps, for its patient identifier column, a keyed digest (HMAC-SHA256) of every
derivation patient's identifier, never the identifiers themselves, and the name of the key
(core/checking/identifier_key.py). The key stays on the computer the tree was grown on, so
only there can ``prunella check`` count the patients both share; elsewhere whether they
overlap is not known, and said so. The digests cannot be turned back into identifiers without
the key, however small the space of record numbers.

Model files written before the key (digests salted with a value stored in the file) are never
used for matching: anyone could recompute those digests, so they give the identifiers away
and say nothing trustworthy here.
"""

from __future__ import annotations

import hashlib
import hmac
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..messages.message import say
from .identifier_key import identifier_key, key_id

DIGEST_CHARS = 16  # 64 bits of each keyed digest: collisions are negligible for any cohort
DIGEST_FORMAT = "hmac-sha256/1"


def _clean(cells: pd.Series) -> pd.Series:
    return cells.astype("string").str.strip()


def identifier_digests(cells: pd.Series, key: bytes) -> np.ndarray:
    """The keyed digest of each identifier (None where it is blank)."""
    out = []
    for value in _clean(cells):
        if value is pd.NA or value == "":
            out.append(None)
        else:
            out.append(hmac.new(key, value.encode("utf-8"),
                                hashlib.sha256).hexdigest()[:DIGEST_CHARS])
    return np.array(out, dtype=object)


def derivation_ids(cells: pd.Series, column: str, key: bytes | None = None) -> dict:
    """The record the model file keeps: the column, the digests' format, the key's name and
    the sorted digests (the key is this computer's, made on first use)."""
    key = identifier_key(create=True) if key is None else key
    digests = sorted({d for d in identifier_digests(cells, key) if d is not None})
    return {"column": column, "format": DIGEST_FORMAT, "key_id": key_id(key),
            "digests": digests}


@dataclass(frozen=True)
class Overlap:
    """Which rows of a file belong to derivation patients, as far as this computer can tell."""

    rows: np.ndarray  # True where the row's patient was among the derivation patients
    patients: int  # how many such patients
    not_known: str | None = None  # the sentence saying why the overlap cannot be told here

    @property
    def known(self) -> bool:
        return self.not_known is None


def overlapping_rows(record: dict | None, frame: pd.DataFrame) -> Overlap:
    """Rows of ``frame`` whose patient was among the derivation patients (no record, or no
    such column: none). Digests made with another key, or by a Prunella before the key, leave
    the overlap not known, with the sentence to say."""
    none = np.zeros(len(frame), dtype=bool)
    if not record or record.get("column") not in frame.columns:
        return Overlap(none, 0)
    if record.get("format") != DIGEST_FORMAT:
        return Overlap(none, 0, say("check.overlap_old_digests"))
    key = identifier_key(create=False)
    if key is None or key_id(key) != record.get("key_id"):
        return Overlap(none, 0, say("check.overlap_elsewhere"))
    digests = identifier_digests(frame[record["column"]], key)
    known = set(record.get("digests", ()))
    rows = np.array([d is not None and d in known for d in digests], dtype=bool)
    return Overlap(rows, len({d for d, r in zip(digests, rows) if r}))
