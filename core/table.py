"""Reading a spreadsheet (CSV, TSV, XLSX) into a DataFrame, with provenance.

The source file is only ever opened for reading. Cells keep their raw form here (numbers that
pandas recognises become numbers, everything else stays text); turning text into values is
the data dictionary's job (core/variables.py), so one parser serves every file type.
"""

from __future__ import annotations

import codecs
import csv
import hashlib
import re
from dataclasses import dataclass, field
from pathlib import Path

import pandas as pd

from .errors import InputError

TEXT_SUFFIXES = {".csv", ".tsv", ".txt", ".tab"}
EXCEL_SUFFIXES = {".xlsx", ".xlsm"}
_SNIFF_BYTES = 256 * 1024
_DECIMAL_COMMA = re.compile(r"(?:^|[;\t|])\s*-?\d+,\d+\s*(?=[;\t|]|$)", re.MULTILINE)


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

    @property
    def short_fingerprint(self) -> str:
        return self.sha256[:12]

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
        }


@dataclass(frozen=True)
class LoadedTable:
    """A table as read from disk, plus its provenance."""

    frame: pd.DataFrame = field(repr=False)
    provenance: Provenance


def file_sha256(path: str | Path) -> str:
    """SHA-256 of a file's bytes (read in blocks, never modified)."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def list_sheets(path: str | Path) -> list[str]:
    """Names of the sheets of an XLSX workbook, in workbook order."""
    path = Path(path)
    _check_readable(path)
    if path.suffix.lower() not in EXCEL_SUFFIXES:
        return []
    from openpyxl import load_workbook

    try:
        book = load_workbook(path, read_only=True, data_only=True)
    except Exception as exc:  # openpyxl raises many kinds for broken files
        raise InputError(_broken_excel_message(path, exc)) from None
    try:
        return list(book.sheetnames)
    finally:
        book.close()


def read_table(path: str | Path, sheet: str | None = None) -> LoadedTable:
    """Read a CSV/TSV/XLSX file. ``sheet`` picks an XLSX sheet by name (default: the first)."""
    path = Path(path)
    _check_readable(path)
    sha = file_sha256(path)
    suffix = path.suffix.lower()
    head = _read_head(path)
    if head.startswith(b"PK\x03\x04") and suffix not in EXCEL_SUFFIXES:
        raise InputError(
            f"{path.name} is an Excel workbook saved under a text name; rename it to end in "
            ".xlsx, or save it from the spreadsheet program as CSV."
        )
    if suffix in EXCEL_SUFFIXES or head.startswith(b"PK\x03\x04"):
        frame, used_sheet, warnings = _read_excel(path, sheet)
        provenance = Provenance(
            path=str(path), sheet=used_sheet, sha256=sha, n_rows=len(frame),
            n_columns=frame.shape[1], warnings=tuple(warnings),
        )
        return LoadedTable(frame, provenance)
    if sheet is not None:
        raise InputError(
            f"{path.name} is a text file and has no sheets; leave out the sheet name."
        )
    frame, encoding, delimiter, decimal, warnings = _read_text(path, head)
    provenance = Provenance(
        path=str(path), sheet=None, sha256=sha, n_rows=len(frame), n_columns=frame.shape[1],
        encoding=encoding, delimiter=delimiter, decimal=decimal, warnings=tuple(warnings),
    )
    return LoadedTable(frame, provenance)


# --- text files -----------------------------------------------------------------------------


def _check_readable(path: Path) -> None:
    if not path.exists():
        raise InputError(f"No file at {path}; check the path and the file name.")
    if path.is_dir():
        raise InputError(f"{path} is a folder; choose a spreadsheet file inside it.")


def _read_head(path: Path) -> bytes:
    with open(path, "rb") as handle:
        return handle.read(_SNIFF_BYTES)


def _detect_encoding(head: bytes, path: Path) -> tuple[str, list[str]]:
    if head.startswith(b"\xef\xbb\xbf"):
        return "utf-8-sig", []
    if head.startswith((b"\xff\xfe", b"\xfe\xff")):
        return "utf-16", ["The file is UTF-16 encoded; it was read as such."]
    try:
        # A cut in the middle of a multi-byte character at the sample's end is not an error.
        head.decode("utf-8")
        whole_ok = True
    except UnicodeDecodeError as exc:
        whole_ok = exc.start >= len(head) - 3
    if whole_ok:
        try:
            _decode_whole(path, "utf-8")
            return "utf-8", []
        except UnicodeDecodeError:
            pass
    try:
        _decode_whole(path, "cp1252")
        return "cp1252", [
            f"{path.name} is not UTF-8; it was read as Windows-1252 (Western European). "
            "If accented letters look wrong, save the file as UTF-8 and open it again."
        ]
    except UnicodeDecodeError:
        return "latin-1", [
            f"{path.name} is not UTF-8; it was read as Latin-1. If letters look wrong, save "
            "the file as UTF-8 and open it again."
        ]


def _decode_whole(path: Path, encoding: str) -> None:
    decoder = codecs.getincrementaldecoder(encoding)()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 22), b""):
            decoder.decode(block)
    decoder.decode(b"", final=True)


def _sniff(sample: str, path: Path) -> tuple[str, str, list[str]]:
    """Delimiter and decimal separator of a text table."""
    warnings: list[str] = []
    lines = [line for line in sample.splitlines() if line.strip()][:50]
    if not lines:
        raise InputError(f"{path.name} is empty; choose a file that holds a table.")
    text = "\n".join(lines)
    delimiter = None
    try:
        delimiter = csv.Sniffer().sniff(text, delimiters=",;\t|").delimiter
    except csv.Error:
        pass
    if delimiter is None:
        # Sniffer gives up on one-column files and on ragged ones; count on the header.
        counts = {d: lines[0].count(d) for d in ",;\t|"}
        best = max(counts, key=counts.get)
        delimiter = best if counts[best] > 0 else ","
    decimal = "."
    if delimiter in ";\t|" and _DECIMAL_COMMA.search(text):
        decimal = ","
    return delimiter, decimal, warnings


def _read_text(path: Path, head: bytes):
    if b"\x00" in head[:8192] and not head.startswith((b"\xff\xfe", b"\xfe\xff")):
        raise InputError(
            f"{path.name} does not look like a text spreadsheet (it holds binary data); "
            "open the original file or save it as CSV from the spreadsheet program."
        )
    if not head.strip():
        raise InputError(f"{path.name} is empty; choose a file that holds a table.")
    encoding, warnings = _detect_encoding(head, path)
    sample = head.decode(encoding if encoding != "utf-8-sig" else "utf-8-sig", errors="ignore")
    delimiter, decimal, more = _sniff(sample, path)
    warnings += more
    try:
        frame = pd.read_csv(
            path, sep=delimiter, decimal=decimal, encoding=encoding, keep_default_na=False,
            na_values=[""], skip_blank_lines=True, engine="c", low_memory=False,
        )
    except pd.errors.EmptyDataError:
        raise InputError(f"{path.name} is empty; choose a file that holds a table.") from None
    except pd.errors.ParserError as exc:
        raise InputError(
            f"{path.name} could not be read as a table ({_first_line(exc)}); check that every "
            "row has the same number of cells, or save the sheet again as CSV."
        ) from None
    frame, tidy = _tidy(frame, path.name)
    return frame, encoding, delimiter, decimal, warnings + tidy


# --- workbooks ------------------------------------------------------------------------------


def _broken_excel_message(path: Path, exc: Exception) -> str:
    text = str(exc).lower()
    if "encrypt" in text or "password" in text:
        return (
            f"{path.name} is protected with a password; remove the protection in the "
            "spreadsheet program and save a copy."
        )
    return (
        f"{path.name} could not be opened as an Excel workbook (the file is damaged or not "
        "really XLSX); open it in the spreadsheet program and save it again, or save as CSV."
    )


def _read_excel(path: Path, sheet: str | None):
    import zipfile

    with open(path, "rb") as handle:
        signature = handle.read(8)
    if signature.startswith(b"\xd0\xcf\x11\xe0"):
        # An OLE container in .xlsx clothing is how password-protected workbooks are stored.
        raise InputError(
            f"{path.name} is protected with a password (or is an old .xls file); remove the "
            "protection or save it as .xlsx in the spreadsheet program."
        )
    if not zipfile.is_zipfile(path):
        raise InputError(_broken_excel_message(path, ValueError("not a zip")))
    sheets = list_sheets(path)
    if not sheets:
        raise InputError(f"{path.name} holds no sheets; choose another workbook.")
    if sheet is None:
        used = sheets[0]
    elif sheet in sheets:
        used = sheet
    else:
        raise InputError(
            f"{path.name} has no sheet called {sheet!r}; its sheets are: "
            + ", ".join(repr(s) for s in sheets) + "."
        )
    try:
        frame = pd.read_excel(path, sheet_name=used, engine="openpyxl", keep_default_na=False,
                              na_values=[""])
    except Exception as exc:
        raise InputError(_broken_excel_message(path, exc)) from None
    frame, warnings = _tidy(frame, f"{path.name}, sheet {used!r}")
    if len(sheets) > 1 and sheet is None:
        warnings.insert(0, f"The workbook has {len(sheets)} sheets; the first, {used!r}, was "
                           "read. Choose another sheet by name if that is not the data.")
    return frame, used, warnings


# --- common tidying -------------------------------------------------------------------------


def _tidy(frame: pd.DataFrame, where: str) -> tuple[pd.DataFrame, list[str]]:
    """Drop fully empty trailing rows/columns and report odd headers."""
    warnings: list[str] = []
    empty_cols = [c for c in frame.columns if str(c).startswith("Unnamed:") and
                  frame[c].isna().all()]
    if empty_cols:
        frame = frame.drop(columns=empty_cols)
        warnings.append(f"{len(empty_cols)} empty column(s) without a header were left out.")
    before = len(frame)
    frame = frame.dropna(how="all")
    if len(frame) < before:
        warnings.append(f"{before - len(frame)} empty row(s) were left out.")
    frame = frame.reset_index(drop=True)
    names = [str(c) for c in frame.columns]
    blank = [i + 1 for i, c in enumerate(names) if c.startswith("Unnamed:")]
    if blank:
        warnings.append(
            "Column(s) " + ", ".join(map(str, blank)) + " have no header; they were named "
            "'column N'. Give every column a header in the spreadsheet to name them yourself."
        )
        names = [f"column {i + 1}" if c.startswith("Unnamed:") else c for i, c in enumerate(names)]
    stripped = [c.strip() for c in names]
    seen: dict[str, int] = {}
    final = []
    for name in stripped:
        if name in seen:
            seen[name] += 1
            new = f"{name} ({seen[name]})"
            warnings.append(f"The header {name!r} appears more than once; the repeat was "
                            f"renamed {new!r}. Rename one of them in the spreadsheet.")
            final.append(new)
        else:
            seen[name] = 1
            final.append(name)
    frame.columns = final
    if frame.shape[1] == 0:
        raise InputError(f"{where} holds no columns; choose a file that holds a table.")
    if len(frame) == 0:
        raise InputError(
            f"{where} has a header but no rows of data; choose the file that holds the patients."
        )
    return frame, warnings


def _first_line(exc: Exception) -> str:
    return str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__

