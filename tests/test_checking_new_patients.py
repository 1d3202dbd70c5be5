"""Checking a tree on separate patients (core/checking/new_patients.py).

The demo cohort is invented (sample_data/README.md); it is used here to check that the code
finds what the generator planted, not as a reference for any clinical fact.
"""

from __future__ import annotations

import json

import numpy as np
import pytest

from core.checking.new_patients import check_table, match_columns, with_check
from core.data import LoadedTable
from core.design import DesignSpec
from core.errors import InputError
from core.model import TreeModel
from core.sizing import DerivationRequest, TreeSettings, choose_model, derive
from tests.helpers import demo_inputs


@pytest.fixture(scope="module")
def demo():
    return demo_inputs()


def _campus(table, name):
    frame = table.frame
    return LoadedTable(frame[frame["campus"] == name].reset_index(drop=True), table.provenance)


@pytest.fixture(scope="module")
def north(demo):
    table, dictionary, predictors = demo
    request = DerivationRequest(DesignSpec("admitted", predictors, patient_id="patient_id"))
    return derive(_campus(table, "North"), dictionary, request)


def test_north_tree_checked_at_riverside_shows_the_planted_difference(demo, north):
    # Planted in the invented cohort: Riverside admits more patients from the lower-risk boxes.
    table, _, _ = demo
    result = check_table(north.model, _campus(table, "Riverside"), source="Riverside campus")
    riverside = (table.frame["campus"] == "Riverside").sum()
    assert result.n == riverside and result.n_excluded == 0 and result.kind == "external"
    outside = [r for r in result.measures.calibration if r.agrees is False]
    assert outside, "at least one box's derivation rate lies outside the Riverside interval"
    for row in outside:
        assert row.derivation_value < row.low  # Riverside admits more than North promised
    assert result.calibration_outside == tuple(sorted(r.box for r in outside))
    record = result.to_model_record()
    assert record["source"] == "Riverside campus" and record["n"] == result.n
    assert record["summary"].startswith("Sensitivity ") and "AUC" in record["summary"]
    assert record["calibration_outside"] == list(result.calibration_outside)
    json.dumps(record, allow_nan=False)


def test_same_campus_rows_agree_with_their_own_boxes(demo, north):
    # Routed through the tree, the North rows land exactly in the derivation counts.
    table, _, _ = demo
    result = check_table(north.model, _campus(table, "North"))
    for row in result.measures.calibration:
        assert row.n == row.derivation_n and row.agrees
    # The file's name is kept apart from the words, so the wall chart prints it only on request.
    assert result.source == "an external file" and result.file == "breathless_ed.csv"
    assert result.source_and_file == "an external file (breathless_ed.csv)"


def test_heldout_check_replaces_the_simple_one(demo):
    table, dictionary, predictors = demo
    request = DerivationRequest(DesignSpec("admitted", predictors, patient_id="patient_id"),
                                holdout=0.25)
    derivation = derive(table, dictionary, request)
    record = derivation.model.extra["validation"]
    assert record["kind"] == "held-out" and record["n"] == derivation.heldout.n
    assert "set aside before growing" in record["source"]
    assert record["summary"] == derivation.check_on_heldout().summary
    assert "Sensitivity" in record["summary"]
    # The model with its check still saves as strict JSON and loads back.
    again = TreeModel.from_dict(json.loads(derivation.model.to_json()))
    assert again.extra["validation"] == record
    # Choosing another size re-checks the new tree: on the demo the 1-SE tree is also the
    # lowest-error one, so a smaller tree of the path is chosen (5 boxes against 7), and its
    # record is the held-out check of that tree, not the old one.
    other = choose_model(derivation, 5)
    assert other.model.chosen["leaves"] != derivation.model.chosen["leaves"]
    assert other.model.extra["validation"]["model_fingerprint"] != record["model_fingerprint"]
    assert other.model.extra["validation"] == other.check_on_heldout().to_model_record()


def test_heldout_check_needs_a_heldout_part(north):
    with pytest.raises(InputError, match="set aside"):
        north.check_on_heldout()


def test_columns_are_matched_by_name_with_an_account(demo, north):
    table, _, _ = demo
    frame = _campus(table, "Riverside").frame.rename(columns={"spo2": "SpO2 ", "age": "AGE"})
    frame = frame.drop(columns=["heart_rate"]).assign(ward="A")
    result = check_table(north.model, LoadedTable(frame, table.provenance))
    report = result.columns
    assert ("SpO2 ", "spo2") in report.renamed and ("AGE", "age") in report.renamed
    assert "heart_rate" in report.missing_offered  # not asked by the tree: harmless
    assert "ward" in report.extra and "visit_id" in report.extra
    text = result.text()
    assert "capitals or spaces" in text and "not asked by the tree" in text
    baseline = check_table(north.model, _campus(table, "Riverside"))
    assert result.summary == baseline.summary


def test_a_missing_asked_column_is_one_clear_message(demo, north):
    table, _, _ = demo
    frame = _campus(table, "Riverside").frame.drop(columns=["spo2"])
    with pytest.raises(InputError, match="lacks column.*spo2"):
        check_table(north.model, LoadedTable(frame, table.provenance))
    with pytest.raises(InputError, match="outcome"):
        match_columns(north.model, [c for c in frame.columns if c != "admitted"])


def _model_asking(demo, column):
    table, dictionary, _ = demo
    request = DerivationRequest(DesignSpec("admitted", (column,), patient_id="patient_id"),
                                tree=TreeSettings(miss_cost=3.0), size=4)
    return derive(table, dictionary, request).model


def test_unseen_levels_are_routed_as_missing_and_counted(demo):
    table, _, _ = demo
    model = _model_asking(demo, "arrival_mode")
    assert "arrival_mode" in model.columns_asked()
    frame = table.frame.head(400).copy()
    frame.loc[frame.index[:7], "arrival_mode"] = "helicopter"
    result = check_table(model, LoadedTable(frame, table.provenance))
    assert dict(result.unseen_levels) == {"arrival_mode": 7}
    assert any("helicopter (7 rows) were not seen among the derivation patients" in w
               and "routed as not recorded" in w for w in result.warnings)
    # Routed exactly like a blank cell.
    blank = frame.copy()
    blank.loc[blank.index[:7], "arrival_mode"] = None
    assert check_table(model, LoadedTable(blank, table.provenance)).measures.confusion == \
        result.measures.confusion


def test_outcome_read_with_the_model_definition(demo, north):
    table, _, _ = demo
    frame = _campus(table, "Riverside").frame.copy()
    frame.loc[frame.index[:5], "admitted"] = "Y"  # another spelling of yes
    frame.loc[frame.index[5:8], "admitted"] = "transferred"  # not a class
    frame.loc[frame.index[8:10], "admitted"] = None
    result = check_table(north.model, LoadedTable(frame, table.provenance))
    assert result.n == len(frame) - 5 and result.n_excluded == 5
    assert any("not one of the tree's classes" in w for w in result.warnings)


def test_with_check_attaches_the_record_for_the_chart(demo, north):
    table, _, _ = demo
    result = check_table(north.model, _campus(table, "Riverside"), source="Riverside campus")
    checked = with_check(north.model, result)
    assert checked.extra["validation"]["source"] == "Riverside campus"
    assert "validation" not in north.model.extra  # the original is unchanged
    assert checked.nodes == north.model.nodes
    # Checking the checked model again records the same tree.
    again = check_table(checked, _campus(table, "Riverside"))
    assert again.model_fingerprint == result.model_fingerprint
    other = derive(table, demo[1], DerivationRequest(DesignSpec("admitted", ("age",)), size=3))
    with pytest.raises(InputError, match="another tree"):
        with_check(other.model, result)


def test_regression_check_reports_errors_and_box_means(demo):
    table, dictionary, predictors = demo
    request = DerivationRequest(DesignSpec("los_hours", predictors, task="regression",
                                           patient_id="patient_id"), size=4)
    model = derive(_campus(table, "North"), dictionary, request).model
    result = check_table(model, _campus(table, "Riverside"))
    m = result.measures
    truth = result.n
    assert m.n == truth and np.isfinite(m.rmse) and m.mae <= m.rmse
    assert len(m.calibration) == len(model.leaves)
    assert result.summary.startswith("RMSE")
    record = result.to_model_record()
    assert set(("rmse", "mae", "r2")) <= set(record)


def test_the_unseen_note_names_each_level_with_its_rows_never_the_column_and_a_count(demo):
    # Levels written as numbers (an institution's code) read as levels, not as a count.
    table, _, _ = demo
    model = _model_asking(demo, "arrival_mode")
    frame = table.frame.head(400).copy()
    frame["arrival_mode"] = frame["arrival_mode"].astype(object)
    frame.loc[frame.index[:7], "arrival_mode"] = "12"
    frame.loc[frame.index[7:18], "arrival_mode"] = "13"
    frame.loc[frame.index[18:19], "arrival_mode"] = "canoe"
    result = check_table(model, LoadedTable(frame, table.provenance))
    note = next(w for w in result.warnings if "not seen among the derivation" in w)
    label = model.spec("arrival_mode").display
    assert f"{label}: 13 (11 rows), 12 (7 rows), canoe (1 row) were not seen" in note
    assert "(19 cell(s))" in note and f"({label} 19)" not in note


def test_calibration_lines_say_whose_share_they_show(demo, north):
    """'box 5 yes derivation 3%' read as box 5's answer; the line names the share's class."""
    table, _, _ = demo
    result = check_table(north.model, _campus(table, "Riverside"))
    lines = [line for line in result.text().splitlines() if line.startswith("  box ")]
    assert lines and all(" share " in line for line in lines)
