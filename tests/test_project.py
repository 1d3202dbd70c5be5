"""The project file: round trip, versions and upgrade, refusal of bad files, data fingerprint,
and that a reopened project recomputes the identical tree."""

from __future__ import annotations

import json
import os
import shutil
from dataclasses import replace
from pathlib import Path

import pytest

from core.derive import DerivationRequest, choose_model, derive
from core.design import DesignSpec
from core.errors import InputError
from core.grow import TreeSettings
from core.project import (
    PROJECT_FORMAT, Project, check_data_file, load_project, save_project, upgrade_project,
)
from core.resample import CVSettings
from core.table import file_sha256, read_table
from core.variables import DataDictionary

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "sample_data" / "breathless_ed.csv"
DEMO_DICT = ROOT / "sample_data" / "breathless_ed.dictionary.json"
OLD_EXAMPLE = ROOT / "tests" / "data" / "project_v0_draft.prunella"


@pytest.fixture(scope="module")
def dictionary() -> DataDictionary:
    return DataDictionary.load(DEMO_DICT)


def _request(dictionary: DataDictionary, seed: int = 3) -> DerivationRequest:
    preds = tuple(c.name for c in dictionary.columns if c.role == "predictor")
    return DerivationRequest(DesignSpec("admitted", preds, patient_id="patient_id"),
                             tree=TreeSettings(min_leaf=10, seed=seed),
                             cv=CVSettings(folds=5, seed=seed))


def _project(data: Path, dictionary: DataDictionary, **changes) -> Project:
    base = Project(data_path=str(data), data_sha256=file_sha256(data), dictionary=dictionary,
                   request=_request(dictionary), size=4,
                   chart={"title": "Who is admitted?", "paper": "a4", "min_text": 9})
    return replace(base, **changes)


def test_round_trip_keeps_everything(tmp_path, dictionary):
    project = _project(DEMO, dictionary, model_fingerprint="ab" * 32)
    target = tmp_path / "work.prunella"
    save_project(project, target)
    raw = json.loads(target.read_text(encoding="utf-8"))
    assert raw["format"] == PROJECT_FORMAT
    assert raw["data"]["sha256"] == file_sha256(DEMO)
    assert raw["seed"] == 3
    again = load_project(target)
    assert again == project
    assert again.request.tree.seed == 3 and again.request.cv.folds == 5


def test_data_found_beside_a_moved_project(tmp_path, dictionary):
    first = tmp_path / "first"
    first.mkdir()
    shutil.copy(DEMO, first / "cohort.csv")
    save_project(_project(first / "cohort.csv", dictionary), first / "p.prunella")
    moved = tmp_path / "moved"
    shutil.move(first, moved)
    project = load_project(moved / "p.prunella")
    assert Path(project.data_path) == (moved / "cohort.csv").resolve()
    assert check_data_file(project).same


def test_changed_and_missing_data_file_are_detected(tmp_path, dictionary):
    data = tmp_path / "cohort.csv"
    shutil.copy(DEMO, data)
    project = _project(data, dictionary)
    assert check_data_file(project).same
    with open(data, "a", encoding="utf-8") as handle:
        handle.write("V99999,P9999,North,2025-12-31,50,male,18,97,80,37.0,120,,3,walked in,"
                     "wheeze,no,3.0,no\n")
    check = check_data_file(project)
    assert check.exists and not check.same
    assert "has changed" in check.message and check.saved_sha256[:12] in check.message
    data.unlink()
    check = check_data_file(project)
    assert not check.exists and "not at" in check.message


def test_old_draft_layout_is_upgraded():
    """The kept example of layout 0 must open as layout 1 with the same settings."""
    raw = json.loads(OLD_EXAMPLE.read_text(encoding="utf-8"))
    assert raw["format"] == "prunella-project/0"
    upgraded = upgrade_project(raw)
    assert upgraded["format"] == PROJECT_FORMAT
    assert upgraded["size"] == 4
    assert upgraded["chart"]["title"].startswith("Who is admitted?")
    project = load_project(OLD_EXAMPLE)
    assert Path(project.data_path).resolve() == DEMO.resolve()
    assert project.request.design.outcome == "admitted"
    assert project.size == 4 and project.seed == 0
    assert check_data_file(project).exists


@pytest.mark.parametrize("content, words", [
    ("{not json", "not valid JSON"),
    ("[1, 2]", "not a Prunella project"),
    ('{"format": "prunella-model/1"}', "not a Prunella project"),
    ('{"format": "prunella-project/9"}', "newer Prunella"),
    ('{"format": "prunella-project/x"}', "does not know"),
    ('{"format": "prunella-project/1", "data": {"path": 5}}', "damaged"),
    ('{"format": "prunella-project/1", "data": null, "size": "huge"}', "damaged"),
    ('{"format": "prunella-project/1", "data": null, "dictionary": {"format": "x"}}', "damaged"),
    ('{"format": "prunella-project/1", "data": null, "request": {"design": {}}}', "damaged"),
    ('{"format": "prunella-project/0", "settings": 3}', "damaged"),
])
def test_bad_files_are_refused_with_a_message(tmp_path, content, words):
    target = tmp_path / "bad.prunella"
    target.write_text(content, encoding="utf-8")
    with pytest.raises(InputError, match=words):
        load_project(target)


def test_inconsistent_seed_is_refused(tmp_path, dictionary):
    target = tmp_path / "p.prunella"
    save_project(_project(DEMO, dictionary), target)
    raw = json.loads(target.read_text(encoding="utf-8"))
    raw["seed"] = 99
    target.write_text(json.dumps(raw), encoding="utf-8")
    with pytest.raises(InputError, match="seed"):
        load_project(target)


def test_with_seed_sets_both_seeds(dictionary):
    project = _project(DEMO, dictionary).with_seed(11)
    assert project.request.tree.seed == 11 and project.request.cv.seed == 11 and project.seed == 11


def test_a_failed_save_leaves_the_previous_file(tmp_path, dictionary, monkeypatch):
    target = tmp_path / "p.prunella"
    save_project(_project(DEMO, dictionary, size="1se"), target)
    before = target.read_bytes()

    def broken_replace(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", broken_replace)
    with pytest.raises(OSError):
        save_project(_project(DEMO, dictionary, size=7), target)
    assert target.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["p.prunella"]  # no temporary file left


def test_reopened_project_recomputes_the_identical_tree(tmp_path, dictionary):
    table = read_table(DEMO)
    first = choose_model(derive(table, dictionary, _request(dictionary)), 4)
    project = _project(DEMO, dictionary, model_fingerprint=first.model.fingerprint)
    save_project(project, tmp_path / "p.prunella")
    again = load_project(tmp_path / "p.prunella")
    redone = choose_model(derive(read_table(again.data_path), again.dictionary, again.request),
                          again.size)
    assert redone.model.fingerprint == again.model_fingerprint
