"""Leakage is judged on measures that do not depend on the outcome's prevalence (issue 10.3):
a column's own cross-validated ROC area and its sensitivity and specificity (deciding with
equal priors), so a column agreeing with an 11% outcome 98% of the time is flagged as surely as
one agreeing with a 33% outcome. Sensitivity, specificity and the ROC area are prevalence-free
(Altman & Bland, BMJ 1994;308:1552 and Hanley & McNeil, Radiology 1982;143:29–36; see
docs/references.md). Every guard's finding is recorded in the model file as ``findings``.
The data are invented."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from core.design import DesignSpec, guard_design
from core.dictionary import infer_dictionary
from core.model import TreeModel
from tests.helpers import prunella, sha256_of


def cohort(prevalence: float, agreement: float, n: int = 400, seed: int = 0,
           among: str = "positives") -> pd.DataFrame:
    """An outcome of the given prevalence and a 'bed booked' column agreeing with it in
    ``agreement`` of the rows, the disagreements all among the positives (the hardest case
    for an error-based screen: the column is never wrong about a negative)."""
    rng = np.random.default_rng(seed)
    y = np.zeros(n, int)
    y[rng.choice(n, int(round(prevalence * n)), replace=False)] = 1
    column = y.copy()
    wrong = int(round((1 - agreement) * n))
    pool = np.flatnonzero(y == 1) if among == "positives" else np.arange(n)
    flip = rng.choice(pool, wrong, replace=False)
    column[flip] = 1 - column[flip]
    first = ["Ada", "Ben", "Cleo", "Dev", "Ena", "Finn", "Gita", "Hal"]
    return pd.DataFrame({
        "resp_rate": rng.integers(10, 40, n),
        "bed_booked": np.where(column == 1, "yes", "no"),
        "patient_name": [f"{first[i % 8]} {first[(i // 8) % 8]}son" for i in range(n)],
        "icu": np.where(y == 1, "yes", "no"),
    })


def leakage(frame):
    dictionary, _ = infer_dictionary(frame)
    report = guard_design(frame, dictionary, DesignSpec("icu", ("resp_rate", "bed_booked")))
    return {f.column: f for f in report.of_kind("leakage")}


@pytest.mark.parametrize("prevalence", [0.11, 0.33])
def test_a_column_agreeing_98_percent_is_flagged_for_rare_and_common_outcomes(prevalence):
    frame = cohort(prevalence, 0.98)
    assert (frame["bed_booked"] == frame["icu"]).mean() == pytest.approx(0.98)
    found = leakage(frame)
    assert "bed_booked" in found, found
    measures = found["bed_booked"].measures
    assert measures["cv_specificity"] == pytest.approx(1.0)
    assert measures["cv_sensitivity"] >= 0.8
    assert "sensitivity" in found["bed_booked"].message
    assert "resp_rate" not in found  # noise is not leakage


def test_a_merely_useful_column_is_not_flagged_at_a_rare_outcome():
    frame = cohort(0.11, 0.90, among="all")  # agrees 90%: sensitivity about 0.5
    assert "bed_booked" not in leakage(frame)


def test_the_model_file_records_every_finding(tmp_path):
    path = tmp_path / "icu.csv"
    cohort(0.11, 0.98).to_csv(path, index=False)
    before = (sha256_of(path), path.stat().st_mtime_ns)
    run = prunella("fit", path, "--outcome", "icu", "--model", tmp_path / "m.json",
                   "--folds", "3", "--quiet")
    assert run.returncode == 0, run.stderr
    data = json.loads((tmp_path / "m.json").read_text())
    kinds = {(f["kind"], f["column"]) for f in data["findings"]}
    assert ("leakage", "bed_booked") in kinds and ("identity", "patient_name") in kinds
    for f in data["findings"]:
        assert set(f) >= {"kind", "column", "message"} and isinstance(f["message"], str)
    # The findings are notes about the data, not the tree: the fingerprint leaves them out.
    model = TreeModel.from_dict(data)
    without = dict(data)
    without.pop("findings")
    assert TreeModel.from_dict(without).fingerprint == model.fingerprint
    assert (sha256_of(path), path.stat().st_mtime_ns) == before


@pytest.mark.parametrize("findings", ["all fine", [{"kind": 3, "message": "x"}],
                                      [{"kind": "leakage", "column": 7, "message": "x"}]])
def test_a_damaged_findings_list_is_refused_in_one_sentence(tmp_path, findings):
    path = tmp_path / "icu.csv"
    cohort(0.33, 0.98).to_csv(path, index=False)
    assert prunella("fit", path, "--outcome", "icu", "--model", tmp_path / "m.json",
                    "--folds", "3", "--quiet").returncode == 0
    data = json.loads((tmp_path / "m.json").read_text())
    data["findings"] = findings
    (tmp_path / "bad.json").write_text(json.dumps(data))
    run = prunella("chart", tmp_path / "bad.json", "--out", tmp_path / "c.pdf")
    assert run.returncode == 2 and "Traceback" not in run.stderr
    lines = [line for line in run.stderr.splitlines() if line.startswith("prunella: ")]
    assert len(lines) == 1 and "findings" in lines[0]
    assert not (tmp_path / "c.pdf").exists()
