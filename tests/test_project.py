"""The project file: round trip, versions and upgrade, refusal of bad files, data fingerprint,
and that a reopened project recomputes the identical tree."""

from __future__ import annotations

import json
import os
import shutil
from dataclasses import replace
from pathlib import Path

import pytest

from core.data import file_sha256, read_table
from core.design import DesignSpec
from core.dictionary import DataDictionary
from core.errors import InputError
from core.messages import kind_of
from core.project.project import (
    PROJECT_FORMAT, Project, check_data_file, load_project, save_project, upgrade_project,
)
from core.sizing import CVSettings, DerivationRequest, TreeSettings, choose_model, derive
from tests.helpers import DEMO_CSV, demo_inputs

ROOT = Path(__file__).resolve().parents[1]
OLD_EXAMPLE = ROOT / "tests" / "data" / "project_v0_draft.prunella"


@pytest.fixture(scope="module")
def dictionary() -> DataDictionary:
    return demo_inputs()[1]


def _request(seed: int = 3) -> DerivationRequest:
    preds = demo_inputs()[2]
    return DerivationRequest(DesignSpec("admitted", preds, patient_id="patient_id"),
                             tree=TreeSettings(min_leaf=10, seed=seed),
                             cv=CVSettings(folds=5, seed=seed))


def _project(data: Path, dictionary: DataDictionary, **changes) -> Project:
    base = Project(data_path=str(data), data_sha256=file_sha256(data), dictionary=dictionary,
                   request=_request(), size=4,
                   chart={"title": "Who is admitted?", "paper": "a4", "min_text": 9})
    return replace(base, **changes)


def test_round_trip_keeps_everything(tmp_path, dictionary):
    project = _project(DEMO_CSV, dictionary, model_fingerprint="ab" * 32)
    target = tmp_path / "work.prunella"
    save_project(project, target)
    raw = json.loads(target.read_text(encoding="utf-8"))
    assert raw["format"] == PROJECT_FORMAT
    assert raw["data"]["sha256"] == file_sha256(DEMO_CSV)
    assert raw["seed"] == 3
    again = load_project(target)
    assert again == project
    assert again.request.tree.seed == 3 and again.request.cv.folds == 5


def test_data_found_beside_a_moved_project(tmp_path, dictionary):
    first = tmp_path / "first"
    first.mkdir()
    shutil.copy(DEMO_CSV, first / "cohort.csv")
    save_project(_project(first / "cohort.csv", dictionary), first / "p.prunella")
    moved = tmp_path / "moved"
    shutil.move(first, moved)
    project = load_project(moved / "p.prunella")
    assert Path(project.data_path) == (moved / "cohort.csv").resolve()
    assert check_data_file(project).same


def test_changed_and_missing_data_file_are_detected(tmp_path, dictionary):
    data = tmp_path / "cohort.csv"
    shutil.copy(DEMO_CSV, data)
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
    assert Path(project.data_path).resolve() == DEMO_CSV.resolve()
    assert project.request.design.outcome == "admitted"
    assert project.size == 4 and project.seed == 0
    assert check_data_file(project).exists


@pytest.mark.parametrize("content, words", [
    ("{not json", "not valid JSON"),
    ("[1, 2]", "not a Prunella project"),
    ('{"format": "prunella-model/1"}', "model file, not a project file"),
    ('{"format": "prunella-project/9"}', "newer Prunella"),
    ('{"format": "prunella-project/x"}', "its format is 'prunella-project/x'"),
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
    save_project(_project(DEMO_CSV, dictionary), target)
    raw = json.loads(target.read_text(encoding="utf-8"))
    raw["seed"] = 99
    target.write_text(json.dumps(raw), encoding="utf-8")
    with pytest.raises(InputError, match="seed"):
        load_project(target)


def test_with_seed_sets_both_seeds(dictionary):
    project = _project(DEMO_CSV, dictionary).with_seed(11)
    assert project.request.tree.seed == 11 and project.request.cv.seed == 11 and project.seed == 11


def test_a_failed_save_leaves_the_previous_file(tmp_path, dictionary, monkeypatch):
    target = tmp_path / "p.prunella"
    save_project(_project(DEMO_CSV, dictionary, size="1se"), target)
    before = target.read_bytes()

    def broken_replace(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", broken_replace)
    with pytest.raises(InputError, match="could not be written"):  # said in one sentence
        save_project(_project(DEMO_CSV, dictionary, size=7), target)
    assert target.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["p.prunella"]  # no temporary file left


def test_reopened_project_recomputes_the_identical_tree(tmp_path, dictionary):
    table = read_table(DEMO_CSV)
    first = choose_model(derive(table, dictionary, _request()), 4)
    project = _project(DEMO_CSV, dictionary, model_fingerprint=first.model.fingerprint)
    save_project(project, tmp_path / "p.prunella")
    again = load_project(tmp_path / "p.prunella")
    redone = choose_model(derive(read_table(again.data_path), again.dictionary, again.request),
                          again.size)
    assert redone.model.fingerprint == again.model_fingerprint


# --- files that are JSON in name only (read through core.safe_files.read_json_document) -----


def _saved(tmp_path, dictionary) -> tuple[Path, dict]:
    target = tmp_path / "p.prunella"
    save_project(_project(DEMO_CSV, dictionary), target)
    return target, json.loads(target.read_text(encoding="utf-8"))


def test_deeply_nested_file_is_refused_not_a_crash(tmp_path):
    target = tmp_path / "deep.prunella"
    depth = 100_000  # far deeper than Python's parser can follow
    target.write_text('{"format": "prunella-project/1", "chart": ' + "[" * depth + "]" * depth
                      + "}", encoding="utf-8")
    with pytest.raises(InputError, match="nested too deeply"):
        load_project(target)


@pytest.mark.parametrize("constant", ["NaN", "Infinity", "-Infinity"])
def test_nan_and_infinity_are_refused(tmp_path, dictionary, constant):
    target, raw = _saved(tmp_path, dictionary)
    text = json.dumps(raw).replace('"min_text": 9', f'"min_text": {constant}')
    assert constant in text
    target.write_text(text, encoding="utf-8")
    with pytest.raises(InputError, match=f"{constant} is not allowed"):
        load_project(target)


def test_text_that_is_not_utf8_and_folders_and_missing_files_are_refused(tmp_path):
    binary = tmp_path / "binary.prunella"
    binary.write_bytes(b"\xff\xfe\x00{\x81")
    with pytest.raises(InputError, match="not UTF-8"):
        load_project(binary)
    folder = tmp_path / "folder.prunella"
    folder.mkdir()
    with pytest.raises(InputError, match="is a folder; choose the Prunella project file"):
        load_project(folder)
    with pytest.raises(InputError, match="No project file at"):
        load_project(tmp_path / "absent.prunella")


def _set(raw: dict, dotted: str, value) -> None:
    keys = dotted.split(".")
    for key in keys[:-1]:
        raw = raw[key]
    raw[keys[-1]] = value


@pytest.mark.parametrize("field, value, named", [
    ("size", True, "size"),  # JSON true is not a number of boxes
    ("size", 0, "size"),
    ("size", 2.5, "size"),
    ("seed", "three", "seed"),
    ("data", [1], "data"),
    ("data.path", 5, "data.path"),
    ("data.sheet", 1, "data.sheet"),
    ("data.sha256", 12345, "data.sha256"),
    ("data.sha256", "not-a-fingerprint", "data.sha256"),
    ("dictionary", "the usual", "dictionary"),
    ("request", 7, "request"),
    ("request.design", None, "request.design"),
    ("request.design.outcome", 1, "request.design.outcome"),
    ("request.design.predictors", "age", "request.design.predictors"),
    ("request.design.predictors", ["age", 3], "request.design.predictors[1]"),
    ("request.design.task", "clustering", "request.design.task"),
    ("request.tree.min_leaf", "5", "request.tree.min_leaf"),
    ("request.tree.min_leaf", 0, "request.tree.min_leaf"),
    ("request.tree.max_depth", False, "request.tree.max_depth"),
    ("request.tree.priors", "tilted", "request.tree.priors"),
    ("request.tree.priors", [0.5, "x"], "request.tree.priors"),
    ("request.tree.loss", [[0, 1], [1, "a"]], "request.tree.loss"),
    ("request.tree.miss_cost", -2, "request.tree.miss_cost"),
    ("request.tree.criterion", "chaos", "request.tree.criterion"),
    ("request.cv.folds", 1, "request.cv.folds"),
    ("request.cv.folds", "10", "request.cv.folds"),
    ("request.cv.plan", "bootstrap", "request.cv.plan"),
    ("request.cv.grouped", "yes", "request.cv.grouped"),
    ("request.cv.validation_share", 1.5, "request.cv.validation_share"),
    ("request.holdout", 1.0, "request.holdout"),
    ("chart", [], "chart"),
    ("chart.title", 5, "chart.title"),
    ("chart.min_text", "big", "chart.min_text"),
    ("model_fingerprint", 5, "model_fingerprint"),
])
def test_fields_of_the_wrong_type_are_refused_naming_the_field(tmp_path, dictionary, field,
                                                               value, named):
    target, raw = _saved(tmp_path, dictionary)
    _set(raw, field, value)
    if field.endswith("seed"):
        raw["request"]["cv"]["seed"] = raw["request"]["tree"]["seed"] = 3
    target.write_text(json.dumps(raw), encoding="utf-8")
    with pytest.raises(InputError) as caught:
        load_project(target)
    message = str(caught.value)
    assert f"The project file p.prunella is damaged at {named}:" in message, message
    assert "save the project again from Prunella" in message
    assert kind_of(message).code == "project.damaged"


def test_every_message_of_a_project_has_advice_in_the_catalogue(tmp_path, dictionary):
    data = tmp_path / "cohort.csv"
    shutil.copy(DEMO_CSV, data)
    project = _project(data, dictionary)
    messages = [check_data_file(project).message]
    data.write_text(data.read_text(encoding="utf-8") + "\n", encoding="utf-8")
    messages.append(check_data_file(project).message)
    data.unlink()
    messages.append(check_data_file(project).message)
    codes = [kind_of(m).code for m in messages]
    assert codes == ["project.data_same", "project.data_changed", "project.data_missing"]
