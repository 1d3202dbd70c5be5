"""The prunella command line: fit and score, and one clear sentence for bad input.

The first fit, the score and one refusal run as child processes, as a user runs them; the
rest run in this process through core.cli.main (tests/helpers.py), which is what the entry
point calls."""

from __future__ import annotations

import csv
import json

import pandas as pd
import pytest

from tests.helpers import DEMO_CSV, DEMO_DICTIONARY, prunella, run_prunella, sha256_of


@pytest.fixture(scope="module")
def fitted(tmp_path_factory):
    out = tmp_path_factory.mktemp("fit")
    before = sha256_of(DEMO_CSV)
    result = run_prunella("fit", DEMO_CSV, "--outcome", "admitted", "--dictionary",
                          DEMO_DICTIONARY, "--model", out / "m.json", "--curve", out / "curve.csv",
                          "--rules", out / "rules.txt")
    assert result.returncode == 0, result.stderr
    assert sha256_of(DEMO_CSV) == before
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
    beside = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--model", tmp_path / "beside.json")
    assert beside.returncode == 0, beside.stderr
    assert "breathless_ed.dictionary.json was used" in beside.stderr
    mine, given = (json.loads(p.read_text()) for p in (tmp_path / "beside.json", out / "m.json"))
    assert mine["nodes"] == given["nodes"]
    guessed = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--dictionary", "none",
                       "--model", tmp_path / "guessed.json")
    assert guessed.returncode == 0, guessed.stderr
    assert "was used" not in guessed.stderr
    # Guessing from the data alone offers every column, and the leakage guard speaks up.
    assert "Probable leakage: 'los_hours'" in guessed.stderr


def test_score_adds_box_and_prediction_and_never_touches_the_input(fitted, tmp_path):
    out, _ = fitted
    before = sha256_of(DEMO_CSV)
    result = run_prunella("score", out / "m.json", DEMO_CSV, "--out", tmp_path / "scored.csv")
    assert result.returncode == 0, result.stderr
    assert sha256_of(DEMO_CSV) == before
    scored = pd.read_csv(tmp_path / "scored.csv")
    assert {"prunella_box", "prunella_prediction", "prunella_share_yes"} <= set(scored.columns)
    assert len(scored) == len(pd.read_csv(DEMO_CSV))


def test_score_refuses_to_overwrite_its_input(fitted, tmp_path):
    out, _ = fitted
    copy = tmp_path / "data.csv"
    copy.write_bytes(DEMO_CSV.read_bytes())
    before = sha256_of(copy)
    result = prunella("score", out / "m.json", copy, "--out", copy)
    assert result.returncode == 2 and "input file" in result.stderr
    assert sha256_of(copy) == before


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
    ("too few rows", "too few for outcome boxes"),
    ("bad size", "--size: must be"),
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
    # One refusal as the user meets it (a child process); the others in this process.
    result = run_prunella(*args) if case == "missing file" else prunella(*args)
    assert result.returncode == 2, result.stdout + result.stderr
    assert expected in result.stderr
    assert "Traceback" not in result.stderr
    assert len(result.stderr.strip().splitlines()) <= 3
    assert not model.exists()


def test_holdout_and_min_rule_and_regression(tmp_path):
    result = prunella("fit", DEMO_CSV, "--outcome", "los_hours", "--task", "regression",
                      "--dictionary", DEMO_DICTIONARY, "--exclude", "admitted,bed_booked",
                      "--holdout", "0.25", "--size", "min", "--folds", "5",
                      "--model", tmp_path / "los.json")
    assert result.returncode == 0, result.stderr
    model = json.loads((tmp_path / "los.json").read_text())
    assert model["task"] == "regression" and model["chosen"]["rule"] == "min"
    assert model["validation"]["n"] > 700 and "mean_squared_error" in model["validation"]
    assert "bed_booked" not in model["columns_asked"]


def test_a_reader_that_stops_early_gets_no_traceback(tmp_path):
    """``prunella fit … | head -1``: when the reader closes the pipe, the command ends quietly
    with the shell's status for a closed pipe (141), not a Python traceback."""
    import os
    import subprocess
    import sys

    from tests.helpers import ROOT

    read_end, write_end = os.pipe()
    os.close(read_end)  # the reader has already gone before anything is printed
    try:
        child = subprocess.run(
            [sys.executable, "-m", "gui", "fit", str(DEMO_CSV), "--outcome", "admitted",
             "--dictionary", str(DEMO_DICTIONARY), "--model", str(tmp_path / "m.json")],
            cwd=ROOT, env=dict(os.environ, PYTHONPATH=str(ROOT)), stdout=write_end,
            stderr=subprocess.PIPE, text=True, timeout=300)
    finally:
        os.close(write_end)
    assert "Traceback" not in child.stderr, child.stderr
    assert child.returncode == 141, child.stderr
    assert (tmp_path / "m.json").exists()  # the work itself was done and saved
