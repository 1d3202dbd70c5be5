"""The prunella command line: fit and score, and one clear sentence for bad input."""

from __future__ import annotations

import csv
import hashlib
import json
import os
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pytest

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "sample_data" / "breathless_ed.csv"
DICTIONARY = ROOT / "sample_data" / "breathless_ed.dictionary.json"


def run(*args, cwd=None):
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.run([sys.executable, "-m", "gui", *map(str, args)], capture_output=True,
                          text=True, cwd=cwd or ROOT, env=env, timeout=300)


def _sha(path):
    return hashlib.sha256(Path(path).read_bytes()).hexdigest()


@pytest.fixture(scope="module")
def fitted(tmp_path_factory):
    out = tmp_path_factory.mktemp("fit")
    before = _sha(DEMO)
    result = run("fit", DEMO, "--outcome", "admitted", "--dictionary", DICTIONARY,
                 "--model", out / "m.json", "--curve", out / "curve.csv", "--rules", out / "rules.txt")
    assert result.returncode == 0, result.stderr
    assert _sha(DEMO) == before
    return out, result


def test_fit_writes_model_curve_and_rules(fitted):
    out, result = fitted
    model = json.loads((out / "m.json").read_text())
    assert model["format"] == "prunella-model/1"
    assert model["chosen"]["rule"] == "1se"
    curve = pd.read_csv(out / "curve.csv")
    assert list(curve.columns[:6]) == ["leaves", "alpha", "grid_alpha", "train_risk", "cv_risk", "cv_se"]
    assert curve["is_1se"].sum() == 1 and curve["is_min"].sum() == 1
    rules = (out / "rules.txt").read_text()
    assert "Box " in rules and "Oxygen saturation" in rules
    # The printed summary shows the cross-validated risk beside the training risk.
    assert "cross-validated" in result.stdout and "training" in result.stdout
    assert "1-SE choice" in result.stdout and "does not replace clinical judgment" in result.stdout


def test_fit_uses_the_dictionary_saved_beside_the_data_unless_told_not_to(fitted, tmp_path):
    """As the app does: NAME.dictionary.json beside NAME.csv is read, and said so; its roles
    keep the columns known only after the outcome (length of stay, bed booked) out."""
    out, _ = fitted
    beside = run("fit", DEMO, "--outcome", "admitted", "--model", tmp_path / "beside.json")
    assert beside.returncode == 0, beside.stderr
    assert "breathless_ed.dictionary.json was used" in beside.stderr
    mine, given = (json.loads(p.read_text()) for p in (tmp_path / "beside.json", out / "m.json"))
    assert mine["nodes"] == given["nodes"]
    guessed = run("fit", DEMO, "--outcome", "admitted", "--dictionary", "none",
                  "--model", tmp_path / "guessed.json")
    assert guessed.returncode == 0, guessed.stderr
    assert "was used" not in guessed.stderr
    # Guessing from the data alone offers every column, and the leakage guard speaks up.
    assert "Probable leakage: 'los_hours'" in guessed.stderr


def test_score_adds_box_and_prediction_and_never_touches_the_input(fitted, tmp_path):
    out, _ = fitted
    before = _sha(DEMO)
    result = run("score", out / "m.json", DEMO, "--out", tmp_path / "scored.csv")
    assert result.returncode == 0, result.stderr
    assert _sha(DEMO) == before
    scored = pd.read_csv(tmp_path / "scored.csv")
    assert {"prunella_box", "prunella_prediction", "prunella_share_yes"} <= set(scored.columns)
    assert len(scored) == len(pd.read_csv(DEMO))


def test_score_refuses_to_overwrite_its_input(fitted, tmp_path):
    out, _ = fitted
    copy = tmp_path / "data.csv"
    copy.write_bytes(DEMO.read_bytes())
    before = _sha(copy)
    result = run("score", out / "m.json", copy, "--out", copy)
    assert result.returncode == 2 and "input file" in result.stderr
    assert _sha(copy) == before


def _bad(tmp_path, name, rows):
    path = tmp_path / name
    with open(path, "w", newline="") as handle:
        csv.writer(handle).writerows(rows)
    return path


@pytest.mark.parametrize("case,expected", [
    ("missing file", "No file"),
    ("unknown column", "no column called 'outcome_x'"),
    ("one class", "only one class"),
    ("all missing", "not recorded for any row"),
    ("too few rows", "too few for leaves"),
    ("bad size", "--size must be"),
    ("bad option", "unrecognized arguments"),
])
def test_bad_input_is_one_sentence_and_exit_2(tmp_path, case, expected):
    model = tmp_path / "m.json"
    rows = [["x", "outcome_x"]] + [[i, "yes" if i % 2 else "no"] for i in range(40)]
    data = _bad(tmp_path, "data.csv", rows)
    args = ["fit", data, "--outcome", "outcome_x", "--model", model]
    if case == "missing file":
        args[1] = tmp_path / "absent.csv"
    elif case == "unknown column":
        args[3] = "nope"
        expected = "no column called 'nope'"
    elif case == "one class":
        args[1] = _bad(tmp_path, "one.csv", [["x", "outcome_x"]] + [[i, "yes"] for i in range(40)])
    elif case == "all missing":
        args[1] = _bad(tmp_path, "blank.csv", [["x", "outcome_x"]] + [[i, ""] for i in range(40)])
    elif case == "too few rows":
        args += ["--min-leaf", "30"]
    elif case == "bad size":
        args += ["--size", "huge"]
    elif case == "bad option":
        args += ["--frobnicate"]
    result = run(*args)
    assert result.returncode == 2, result.stdout + result.stderr
    assert expected in result.stderr
    assert "Traceback" not in result.stderr
    assert len(result.stderr.strip().splitlines()) <= 3
    assert not model.exists()


def test_holdout_and_min_rule_and_regression(tmp_path):
    result = run("fit", DEMO, "--outcome", "los_hours", "--task", "regression", "--dictionary",
                 DICTIONARY, "--exclude", "admitted,bed_booked", "--holdout", "0.25", "--size",
                 "min", "--folds", "5", "--model", tmp_path / "los.json")
    assert result.returncode == 0, result.stderr
    model = json.loads((tmp_path / "los.json").read_text())
    assert model["task"] == "regression" and model["chosen"]["rule"] == "min"
    assert model["validation"]["n"] > 700 and "mean_squared_error" in model["validation"]
    assert "bed_booked" not in model["columns_asked"]
