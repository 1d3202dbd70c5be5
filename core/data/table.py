"""Reading a spreadsheet (CSV, TSV, XLSX) into a DataFrame, with provenance.

The source file is only ever opened for reading. Cells keep their raw form here (numbers that
pandas recognises become numbers, everything else stays text); turning text into values is
the data dictionary's job (core/dictionary/columns.py), so one parser serves every file type.

Text files are read by core/data/text_table.py, workbooks by core/data/xlsx.py; both follow
the rules of core/data/reading_rules.py for where the header is and for tidying headers and
empty rows. Every kept row remembers its row number in the spreadsheet, so messages can say
where.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import InputError
from ..messages.message import say
from ..phrases import short_fingerprint
from .reading_rules import SAMPLE_BYTES, binary_share, tidy
from .text_table import read_text, read_text_bytes
from .xlsx import read_sheet, sheet_names

TEXT_SUFFIXES = {".csv", ".tsv", ".txt", ".tab"}
EXCEL_SUFFIXES = {".xlsx", ".xlsm"}
_OLE = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"
_OTHER_FILES = ((b"%PDF", "a PDF document"), (b"\x89PNG", "a PNG image"),
                (b"\xff\xd8\xff", "a JPEG image"), (b"GIF8", "a GIF image"),
                (b"\x1f\x8b", "a gzip-compressed file"), (b"7z\xbc\xaf", "a 7-Zip archive"),
                (b"Rar!", "a RAR archive"), (b"SQLite format 3", "an SQLite database"),
                (b"PAR1", "a Parquet file"), (b"{\\rtf", "an RTF document"))


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
    return sheet_names(path)


def read_table(path: str | Path, sheet: str | None = None) -> LoadedTable:
    """Read a CSV/TSV/XLSX file. ``sheet`` picks an XLSX sheet by name (default: the first).

    Raises :class:`InputError` with a message saying what is wrong, where, and how to fix it.
    """
    path = Path(path)
    _check_readable(path)
    head = _read_head(path)
    kind = _file_kind(path, head)
    # The file is read once: the fingerprint is of exactly the bytes parsed, even if the file
    # is written to while it is read.
    data = _read_workbook_bytes(path) if kind == "xlsx" else read_text_bytes(path)
    sha = hashlib.sha256(data).hexdigest()
    if kind == "xlsx":
        raw = read_sheet(path, sheet, data)
        frame, rows, warnings = tidy(raw.frame, raw.header, raw.row_numbers,
                                      f"{path.name}, sheet {raw.sheet!r}", letters=True)
        provenance = Provenance(
            path=str(path), sheet=raw.sheet, sha256=sha, n_rows=len(frame),
            n_columns=frame.shape[1], warnings=tuple(raw.warnings + warnings),
            header_row=raw.header_row, row_numbers=rows,
        )
        return LoadedTable(frame, provenance)
    if sheet is not None:
        raise InputError(say("read.text_has_no_sheets", file=path.name))
    frame, rows, layout, warnings = read_text(path, data)
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
    if not path.is_file():  # a pipe or device never ends: refused before it is opened
        raise InputError(say("read.not_regular", file=path.name))
    try:
        with open(path, "rb"):
            pass
    except OSError as exc:
        raise InputError(say("read.cannot_open", file=path.name,
                             reason=exc.strerror or type(exc).__name__)) from None
    if path.stat().st_size == 0:
        raise InputError(say("read.zero_bytes", file=path.name))


def _read_workbook_bytes(path: Path) -> bytes:
    try:
        return path.read_bytes()
    except MemoryError:
        raise InputError(say("read.too_big", file=path.name)) from None


def _read_head(path: Path) -> bytes:
    with open(path, "rb") as handle:
        return handle.read(SAMPLE_BYTES)


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
    return b"\x00" not in head[:8192] and binary_share(head) < 0.01
