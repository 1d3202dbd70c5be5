"""Reading a spreadsheet (CSV, TSV, XLSX) into a DataFrame, with provenance.

The source file is only ever opened for reading. Cells keep their raw form here (numbers that
pandas recognises become numbers, everything else stays text); turning text into values is
the data dictionary's job (core/variables.py), so one parser serves every file type.

Text files are read by pandas' C parser in one pass; the layout (delimiter, decimal mark,
where the header is) is worked out from the first 256 KB with the standard ``csv`` module.
Every kept row remembers its row number in the spreadsheet, so messages can say where.
"""

from __future__ import annotations

import codecs
import csv
import hashlib
import io
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from .errors import InputError
from .messages import say
from .values import rows_phrase

TEXT_SUFFIXES = {".csv", ".tsv", ".txt", ".tab"}
EXCEL_SUFFIXES = {".xlsx", ".xlsm"}
_SNIFF_BYTES = 256 * 1024
_DELIMITERS = (",", ";", "\t", "|")
_DELIMITER_NAMES = {",": "commas", ";": "semicolons", "\t": "tabs", "|": "bars (|)"}
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
        return self.sha256[:12]

    def row_of(self, position: int) -> int:
        """The spreadsheet row number of the table's row at ``position`` (0-based)."""
        if self.row_numbers is not None:
            return int(self.row_numbers[position])
        return self.header_row + 1 + int(position)

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
    frame, rows, layout, warnings = _read_text(path, head)
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


# --- text files -----------------------------------------------------------------------------


def _detect_encoding(head: bytes, path: Path) -> tuple[str, list[str]]:
    if head.startswith(b"\xef\xbb\xbf"):
        return "utf-8-sig", []
    if head.startswith((b"\xff\xfe", b"\xfe\xff")):
        return "utf-16", [say("read.utf16", file=path.name)]
    bad = _first_bad_byte(path, "utf-8")
    if bad is None:
        return "utf-8", []
    line = _line_of_offset(path, bad)
    if _first_bad_byte(path, "cp1252") is None:
        return "cp1252", [say("read.cp1252", file=path.name, line=line)]
    return "latin-1", [say("read.latin1", file=path.name, line=line)]


def _first_bad_byte(path: Path, encoding: str) -> int | None:
    """Offset of the first byte that does not decode, or None if the whole file decodes."""
    decoder = codecs.getincrementaldecoder(encoding)()
    offset = 0
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 22), b""):
            try:
                decoder.decode(block)
            except UnicodeDecodeError as exc:
                return offset + max(exc.start, 0)
            offset += len(block)
    try:
        decoder.decode(b"", final=True)
    except UnicodeDecodeError:
        return offset
    return None


def _line_of_offset(path: Path, offset: int) -> int:
    with open(path, "rb") as handle:
        return handle.read(offset).count(b"\n") + 1


def _layout(sample: str, truncated: bool, path: Path) -> dict:
    """Delimiter, header position and decimal mark of a text table, from its first records."""
    best = None
    for delimiter in _DELIMITERS:
        try:
            records = list(csv.reader(io.StringIO(sample, newline=""), delimiter=delimiter))
        except csv.Error:
            continue
        if truncated and len(records) > 1:
            records = records[:-1]  # the sample may end inside the last record
        filled = [r for r in records if any(c.strip() for c in r)]
        if not filled:
            raise InputError(say("read.zero_bytes", file=path.name))
        widths = pd.Series([len(r) for r in filled[:200]])
        width = int(widths.mode().max())
        share = float((widths == width).mean())
        score = (share if width > 1 else 0.0, width)
        if best is None or score > best[0]:
            best = (score, delimiter, records, width)
    if best is None:
        raise InputError(say("read.unparseable", file=path.name, detail="no delimiter fits"))
    _, delimiter, records, width = best
    header_index = _header_index(records, width, path)
    header = records[header_index]
    data = [r for r in records[header_index + 1:] if any(c.strip() for c in r)][:200]
    decimal = "."
    if delimiter != ",":
        cells = [c.strip() for r in data for c in r]
        commas = sum(1 for c in cells if re.fullmatch(r"[+-]?\d+,\d+", c))
        points = sum(1 for c in cells if re.fullmatch(r"[+-]?\d+\.\d+", c))
        if commas and commas >= points:
            decimal = ","
    return {"delimiter": delimiter, "header_index": header_index, "header": header,
            "decimal": decimal, "header_row": header_index + 1,
            "titles": [r for r in records[:header_index] if any(c.strip() for c in r)]}


def _header_index(records: list[list], width: int, path: Path, where: str = "") -> int:
    """The first record that looks like column names: filled enough, and mostly words."""
    where = where or path.name
    need = max(1, int(np.ceil(0.5 * width)))
    for index, record in enumerate(records[:30]):
        cells = [str(c).strip() for c in record if c is not None and str(c).strip()]
        if len(cells) < need:
            continue
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


def _read_text(path: Path, head: bytes):
    if head.strip(b" \t\r\n\x00\xef\xbb\xbf") == b"":
        raise InputError(say("read.blank", file=path.name))
    if not head.startswith((b"\xff\xfe", b"\xfe\xff")) and (b"\x00" in head[:8192]):
        raise InputError(say("read.binary", file=path.name))
    if _binary_share(head) > 0.01:
        raise InputError(say("read.binary", file=path.name))
    lowered = head[:512].lstrip().lower()
    if lowered.startswith((b"<!doctype html", b"<html", b"<table", b"<?xml")):
        raise InputError(say("read.html", file=path.name))
    encoding, warnings = _detect_encoding(head, path)
    sample = head.decode("utf-16" if encoding == "utf-16" else encoding, errors="ignore")
    sample = sample.lstrip("\ufeff")
    truncated = path.stat().st_size > len(head)
    layout = _layout(sample, truncated, path)
    layout["encoding"] = encoding
    if path.suffix.lower() == ".xls":
        warnings.append(say("read.xls_text", file=path.name))
    if layout["titles"]:
        warnings.append(say("read.title_rows", where=path.name,
                            lines=_span(1, layout["header_index"]),
                            title=" ".join(c.strip() for c in layout["titles"][0] if c.strip())[:60],
                            header_row=layout["header_row"]))
    delimiter, decimal = layout["delimiter"], layout["decimal"]
    if delimiter != "," or decimal != ".":
        warnings.append(say("read.layout", file=path.name,
                            delimiter=_DELIMITER_NAMES[delimiter],
                            decimal="a comma" if decimal == "," else "a point"))
    try:
        frame = pd.read_csv(
            path, sep=delimiter, decimal=decimal, encoding=encoding, header=layout["header_index"],
            index_col=False, keep_default_na=False, na_values=[""], skip_blank_lines=False,
            engine="c", low_memory=False, encoding_errors="replace",
        )
    except pd.errors.EmptyDataError:
        raise InputError(say("read.blank", file=path.name)) from None
    except pd.errors.ParserError as exc:
        raise InputError(_parser_message(path, exc, delimiter)) from None
    except MemoryError:
        raise InputError(say("read.too_big", file=path.name)) from None
    except (UnicodeDecodeError, ValueError, OverflowError) as exc:
        raise InputError(say("read.unparseable", file=path.name, detail=_first_line(exc))) from None
    header = list(layout["header"])
    if len(header) != frame.shape[1]:
        header = ["" if str(c).startswith("Unnamed:") else str(c) for c in frame.columns]
    rows = np.arange(len(frame)) + layout["header_row"] + 1
    frame, rows, tidy = _tidy(frame, header, rows, path.name)
    return frame, rows, layout, warnings + tidy


def _parser_message(path: Path, exc: Exception, delimiter: str) -> str:
    text = str(exc)
    match = re.search(r"Expected (\d+) fields in line (\d+), saw (\d+)", text)
    if match:
        expected, line, saw = match.groups()
        return say("read.ragged", file=path.name, line=line, saw=saw, expected=expected,
                   delimiter=_DELIMITER_NAMES[delimiter])
    match = re.search(r"EOF inside string starting at row (\d+)", text)
    if match:
        return say("read.open_quote", file=path.name, line=int(match.group(1)) + 1)
    return say("read.unparseable", file=path.name, detail=_first_line(exc))


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
    kept = [j for j in range(len(names)) if j not in set(drop)]
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
