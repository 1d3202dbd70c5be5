"""A corpus of messy and broken spreadsheets, generated here, each run through core and the CLI.

Every case is either loaded correctly with a warning or refused with one message that says what
is wrong, where (line, row, column or sheet) and how to fix it (house rule 8). Each case is
checked twice — in core (read → dictionary → guards → derivation, as the CLI does) and through
``prunella fit`` (exit 2 and no traceback for refusals; exit 0 and the warning text for warned
loads) — and both times the input file must be unchanged (SHA-256 and modification time). The
command line runs in this process through core.cli.main; a few cases also run as a child
process, which must print exactly the same. All data are invented for these tests.
"""

from __future__ import annotations

import csv
import io
import os
import zipfile
from dataclasses import dataclass
from pathlib import Path
from typing import Callable

import numpy as np
import openpyxl
import pandas as pd
import pytest

from core.data import read_table
from core.data.cells import parse_dates
from core.design import DesignSpec, guard_design
from core.dictionary import infer_dictionary
from core.errors import InputError
from core.messages import kind_of
from core.sizing import CVSettings, DerivationRequest, TreeSettings, derive
from tests.helpers import Ran, prunella, run_prunella, sha256_of

HEADER = ["age", "spo2", "resp_rate", "sex", "admitted"]


# --- building blocks ------------------------------------------------------------------------


def base_rows(n: int = 80, seed: int = 0, positives: int | None = None) -> list[list]:
    """Invented visits: admission more likely with low SpO2, with plenty of noise."""
    rng = np.random.default_rng(seed)
    age = rng.integers(18, 96, n)
    spo2 = rng.integers(85, 101, n)
    resp = rng.integers(10, 40, n)
    sex = rng.choice(["female", "male"], n)
    risk = 0.15 + 0.5 * (spo2 <= 91)
    admitted = np.where(rng.random(n) < risk, "yes", "no")
    if positives is not None:
        admitted = np.array(["no"] * n, dtype=object)
        admitted[rng.choice(n, positives, replace=False)] = "yes"
    return [[int(a), int(s), int(r), str(x), str(y)]
            for a, s, r, x, y in zip(age, spo2, resp, sex, admitted)]


def csv_text(header, rows, sep=",") -> str:
    buffer = io.StringIO()
    csv.writer(buffer, delimiter=sep, lineterminator="\n").writerows([header] + rows)
    return buffer.getvalue()


def write_text(path: Path, text: str, encoding="utf-8") -> None:
    path.write_bytes(text.encode(encoding))


def add_column(rows, values):
    return [r + [v] for r, v in zip(rows, values)]


def workbook(path: Path, sheets: dict[str, list[list]], edit=None) -> None:
    book = openpyxl.Workbook()
    book.remove(book.active)
    for name, rows in sheets.items():
        sheet = book.create_sheet(name)
        for row in rows:
            sheet.append(row)
        if edit is not None:
            edit(name, sheet)
    book.save(path)


def plain_xlsx(path: Path) -> None:
    workbook(path, {"visits": [HEADER] + base_rows()})


def patch_zip(path: Path, member: str, change: Callable[[str], str]) -> None:
    """Rewrite one part of an XLSX (e.g. to give formulas the saved results Excel would)."""
    with zipfile.ZipFile(path) as source:
        parts = {name: source.read(name) for name in source.namelist()}
    parts[member] = change(parts[member].decode("utf-8")).encode("utf-8")
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as target:
        for name, data in parts.items():
            target.writestr(name, data)


def ole_container(streams: list[str]) -> bytes:
    """The signature and directory names of an OLE/CFB container (how Office stores .xls and
    password-protected .xlsx), crafted: enough for a reader that looks at the bytes."""
    header = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + b"\x00" * 16 + b"\x3e\x00\x03\x00\xfe\xff"
    header += b"\x09\x00\x06\x00" + b"\x00" * (512 - len(header) - 4)
    directory = b"".join(name.encode("utf-16-le").ljust(64, b"\x00") + b"\x00" * 64
                         for name in ["Root Entry"] + streams)
    return header + b"\x00" * 4 + directory.ljust(4096, b"\x00")


# --- the cases ------------------------------------------------------------------------------


@dataclass
class Case:
    name: str
    file: str
    make: Callable[[Path], None]
    refused: bool = False
    says: tuple[str, ...] = ()  # must appear (case-insensitive) in the message or warnings
    check: Callable | None = None  # check(table, dictionary) for loaded cases
    outcome: str = "admitted"
    sheet: str | None = None
    args: tuple[str, ...] = ()
    predictors: tuple[str, ...] = ()
    patient_id: str | None = None
    exists: bool = True


CASES: list[Case] = []


def case(name, file, refused=False, says=(), **more):
    def register(make):
        CASES.append(Case(name, file, make, refused=refused, says=tuple(says), **more))
        return make
    return register


def _frame_check(fn):
    return lambda table, dictionary: fn(table.frame, dictionary)


# Refused while reading.
case("zero_bytes", "empty.csv", True, ["empty.csv is empty", "choose the file"])(
    lambda p: p.write_bytes(b""))
case("blank_lines_only", "blank.csv", True, ["only blank lines"])(
    lambda p: p.write_bytes(b"\n \n\t\n\n"))
case("header_only", "header.csv", True, ["has a header but no rows"])(
    lambda p: write_text(p, ",".join(HEADER) + "\n"))
case("header_only_xlsx", "header.xlsx", True, ["sheet 'visits' has a header but no rows"])(
    lambda p: workbook(p, {"visits": [HEADER]}))
case("binary_named_csv", "binary.csv", True, ["binary data", "save it as csv"])(
    lambda p: p.write_bytes(bytes(np.random.default_rng(1).integers(0, 256, 5000,
                                                                    dtype=np.uint8))))
case("image_named_csv", "picture.csv", True, ["is a png image, not a spreadsheet"])(
    lambda p: p.write_bytes(b"\x89PNG\r\n\x1a\n" + b"\x00" * 100))
case("workbook_named_csv", "visits.csv", True, ["excel workbook saved under a text name",
                                                "rename it to end in .xlsx"])(plain_xlsx)
case("text_named_xlsx", "visits.xlsx", True, ["is a text file, not an excel workbook",
                                              "rename it to end in .csv"])(
    lambda p: write_text(p, csv_text(HEADER, base_rows())))


@case("truncated_xlsx", "cut.xlsx", True, ["cut.xlsx could not be opened as an excel workbook",
                                           "save it again"])
def _truncated(p):
    plain_xlsx(p)
    p.write_bytes(p.read_bytes()[: p.stat().st_size // 2])


@case("corrupt_xlsx", "corrupt.xlsx", True, ["could not be opened as an excel workbook"])
def _corrupt(p):
    plain_xlsx(p)
    patch_zip(p, "xl/worksheets/sheet1.xml", lambda xml: xml[: len(xml) // 3] + "<<garbage")


@case("zip_not_workbook", "report.xlsx", True, ["zip file but not an excel workbook"])
def _other_zip(p):
    with zipfile.ZipFile(p, "w") as archive:
        archive.writestr("word/document.xml", "<w:document/>")


case("encrypted_xlsx", "locked.xlsx", True, ["protected with a password",
                                              "remove the protection"])(
    lambda p: p.write_bytes(ole_container(["EncryptionInfo", "EncryptedPackage"])))
case("old_xls", "old.xls", True, ["old-style .xls workbook", "save it as .xlsx"])(
    lambda p: p.write_bytes(ole_container(["Workbook", "SummaryInformation"])))
case("html_named_xls", "export.xls", True, ["web page (html)"])(
    lambda p: write_text(p, "<html><body><table><tr><td>age</td></tr></table></body></html>"))


@case("ragged_row", "ragged.csv", True, ["line 5 has 7 cells but the header has 5",
                                         "commas", "double quotes"])
def _ragged(p):
    rows = base_rows()
    rows[3] = rows[3] + ["extra", "cells"]
    write_text(p, csv_text(HEADER, rows))


@case("rows_wider_than_header", "wide.csv", True, ["line 2 has 6 cells but the header has 5"])
def _wide(p):
    rows = [r + ["stray"] for r in base_rows()]  # every row one cell wider than the header
    write_text(p, csv_text(HEADER, rows))


@case("unclosed_quote", "quote.csv", True, ["double quote opened on line 4 is never closed"])
def _quote(p):
    lines = csv_text(HEADER, base_rows()).splitlines()
    cells = lines[3].split(",")
    cells[3] = '"' + cells[3]  # a quote opens the sex cell and is never closed
    lines[3] = ",".join(cells)
    write_text(p, "\n".join(lines) + "\n")


case("no_header_row", "noheader.csv", True, ["row 1, where the column names should be",
                                             "add a row of column names"])(
    lambda p: write_text(p, csv_text(["37", "95", "20", "1", "0"],
                                     [[r[0], r[1], r[2], 0, 1] for r in base_rows()])))
case("missing_sheet", "sheets.xlsx", True, ["has no sheet called 'nope'",
                                            "its sheets are: 'visits'"], sheet="nope")(plain_xlsx)
case("no_such_file", "absent.csv", True, ["no file at", "check the path"], exists=False)(
    lambda p: None)
case("folder", "folder.csv", True, ["is a folder"], exists=False)(lambda p: p.mkdir())

# Refused when the tree is set up.
case("one_column", "one.csv", True, ["no predictors are chosen"])(
    lambda p: write_text(p, csv_text(["admitted"], [[r[4]] for r in base_rows()])))
case("outcome_one_class", "oneclass.csv", True, ["has only one class ('no')",
                                                 "nothing to predict"])(
    lambda p: write_text(p, csv_text(HEADER, [r[:4] + ["no"] for r in base_rows()])))
case("outcome_all_missing", "nooutcome.csv", True, ["'admitted' is not recorded for any row"])(
    lambda p: write_text(p, csv_text(HEADER, [r[:4] + [""] for r in base_rows()])))
case("outcome_not_a_column", "plain.csv", True, ["no column called 'outcome'"],
     outcome="outcome")(lambda p: write_text(p, csv_text(HEADER, base_rows())))


# Loaded, with a warning or a note.
@case("blank_header", "blankhead.csv", says=["column(s) 3 have no header", "named 'column"])
def _blank_header(p):
    write_text(p, csv_text(["age", "spo2", "", "sex", "admitted"], base_rows()))


case("duplicated_headers", "dup.csv", says=["the header 'spo2' appears more than once",
                                            "renamed 'spo2 (2)'"],
     check=_frame_check(lambda f, d: list(f.columns) == ["age", "spo2", "spo2 (2)", "sex",
                                                        "admitted"]))(
    lambda p: write_text(p, csv_text(["age", "spo2", "spo2", "sex", "admitted"], base_rows())))
case("utf8_bom", "bom.csv",
     check=_frame_check(lambda f, d: list(f.columns) == HEADER and len(f) == 80))(
    lambda p: p.write_bytes(b"\xef\xbb\xbf" + csv_text(HEADER, base_rows()).encode()))


@case("windows_1252", "cp1252.csv", says=["not utf-8 (first other character on line 2)",
                                          "windows-1252"],
      check=_frame_check(lambda f, d: set(f["ward"]) == {"Hôpital Nord", "Clinique Sœur"}))
def _cp1252(p):
    rows = add_column(base_rows(), ["Hôpital Nord", "Clinique Sœur"] * 40)
    write_text(p, csv_text(HEADER + ["ward"], rows), encoding="cp1252")


@case("latin1", "latin1.csv", says=["read as latin-1"])
def _latin1(p):
    rows = add_column(base_rows(), ["A\x81", "B"] * 40)
    p.write_bytes(csv_text(HEADER + ["ward"], rows).encode("latin-1"))


case("utf16", "utf16.csv", says=["utf-16 encoded"],
     check=_frame_check(lambda f, d: list(f.columns) == HEADER))(
    lambda p: p.write_bytes(csv_text(HEADER, base_rows()).encode("utf-16")))


@case("semicolon_decimal_comma", "semicolon.csv",
      says=["semicolons between cells and a comma as the decimal mark"],
      check=_frame_check(lambda f, d: f["temperature"].dtype == float
                         and abs(f["temperature"].iloc[0] - 36.5) < 1e-9))
def _semicolon(p):
    rows = add_column(base_rows(), [f"{36 + (i % 40) / 10:.1f}".replace(".", ",") for i in
                                    range(5, 85)])
    write_text(p, csv_text(HEADER + ["temperature"], rows, sep=";"))


case("tab_separated", "tabs.tsv", says=["tabs between cells"],
     check=_frame_check(lambda f, d: list(f.columns) == HEADER))(
    lambda p: write_text(p, csv_text(HEADER, base_rows(), sep="\t")))


@case("quoted_newlines", "newlines.csv",
      check=_frame_check(lambda f, d: len(f) == 80 and "\n" in f["comment"].iloc[0]))
def _newlines(p):
    rows = add_column(base_rows(), [f"seen by nurse\nthen doctor {i % 7}" for i in range(80)])
    write_text(p, csv_text(HEADER + ["comment"], rows))


@case("thousands_separators", "thousands.csv", says=["thousands separators (e.g. '1,234')"],
      check=_frame_check(lambda f, d: d.get("platelets").kind == "numeric"))
def _thousands(p):
    values = ["1,234", "987", "1,002", "250"] * 20
    write_text(p, csv_text(HEADER + ["platelets"], add_column(base_rows(), values)))


@case("numbers_as_text_xlsx", "text_numbers.xlsx", says=["stored as text", "cells b2"],
      check=_frame_check(lambda f, d: pd.api.types.is_numeric_dtype(f["spo2"])))
def _text_numbers(p):
    rows = [[r[0], str(r[1]), r[2], r[3], r[4]] for r in base_rows()]
    workbook(p, {"visits": [HEADER] + rows})


def _limits_ok(table, dictionary):
    from core.dictionary import typed_column
    values = typed_column(table.frame["crp"], dictionary.get("crp")).numbers
    return values[0] == 5.0 and values[1] == 100.0 and np.isnan(values).sum() == 0


@case("lab_limits", "limits.csv", says=["2", "written as limits (e.g. '<5')", "(rows 2 and 3)",
                                        "read as the limit itself"], check=_limits_ok)
def _limits(p):
    values = ["<5", ">100"] + [str(x) for x in np.linspace(6, 90, 78).round(1)]
    write_text(p, csv_text(HEADER + ["crp"], add_column(base_rows(), values)))


def _dates_ok(table, dictionary):
    parsed = parse_dates(table.frame["arrival"])
    return dictionary.get("arrival").kind == "date" and \
        all(d == pd.Timestamp("2024-01-03") for d in parsed.iloc[:3])


@case("dates_several_formats", "dates.csv", says=["dates in several formats"], check=_dates_ok)
def _dates(p):
    values = ["2024-01-03", "03/01/2024", "3 Jan 2024"] + \
        [f"2024-02-{d:02d}" for d in range(1, 28)] * 3
    write_text(p, csv_text(HEADER + ["arrival"], add_column(base_rows(), values[:80])))


@case("numbers_and_a_few_words", "words.csv",
      says=["holds numbers and a few words ('haemolysed', 'not done')",
            "treated as not recorded"],
      check=_frame_check(lambda f, d: d.get("potassium").kind == "numeric"))
def _few_words(p):
    values = [f"{3.2 + (i % 25) / 10:.1f}" for i in range(80)]
    values[4], values[9], values[30] = "haemolysed", "not done", "haemolysed"
    write_text(p, csv_text(HEADER + ["potassium"], add_column(base_rows(), values)))


@case("mixed_numbers_words", "pain.csv", says=["mixes numbers and words",
                                               "treated as categories"],
      check=_frame_check(lambda f, d: d.get("pain").kind == "nominal"))
def _mixed(p):
    values = ["none", "mild", "3", "5", "severe", "2"] * 14
    write_text(p, csv_text(HEADER + ["pain"], add_column(base_rows(), values[:80])))


@case("trailing_empty_rows_columns", "trailing.csv",
      says=["empty row(s) were left out", "empty column(s) without a header"],
      check=_frame_check(lambda f, d: f.shape == (80, 5)))
def _trailing(p):
    rows = [r + ["", ""] for r in base_rows()] + [[""] * 7] * 4
    write_text(p, csv_text(HEADER + ["", ""], rows))


case("trailing_delimiters", "trailingdelim.csv",
     check=_frame_check(lambda f, d: list(f.columns) == HEADER and f["age"].iloc[0] ==
                        base_rows()[0][0]))(
    lambda p: write_text(p, ",".join(HEADER) + "\n" +
                         "".join(",".join(map(str, r)) + ",\n" for r in base_rows())))
case("crlf_line_endings", "crlf.csv", check=_frame_check(lambda f, d: f.shape == (80, 5)))(
    lambda p: p.write_bytes(csv_text(HEADER, base_rows()).replace("\n", "\r\n").encode()))


@case("header_with_line_break", "breakhead.csv",
      check=_frame_check(lambda f, d: "SpO2 (%)" in f.columns))
def _break_header(p):
    write_text(p, csv_text(["age", "SpO2\n(%)", "resp_rate", "sex", "admitted"], base_rows()))


@case("csv_title_rows", "titled.csv", says=["row 1 hold a title ('breathless audit 2024')",
                                            "header was taken from row 2"],
      check=_frame_check(lambda f, d: list(f.columns) == HEADER))
def _csv_title(p):
    write_text(p, "Breathless audit 2024\n" + csv_text(HEADER, base_rows()))


case("several_sheets", "two.xlsx", says=["has 2 sheets", "'visits', was read"],
     check=_frame_check(lambda f, d: len(f) == 80))(
    lambda p: workbook(p, {"visits": [HEADER] + base_rows(),
                           "lookup": [["code", "meaning"], [1, "yes"]]}))
case("pick_second_sheet", "pick.xlsx", sheet="later",
     check=lambda t, d: t.provenance.sheet == "later" and len(t.frame) == 60)(
    lambda p: workbook(p, {"notes": [["written by", "audit team"]],
                           "later": [HEADER] + base_rows(60, seed=3)}))


@case("xlsx_title_rows", "title.xlsx", says=["rows 1–3 hold a title", "from row 4"],
      check=lambda t, d: list(t.frame.columns) == HEADER and t.row_numbers[0] == 5)
def _xlsx_title(p):
    workbook(p, {"visits": [["Breathless audit"], ["Fenwick Bay, 2024"], [], HEADER]
                 + base_rows()})


def _group_header(name, sheet):
    sheet.insert_rows(1)
    sheet["B1"] = "Vital signs"
    sheet.merge_cells("B1:C1")


case("xlsx_merged_group_header", "group.xlsx", says=["header is in two rows"],
     check=_frame_check(lambda f, d: "Vital signs spo2" in f.columns and len(f) == 80))(
    lambda p: workbook(p, {"visits": [HEADER] + base_rows()}, edit=_group_header))


def _merged_header_cells(name, sheet):
    sheet["B1"] = "vital"
    sheet.merge_cells("B1:C1")


case("xlsx_merged_header_cells", "merged.xlsx", says=["header cells in row 1 are merged",
                                                      "renamed 'vital (2)'"],
     check=_frame_check(lambda f, d: list(f.columns)[1:3] == ["vital", "vital (2)"]))(
    lambda p: workbook(p, {"visits": [HEADER] + base_rows()}, edit=_merged_header_cells))


def _bmi_rows():
    rows = [HEADER + ["double_age"]]
    for i, r in enumerate(base_rows(), start=2):
        rows.append(r + [f"=A{i}*2"])
    return rows


@case("xlsx_formulas_cached", "formulas.xlsx", says=["'double_age' hold formulas",
                                                     "saved results were read"],
      check=_frame_check(lambda f, d: (f["double_age"] == 2 * f["age"]).all()))
def _formulas_cached(p):
    workbook(p, {"visits": _bmi_rows()})
    ages = {i: r[0] for i, r in enumerate(base_rows(), start=2)}

    def cache(xml: str) -> str:
        for i, age in ages.items():
            xml = xml.replace(f"<f>A{i}*2</f><v />", f"<f>A{i}*2</f><v>{2 * age}</v>")
        return xml
    patch_zip(p, "xl/worksheets/sheet1.xml", cache)


case("xlsx_formulas_uncalculated", "nocache.xlsx", says=["formula cell(s) have no saved result",
                                                        "let it calculate"])(
    lambda p: workbook(p, {"visits": _bmi_rows()}))


def _hide(name, sheet):
    for r in (5, 9):
        sheet.row_dimensions[r].hidden = True


case("xlsx_hidden_rows", "hidden.xlsx", says=["2 row(s) are hidden", "(rows 5 and 9)"],
     check=_frame_check(lambda f, d: len(f) == 80))(
    lambda p: workbook(p, {"visits": [HEADER] + base_rows()}, edit=_hide))


@case("xlsx_error_cells", "errors.xlsx", says=["spreadsheet error such as #div/0!", "c4"])
def _errors(p):
    rows = [HEADER] + base_rows()
    rows[3][2] = "#DIV/0!"
    rows[7][2] = "#VALUE!"
    workbook(p, {"visits": rows})


@case("inf_and_huge_numbers", "huge.csv", says=["infinite value(s) in crp", "too large to compute"],
      check=_frame_check(lambda f, d: d.get("crp").kind == "numeric"))
def _huge(p):
    values = ["inf", "1e39", "-1e300", "-inf"] + [str(10 + i) for i in range(76)]
    write_text(p, csv_text(HEADER + ["crp"], add_column(base_rows(), values)))


case("all_missing_column", "allmissing.csv", says=["'lactate' has no recorded values"],
     check=_frame_check(lambda f, d: d.get("lactate").role == "ignore"))(
    lambda p: write_text(p, csv_text(HEADER + ["lactate"], add_column(base_rows(), [""] * 80))))
case("constant_column", "constant.csv", says=["'ward' has the same value in every row"],
     check=_frame_check(lambda f, d: d.get("ward").role == "ignore"))(
    lambda p: write_text(p, csv_text(HEADER + ["ward"], add_column(base_rows(), ["A"] * 80))))


def _spellings_ok(table, dictionary):
    spec = dictionary.get("admitted")
    return spec.kind == "binary" and spec.levels == ("no", "yes")


@case("positive_class_spellings", "spellings.csv", says=["writes yes and no in several ways"],
      check=_spellings_ok)
def _spellings(p):
    yes, no = ["Yes", "yes", "Y", "1", "TRUE"], ["No", "no", "N", "0", "FALSE"]
    rows = [r[:4] + [(yes if r[4] == "yes" else no)[i % 5]] for i, r in enumerate(base_rows())]
    write_text(p, csv_text(HEADER, rows))


case("rare_class", "rare.csv", says=["only 6 patient(s) have 'yes' for 'admitted'",
                                     "fewer than 10"])(
    lambda p: write_text(p, csv_text(HEADER, base_rows(positives=6))))


@case("unicode_column_names", "unicode.csv",
      check=_frame_check(lambda f, d: "Sättigung (%)" in f.columns and "年龄" in f.columns),
      outcome="aufgenommen")
def _unicode(p):
    write_text(p, csv_text(["年龄", "Sättigung (%)", "fréquence respiratoire", "sexe",
                            "aufgenommen"], base_rows()))


@case("identity_columns", "identity.csv",
      says=["'surname' seems to identify patients", "'email' seems to identify patients",
            "'phone' seems to identify patients", "'date_of_birth' seems to identify patients",
            "'home' seems to identify patients", "'ref' is different in every row, like a "
            "record number"],
      check=lambda t, d: all(d.get(c).role == "ignore" for c in ("surname", "email", "phone",
                                                                  "date_of_birth", "home",
                                                                  "ref")))
def _identity(p):
    n = 80
    surnames = [f"{first} {last}" for first, last in
                zip(["Ada", "Ben", "Cleo", "Dev", "Ema", "Finn", "Gita", "Hugo"] * 10,
                    [f"Lastname{chr(65 + i % 26)}{chr(97 + i // 26)}" for i in range(n)])]
    columns = {
        "surname": surnames,
        "email": [f"patient{i}@example.org" for i in range(n)],
        "phone": [f"07700 900{i:03d}" for i in range(n)],
        "date_of_birth": [f"{1930 + i % 70}-0{1 + i % 9}-1{i % 10}" for i in range(n)],
        "home": [f"{i + 1} Harbour Road" for i in range(n)],
        "ref": [100000 + 37 * i for i in range(n)],
    }
    rows = base_rows()
    for values in columns.values():
        rows = add_column(rows, values)
    write_text(p, csv_text(HEADER + list(columns), rows))


@case("leakage_column", "leak.csv", says=["probable leakage: 'bed_booked'",
                                          "check when it is recorded"])
def _leak(p):
    rows = base_rows(200, seed=4)
    rng = np.random.default_rng(5)
    booked = [r[4] if rng.random() > 0.02 else ("no" if r[4] == "yes" else "yes") for r in rows]
    write_text(p, csv_text(HEADER + ["bed_booked"], add_column(rows, booked)))


# A record-number column that repeats is proposed as the patient number (issue 10.4).
@case("repeat_visits_without_id", "repeats.csv",
      says=["'hospital number' looks like a patient identifier",
            "keeps each patient's rows in the same fold"],
      check=_frame_check(lambda f, d: d.get("hospital number").role == "patient_id"))
def _repeats(p):
    numbers = [f"H{1000 + i // 2}" for i in range(80)]
    write_text(p, csv_text(HEADER + ["hospital number"], add_column(base_rows(), numbers)))


@case("repeat_visits_with_id", "visits.csv",
      says=["patient(s) have more than one row", "keeps each patient's rows in the same fold"])
def _grouped(p):
    ids = [f"P{i // 3:03d}" for i in range(80)]
    write_text(p, csv_text(HEADER + ["patient_id"], add_column(base_rows(), ids)))


@case("missing_value_codes", "codes.csv", says=["the value -99", "looks like a code for 'not "
                                                "recorded'"])
def _codes(p):
    values = ["NA", "not recorded", "-99"] + [str(100 + i) for i in range(77)]
    write_text(p, csv_text(HEADER + ["systolic_bp"], add_column(base_rows(), values)))


@case("percent_signs", "percent.csv", says=["with a % sign (e.g. '95%')"],
      check=_frame_check(lambda f, d: d.get("saturation").kind == "numeric"))
def _percent(p):
    rows = [[r[0], f"{r[1]}%", r[2], r[3], r[4]] for r in base_rows()]
    rows[0][1] = "95%"
    write_text(p, csv_text(["age", "saturation", "resp_rate", "sex", "admitted"], rows))


def _answers_kept(f, d) -> bool:
    """'none' stays an answer of its own: a level, read in every row that holds it."""
    from core.dictionary import typed_column
    spec = d.get("oxygen")
    typed = typed_column(f["oxygen"], spec)
    none = f["oxygen"].str.strip().str.casefold() == "none"
    return "none" in spec.levels and not typed.missing[none.to_numpy()].any()


@case("none_is_an_answer", "oxygen.csv", check=_frame_check(_answers_kept))
def _none_answers(p):
    # Issue 10.5: 'none' (oxygen given: none) in 47% of the rows is a real answer.
    values = (["none"] * 38 + ["nasal", "mask", "nasal"] * 14)[:80]
    write_text(p, csv_text(HEADER + ["oxygen"], add_column(base_rows(), values)))


@case("probable_missing_codes", "smoking.csv",
      says=["'unknown' (12 cells) and 'NR' (3 cells)", "may mean 'not recorded'",
            "until you confirm"],
      check=_frame_check(lambda f, d: {"unknown", "NR"} <= set(d.get("smoker").levels)
                         and d.get("smoker").missing_codes == ()))
def _probable_codes(p):
    # Issue 10.5: probable missing codes are proposed with their counts, not applied.
    values = ["unknown"] * 12 + ["NR"] * 3 + ["never", "former", "current"] * 22
    write_text(p, csv_text(HEADER + ["smoker"], add_column(base_rows(), values[:80])))


case("text_named_xls", "export.xls", says=["named .xls but holds a text table"],
     check=_frame_check(lambda f, d: list(f.columns) == HEADER))(
    lambda p: write_text(p, csv_text(HEADER, base_rows(), sep="\t")))


# --- running a case -------------------------------------------------------------------------


def fingerprint(path: Path) -> tuple[str, int] | None:
    if not path.is_file():
        return None
    return sha256_of(path), path.stat().st_mtime_ns


def core_run(path: Path, c: Case):
    """What ``prunella fit`` does, in-process: returns (table, dictionary, every message)."""
    table = read_table(path, sheet=c.sheet)
    dictionary, notes = infer_dictionary(table.frame, table.row_numbers)
    messages = list(table.provenance.warnings) + notes
    if c.outcome not in dictionary:
        dictionary.get(c.outcome)  # refuses with the list of columns
    patient = c.patient_id or next((s.name for s in dictionary.by_role("patient_id")), None)
    predictors = c.predictors or tuple(s.name for s in dictionary.by_role("predictor")
                                       if s.name not in (c.outcome, patient))
    design = DesignSpec(c.outcome, predictors, patient_id=patient)
    report = guard_design(table.frame, dictionary, design, keep=c.predictors, min_leaf=3)
    messages += list(report.messages)
    request = DerivationRequest(report.design, tree=TreeSettings(min_leaf=3),
                                cv=CVSettings(folds=3))
    derivation = derive(table, dictionary, request)
    messages += list(derivation.notes)
    return table, dictionary, messages


@pytest.fixture(scope="module")
def corpus(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("corpus")
    for c in CASES:
        (folder / c.name).mkdir()
        c.make(folder / c.name / c.file)
    return folder


def _fit_args(folder: Path, c: Case, out: Path) -> list:
    out.mkdir(exist_ok=True)
    args = ["fit", folder / c.name / c.file, "--outcome", c.outcome, "--model", out / "model.json",
            "--folds", "3", "--min-leaf", "3", "--quiet"]
    if c.sheet:
        args += ["--sheet", c.sheet]
    return args + list(c.args)


def _cli(folder: Path, c: Case) -> Ran:
    return prunella(*_fit_args(folder, c, folder.parent / f"{folder.name}-out-{c.name}"))


@pytest.fixture(scope="module")
def cli_results(corpus) -> dict:
    """Every case through ``prunella fit`` (in this process)."""
    before = {c.name: fingerprint(corpus / c.name / c.file) for c in CASES}
    runs = {c.name: _cli(corpus, c) for c in CASES}
    after = {c.name: fingerprint(corpus / c.name / c.file) for c in CASES}
    listing = {c.name: sorted(os.listdir(corpus / c.name)) for c in CASES
               if (corpus / c.name).is_dir()}
    return {"runs": runs, "before": before, "after": after, "listing": listing}


def test_corpus_is_large_enough():
    assert len(CASES) >= 40
    assert len({c.name for c in CASES}) == len(CASES)
    assert sum(c.refused for c in CASES) >= 15 and sum(not c.refused for c in CASES) >= 25


def _has_all(text: str, needles) -> list[str]:
    low = text.casefold()
    return [n for n in needles if n.casefold() not in low]


@pytest.mark.parametrize("c", CASES, ids=lambda c: c.name)
def test_core(corpus, c):
    path = corpus / c.name / c.file
    before = fingerprint(path)
    if c.refused:
        with pytest.raises(InputError) as caught:
            core_run(path, c)
        message = str(caught.value)
        assert not _has_all(message, c.says), (message, _has_all(message, c.says))
        assert kind_of(message) is not None, f"message not in the catalogue: {message}"
    else:
        table, dictionary, messages = core_run(path, c)
        joined = "\n".join(messages)
        assert not _has_all(joined, c.says), (_has_all(joined, c.says), joined)
        if c.check is not None:
            assert c.check(table, dictionary), joined
        for message in messages:
            assert kind_of(message) is not None, f"message not in the catalogue: {message}"
    assert fingerprint(path) == before, "the input file changed"
    if c.exists:
        assert sorted(os.listdir(path.parent)) == [c.file], "a file appeared beside the input"


@pytest.mark.parametrize("c", CASES, ids=lambda c: c.name)
def test_cli(cli_results, c):
    run = cli_results["runs"][c.name]
    assert "Traceback" not in run.stderr, run.stderr
    if c.refused:
        assert run.returncode == 2, (run.returncode, run.stderr)
        lines = [line for line in run.stderr.splitlines() if line.startswith("prunella: ")]
        assert len(lines) == 1, run.stderr
        assert not _has_all(lines[0], c.says), (lines[0], _has_all(lines[0], c.says))
    else:
        assert run.returncode == 0, run.stderr
        assert not _has_all(run.stderr, c.says), (run.stderr, _has_all(run.stderr, c.says))
    assert cli_results["before"][c.name] == cli_results["after"][c.name], "input changed"
    if c.exists:
        assert cli_results["listing"][c.name] == [c.file], "a file appeared beside the input"


@pytest.mark.parametrize("name", ["zero_bytes", "ragged_row", "lab_limits"])
def test_a_child_process_prints_what_the_command_line_prints_in_process(corpus, cli_results,
                                                                         name, tmp_path):
    """The real entry point (``python -m gui``, a refused and warned case each) prints exactly
    what the in-process run printed, and exits the same; no traceback."""
    c = next(x for x in CASES if x.name == name)
    child = run_prunella(*_fit_args(corpus, c, tmp_path / "out"), timeout=240)
    ran = cli_results["runs"][name]
    assert "Traceback" not in child.stderr
    assert (child.returncode, child.stderr) == (ran.returncode, ran.stderr)
    assert fingerprint(corpus / c.name / c.file) == cli_results["after"][name]


def test_identity_columns_can_be_named_explicitly(corpus):
    """A column left out as identity comes back when the user names it as a predictor."""
    c = next(x for x in CASES if x.name == "identity_columns")
    table = read_table(corpus / c.name / c.file)
    dictionary, _ = infer_dictionary(table.frame)
    design = DesignSpec("admitted", ("age", "spo2", "ref"))
    assert "ref" not in guard_design(table.frame, dictionary, design).design.predictors
    kept = guard_design(table.frame, dictionary, design, keep=("ref",))
    assert "ref" in kept.design.predictors and not kept.left_out
