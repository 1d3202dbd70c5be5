"""Safe files: atomic saves survive a kill, Prunella's JSON files are checked before use, and
exported spreadsheets cannot run formulas (OWASP, "CSV Injection")."""

from __future__ import annotations

import copy
import json
import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from core.data import read_table
from core.design import DesignSpec
from core.dictionary import ColumnSpec, DataDictionary, infer_dictionary
from core.errors import InputError
from core.model import TreeModel
from core.safe_files import (
    MAX_JSON_BYTES, neutralise_cell, read_json_document, write_csv_safely, write_text_atomic,
)
from core.sizing import CVSettings, DerivationRequest, derive
from tests.helpers import prunella

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="module")
def model(tmp_path_factory) -> TreeModel:
    rng = np.random.default_rng(0)
    n = 200
    spo2 = rng.integers(85, 101, n)
    frame = pd.DataFrame({"spo2": spo2, "mode": rng.choice(["ambulance", "walked in"], n),
                          "admitted": np.where((spo2 <= 91) ^ (rng.random(n) < 0.1), "yes", "no")})
    path = tmp_path_factory.mktemp("model") / "data.csv"
    frame.to_csv(path, index=False)
    table = read_table(path)
    dictionary, _ = infer_dictionary(table.frame)
    request = DerivationRequest(DesignSpec("admitted", ("spo2", "mode")), cv=CVSettings(folds=5))
    return derive(table, dictionary, request).model


# --- atomic saves ---------------------------------------------------------------------------


_SLOW_SAVE = textwrap.dedent("""
    import os, sys, time
    sys.path.insert(0, {root!r})
    import core.safe_files as safe
    from core.model import TreeModel

    def slow_fsync(fd):  # a slow disk: the bytes are written, the flush never ends
        time.sleep(60)
    os.fsync = slow_fsync
    target = sys.argv[1]
    if sys.argv[2] == "model":
        model = TreeModel.load(target)
        model = TreeModel(**{{**model.__dict__, "n_rows": model.n_rows + 1}})
        model.save(target)
    else:
        safe.write_text_atomic(target, "x" * 50_000_000)
""")


def _kill_mid_save(target: Path, what: str) -> None:
    folder = target.parent
    before = set(os.listdir(folder))
    child = subprocess.Popen([sys.executable, "-c", _SLOW_SAVE.format(root=str(ROOT)),
                              str(target), what], cwd=ROOT)
    deadline = time.time() + 120
    try:
        while time.time() < deadline:
            temps = [f for f in set(os.listdir(folder)) - before if f.endswith(".tmp")]
            if temps and (folder / temps[0]).stat().st_size > 0:
                break
            if child.poll() is not None:
                pytest.fail(f"the child ended before it was killed (status {child.returncode})")
            time.sleep(0.02)
        else:
            pytest.fail("the save never started")
    finally:
        child.send_signal(signal.SIGKILL)
        child.wait(timeout=30)
    assert child.returncode == -signal.SIGKILL


def test_a_model_save_killed_midway_leaves_the_previous_file(tmp_path, model):
    target = tmp_path / "model.json"
    model.save(target)
    old = target.read_bytes()
    _kill_mid_save(target, "model")
    assert target.read_bytes() == old
    assert TreeModel.load(target).fingerprint == model.fingerprint


def test_a_large_save_killed_midway_leaves_the_previous_file(tmp_path):
    target = tmp_path / "project.json"
    write_text_atomic(target, json.dumps({"format": "prunella-project/1", "size": 3}))
    old = target.read_bytes()
    _kill_mid_save(target, "text")
    assert target.read_bytes() == old
    assert read_json_document(target, "project")["size"] == 3


def test_a_failed_save_removes_its_temporary_file(tmp_path, monkeypatch):
    target = tmp_path / "m.json"
    write_text_atomic(target, "old")

    def broken(fd):
        raise OSError(28, "No space left on device")
    monkeypatch.setattr(os, "fsync", broken)
    with pytest.raises(InputError, match="could not be written .No space left on device"):
        write_text_atomic(target, "new")
    assert target.read_text() == "old" and os.listdir(tmp_path) == ["m.json"]


# --- Prunella's JSON files ------------------------------------------------------------------


def _mutations(good: dict):
    """(name, damaged model data) pairs; each must be refused with InputError."""
    def changed(fn):
        data = copy.deepcopy(good)
        fn(data)
        return data

    internal = next(n for n in good["nodes"] if n["children"])
    i = internal["id"] - 1
    leaf = next(n for n in good["nodes"] if not n["children"])
    j = leaf["id"] - 1
    yield "a list", [good]
    yield "a string", "prunella-model/1"
    yield "null", None
    yield "no format", changed(lambda d: d.pop("format"))
    yield "format of a dictionary", changed(lambda d: d.update(format="prunella-dictionary/1"))
    yield "newer version", changed(lambda d: d.update(format="prunella-model/7"))
    yield "version zero", changed(lambda d: d.update(format="prunella-model/0"))
    yield "format garbage", changed(lambda d: d.update(format=["prunella"]))
    yield "no nodes", changed(lambda d: d.pop("nodes"))
    yield "nodes a dict", changed(lambda d: d.update(nodes={"1": {}}))
    yield "empty nodes", changed(lambda d: d.update(nodes=[]))
    yield "node a list", changed(lambda d: d["nodes"].__setitem__(0, [1, 2]))
    yield "node id text", changed(lambda d: d["nodes"][0].update(id="1"))
    yield "node id true", changed(lambda d: d["nodes"][0].update(id=True))
    yield "ids renumbered", changed(lambda d: d["nodes"][-1].update(id=99))
    yield "child missing", changed(lambda d: d["nodes"][i].update(children=[2, 999]))
    yield "child backwards", changed(lambda d: d["nodes"][i].update(children=[1, 2]))
    yield "child twice", changed(lambda d: d["nodes"][0].update(
        children=[d["nodes"][0]["children"][0]] * 2))
    yield "one child", changed(lambda d: d["nodes"][i].update(children=[2]))
    yield "children text", changed(lambda d: d["nodes"][i].update(children="2,3"))
    yield "no split", changed(lambda d: d["nodes"][i].pop("split"))
    yield "unknown column", changed(lambda d: d["nodes"][i]["split"].update(column="shoe size"))
    yield "threshold text", changed(lambda d: d["nodes"][i]["split"].update(kind="above",
                                                                            threshold="92"))
    yield "threshold missing", changed(lambda d: d["nodes"][i]["split"].update(kind="above",
                                                                               threshold=None))
    yield "unknown kind", changed(lambda d: d["nodes"][i]["split"].update(kind="between"))
    yield "missing_goes", changed(lambda d: d["nodes"][i]["split"].update(missing_goes="left"))
    yield "levels not text", changed(lambda d: d["nodes"][i]["split"].update(kind="in",
                                                                             yes_levels=[1]))
    yield "counts short", changed(lambda d: d["nodes"][j].update(counts=[1]))
    yield "counts negative", changed(lambda d: d["nodes"][j].update(counts=[-1, 2]))
    yield "prediction unknown", changed(lambda d: d["nodes"][j].update(prediction="maybe"))
    yield "n text", changed(lambda d: d["nodes"][j].update(n="12"))
    yield "unreached box", changed(lambda d: d["nodes"].append({**copy.deepcopy(leaf),
                                                                "id": len(d["nodes"]) + 1}))
    yield "task unknown", changed(lambda d: d.update(task="clustering"))
    yield "one class", changed(lambda d: d.update(classes=["yes"]))
    yield "classes text", changed(lambda d: d.update(classes="no,yes"))
    yield "n_rows text", changed(lambda d: d.update(n_rows="200"))
    yield "predictors dict", changed(lambda d: d.update(predictors={"spo2": {}}))
    yield "predictor nameless", changed(lambda d: d["predictors"][0].pop("name"))
    yield "predictor levels number", changed(lambda d: d["predictors"][0].update(levels=5))
    yield "outcome spec text", changed(lambda d: d.update(outcome_spec="admitted"))
    yield "path list", changed(lambda d: d.update(path=[1, 2]))
    yield "chosen missing", changed(lambda d: d.pop("chosen"))


def test_damaged_model_data_is_refused_with_input_error(model):
    good = model.to_dict()
    assert TreeModel.from_dict(copy.deepcopy(good)).fingerprint == model.fingerprint
    names = []
    for name, data in _mutations(good):
        names.append(name)
        with pytest.raises(InputError) as caught:
            TreeModel.from_dict(data)
        assert "Prunella" in str(caught.value), (name, caught.value)
    assert len(names) >= 40


@pytest.mark.parametrize("content,expected", [
    (b"", "not valid JSON"),
    (b"\x80\x81not text", "not UTF-8"),
    (b'{"format": "prunella-model/1", "x": NaN}', "NaN is not allowed"),
    (b"[" * 100_000 + b"]" * 100_000, "nested too deeply"),
    (b'{"format": "prunella-model/1",', "line 1, column"),
    (b"\x80\x04\x95\x10\x00\x00\x00\x00\x00\x00\x00}\x94.", "not UTF-8"),  # a pickle
    (b'"just a string"', "does not hold a JSON object"),
    (b'{"format": "prunella-project/1"}', "is a Prunella project file, not a model file"),
    (b'{"format": "prunella-model/2"}', "newer Prunella"),
])
def test_model_files_are_read_as_data_only(tmp_path, content, expected):
    path = tmp_path / "model.json"
    path.write_bytes(content)
    with pytest.raises(InputError, match=expected):
        TreeModel.load(path)
    assert path.read_bytes() == content


def test_oversized_and_missing_files_are_refused_before_reading(tmp_path):
    huge = tmp_path / "huge.json"
    with open(huge, "wb") as handle:
        handle.truncate(MAX_JSON_BYTES + 1)  # sparse: costs no disk
    with pytest.raises(InputError, match="far larger than any Prunella model"):
        TreeModel.load(huge)
    with pytest.raises(InputError, match="No model file"):
        TreeModel.load(tmp_path / "absent.json")
    with pytest.raises(InputError, match="is a folder"):
        read_json_document(tmp_path, "project")


def test_core_never_unpickles_or_evaluates():
    for path in (ROOT / "core").rglob("*.py"):
        text = path.read_text(encoding="utf-8")
        for forbidden in ("import pickle", "pickle.load", "eval(", "exec(", "yaml.load",
                          "joblib.load", "marshal.loads"):
            assert forbidden not in text, f"{path.name} uses {forbidden}"


@pytest.mark.parametrize("data,expected", [
    ({"format": "prunella-dictionary/1", "columns": {"a": {}}}, "must be a list"),
    ({"format": "prunella-dictionary/1", "columns": ["age"]}, "written as str"),
    ({"format": "prunella-dictionary/1", "columns": [{"name": 3}]}, "has no 'name'"),
    ({"format": "prunella-dictionary/1", "columns": [{"name": "a", "levels": 3}]},
     "'levels' must be a list of texts"),
    ({"format": "prunella-dictionary/1", "columns": [{"name": "a", "label": ["x"]}]},
     "'label' must be a text"),
    ({"format": "prunella-dictionary/1", "columns": [{"name": "a", "levels": ["x", "x"]}]},
     "more than once"),
    ({"format": "prunella-dictionary/1", "columns": [{"name": "a", "kind": "colour"}]},
     "kind 'colour' is not one of"),
    ({"format": "prunella-dictionary/9", "columns": []}, "newer Prunella"),
    ({"format": "prunella-model/1", "columns": []}, "is a Prunella model file, not a data"),
])
def test_damaged_dictionaries_are_refused(tmp_path, data, expected):
    path = tmp_path / "d.json"
    path.write_text(json.dumps(data))
    with pytest.raises(InputError, match=expected):
        DataDictionary.load(path)


def test_good_dictionary_still_loads(tmp_path):
    dictionary = DataDictionary((ColumnSpec("a", kind="nominal", levels=("x", "y")),))
    dictionary.save(tmp_path / "d.json")
    assert DataDictionary.load(tmp_path / "d.json") == dictionary


# --- exports cannot run formulas ------------------------------------------------------------

NASTY = ["=1+1", "+1+1", "-1+1", "@SUM(A1:A2)", "\t=cmd", "\r=cmd",
         "=HYPERLINK(\"http://example.invalid\",\"click\")"]


def test_every_formula_start_is_neutralised():
    """OWASP, "CSV Injection": =, +, -, @, tab and carriage return start a formula."""
    for text in NASTY:
        assert neutralise_cell(text) == "'" + text
    for safe in ("plain", "1+1", " =1", "", "a=b"):
        assert neutralise_cell(safe) == safe
    assert neutralise_cell(-3.5) == -3.5 and neutralise_cell(None) is None


def test_csv_export_neutralises_headers_and_cells_but_keeps_numbers(tmp_path):
    frame = pd.DataFrame({"=evil": NASTY, "-5": range(len(NASTY)),
                          "value": [-1.5, 2, 3, 4, 5, 6, 7]})
    frame["cat"] = pd.Categorical(["@x", "y", "@x", "y", "y", "y", "y"])
    path = tmp_path / "out.csv"
    write_csv_safely(frame, path)
    back = pd.read_csv(path, keep_default_na=False)
    assert list(back.columns) == ["'=evil", "'-5", "value", "cat"]
    assert all(cell.startswith("'") for cell in back["'=evil"])
    assert back["'=evil"].tolist()[5] == "'\n=cmd"  # CR kept inside its (quoted) cell
    raw = path.read_bytes()
    assert b"\r" not in raw and raw.count(b"\n") == len(NASTY) + 2
    assert back["value"].iloc[0] == -1.5  # a negative number stays a number
    assert back["cat"].iloc[0] == "'@x"
    assert frame.columns[0] == "=evil"  # the caller's table is not changed


def test_prunella_score_output_is_neutralised(tmp_path, model):
    model_path = tmp_path / "m.json"
    model.save(model_path)
    data = pd.DataFrame({"spo2": [88, 97, 93], "mode": ["ambulance", "walked in", "ambulance"],
                         "note": ["=HYPERLINK(\"http://x.invalid\")", "@risk", "fine"],
                         "+header": ["a", "b", "c"]})
    source = tmp_path / "new.csv"
    data.to_csv(source, index=False)
    result = prunella("score", model_path, source, "--out", tmp_path / "scored.csv")
    assert result.returncode == 0, result.stderr
    lines = (tmp_path / "scored.csv").read_text().splitlines()
    assert lines[0].startswith("spo2,mode,note,'+header,prunella_box")
    assert "'=HYPERLINK" in lines[1] and ",'@risk," in lines[2]
    for line in lines:
        for cell in line.split(","):
            assert not cell.startswith(("=", "+", "@", "\t", "\r")), line
