"""Details of reading that the bad-input corpus does not pin down: row numbers, sheets,
compatibility of the frame with plain pandas, and what is (not) converted."""

from __future__ import annotations

import numpy as np
import openpyxl
import pandas as pd
import pytest

from core.data import list_sheets, read_table
from core.data.cells import parse_dates, parse_numbers
from core.dictionary import infer_dictionary
from core.errors import InputError
from core.phrases import rows_phrase
from tests.helpers import DEMO_CSV, DEMO_XLSX


def test_demo_frame_is_what_pandas_reads():
    """read_table keeps pandas' own types and values for a clean file (others rely on it)."""
    ours = read_table(DEMO_CSV).frame
    plain = pd.read_csv(DEMO_CSV, keep_default_na=False, na_values=[""])
    pd.testing.assert_frame_equal(ours, plain)
    book = read_table(DEMO_XLSX, sheet="visits").frame
    pd.testing.assert_frame_equal(book, pd.read_excel(DEMO_XLSX, sheet_name="visits"))


def test_row_numbers_follow_the_spreadsheet(tmp_path):
    path = tmp_path / "gaps.csv"
    path.write_text("Audit\nage,crp\n40,<5\n\n,\n50,7\n60,>100\n")
    table = read_table(path)
    assert list(table.frame["age"]) == [40, 50, 60]
    assert list(table.row_numbers) == [3, 6, 7]
    assert table.provenance.header_row == 2
    _, notes = infer_dictionary(table.frame, table.row_numbers)
    assert any("(rows 3 and 7)" in n and "limits" in n for n in notes)


def test_rows_phrase():
    assert rows_phrase([]) == "" and rows_phrase(None) == ""
    assert rows_phrase([4]) == " (row 4)"
    assert rows_phrase([4, 9, 22]) == " (rows 4, 9 and 22)"
    assert rows_phrase(range(2, 20)) == " (rows 2, 3, 4, 5, 6 and 13 more)"


def test_first_visible_sheet_is_the_default(tmp_path):
    book = openpyxl.Workbook()
    book.active.title = "hidden notes"
    book.active.append(["x"])
    book.active.sheet_state = "hidden"
    data = book.create_sheet("data")
    data.append(["age", "sex"])
    for i in range(5):
        data.append([30 + i, "female"])
    path = tmp_path / "book.xlsx"
    book.save(path)
    table = read_table(path)
    assert table.provenance.sheet == "data" and len(table.frame) == 5
    assert list_sheets(path) == ["hidden notes", "data"]
    assert list_sheets(DEMO_CSV) == []


def test_codes_with_leading_zeros_stay_text_in_workbooks(tmp_path):
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(["ward_code", "spo2"])
    for code, value in (("007", "95"), ("012", "97"), ("101", 93)):
        sheet.append([code, value])
    path = tmp_path / "codes.xlsx"
    book.save(path)
    frame = read_table(path).frame
    assert list(frame["ward_code"]) == ["007", "012", "101"]
    assert list(frame["spo2"]) == [95, 97, 93]


def test_trailing_delimiters_do_not_shift_columns(tmp_path):
    path = tmp_path / "t.csv"
    path.write_text("a,b\n1,2,\n3,4,\n")
    frame = read_table(path).frame
    assert list(frame.columns) == ["a", "b"] and list(frame["a"]) == [1, 3]


def test_numbers_parse_the_usual_spellings():
    values = pd.Series(["1,234", "7,5", "<5", "≥ 3", "95%", "inf", "1e39", "x", "NA", " 12 "])
    parsed = parse_numbers(values, label="lab", rows=np.arange(2, 12))
    assert parsed.values[:5].tolist() == [1234, 7.5, 5, 3, 95]
    assert np.isnan(parsed.values[5:9]).all() and parsed.values[9] == 12
    assert parsed.n_unreadable == 1 and parsed.unreadable_rows == (9,)
    joined = " ".join(parsed.notes)
    for words in ("thousands", "decimal comma", "limits", "% sign", "infinite", "too large",
                  "not numbers"):
        assert words in joined


def test_mixed_date_formats_are_all_read():
    dates = parse_dates(pd.Series(["2024-01-03", "03/01/2024", "3 Jan 2024", None]))
    assert list(dates[:3]) == [pd.Timestamp("2024-01-03")] * 3 and pd.isna(dates[3])


def test_sheet_given_for_a_text_file_is_refused(tmp_path):
    path = tmp_path / "a.csv"
    path.write_text("a,b\n1,2\n")
    with pytest.raises(InputError, match="text file and has no sheets"):
        read_table(path, sheet="x")


def test_rows_wider_than_the_header_are_refused_not_cut(tmp_path):
    path = tmp_path / "w.csv"
    path.write_text("a,b\n1,2,\n4,5,6\n")
    with pytest.raises(InputError, match="line 3 has 3 cells but the header has 2"):
        read_table(path)
    path.write_text("a,b\n1,2,\n4,5,\n")
    assert read_table(path).frame.values.tolist() == [[1, 2], [4, 5]]
