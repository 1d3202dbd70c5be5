"""File modes of what Prunella writes (issue 15, items 12 and 14): a temporary file is readable
by its owner only while it is written (it may hold every patient row); the finished chart,
report, model, rules, curve and project get the user's normal mode (0666 less the umask, so
0644 under umask 022, 0640 under 027), or keep the mode of the file they replace; a temporary
file an earlier, killed save of ours left behind is removed on the next save with a note.
The data are invented."""

from __future__ import annotations

import os
import stat
import time
from pathlib import Path

import pytest

from core import safe_files
from core.data import file_sha256
from core.dictionary import DataDictionary
from core.project import Project, save_project
from core.safe_files import TEMP_MARK, save_notes, write_text_atomic
from tests.helpers import DEMO_CSV, DEMO_DICTIONARY, prunella
from tests.test_bad_inputs import HEADER, base_rows, csv_text

pytestmark = pytest.mark.skipif(os.name != "posix", reason="POSIX file modes")


@pytest.fixture
def umask():
    """Set the process's umask for one test, then put the old one back."""
    before = os.umask(0o022)
    os.umask(before)
    masks = []

    def set_mask(mask: int) -> None:
        masks.append(os.umask(mask))

    yield set_mask
    os.umask(before)


def mode_of(path) -> int:
    return stat.S_IMODE(os.stat(path).st_mode)


@pytest.fixture
def temporary_modes(monkeypatch) -> list[int]:
    """The mode of every temporary file at the moment its bytes are flushed to disk (while
    it is being written, before it is renamed into place)."""
    seen: list[int] = []
    real = os.fsync

    def fsync(descriptor):
        info = os.fstat(descriptor)
        if stat.S_ISREG(info.st_mode):
            seen.append(stat.S_IMODE(info.st_mode))
        return real(descriptor)

    monkeypatch.setattr(safe_files.os, "fsync", fsync)
    return seen


@pytest.fixture
def visits(tmp_path) -> Path:
    data = tmp_path / "visits.csv"
    data.write_text(csv_text(HEADER, base_rows(120)), encoding="utf-8")
    return data


@pytest.mark.parametrize("mask, expected", [(0o022, 0o644), (0o027, 0o640), (0o077, 0o600)])
def test_every_output_of_the_command_line_gets_the_users_normal_mode(
        tmp_path, visits, umask, temporary_modes, mask, expected):
    umask(mask)
    out = tmp_path / "out"
    out.mkdir()
    ran = prunella("fit", visits, "--outcome", "admitted", "--folds", "3", "--quiet",
                   "--model", out / "tree.json", "--rules", out / "rules.txt",
                   "--curve", out / "curve.csv", "--chart", out / "chart.pdf")
    assert ran.returncode == 0, ran.stderr
    ran = prunella("report", out / "tree.json", visits, "--out", out / "report.pdf",
                   "--no-nested", "--bootstrap", "2", "--jobs", "1", "--date", "2026-01-05")
    assert ran.returncode == 0, ran.stderr
    written = sorted(p.name for p in out.iterdir())
    assert written == ["chart.pdf", "curve.csv", "report.pdf", "rules.txt", "tree.json"]
    assert {name: mode_of(out / name) for name in written} == dict.fromkeys(written, expected)
    # Each of the five was a private temporary file while its bytes were written.
    assert len(temporary_modes) >= 5 and set(temporary_modes) == {0o600}


def test_a_project_gets_the_users_normal_mode(tmp_path, umask, temporary_modes):
    umask(0o022)
    project = Project(data_path=str(DEMO_CSV), data_sha256=file_sha256(DEMO_CSV),
                      dictionary=DataDictionary.load(DEMO_DICTIONARY))
    save_project(project, tmp_path / "work.prunella")
    assert mode_of(tmp_path / "work.prunella") == 0o644
    assert temporary_modes == [0o600]


def test_a_replaced_file_keeps_its_own_mode(tmp_path, umask):
    umask(0o022)
    target = tmp_path / "tree.json"
    target.write_text("the earlier model", encoding="utf-8")
    target.chmod(0o600)  # the user made it private: a new save keeps it so
    write_text_atomic(target, "the new model")
    assert mode_of(target) == 0o600 and target.read_text(encoding="utf-8") == "the new model"
    target.chmod(0o664)
    write_text_atomic(target, "again")
    assert mode_of(target) == 0o664


def _leftover(folder: Path, name: str = "tree.json") -> Path:
    """A temporary file as a save of ours killed before its rename leaves it: our naming,
    a writer process that has ended, written two minutes ago."""
    leftover = folder / f".{name}{TEMP_MARK}999999999-k1ll3d.tmp"
    leftover.write_text('{"rows": "every patient row"}', encoding="utf-8")
    leftover.chmod(0o600)
    old = time.time() - 120
    os.utime(leftover, (old, old))
    return leftover


def test_a_leftover_temporary_file_is_removed_on_the_next_save_with_a_note(tmp_path):
    leftover = _leftover(tmp_path)
    # Not ours (another name pattern) or not a leftover (a save that runs now): kept.
    theirs = tmp_path / ".tree.json.part.tmp"
    theirs.write_text("someone else's", encoding="utf-8")
    notes: list[str] = []
    with save_notes(notes.append):
        write_text_atomic(tmp_path / "tree.json", "{}")
    assert not leftover.exists() and theirs.exists()
    assert notes == [f"Removed 1 temporary file left in {tmp_path} by an earlier save that "
                     f"was stopped before it finished ({leftover.name}); they held a copy of "
                     "what was being saved."]
    assert sorted(p.name for p in tmp_path.iterdir()) == [".tree.json.part.tmp", "tree.json"]
    with save_notes(notes.append):  # nothing left: nothing said
        write_text_atomic(tmp_path / "tree.json", "{}")
    assert len(notes) == 1


def test_the_command_line_prints_the_note(tmp_path, visits):
    leftover = _leftover(tmp_path, "visits-tree.json")
    ran = prunella("fit", visits, "--outcome", "admitted", "--folds", "3", "--quiet",
                   "--model", tmp_path / "visits-tree.json")
    assert ran.returncode == 0, ran.stderr
    assert not leftover.exists()
    assert f"note: Removed 1 temporary file left in {tmp_path}" in ran.stderr
    assert leftover.name in ran.stderr and "Traceback" not in ran.stderr
