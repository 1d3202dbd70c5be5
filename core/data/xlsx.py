"""Reading one sheet of an XLSX workbook as the user sees it in the spreadsheet program.

openpyxl streams the cell values (read-only mode, the saved results of formulas). What it does
not report in that mode — hidden rows and columns, merged cells, formulas that were never
calculated — comes from one streaming pass over the sheet's XML with the standard library, so
a large sheet is never held twice in memory. Title rows above the table are recognised and
skipped; numbers stored as text become numbers; error cells (#DIV/0!) become "not recorded";
every one of these is reported with the cells or rows it concerns.
"""

from __future__ import annotations

import io
import re
import zipfile
from dataclasses import dataclass, field
from pathlib import Path
from xml.etree import ElementTree

import numpy as np
import pandas as pd

from ..errors import InputError
from ..messages.message import say
from ..phrases import rows_phrase
from .cells import SPREADSHEET_ERRORS
from .reading_rules import header_index, span

_NS = "{http://schemas.openxmlformats.org/spreadsheetml/2006/main}"
_PLAIN_NUMBER = re.compile(r"^[+-]?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?$|^[+-]?0?\.\d+$")
_HEADER_SCAN = 30


@dataclass(frozen=True)
class SheetRead:
    """The raw cells of one sheet below its header, before headers are tidied."""

    sheet: str
    header: list
    frame: pd.DataFrame = field(repr=False)  # columns 0..k-1
    row_numbers: np.ndarray = field(repr=False)
    header_row: int
    warnings: list[str]


@dataclass
class _SheetXml:
    hidden_rows: set = field(default_factory=set)
    hidden_columns: set = field(default_factory=set)
    merged: list = field(default_factory=list)  # (min_col, min_row, max_col, max_row), 1-based
    formulas: list = field(default_factory=list)  # cell references holding a formula
    uncached: list = field(default_factory=list)  # formula cells without a saved result


MAX_UNPACKED_BYTES = 4 * 2**30  # far above a million rows of fifty columns
MAX_RATIO = 200  # worksheets pack about 5-20 times; a bomb, thousands of times


def _open_workbook(path: Path, data: bytes | None = None):
    from openpyxl import load_workbook

    source = path if data is None else io.BytesIO(data)
    if not zipfile.is_zipfile(source):
        raise InputError(say("xlsx.damaged", file=path.name))
    try:
        with zipfile.ZipFile(source) as archive:
            members = archive.infolist()
    except (zipfile.BadZipFile, OSError, ValueError):
        raise InputError(say("xlsx.damaged", file=path.name)) from None
    names = {m.filename for m in members}
    # An archive that unpacks to far more than any clinical workbook (a "zip bomb") is refused
    # from its own declared sizes, before anything is unpacked.
    unpacked = sum(m.file_size for m in members)
    packed = max(sum(m.compress_size for m in members), 1)
    if unpacked > MAX_UNPACKED_BYTES or (unpacked > 50 * 2**20 and unpacked / packed > MAX_RATIO):
        raise InputError(say("xlsx.too_large_unpacked", file=path.name,
                             mb=f"{unpacked / 2**20:,.0f}", ratio=f"{unpacked / packed:,.0f}"))
    if "xl/workbook.xml" not in names:
        raise InputError(say("xlsx.not_workbook", file=path.name))
    try:
        if data is not None:
            source.seek(0)
        return load_workbook(source, read_only=True, data_only=True)
    except Exception:  # openpyxl raises many kinds for broken files
        raise InputError(say("xlsx.damaged", file=path.name)) from None


def sheet_names(path: str | Path) -> list[str]:
    """Names of the sheets of a workbook, in workbook order."""
    book = _open_workbook(Path(path))
    try:
        return list(book.sheetnames)
    finally:
        book.close()


def read_sheet(path: Path, sheet: str | None, data: bytes | None = None) -> SheetRead:
    """The cells of one sheet (default: the first visible one), with what was interpreted;
    ``data`` (optional) is the file's bytes, already read once by the caller."""
    book = _open_workbook(path, data)
    try:
        return _read(book, path, sheet, data)
    except InputError:
        raise
    except Exception:  # a damaged part only shows while its cells are read
        raise InputError(say("xlsx.damaged", file=path.name)) from None
    finally:
        book.close()


def _read(book, path: Path, sheet: str | None, data: bytes | None) -> SheetRead:
    names = list(book.sheetnames)
    if not names:
        raise InputError(say("xlsx.no_sheets", file=path.name))
    warnings: list[str] = []
    if sheet is None:
        visible = [n for n in names if getattr(book[n], "sheet_state", "visible") == "visible"]
        used = (visible or names)[0]
        if len(names) > 1:
            warnings.append(say("xlsx.several_sheets", file=path.name, n=len(names), sheet=used,
                                others=", ".join(repr(n) for n in names if n != used)[:200]))
    elif sheet in names:
        used = sheet
    else:
        raise InputError(say("xlsx.no_such_sheet", file=path.name, sheet=sheet,
                             sheets=", ".join(repr(n) for n in names)))
    where = f"{path.name}, sheet {used!r}"
    ws = book[used]
    ws.reset_dimensions()
    rows = [tuple(r) for r in ws.iter_rows(min_row=1, min_col=1, values_only=True)]
    xml = _scan_xml(path if data is None else io.BytesIO(data),
                    getattr(ws, "_worksheet_path", None))
    while rows and not any(_filled(v) for v in rows[-1]):
        rows.pop()
    if not rows:
        raise InputError(say("xlsx.empty_sheet", where=where))
    width = max(_last_filled(r) for r in rows[:100_000])
    _fill_merged_headers(rows, xml.merged, limit=_HEADER_SCAN + 2)

    scan = [["" if not _filled(v) else str(v) for v in r] for r in rows[:_HEADER_SCAN]]
    h = header_index(scan, width, path, where)
    header = list(rows[h]) + [None] * (width - len(rows[h]))
    header = header[:width]
    first_data = h + 1
    if h >= 1 and any(m[1] == h and m[2] > m[0] for m in xml.merged):
        # Group names merged across columns in the row above the column names.
        upper = list(rows[h - 1]) + [None] * width
        header = [_join(a, b) for a, b in zip(upper[:width], header)]
        warnings.append(say("xlsx.two_header_rows", where=where, lines=f"rows {h}–{h + 1}"))
        h -= 1
    elif _two_level(rows, h, xml.merged, width):
        lower = list(rows[h + 1]) + [None] * width
        header = [_join(a, b) for a, b in zip(header, lower[:width])]
        first_data = h + 2
        warnings.append(say("xlsx.two_header_rows", where=where, lines=f"rows {h + 1}–{h + 2}"))
    elif any(m[1] <= h + 1 <= m[3] and m[2] > m[0] for m in xml.merged):
        warnings.append(say("xlsx.merged_header", where=where, row=h + 1))
    titles = [r for r in rows[:h] if any(_filled(v) for v in r)]
    if titles:
        title = " ".join(str(v) for v in titles[0] if _filled(v))[:60]
        warnings.append(say("read.title_rows", where=where, lines=span(1, h), title=title,
                            header_row=h + 1))
    body = rows[first_data:]
    numbers = np.arange(first_data + 1, first_data + 1 + len(body), dtype=np.int64)
    columns, notes = _columns(body, numbers, header, width, where)
    warnings.extend(notes)
    frame = pd.DataFrame(dict(enumerate(columns)), index=pd.RangeIndex(len(body)))
    warnings.extend(_structure_notes(xml, numbers, body, header, where))
    return SheetRead(sheet=used, header=header, frame=frame, row_numbers=numbers,
                     header_row=h + 1, warnings=warnings)


def _filled(value) -> bool:
    return value is not None and not (isinstance(value, str) and not value.strip())


def _last_filled(row: tuple) -> int:
    for j in range(len(row) - 1, -1, -1):
        if _filled(row[j]):
            return j + 1
    return 0


def _join(upper, lower) -> str | None:
    parts = [str(v).strip() for v in (upper, lower) if _filled(v)]
    return " ".join(parts) if parts else None


def _two_level(rows: list, h: int, merged: list, width: int) -> bool:
    """A header in two rows: group names merged across columns above the column names."""
    spans = [m for m in merged if m[1] == h + 1 and m[2] > m[0]]
    if not spans or h + 1 >= len(rows):
        return False
    below = [v for v in rows[h + 1][:width] if _filled(v)]
    words = [v for v in below if isinstance(v, str) and not _PLAIN_NUMBER.match(v.strip())]
    return len(below) >= 1 and len(words) == len(below) and len(rows) > h + 2


def _fill_merged_headers(rows: list, merged: list, limit: int) -> None:
    """Spread a merged cell's value across the columns it covers (as the user sees it), in the
    rows near the top where the header is; a vertical merge names only its top cell."""
    for min_col, min_row, max_col, max_row in merged:
        if min_row > limit or min_row > len(rows) or max_col == min_col:
            continue
        cells = list(rows[min_row - 1]) + [None] * max(0, max_col - len(rows[min_row - 1]))
        value = cells[min_col - 1]
        for c in range(min_col, max_col + 1):
            cells[c - 1] = value
        rows[min_row - 1] = tuple(cells)


def _columns(body: list, numbers: np.ndarray, header: list, width: int, where: str):
    """Columns as Series with pandas' types; error cells out, numbers stored as text in."""
    from openpyxl.utils import get_column_letter

    notes: list[str] = []
    errors: list[str] = []
    columns = []
    for j in range(width):
        values = [r[j] if j < len(r) else None for r in body]
        for i, v in enumerate(values):
            if isinstance(v, str) and v.startswith("#") and v.strip().casefold() in \
                    SPREADSHEET_ERRORS | {"#n/a"}:
                errors.append(f"{get_column_letter(j + 1)}{numbers[i]}")
                values[i] = None
            elif isinstance(v, str) and not v.strip():
                values[i] = None
        real = sum(1 for v in values if isinstance(v, (int, float)) and not isinstance(v, bool))
        texts = [i for i, v in enumerate(values) if isinstance(v, str)
                 and _PLAIN_NUMBER.match(v.strip())]
        filled = sum(1 for v in values if v is not None)
        if texts and (real + len(texts)) >= 0.5 * filled:
            for i in texts:
                values[i] = float(values[i].strip())
            name = header[j] if _filled(header[j]) else get_column_letter(j + 1)
            cells = ", ".join(f"{get_column_letter(j + 1)}{numbers[i]}" for i in texts[:5])
            notes.append(say("xlsx.numbers_as_text", where=where, n=len(texts), column=name,
                             cells=cells + (" …" if len(texts) > 5 else "")))
        columns.append(pd.Series(values, dtype=object).infer_objects())
    if errors:
        notes.append(say("xlsx.error_cells", where=where, n=len(errors),
                         cells=", ".join(errors[:6]) + (" …" if len(errors) > 6 else "")))
    return columns, notes


def _structure_notes(xml: _SheetXml, numbers: np.ndarray, body: list, header: list,
                     where: str) -> list[str]:
    from openpyxl.utils import column_index_from_string

    notes = []
    filled_rows = {int(n) for n, r in zip(numbers, body) if any(_filled(v) for v in r)}
    hidden = sorted(r for r in xml.hidden_rows if r in filled_rows)
    if hidden:
        notes.append(say("xlsx.hidden_rows", where=where, n=len(hidden),
                         rows=rows_phrase(hidden)))
    hidden_cols = [header[c - 1] for c in sorted(xml.hidden_columns)
                   if c - 1 < len(header) and _filled(header[c - 1])]
    if hidden_cols:
        notes.append(say("xlsx.hidden_columns", where=where,
                         columns=", ".join(repr(str(c)) for c in hidden_cols[:8])))
    if xml.uncached:
        notes.append(say("xlsx.uncalculated", where=where, n=len(xml.uncached),
                         cells=", ".join(xml.uncached[:6]) + (" …" if len(xml.uncached) > 6
                                                              else "")))
    uncached = set(xml.uncached)
    cached = [ref for ref in xml.formulas if ref not in uncached]
    if cached:
        letters = sorted({re.match(r"[A-Z]+", ref).group(0) for ref in cached
                          if re.match(r"[A-Z]+", ref)}, key=column_index_from_string)
        names = [str(header[column_index_from_string(c) - 1]) for c in letters
                 if column_index_from_string(c) - 1 < len(header)
                 and _filled(header[column_index_from_string(c) - 1])]
        if names:
            notes.append(say("xlsx.formulas", where=where,
                             columns=", ".join(repr(n) for n in names[:8])))
    return notes


def _scan_xml(path, member: str | None) -> _SheetXml:
    """Hidden rows/columns, merged ranges and uncalculated formulas, from the sheet's XML."""
    from openpyxl.utils.cell import range_boundaries

    found = _SheetXml()
    if not member:
        return found
    member = member.lstrip("/")
    with zipfile.ZipFile(path) as archive:
        if member not in archive.namelist():
            return found
        with archive.open(member) as source:
            for _, elem in ElementTree.iterparse(source, events=("end",)):
                tag = elem.tag
                if tag == _NS + "c":
                    formula = elem.find(_NS + "f")
                    if formula is not None:
                        ref = elem.get("r") or ""
                        found.formulas.append(ref)
                        value = elem.find(_NS + "v")
                        if value is None or (value.text is None and elem.get("t") != "str"):
                            found.uncached.append(ref)
                    elem.clear()
                elif tag == _NS + "row":
                    if elem.get("hidden") in ("1", "true") and elem.get("r"):
                        found.hidden_rows.add(int(elem.get("r")))
                    elem.clear()
                elif tag == _NS + "col":
                    if elem.get("hidden") in ("1", "true"):
                        low, high = int(elem.get("min", 0)), int(elem.get("max", 0))
                        found.hidden_columns.update(range(low, min(high, low + 500) + 1))
                elif tag == _NS + "mergeCell" and elem.get("ref"):
                    try:
                        found.merged.append(range_boundaries(elem.get("ref")))
                    except (ValueError, TypeError):
                        pass
    return found
