"""Hostile output paths and files that never end (issue 15, items 2, 3, 8 and 12): each is
refused before any work with exit status 2 and one sentence, no traceback, and every input
byte-identical (SHA-256 and modification time). The data are invented."""

from __future__ import annotations

import errno
import os
import shutil
from pathlib import Path

import pytest

from core.errors import InputError
from core.safe_files import write_text_atomic
from tests.helpers import prunella
from tests.test_bad_inputs import HEADER, base_rows, csv_text
from tests.test_hostile_inputs import refused


@pytest.fixture
def visits(tmp_path) -> Path:
    data = tmp_path / "visits.csv"
    data.write_text(csv_text(HEADER, base_rows(120)), encoding="utf-8")
    return data


@pytest.fixture(scope="module")
def saved_model(tmp_path_factory) -> tuple[Path, Path]:
    folder = tmp_path_factory.mktemp("saved")
    data = folder / "visits.csv"
    data.write_text(csv_text(HEADER, base_rows(120)), encoding="utf-8")
    model = folder / "tree.json"
    ran = prunella("fit", data, "--outcome", "admitted", "--folds", "3", "--model", model,
                   "--quiet")
    assert ran.returncode == 0, ran.stderr
    return data, model


def fit(visits, *more):
    return ["fit", visits, "--outcome", "admitted", "--folds", "3", *more]


# --- 2. output paths -------------------------------------------------------------------------


def test_an_output_that_is_a_folder_or_empty_is_refused(visits):
    refused(fit(visits, "--model", visits.parent), ["--model", "is a folder"], [visits])
    refused(fit(visits, "--model", ""), ["--model", "empty file name"], [visits])
    refused(fit(visits, "--model", "m.json", "--chart", f"{visits.parent}/"),
            ["--chart", "is a folder"], [visits])


def test_a_full_disk_leaves_no_temporary_file_and_the_old_file_intact(tmp_path, monkeypatch):
    target = tmp_path / "model.json"
    target.write_text("the previous file", encoding="utf-8")

    def no_room(*_args, **_kwargs):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    monkeypatch.setattr(os, "fsync", no_room)
    with pytest.raises(InputError) as told:
        write_text_atomic(target, "new contents")
    assert "could not be written" in str(told.value) and "space" in str(told.value)
    assert target.read_text(encoding="utf-8") == "the previous file"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["model.json"]


def test_a_read_only_folder_is_refused_before_any_work(visits, tmp_path):
    if os.geteuid() == 0:
        pytest.skip("root may write into any folder")
    closed = tmp_path / "closed"
    closed.mkdir()
    closed.chmod(0o555)
    try:
        refused(fit(visits, "--model", closed / "m.json"), ["--model", "does not allow"],
                [visits])
    finally:
        closed.chmod(0o755)


# --- 3. never write over an input --------------------------------------------------------------


def test_the_dictionary_beside_the_data_is_never_written_over(visits):
    dictionary = visits.with_name("visits.dictionary.json")
    ran = prunella("fit", visits, "--outcome", "admitted", "--folds", "3", "--model",
                   visits.with_name("first.json"), "--quiet")
    assert ran.returncode == 0, ran.stderr
    from core.dictionary.for_table import dictionary_for
    from core.data.table import read_table

    found, _ = dictionary_for(read_table(visits), None)
    found.save(dictionary)
    refused(fit(visits, "--model", dictionary), ["is an input file"], [visits, dictionary])
    given = visits.with_name("mine.dictionary.json")
    shutil.copy(dictionary, given)
    refused(fit(visits, "--dictionary", given, "--model", given), ["is an input file"],
            [visits, dictionary, given])


def test_an_input_by_another_path_link_or_hard_link_is_refused(visits):
    link = visits.with_name("link.json")
    link.symlink_to(visits)
    refused(fit(visits, "--model", link), ["--model", "symbolic link"], [visits])
    hard = visits.with_name("hard.json")
    os.link(visits, hard)
    refused(fit(visits, "--model", hard), ["is an input file"], [visits])
    refused(fit(visits, "--rules", f"{visits.parent}/./visits.csv", "--model", "m.json"),
            ["is an input file"], [visits])


def test_score_check_report_and_chart_never_write_over_their_inputs(saved_model):
    data, model = saved_model
    inputs = [data, model]
    refused(["score", model, data, "--out", model], ["is an input file"], inputs)
    refused(["check", model, data, "--out", data], ["is an input file"], inputs)
    refused(["check", model, data, "--checked-model", model], ["is an input file"], inputs)
    refused(["report", model, data, "--out", model], ["is an input file"], inputs)
    refused(["chart", model, "--out", model], ["is an input file"], inputs)


# --- 8. files that never end -----------------------------------------------------------------


def test_a_named_pipe_as_data_or_model_is_refused_at_once(tmp_path, saved_model):
    pipe = tmp_path / "pipe.csv"
    os.mkfifo(pipe)
    refused(["fit", pipe, "--outcome", "admitted", "--model", tmp_path / "m.json"],
            ["pipe.csv", "not an ordinary file"])
    refused(["chart", pipe, "--out", tmp_path / "c.pdf"], ["not an ordinary file"])
    data, model = saved_model
    refused(["score", model, data, "--out", pipe], ["--out", "not an ordinary file"],
            [data, model])


# --- 12. outputs that collide ----------------------------------------------------------------


@pytest.mark.parametrize("first, second", [("--model", "--rules"), ("--model", "--curve"),
                                           ("--rules", "--chart")])
def test_two_outputs_naming_one_file_are_refused(visits, first, second):
    others = {"--model": "m.json"}
    args = fit(visits, first, visits.with_name("same.out"), second,
               f"{visits.parent}/./same.out")
    if "--model" not in (first, second):
        args += ["--model", visits.with_name(others["--model"])]
    refused(args, [first, second, "both name"], [visits])
    assert not visits.with_name("same.out").exists()


def test_check_out_and_checked_model_must_differ(saved_model, tmp_path):
    data, model = saved_model
    out = tmp_path / "z.json"
    refused(["check", model, data, "--out", out, "--checked-model", out],
            ["--out", "--checked-model", "both name"], [data, model])


# --- 7. archives that explode ----------------------------------------------------------------


def test_a_workbook_that_would_unpack_to_gigabytes_is_refused_unread(tmp_path):
    """A zip bomb named .xlsx: its declared sizes are judged before anything is unpacked."""
    import zipfile

    bomb = tmp_path / "bomb.xlsx"
    with zipfile.ZipFile(bomb, "w", compression=zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("[Content_Types].xml", "<Types/>")
        archive.writestr("xl/workbook.xml", "<workbook/>")
        with archive.open("xl/worksheets/sheet1.xml", "w", force_zip64=True) as sheet:
            chunk = b"0" * 2**20
            for _ in range(300):  # 300 MB of zeros, a few hundred kB packed
                sheet.write(chunk)
    assert bomb.stat().st_size < 2 * 2**20
    refused(["fit", bomb, "--outcome", "admitted", "--model", tmp_path / "m.json"],
            ["bomb.xlsx", "would unpack to", "CSV"], [bomb])
