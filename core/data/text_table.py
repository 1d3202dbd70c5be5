"""Reading a text table (CSV, TSV, semicolon- or bar-separated) with pandas' C parser.

The file's bytes are read once (stopping at a line longer than any table has), and everything
below works on those bytes, so what is fingerprinted is what is parsed. The layout — encoding,
delimiter, decimal mark, where the header is — is worked out from the first 256 KB with the
standard ``csv`` module, then pandas reads the whole file in one pass with numeric inference
(no per-cell Python). The whole file is checked to be UTF-8 before it is read as such;
otherwise Windows-1252 or Latin-1 is used, and the warning says on which line the first other
character is.
"""

from __future__ import annotations

import codecs
import csv
import io
import re
import warnings as warnings_module
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import InputError
from ..messages.message import say
from ..phrases import rows_phrase
from .reading_rules import SAMPLE_BYTES, binary_share, first_line, header_index, span, tidy

_DELIMITERS = (",", ";", "\t", "|")
# The longest line read: far above any row of a clinical table (a few MB of notes in one cell
# still fits), far below a file that lost its line breaks, which is refused at this point
# instead of being read for minutes.
LONGEST_LINE_BYTES = 16 * 2**20
_BLOCK = 1 << 20  # read in blocks of 1 MB (smaller than the longest line)
_DELIMITER_NAMES = {",": "commas", ";": "semicolons", "\t": "tabs", "|": "bars (|)"}


def read_text_bytes(path: Path) -> bytes:
    """A text file's bytes, read once in blocks; a line longer than ``LONGEST_LINE_BYTES``
    stops the reading there (so memory stays bounded) with a message naming its row."""
    blocks = []
    lines = 0  # line breaks read so far
    run = 0  # bytes since the last line break
    try:
        with open(path, "rb") as handle:
            for block in iter(lambda: handle.read(_BLOCK), b""):
                first = block.find(b"\n")
                if first < 0:
                    run += len(block)
                else:
                    if run + first > LONGEST_LINE_BYTES:
                        break
                    lines += block.count(b"\n")
                    run = len(block) - block.rfind(b"\n") - 1
                if run > LONGEST_LINE_BYTES:
                    break
                blocks.append(block)
            else:
                return b"".join(blocks)
    except MemoryError:
        raise InputError(say("read.too_big", file=path.name)) from None
    raise InputError(say("read.line_too_long", file=path.name, row=lines + 1,
                         mb=LONGEST_LINE_BYTES // 2**20))


def _detect_encoding(data: bytes, path: Path) -> tuple[str, list[str]]:
    if data.startswith(b"\xef\xbb\xbf"):
        return "utf-8-sig", []
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        return "utf-16", [say("read.utf16", file=path.name)]
    bad = _first_bad_byte(data, "utf-8")
    if bad is None:
        return "utf-8", []
    line = data.count(b"\n", 0, bad) + 1
    if _first_bad_byte(data, "cp1252") is None:
        return "cp1252", [say("read.cp1252", file=path.name, line=line)]
    return "latin-1", [say("read.latin1", file=path.name, line=line)]


def _first_bad_byte(data: bytes, encoding: str) -> int | None:
    """Offset of the first byte that does not decode, or None if all of ``data`` decodes."""
    decoder = codecs.getincrementaldecoder(encoding)()
    view = memoryview(data)
    step = 1 << 22
    for offset in range(0, len(data), step):
        try:
            decoder.decode(view[offset:offset + step])
        except UnicodeDecodeError as exc:
            return offset + max(exc.start, 0)
    try:
        decoder.decode(b"", final=True)
    except UnicodeDecodeError:
        return len(data)
    return None


def _records(sample: str, delimiter: str) -> list[list[str]]:
    """The sample's records, up to the first one the csv module cannot take (a cell larger
    than its field limit, or one that runs past the sample's end): the layout is judged on
    whole records, and pandas reads the rest."""
    records = []
    reader = csv.reader(io.StringIO(sample, newline=""), delimiter=delimiter)
    while True:
        try:
            records.append(next(reader))
        except StopIteration:
            return records
        except csv.Error:
            records.append(None)  # marks where the sample stopped being readable
            return records


def _layout(sample: str, truncated: bool, path: Path) -> dict:
    """Delimiter, header position and decimal mark of a text table, from its first records."""
    best = None
    for delimiter in _DELIMITERS:
        records = _records(sample, delimiter)
        if records and records[-1] is None:
            records = records[:-1]  # stopped at a record the csv module could not take
        elif truncated and len(records) > 1:
            records = records[:-1]  # the sample may end inside the last record
        if not records:
            continue
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
    at = header_index(records, width, path)
    header = records[at]
    data = [r for r in records[at + 1:] if any(c.strip() for c in r)][:200]
    decimal = "."
    if delimiter != ",":
        cells = [c.strip() for r in data for c in r]
        commas = sum(1 for c in cells if re.fullmatch(r"[+-]?\d+,\d+", c))
        points = sum(1 for c in cells if re.fullmatch(r"[+-]?\d+\.\d+", c))
        if commas and commas >= points:
            decimal = ","
    return {"delimiter": delimiter, "header_index": at, "header": header,
            "records": records[at + 1:at + 201],
            "decimal": decimal, "header_row": at + 1,
            "titles": [r for r in records[:at] if any(c.strip() for c in r)]}


_BOM = b"\xef\xbb\xbf"
# NUL bytes a text table may hold by accident (a damaged export) and still be read: a few, or
# one in a thousand bytes; a binary file, or UTF-16 without its mark, holds far more.
_FEW_NULS = 10
_NUL_SHARE = 0.001


def _line_numbers(data: bytes, marker: bytes, skip: int = 0, limit: int = 2000) -> list[int]:
    """The distinct line numbers (1-based) of the first ``limit`` places ``marker`` occurs
    (after the first ``skip`` bytes), counting line breaks once from the start."""
    lines, last, at, found = 1, 0, skip, []
    while len(found) < limit:
        at = data.find(marker, at)
        if at < 0:
            break
        lines += data.count(b"\n", last, at)
        last = at
        if not found or found[-1] != lines:
            found.append(lines)
        at += len(marker)
    return found


def _stray_marks(data: bytes, path: Path) -> tuple[bytes, list[str]]:
    """A byte-order mark inside the file (two exports pasted together) and a few NUL bytes
    (a damaged export) are taken out, with a note naming the rows: left in, they would make
    'yes' and a 'yes' with an invisible mark two answers."""
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        return data, []
    notes = []
    start = len(_BOM) if data.startswith(_BOM) else 0
    if data.find(_BOM, start) >= 0:
        rows = _line_numbers(data, _BOM, start)
        data = data[:start] + data[start:].replace(_BOM, b"")
        notes.append(say("read.stray_bom", file=path.name,
                         rows=rows_phrase(rows, word="file line")))
    nuls = data.count(b"\x00")
    if nuls:
        if nuls > max(_FEW_NULS, _NUL_SHARE * len(data)):
            raise InputError(say("read.binary", file=path.name))
        rows = _line_numbers(data, b"\x00")
        data = data.replace(b"\x00", b"")
        notes.append(say("read.nul_bytes", file=path.name,
                         rows=rows_phrase(rows, word="file line")))
    return data, notes


def read_text(path: Path, data: bytes):
    """A text table's frame, spreadsheet row numbers, layout and warnings, from the file's
    bytes ``data`` (read once by :func:`read_text_bytes`; the fingerprint is of those bytes,
    and stray marks are taken out of what is parsed, with a note)."""
    head = data[:SAMPLE_BYTES]
    if head.strip(b" \t\r\n\x00\xef\xbb\xbf") == b"":
        raise InputError(say("read.blank", file=path.name))
    data, marks = _stray_marks(data, path)
    head = data[:SAMPLE_BYTES]
    if binary_share(head) > 0.01:
        raise InputError(say("read.binary", file=path.name))
    lowered = head[:512].lstrip().lower()
    if lowered.startswith((b"<!doctype html", b"<html", b"<table", b"<?xml")):
        raise InputError(say("read.html", file=path.name))
    encoding, warnings = _detect_encoding(data, path)
    warnings.extend(marks)
    sample = head.decode("utf-16" if encoding == "utf-16" else encoding, errors="ignore")
    sample = sample.lstrip("\ufeff")
    truncated = len(data) > len(head)
    layout = _layout(sample, truncated, path)
    layout["encoding"] = encoding
    if path.suffix.lower() == ".xls":
        warnings.append(say("read.xls_text", file=path.name))
    if layout["titles"]:
        warnings.append(say("read.title_rows", where=path.name,
                            lines=span(1, layout["header_index"]),
                            title=" ".join(c.strip() for c in layout["titles"][0] if c.strip())[:60],
                            header_row=layout["header_row"]))
    delimiter, decimal = layout["delimiter"], layout["decimal"]
    if delimiter != "," or decimal != ".":
        warnings.append(say("read.layout", file=path.name,
                            delimiter=_DELIMITER_NAMES[delimiter],
                            decimal="a comma" if decimal == "," else "a point"))
    options = dict(sep=delimiter, decimal=decimal, encoding=encoding, index_col=False,
                   keep_default_na=False, na_values=[""], skip_blank_lines=False, engine="c",
                   low_memory=False, encoding_errors="replace")
    try:
        with warnings_module.catch_warnings(record=True) as caught:
            warnings_module.simplefilter("always", pd.errors.ParserWarning)
            frame = pd.read_csv(io.BytesIO(data), header=layout["header_index"], **options)
        if any(issubclass(w.category, pd.errors.ParserWarning) for w in caught):
            # Data rows wider than the header: pandas would drop the extra cells silently.
            frame = _wider_than_header(path, data, layout, options, delimiter)
    except pd.errors.EmptyDataError:
        raise InputError(say("read.blank", file=path.name)) from None
    except pd.errors.ParserError as exc:
        raise _parser_error(path, exc, delimiter) from None
    except MemoryError:
        raise InputError(say("read.too_big", file=path.name)) from None
    except (UnicodeDecodeError, ValueError, OverflowError) as exc:
        raise InputError(say("read.unparseable", file=path.name, detail=first_line(exc))) from None
    header = list(layout["header"])
    if len(header) != frame.shape[1]:
        header = ["" if str(c).startswith("Unnamed:") else str(c) for c in frame.columns]
    rows = np.arange(len(frame)) + layout["header_row"] + 1
    frame, rows, notes = tidy(frame, header, rows, path.name)
    return frame, rows, layout, warnings + notes


def _wider_than_header(path: Path, data: bytes, layout: dict, options: dict,
                       delimiter: str) -> pd.DataFrame:
    """Read again with room for every cell; extra cells must be empty (trailing delimiters)."""
    width = len(layout["header"])
    widest = max([len(r) for r in layout["records"]] + [width])
    frame = pd.read_csv(io.BytesIO(data), header=None, skiprows=layout["header_index"] + 1,
                        names=list(range(widest)), **options)
    extra = frame.iloc[:, width:].notna().any(axis=1).to_numpy()
    if extra.any():
        first = int(np.flatnonzero(extra)[0])
        saw = int(frame.iloc[first].notna().to_numpy().nonzero()[0].max()) + 1
        raise InputError(say("read.ragged", file=path.name, line=layout["header_row"] + 1 + first,
                             saw=saw, expected=width, delimiter=_DELIMITER_NAMES[delimiter]))
    return frame.iloc[:, :width]


def _parser_error(path: Path, exc: Exception, delimiter: str) -> InputError:
    """pandas' parser error said in the user's words (its own text is read, as it comes)."""
    text = str(exc)
    match = re.search(r"Expected (\d+) fields in line (\d+), saw (\d+)", text)
    if match:
        expected, line, saw = match.groups()
        return InputError(say("read.ragged", file=path.name, line=line, saw=saw,
                              expected=expected, delimiter=_DELIMITER_NAMES[delimiter]))
    match = re.search(r"EOF inside string starting at row (\d+)", text)
    if match:
        return InputError(say("read.open_quote", file=path.name, line=int(match.group(1)) + 1))
    return InputError(say("read.unparseable", file=path.name, detail=first_line(exc)))
