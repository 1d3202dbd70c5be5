"""Files that fool the reader quietly or never end (issue 15, items 8 and 9): each loads
correctly with a note naming what was done and where, or is refused in one sentence (exit
status 2, no traceback), and every input stays byte-identical (SHA-256 and modification time).

Every file here is invented and written by the test itself.
"""

from __future__ import annotations

import hashlib
from pathlib import Path

from core.data import read_table
from core.data.text_table import LONGEST_LINE_BYTES
from tests.helpers import prunella
from tests.test_bad_inputs import HEADER, base_rows, csv_text
from tests.test_hostile_inputs import refused, state


def fit(data: Path, *more):
    return prunella("fit", data, "--outcome", "admitted", "--folds", "3", "--quiet",
                    "--model", data.parent / "m.json", *more)


def loads(data: Path, *more) -> str:
    """Run ``prunella fit`` on ``data``; assert it worked, left the input alone; its stderr."""
    before = state([data])
    ran = fit(data, *more)
    assert ran.returncode == 0, ran.stderr
    assert "Traceback" not in ran.stderr
    assert state([data]) == before
    return ran.stderr


# --- item 8: a file that never ends its line ---------------------------------------------------


def test_a_file_without_line_breaks_is_stopped_at_the_longest_line_naming_its_row(tmp_path):
    # A header, two rows, then a few tens of MB with no line break (as a file that lost its
    # line ends): reading stops at the limit instead of running on.
    data = tmp_path / "no_breaks.csv"
    with open(data, "wb") as handle:
        handle.write(b"age,spo2,resp_rate,sex,admitted\n40,95,20,male,no\n50,90,22,female,yes\n")
        chunk = b"41,96,18,male,no;" * 65536
        while handle.tell() < LONGEST_LINE_BYTES + 8 * 2**20:
            handle.write(chunk)
    assert data.stat().st_size > 20 * 2**20
    last = refused(["fit", data, "--outcome", "admitted", "--model", tmp_path / "m.json"],
                   ["no_breaks.csv", "row 4", "without a line break", "save the sheet again"],
                   inputs=[data])
    assert f"{LONGEST_LINE_BYTES // 2**20} MB" in last


def test_a_valid_csv_with_one_very_large_cell_loads(tmp_path):
    # A free-text cell of a few MB (pasted notes) in a well-formed CSV: the layout is judged on
    # the whole records before it, and the table loads.
    rows = base_rows(60)
    header = HEADER + ["notes"]
    rows = [r + ["seen"] for r in rows]
    rows[3][-1] = "word " * 700_000  # about 3.5 MB on one line
    data = tmp_path / "big_cell.csv"
    data.write_text(csv_text(header, rows), encoding="utf-8")
    assert data.stat().st_size > 3 * 2**20
    table = read_table(data)
    assert table.frame.shape == (60, 6)
    assert len(table.frame["notes"][3].strip()) > 3_000_000
    quoted = tmp_path / "big_quoted.csv"
    rows[3][-1] = "line one, with a comma\n" * 150_000  # quoted, spanning many lines
    quoted.write_text(csv_text(header, rows), encoding="utf-8")
    assert read_table(quoted).frame.shape == (60, 6)
    loads(quoted)


def test_the_fingerprint_is_of_exactly_the_bytes_that_were_parsed(tmp_path, monkeypatch):
    # Rows appended by another program between reading and parsing must not make the
    # fingerprint describe a different state of the file than the rows grown on.
    import core.data.table as table_module

    data = tmp_path / "growing.csv"
    original = csv_text(HEADER, base_rows(40)).encode("utf-8")
    data.write_bytes(original)
    real = table_module.read_text_bytes

    def read_then_append(path):
        got = real(path)
        with open(path, "ab") as other_program:
            other_program.write(csv_text(HEADER, base_rows(25, seed=3))[len(",".join(HEADER)) + 1:]
                                .encode("utf-8"))
        return got

    monkeypatch.setattr(table_module, "read_text_bytes", read_then_append)
    table = read_table(data)
    assert len(table.frame) == 40
    assert table.provenance.sha256 == hashlib.sha256(original).hexdigest()
    assert data.stat().st_size > len(original)  # the file did grow meanwhile


def test_a_workbook_is_fingerprinted_from_the_bytes_it_is_read_from(tmp_path):
    from tests.test_bad_inputs import workbook

    book = tmp_path / "visits.xlsx"
    workbook(book, {"Visits": [HEADER] + base_rows(30)})
    table = read_table(book)
    assert table.provenance.sha256 == hashlib.sha256(book.read_bytes()).hexdigest()
    assert len(table.frame) == 30


# --- item 9: invisible marks inside the file ---------------------------------------------------


def test_a_second_byte_order_mark_is_taken_out_with_a_note_and_makes_no_third_answer(tmp_path):
    # Two UTF-8 exports pasted together: the second starts with its own byte-order mark, which
    # would make its first 'no' a different answer from every other 'no'.
    first = csv_text(HEADER, base_rows(40)).encode("utf-8")
    second = csv_text(HEADER, base_rows(30, seed=5)).encode("utf-8")
    second = second[second.index(b"\n") + 1:]  # its rows only
    data = tmp_path / "pasted.csv"
    data.write_bytes(b"\xef\xbb\xbf" + first + b"\xef\xbb\xbf" + second)
    table = read_table(data)
    assert len(table.frame) == 70
    assert sorted(table.frame["admitted"].unique()) == ["no", "yes"]
    note = " ".join(table.provenance.warnings)
    assert "byte-order mark" in note and "file line 42" in note
    assert "byte-order mark" in loads(data)


def test_a_few_nul_bytes_are_taken_out_naming_their_lines_and_many_mean_not_a_table(tmp_path):
    rows = base_rows(40)
    rows[4][-1] = rows[4][-1] + "\x00"  # 'yes\0' or 'no\0': would be a third answer
    data = tmp_path / "damaged.csv"
    data.write_text(csv_text(HEADER, rows), encoding="utf-8")
    table = read_table(data)
    assert sorted(table.frame["admitted"].unique()) == ["no", "yes"]
    assert any("NUL bytes (file line 6)" in w for w in table.provenance.warnings)
    binary = tmp_path / "binary.csv"
    binary.write_bytes(csv_text(HEADER, base_rows(40)).encode("utf-8").replace(b",", b",\x00"))
    refused(["fit", binary, "--outcome", "admitted", "--model", tmp_path / "m.json"],
            ["binary.csv"], inputs=[binary])


# --- item 9: data that fool the reader quietly -------------------------------------------------


def _pasted_exports(path: Path, bom_on_second: bool = False) -> None:
    """Two exports pasted one below the other: the second brings its header row along."""
    first = csv_text(HEADER, base_rows(70))
    second = csv_text(HEADER, base_rows(50, seed=4))
    if bom_on_second:
        second = "\ufeff" + second
    path.write_text(first + second, encoding="utf-8")


def test_a_header_row_repeated_inside_the_file_is_left_out_with_a_note(tmp_path):
    data = tmp_path / "two_exports.csv"
    _pasted_exports(data)
    table = read_table(data)
    assert len(table.frame) == 120
    note = next(w for w in table.provenance.warnings if "repeating the column names" in w)
    assert "1 row(s)" in note and "(row 72)" in note
    # The columns are numbers again, as they are without the pasted header.
    assert str(table.frame["age"].dtype).startswith(("int", "float"))
    assert set(table.frame["admitted"]) == {"yes", "no"}
    stderr = loads(data)
    assert "repeating the column names (row 72)" in stderr


def test_a_repeated_header_with_its_own_byte_order_mark_is_left_out_too(tmp_path):
    data = tmp_path / "two_exports_bom.csv"
    _pasted_exports(data, bom_on_second=True)
    table = read_table(data)
    assert len(table.frame) == 120 and set(table.frame["admitted"]) == {"yes", "no"}
    warnings = " ".join(table.provenance.warnings)
    assert "byte-order mark" in warnings
    assert "repeating the column names (row 72)" in warnings


def test_a_repeated_header_row_in_a_workbook_is_left_out(tmp_path):
    from tests.test_bad_inputs import workbook

    book = tmp_path / "visits.xlsx"
    workbook(book, {"Visits": [HEADER] + base_rows(30) + [HEADER] + base_rows(20, seed=2)})
    table = read_table(book)
    assert len(table.frame) == 50
    assert any("repeating the column names (row 32)" in w for w in table.provenance.warnings)


def test_a_file_full_of_nul_bytes_is_still_refused_as_binary(tmp_path):
    data = tmp_path / "utf16_without_mark.csv"
    data.write_bytes(csv_text(HEADER, base_rows(40)).encode("utf-16-le"))
    refused(["fit", data, "--outcome", "admitted", "--model", tmp_path / "m.json"],
            ["binary data"], inputs=[data])


def test_a_repeated_header_is_found_after_an_empty_unnamed_column_was_dropped(tmp_path):
    # The empty column without a name goes first; the repeated header is still matched by
    # the columns' places, not by labels that counted the dropped column.
    rows = base_rows(40)
    lines = [",".join([""] + HEADER)] + [",".join([""] + [str(v) for v in r]) for r in rows[:20]]
    lines += [",".join([""] + HEADER)] + [",".join([""] + [str(v) for v in r]) for r in rows[20:]]
    data = tmp_path / "pasted_with_gap.csv"
    data.write_text("\n".join(lines) + "\n", encoding="utf-8")
    table = read_table(data)
    assert len(table.frame) == 40 and list(table.frame.columns) == HEADER
    assert any("repeating the column names" in w for w in table.provenance.warnings)
    read_table_bytes = tmp_path / "tab_bang.csv"
    read_table_bytes.write_bytes(b"\t!")  # found by the fuzz test: a KeyError before
    try:
        read_table(read_table_bytes)
    except Exception as exc:  # noqa: BLE001 - only a clear refusal is allowed
        from core.errors import InputError
        assert isinstance(exc, InputError), exc


def test_an_infinite_number_in_a_row_read_for_a_header_is_no_crash(tmp_path):
    """Found by the fuzz test: a cell of 1e400 (infinity once read) in a row compared with the
    header made the reader crash converting it to a whole number."""
    from core.data import read_table
    from core.errors import InputError

    path = tmp_path / "odd.csv"
    path.write_bytes(b",,,\n0,NA,0,0,NA\n0,1e400,0,0,NA")
    try:
        read_table(path)
    except InputError:
        pass  # refused in one sentence is as good as read
