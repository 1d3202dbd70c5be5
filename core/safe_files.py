"""Writing files so that a crash never leaves a half-written one, and exports stay inert.

Every file Prunella writes goes through here: the bytes go to a temporary file in the same
folder, are flushed to disk, and only then replace the target in one rename, so a kill at any
moment leaves either the old file or the new one.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

import pandas as pd

# OWASP "CSV Injection": a cell starting with one of these is run as a formula by spreadsheets.
_FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def write_bytes_atomic(path: str | Path, data: bytes) -> None:
    """Replace ``path`` with ``data`` atomically (temporary file, fsync, rename)."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(handle, "wb") as out:
            out.write(data)
            out.flush()
            os.fsync(out.fileno())
        os.replace(temp, path)
    except BaseException:
        try:
            os.unlink(temp)
        except FileNotFoundError:
            pass
        raise


def write_text_atomic(path: str | Path, text: str) -> None:
    """Replace ``path`` with UTF-8 ``text`` atomically."""
    write_bytes_atomic(path, text.encode("utf-8"))


def neutralise_cell(value):
    """Prefix a text cell that a spreadsheet would run as a formula with an apostrophe."""
    if isinstance(value, str) and value.startswith(_FORMULA_STARTS):
        return "'" + value
    return value


def write_csv_safely(frame: pd.DataFrame, path: str | Path) -> None:
    """Write a table as UTF-8 CSV with formula-like text cells neutralised, atomically."""
    safe = frame.copy()
    safe.columns = [neutralise_cell(str(c)) for c in safe.columns]
    for column in safe.columns:
        if safe[column].dtype == object or pd.api.types.is_string_dtype(safe[column].dtype):
            safe[column] = safe[column].map(neutralise_cell)
    write_text_atomic(path, safe.to_csv(index=False, lineterminator="\n"))
