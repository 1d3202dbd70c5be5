"""Reading a spreadsheet (CSV, TSV, XLSX) into a DataFrame, with provenance.

The source file is only ever opened for reading. Cells keep their raw form here (numbers that
pandas recognises become numbers, everything else stays text); turning text into values is
the data dictionary's job (core/dictionary/columns.py), so one parser serves every file type.

Text files are read by core/data/text_table.py, workbooks by core/data/xlsx.py; both share the rules
here for where the header is and for tidying headers and empty rows. Every kept row remembers
its row number in the spreadsheet, so messages can say where.
"""

from __future__ import annotations

import hashlib
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import InputError
from ..messages.message import say
from ..words import short_fingerprint
from .cells import rows_phrase

TEXT_SUFFIXES = {".csv", ".tsv", ".txt", ".tab"}
EXCEL_SUFFIXES = {".xlsx", ".xlsm"}
_SNIFF_BYTES = 256 * 1024
_OLE = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"
_OTHER_FILES = ((b"%PDF", "a PDF document"), (b"\x89PNG", "a PNG image"),
                (b"\xff\xd8\xff", "a JPEG image"), (b"GIF8", "a GIF image"),
                (b"\x1f\x8b", "a gzip-compressed file"), (b"7z\xbc\xaf", "a 7-Zip archive"),
                (b"Rar!", "a RAR archive"), (b"SQLite format 3", "an SQLite database"),
                (b"PAR1", "a Parquet file"), (b"{\\rtf", "an RTF document"))
_NUMBERISH = re.compile(r"^[+-]?(\d+[.,]?\d*|[.,]\d+)([eE][+-]?\d+)?$")


@dataclass(frozen=True)
class Provenance:
    """Where a table came from and what happened while reading it."""

    path: str
    sheet: str | None
    sha256: str
    n_rows: int
    n_columns: int
    encoding: str | None = None
    delimiter: str | None = None
    decimal: str | None = None
    warnings: tuple[str, ...] = ()
    header_row: int = 1  # spreadsheet row (1-based) that holds the column names
    # Spreadsheet row number of every kept row (rows left out as empty are skipped).
    row_numbers: np.ndarray | None = field(default=None, repr=False, compare=False)

    @property
    def short_fingerprint(self) -> str:
        return short_fingerprint(self.sha256)

    def to_dict(self) -> dict:
        return {
            "path": self.path,
            "sheet": self.sheet,
            "sha256": self.sha256,
            "n_rows": self.n_rows,
            "n_columns": self.n_columns,
            "encoding": self.encoding,
            "delimiter": self.delimiter,
            "decimal": self.decimal,
            "warnings": list(self.warnings),
            "header_row": self.header_row,
        }


@dataclass(frozen=True)
class LoadedTable:
    """A table as read from disk, plus its provenance."""

    frame: pd.DataFrame = field(repr=False)
    provenance: Provenance

    @property
    def row_numbers(self) -> np.ndarray:
        """Spreadsheet row number of each row of ``frame``, for messages."""
        numbers = self.provenance.row_numbers
        if numbers is None or len(numbers) != len(self.frame):
            return np.arange(len(self.frame)) + self.provenance.header_row + 1
        return numbers


def file_sha256(path: str | Path) -> str:
    """SHA-256 of a file's bytes (read in blocks, never modified)."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def list_sheets(path: str | Path) -> list[str]:
    """Names of the sheets of an XLSX workbook, in workbook order ([] for a text file)."""
    path = Path(path)
    _check_readable(path)
    if _file_kind(path, _read_head(path)) != "xlsx":
        return []
    from .xlsx import sheet_names

    return sheet_names(path)


def read_table(path: str | Path, sheet: str | None = None) -> LoadedTable:
    """Read a CSV/TSV/XLSX file. ``sheet`` picks an XLSX sheet by name (default: the first).

    Raises :class:`InputError` with a message saying what is wrong, where, and how to fix it.
    """
    path = Path(path)
    _check_readable(path)
    head = _read_head(path)
    kind = _file_kind(path, head)
    sha = file_sha256(path)
    if kind == "xlsx":
        from .xlsx import read_sheet

        raw = read_sheet(path, sheet)
        frame, rows, warnings = _tidy(raw.frame, raw.header, raw.row_numbers,
                                      f"{path.name}, sheet {raw.sheet!r}", letters=True)
        provenance = Provenance(
            path=str(path), sheet=raw.sheet, sha256=sha, n_rows=len(frame),
            n_columns=frame.shape[1], warnings=tuple(raw.warnings + warnings),
            header_row=raw.header_row, row_numbers=rows,
        )
        return LoadedTable(frame, provenance)
    if sheet is not None:
        raise InputError(say("read.text_has_no_sheets", file=path.name))
    from .text_table import read_text

    frame, rows, layout, warnings = read_text(path, head)
    provenance = Provenance(
        path=str(path), sheet=None, sha256=sha, n_rows=len(frame), n_columns=frame.shape[1],
        encoding=layout["encoding"], delimiter=layout["delimiter"], decimal=layout["decimal"],
        warnings=tuple(warnings), header_row=layout["header_row"], row_numbers=rows,
    )
    return LoadedTable(frame, provenance)


# --- what kind of file ----------------------------------------------------------------------


def _check_readable(path: Path) -> None:
    if not path.exists():
        raise InputError(say("read.no_file", path=str(path)))
    if path.is_dir():
        raise InputError(say("read.folder", path=str(path)))
    try:
        with open(path, "rb"):
            pass
    except OSError as exc:
        raise InputError(say("read.cannot_open", file=path.name,
                             reason=exc.strerror or type(exc).__name__)) from None
    if path.stat().st_size == 0:
        raise InputError(say("read.zero_bytes", file=path.name))


def _read_head(path: Path) -> bytes:
    with open(path, "rb") as handle:
        return handle.read(_SNIFF_BYTES)


def _file_kind(path: Path, head: bytes) -> str:
    """'xlsx' or 'text'; refuses files that are neither, saying what they look like."""
    suffix = path.suffix.lower()
    if head.startswith(b"PK\x03\x04"):
        if suffix in EXCEL_SUFFIXES:
            return "xlsx"
        if b"xl/" in head[:65536] or b"[Content_Types].xml" in head[:65536]:
            raise InputError(say("read.workbook_with_text_name", file=path.name))
        raise InputError(say("read.other_file", file=path.name, what="a zip archive"))
    if head.startswith(_OLE):
        if b"E\x00n\x00c\x00r\x00y\x00p\x00t\x00e\x00d\x00P\x00a\x00c\x00k\x00a\x00g\x00e" in head:
            raise InputError(say("read.encrypted", file=path.name))
        raise InputError(say("read.ole", file=path.name))
    for signature, what in _OTHER_FILES:
        if head.startswith(signature):
            raise InputError(say("read.other_file", file=path.name, what=what))
    if suffix in EXCEL_SUFFIXES:
        if _looks_textual(head):
            raise InputError(say("read.text_with_workbook_name", file=path.name))
        raise InputError(say("xlsx.damaged", file=path.name))
    return "text"


def _looks_textual(head: bytes) -> bool:
    return b"\x00" not in head[:8192] and _binary_share(head) < 0.01


def _binary_share(head: bytes) -> float:
    """Share of control characters (other than tab, CR, LF, FF) in the first 8 KB."""
    chunk = head[:8192]
    if chunk.startswith((b"\xff\xfe", b"\xfe\xff")):
        text = chunk.decode("utf-16", errors="replace")
    else:
        text = chunk.decode("utf-8", errors="ignore") if _is_utf8(chunk) else \
            chunk.decode("cp1252", errors="replace")
    if not text:
        return 0.0
    control = sum(1 for ch in text if (ord(ch) < 32 and ch not in "\t\r\n\f") or
                  ord(ch) == 0x7F)
    return control / len(text)


def _is_utf8(chunk: bytes) -> bool:
    try:
        chunk.decode("utf-8")
        return True
    except UnicodeDecodeError as exc:
        return exc.start >= len(chunk) - 3  # a character cut at the sample's end is fine


# --- where the header is -------------------------------------------------------------------


def _header_index(records: list[list], width: int, path: Path, where: str = "") -> int:
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


def _span(first: int, count: int) -> str:
    return f"row {first}" if count <= 1 else f"rows {first}–{first + count - 1}"


def column_name_at(position: int, letters: bool) -> str:
    """How a spreadsheet names the column at ``position`` (0-based): 'C' or 'column 3'."""
    if letters:
        from openpyxl.utils import get_column_letter

        return get_column_letter(position + 1)
    return str(position + 1)


def _clean_header(value) -> str:
    if value is None or (isinstance(value, float) and np.isnan(value)):
        return ""
    if isinstance(value, float) and value == int(value):
        value = int(value)
    return re.sub(r"\s+", " ", str(value)).strip()


def _tidy(frame: pd.DataFrame, header: list, rows: np.ndarray, where: str,
          letters: bool = False) -> tuple[pd.DataFrame, np.ndarray, list[str]]:
    """Name columns from ``header``, drop empty rows/columns, and report odd headers."""
    warnings: list[str] = []
    names = [_clean_header(h) for h in header]
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


def _first_line(exc: Exception) -> str:
    return str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
