"""The pruning path's errors at the data's precision (issue 10, item 8): a mean squared error
is in the outcome's unit squared, printed with at most one decimal more than the squared data
(core/precision.py, common practice: a summary is not more precise than its measurements),
with its root beside it in the outcome's own unit; the cross-validated error comes before the
training error in the command line's table, the report's table and the app's size list.

Invented data generated here (tests/test_visits_or_patients.py); our own rule, not a reference.
"""

from __future__ import annotations

import io
import math
import re

import numpy as np
import pytest
from pypdf import PdfReader

from core.data import read_table
from core.design import DesignSpec
from core.dictionary import infer_dictionary
from core.model import TreeModel, path_rows
from core.report import prepare_report, render_report
from core.sizing import CVSettings, DerivationRequest, derive
from tests.helpers import prunella
from tests.test_visits_or_patients import PREDICTORS, _cohort


def _decimals(text: str) -> int:
    return len(text.split(".")[1]) if "." in text else 0


@pytest.fixture(scope="module")
def stays(tmp_path_factory):
    """Days in hospital, recorded in whole days, and the same stays in days with one decimal."""
    folder = tmp_path_factory.mktemp("stays")
    frame = _cohort(200, 2, 11)
    frame.to_csv(folder / "whole.csv", index=False)
    tenths = frame.assign(stay_days=frame["stay_days"] + np.random.default_rng(3).integers(
        0, 10, len(frame)) / 10)
    tenths.to_csv(folder / "tenths.csv", index=False)
    return folder


def _derive(path) -> TreeModel:
    table = read_table(path)
    dictionary, _ = infer_dictionary(table.frame)
    request = DerivationRequest(DesignSpec("stay_days", PREDICTORS, patient_id="Record no"),
                                cv=CVSettings(folds=5))
    return derive(table, dictionary, request)


@pytest.mark.parametrize("name, data_places", [("whole", 0), ("tenths", 1)])
def test_path_rows_follow_the_datas_precision(stays, name, data_places):
    model = _derive(stays / f"{name}.csv").model
    assert model.outcome_decimals == data_places
    rows = path_rows(model)
    path = model.path
    assert [r.leaves for r in rows] == path["leaves"]
    # One precision per column, never more than one decimal past the squared data.
    for column in ("cv", "se", "train"):
        places = {_decimals(getattr(r, column)) for r in rows}
        assert len(places) == 1 and places.pop() <= 2 * data_places + 1, column
    roots = {_decimals(r.cv_root) for r in rows}
    assert len(roots) == 1 and roots.pop() <= data_places + 1
    for row, cv, train in zip(rows, path["cv_risk"], path["train_risk"]):
        places = _decimals(row.cv)
        assert float(row.cv.replace(",", "")) == pytest.approx(round(cv, places))
        assert float(row.train.replace(",", "")) == pytest.approx(round(train, places))
        assert float(row.cv_root) == pytest.approx(round(math.sqrt(cv), _decimals(row.cv_root)))


def test_the_command_line_and_the_report_print_them(stays):
    folder = stays
    ran = prunella("fit", folder / "whole.csv", "--outcome", "stay_days", "--predictors",
                   ",".join(PREDICTORS), "--patient-id", "Record no", "--folds", "5",
                   "--model", folder / "whole.json")
    assert ran.returncode == 0, ran.stderr
    lines = ran.stdout.splitlines()
    header = next(i for i, line in enumerate(lines) if line.split()[:3] == ["boxes", "CV", "error"])
    assert "CV root (days)" in lines[header]
    assert lines[header].index("CV error") < lines[header].index("CV root") \
        < lines[header].index("training")
    table = lines[header + 1:lines.index("", header)]
    assert table and not any(re.search(r"\d\.\d\d", line) for line in table), table
    chosen = next(line for line in lines if line.startswith("Chosen:"))
    assert not re.search(r"\d\.\d\d", chosen), chosen  # whole days: one decimal at most
    assert "Root of the cross-validated error:" in chosen and " days" in chosen

    derivation = _derive(folder / "whole.csv")
    contents = prepare_report(derivation, nested=False, bootstrap=0, printed="2026-01-31")
    reader = PdfReader(io.BytesIO(render_report(contents)))
    words = " ".join(" ".join(p.extract_text() for p in reader.pages).split())
    heading = ("Boxes Mark Cross-validated error SE Root of the cross-validated error (days) "
               "Training error (optimistic)")
    assert heading in words
    after = words[words.index(heading) + len(heading):][:600]
    row = path_rows(derivation.model)[derivation.model.path["leaves"].index(
        derivation.model.chosen["leaves"])]
    assert f"{row.cv} {row.se} {row.cv_root} {row.train}" in after
    assert not re.search(r"\b\d+\.\d{4}\b", after), after
