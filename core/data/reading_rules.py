"""What the text and workbook readers share: telling text from binary bytes, finding the row
that holds the column names, and tidying headers and empty rows and columns.

Kept apart from core/data/table.py (which picks the reader) so that both readers
(core/data/text_table.py, core/data/xlsx.py) apply one set of rules and say one thing.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pandas as pd

from ..document_checks import NAME_LENGTH
from ..errors import InputError
from ..messages.message import say
from ..phrases import rows_phrase

SAMPLE_BYTES = 256 * 1024  # what the kind of file and a text table's layout are judged on
_NUMBERISH = re.compile(r"^[+-]?(\d+[.,]?\d*|[.,]\d+)([eE][+-]?\d+)?$")


def binary_share(head: bytes) -> float:
    """Share of control characters (other than tab, CR, LF, FF) in the first 8 KB."""
    chunk = head[:8192]
    if chunk.startswith((b"\xff\xfe", b"\xfe\xff")):
        text = chunk.decode("utf-16", errors="replace")
    else:
        text = chunk.decode("utf-8", errors="ignore") if is_utf8(chunk) else \
            chunk.decode("cp1252", errors="replace")
    if not text:
        return 0.0
    control = sum(1 for ch in text if (ord(ch) < 32 and ch not in "\t\r\n\f") or
                  ord(ch) == 0x7F)
    return control / len(text)


def is_utf8(chunk: bytes) -> bool:
    try:
        chunk.decode("utf-8")
        return True
    except UnicodeDecodeError as exc:
        return exc.start >= len(chunk) - 3  # a character cut at the sample's end is fine


# --- where the header is -------------------------------------------------------------------


def header_index(records: list[list], width: int, path: Path, where: str = "") -> int:
    """The first record that looks like column names: filled enough, and mostly words."""
    where = where or path.name
    need = max(1, int(np.ceil(0.5 * width)))
    filled = [[str(c).strip() for c in r if c is not None and str(c).strip()]
              for r in records[:31]]
    for index, cells in enumerate(filled[:30]):
        if len(cells) < need:
            continue
        later = next((f for f in filled[index + 1:] if f), [])
        if width > 1 and len(cells) == 1 and len(later) >= 2:
            continue  # a title above a wider table
        words = [c for c in cells if not _NUMBERISH.match(c)]
        if not words:
            raise InputError(say("read.no_header", where=where, row=index + 1,
                                 examples=", ".join(cells[:4])))
        if len(words) >= 0.5 * len(cells):
            return index
    for index, record in enumerate(records):
        if any(str(c).strip() for c in record if c is not None):
            return index
    raise InputError(say("read.zero_bytes", file=path.name))


# --- common tidying -------------------------------------------------------------------------


def span(first: int, count: int) -> str:
    return f"row {first}" if count <= 1 else f"rows {first}–{first + count - 1}"


def column_name_at(position: int, letters: bool) -> str:
    """How a spreadsheet names the column at ``position`` (0-based): 'C' or 'column 3'."""
    if letters:
        from openpyxl.utils import get_column_letter

        return get_column_letter(position + 1)
    return str(position + 1)


def clean_header(value) -> str:
    if value is None or (isinstance(value, float) and np.isnan(value)):
        return ""
    if isinstance(value, float) and np.isfinite(value) and value == int(value):  # not 1e400
        value = int(value)
    return re.sub(r"\s+", " ", str(value)).strip()


def tidy(frame: pd.DataFrame, header: list, rows: np.ndarray, where: str,
          letters: bool = False) -> tuple[pd.DataFrame, np.ndarray, list[str]]:
    """Name columns from ``header``, drop empty rows/columns, and report odd headers."""
    warnings: list[str] = []
    names = [clean_header(h) for h in header]
    frame = frame.copy(deep=False)
    frame.columns = range(frame.shape[1])
    empty = frame.isna().all(axis=0).to_numpy()
    drop = [j for j in range(frame.shape[1]) if empty[j] and not names[j]]
    if drop:
        frame = frame.drop(columns=drop)
        warnings.append(say("read.empty_columns", n=len(drop), where=where,
                            columns=", ".join(column_name_at(j, letters) for j in drop[:8])))
    dropped = set(drop)
    kept = [j for j in range(len(names)) if j not in dropped]
    names = [names[j] for j in kept]
    for j, name in zip(kept, names):  # a model file could not hold it (core/document_checks.py)
        if len(name) > NAME_LENGTH:
            raise InputError(say("read.long_header", where=where, length=f"{len(name):,}",
                                 column=column_name_at(j, letters), limit=f"{NAME_LENGTH:,}"))
    repeated = _repeated_header_rows(frame, names)
    if repeated.any():
        frame = _numbers_again(frame.loc[~repeated])
        warnings.append(say("read.repeated_header", n=int(repeated.sum()), where=where,
                            rows=rows_phrase(rows[repeated])))
        rows = rows[~repeated]
    blank_rows = frame.isna().all(axis=1).to_numpy()
    if blank_rows.any():
        frame = frame.loc[~blank_rows]
        warnings.append(say("read.empty_rows", n=int(blank_rows.sum()), where=where,
                            rows=rows_phrase(rows[blank_rows])))
        rows = rows[~blank_rows]
    frame = frame.reset_index(drop=True)
    if frame.shape[1] == 0:
        raise InputError(say("read.no_columns", where=where))
    blank = [i for i, n in enumerate(names) if not n]
    if blank:
        labels = [column_name_at(kept[i], letters) for i in blank]
        for i, label in zip(blank, labels):
            names[i] = f"column {label}"
        warnings.append(say("read.blank_headers", where=where, columns=", ".join(labels[:8])))
    seen: dict[str, int] = {}
    final = []
    for index, name in enumerate(names):
        key = name
        if key in seen:
            seen[key] += 1
            new = f"{name} ({seen[key]})"
            warnings.append(say("read.duplicate_header", where=where, name=name, new=new,
                                column=column_name_at(kept[index], letters)))
            final.append(new)
        else:
            seen[key] = 1
            final.append(name)
    frame.columns = final
    if len(frame) == 0:
        raise InputError(say("read.header_only", where=where))
    return frame, np.asarray(rows, dtype=np.int64), warnings


def _header_text(value) -> str:
    return clean_header(str(value).replace("\ufeff", "")) if isinstance(value, str) else \
        clean_header(value)


def _is_text(column: pd.Series) -> bool:
    return column.dtype == object or pd.api.types.is_string_dtype(column.dtype)


def _repeated_header_rows(frame: pd.DataFrame, names: list[str]) -> np.ndarray:
    """Rows that repeat the column names (two exports pasted one below the other): every
    filled cell is its column's name, and at least half the named columns are filled."""
    named = [j for j, n in enumerate(names) if n and not _NUMBERISH.match(n)]
    # Positions, not labels: the frame's labels still count the columns dropped as empty.
    text_columns = [j for j in named if _is_text(frame.iloc[:, j])]
    hit = np.zeros(len(frame), dtype=bool)
    if not text_columns or len(frame) == 0:
        return hit
    # Only rows whose first text column holds its name are looked at further (cheap: one
    # comparison per distinct cell of one column).
    first = text_columns[0]
    codes, uniques = pd.factorize(frame.iloc[:, first])
    same = np.array([_header_text(u) == names[first] for u in uniques] + [False])
    candidates = np.flatnonzero(same[codes])
    if len(candidates) == 0:
        return hit
    part = frame.iloc[candidates]
    matches = np.zeros(len(part), dtype=int)
    for j in named:
        matches += np.array([_header_text(v) == names[j] for v in part.iloc[:, j]], dtype=int)
    filled = part.notna().sum(axis=1).to_numpy()
    hit[candidates] = (matches == filled) & (matches >= max(1, int(np.ceil(0.5 * len(named)))))
    return hit


def _numbers_again(frame: pd.DataFrame) -> pd.DataFrame:
    """Columns that held text only because a repeated header row was among them become
    numbers again, as they would have been read without it."""
    frame = frame.copy()
    for j in frame.columns:
        column = frame[j]
        if not _is_text(column):
            continue
        numbers = pd.to_numeric(column, errors="coerce")
        if int(numbers.notna().sum()) == int(column.notna().sum()) and column.notna().any():
            frame[j] = numbers
        else:
            frame[j] = column.infer_objects()
    return frame


def first_line(exc: Exception) -> str:
    return str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
