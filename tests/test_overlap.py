"""An external file that shares patients with the derivation data is no separate check
(issue 10, item 7).

Generated data: 300 patients with a patient identifier; the "external" file holds 40 of them
again plus 100 new ones. Counting the patients both share by their identifiers, and not
calling such a check separate, is common practice: an external validation uses participants
who were not in the development data (as the TRIPOD statement, Collins et al. 2015, describes
validation; recalled from memory).
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from core.chart import ChartOptions
from core.chart.content import chart_text
from core.checking.new_patients import check_table, with_check
from core.data import read_table
from core.design import DesignSpec
from core.dictionary import infer_dictionary
from core.model import TreeModel
from core.sizing import CVSettings, DerivationRequest, derive
from tests.helpers import prunella


def cohort(ids, seed: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    x = np.round(rng.uniform(size=len(ids)), 3)
    return pd.DataFrame({"pid": ids, "x": x,
                         "outcome": np.where((x > 0.5) ^ (rng.random(len(ids)) < 0.1), "yes", "no")})


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("overlap")
    cohort([f"P{i:04d}" for i in range(300)], 1).to_csv(folder / "derive.csv", index=False)
    ids = [f"P{i:04d}" for i in range(40)] + [f"Q{i:04d}" for i in range(100)]
    cohort(ids, 2).to_csv(folder / "external.csv", index=False)
    table = read_table(folder / "derive.csv")
    dictionary, _ = infer_dictionary(table.frame)
    dictionary = dictionary.with_column("outcome", role="outcome").with_column("pid",
                                                                                role="patient_id")
    model = derive(table, dictionary, DerivationRequest(
        DesignSpec("outcome", ("x",), positive="yes", patient_id="pid"),
        cv=CVSettings(folds=5))).model
    model.save(folder / "m.json")
    return folder, model


def test_model_keeps_digests_not_identifiers(files):
    folder, model = files
    text = (folder / "m.json").read_text()
    assert "P0001" not in text
    ids = json.loads(text)["derivation_ids"]
    assert ids["column"] == "pid" and len(ids["digests"]) == 300


def test_overlap_is_counted_and_not_called_separate(files):
    folder, model = files
    result = check_table(model, read_table(folder / "external.csv"))
    assert (result.overlap_patients, result.overlap_rows, result.separate) == (40, 40, False)
    assert result.n == 140
    data = result.to_dict()
    assert data["overlap_patients"] == 40 and data["separate"] is False
    assert any("not a check on separate patients" in w for w in result.warnings)
    checked = with_check(model, result)
    titles = [s.title for s in chart_text(checked, ChartOptions().checked()).sections]
    assert "Checked on separate patients" not in titles
    assert "Checked on patients who include derivation patients" in titles


def test_overlapping_rows_can_be_left_out(files):
    folder, model = files
    result = check_table(model, read_table(folder / "external.csv"), leave_out_overlap=True)
    assert result.n == 100 and result.overlap_patients == 40 and result.separate
    titles = [s.title for s in chart_text(with_check(model, result),
                                          ChartOptions().checked()).sections]
    assert "Checked on separate patients" in titles


def test_command_line(files, tmp_path):
    folder, _ = files
    ran = prunella("check", folder / "m.json", folder / "external.csv", "--out", tmp_path / "c.json")
    assert ran.returncode == 0, ran.stderr
    assert "not a check on separate patients" in ran.stdout
    assert json.loads((tmp_path / "c.json").read_text())["overlap_patients"] == 40
    ran = prunella("check", folder / "m.json", folder / "external.csv", "--leave-out-overlap",
                   "--out", tmp_path / "d.json")
    record = json.loads((tmp_path / "d.json").read_text())
    assert record["n"] == 100 and record["separate"] is True


def test_an_older_model_without_digests_counts_none(files):
    _, model = files
    data = json.loads(model.to_json())
    del data["derivation_ids"]
    old = TreeModel.from_dict(data)
    assert old.extra.get("derivation_ids") is None
