"""``prunella score`` finds a file's columns as ``prunella check`` does (exact names, else the
same name but for case and spaces), refuses a file lacking a column the tree asks about in the
same sentence as check, and names a column that looks meant for it ("SpO2 on air %" for "SpO2
on air (%)"). Input files are never changed. Invented data; our own checks."""

from __future__ import annotations

import json
import os

import numpy as np
import pandas as pd
import pytest

from tests.helpers import prunella, sha256_of


def _audit(n: int, seed: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    spo2 = rng.integers(82, 100, n)
    rate = rng.integers(10, 40, n)
    admitted = np.where(((spo2 < 90) | (rate > 30)) & (rng.random(n) < 0.85), "Yes", "No")
    return pd.DataFrame({"Record no": [f"M{900 + i}" for i in range(n)],
                         "SpO2 on air (%)": spo2, "Resp rate": rate,
                         "Oxygen given": rng.choice(["none", "nasal", "mask"], n),
                         "Admitted": admitted})


@pytest.fixture(scope="module")
def model(tmp_path_factory):
    folder = tmp_path_factory.mktemp("fit")
    data = folder / "ward audit.csv"
    _audit(300, 3).to_csv(data, index=False)
    out = folder / "model.json"
    ran = prunella("fit", data, "--outcome", "Admitted", "--folds", "5", "--model", out,
                   "--quiet")
    assert ran.returncode == 0, ran.stderr
    asked = {n["split"]["column"] for n in json.loads(out.read_text())["nodes"]
             if not n["leaf"]}
    assert {"SpO2 on air (%)", "Resp rate"} <= asked
    return out


def _unchanged(path):
    return sha256_of(path), os.stat(path).st_mtime_ns


def _write(tmp_path, frame, name):
    path = tmp_path / name
    frame.to_csv(path, index=False)
    return path


def test_score_takes_names_that_differ_in_case_and_spaces(model, tmp_path):
    fresh = _audit(120, 21)
    plain = _write(tmp_path, fresh, "plain.csv")
    odd = _write(tmp_path, fresh.rename(columns={"SpO2 on air (%)": "spo2 ON air (%)",
                                                 "Resp rate": "RespRate"}), "odd names.csv")
    before = _unchanged(odd)
    check = prunella("check", model, odd)
    assert check.returncode == 0, check.stderr
    ran = prunella("score", model, plain, "--out", tmp_path / "plain.scored.csv")
    assert ran.returncode == 0, ran.stderr
    ran = prunella("score", model, odd, "--out", tmp_path / "odd.scored.csv")
    assert ran.returncode == 0, ran.stderr
    assert "'spo2 ON air (%)' was taken as 'SpO2 on air (%)'" in ran.stderr
    scored = pd.read_csv(tmp_path / "odd.scored.csv")
    expected = pd.read_csv(tmp_path / "plain.scored.csv")
    assert list(scored.columns[:5]) == list(fresh.rename(columns={
        "SpO2 on air (%)": "spo2 ON air (%)", "Resp rate": "RespRate"}).columns)  # its own headers
    assert scored["prunella_box"].tolist() == expected["prunella_box"].tolist()
    assert scored["prunella_prediction"].tolist() == expected["prunella_prediction"].tolist()
    assert _unchanged(odd) == before


def test_a_missing_column_is_refused_alike_and_a_near_name_is_named(model, tmp_path):
    fresh = _audit(80, 22)
    near = _write(tmp_path, fresh.rename(columns={"SpO2 on air (%)": "SpO2 on air %"}),
                  "near.csv")
    gone = _write(tmp_path, fresh.drop(columns=["SpO2 on air (%)"]), "gone.csv")
    states = {p: _unchanged(p) for p in (near, gone)}
    for path, meant in ((near, True), (gone, False)):
        check = prunella("check", model, path)
        score = prunella("score", model, path, "--out", tmp_path / "scored.csv")
        assert check.returncode == score.returncode == 2
        for ran in (check, score):
            assert "Traceback" not in ran.stderr
            assert "lacks column(s) the tree asks about: 'SpO2 on air (%)'" in ran.stderr
            named = "the file's 'SpO2 on air %' (for 'SpO2 on air (%)') looks meant"
            assert (named in ran.stderr) == meant
            assert ("rename that column" in ran.stderr) == meant
        # One sentence, the same for both commands.
        assert check.stderr.strip().splitlines()[-1] == score.stderr.strip().splitlines()[-1]
        assert not (tmp_path / "scored.csv").exists()
    assert {p: _unchanged(p) for p in (near, gone)} == states


def test_an_outcome_column_with_a_near_name_is_named(model, tmp_path):
    path = _write(tmp_path, _audit(60, 23).rename(columns={"Admitted": "Admitted?"}), "o.csv")
    check = prunella("check", model, path)
    assert check.returncode == 2
    assert "no column 'Admitted'" in check.stderr and "'Admitted?'" in check.stderr
    # Scoring needs no outcome: it scores the rows.
    score = prunella("score", model, path, "--out", tmp_path / "o.scored.csv")
    assert score.returncode == 0, score.stderr


def test_near_name_rules():
    from core.model.column_names import near_name

    assert near_name("SpO2 on air (%)", ["SpO2 on air %", "Resp rate"]) == "SpO2 on air %"
    assert near_name("Resp rate", ["resp_rate"]) == "resp_rate"
    assert near_name("Resp rate", ["Respiratory rate", "Pulse"]) is None  # not near enough
    assert near_name("Resp rate", ["Resp. rate", "Resp-rate"]) is None    # two: none chosen
    assert near_name("Lactate", ["Lactat"]) == "Lactat"                  # a close spelling
