"""One box's details and one patient's route (core/model/details.py, used by the app's tree
view), and the scored table shared by `prunella score` and the app's export."""

from __future__ import annotations

import numpy as np
import pytest

from core.checking.intervals import wilson_interval
from core.design import DesignSpec
from core.model import box_details, route_patient, scored_table
from core.sizing import DerivationRequest, derive
from tests.helpers import demo_inputs


@pytest.fixture(scope="module")
def demo():
    table, dictionary, preds = demo_inputs()
    derivation = derive(table, dictionary,
                        DerivationRequest(DesignSpec("admitted", preds, patient_id="patient_id")))
    return table, derivation.model


def test_steps_lead_from_box_one_to_every_box(demo):
    _, model = demo
    assert model.steps_to(1) == ()
    for node in model.nodes[1:]:
        steps = model.steps_to(node.id)
        assert steps[0].box == 1 and steps[-1].to == node.id
        for before, after in zip(steps, steps[1:]):
            assert before.to == after.box  # a connected path
        for step in steps:
            parent = model.node(step.box)
            assert step.to == parent.children[0 if step.answer == "YES" else 1]


def test_box_details_counts_and_wilson_intervals(demo):
    _, model = demo
    for node in model.nodes:
        details = box_details(model, node.id)
        assert details.n == node.n
        assert sum(c.count for c in details.classes) == node.n
        for share in details.classes:
            assert (share.low, share.high) == wilson_interval(share.count, node.n)
            assert share.low <= share.share <= share.high
    assert box_details(model, 1).share_of_all == 1.0


def test_route_patient_agrees_with_scoring_the_file(demo):
    """One patient entered by hand reaches the box the whole file's scoring gives that row."""
    table, model = demo
    frame = table.frame
    scored, _ = scored_table(model, frame)
    for row in (0, 3, 10, 250, 1999):
        values = {c: frame[c].iloc[row] for c in model.columns_asked()}
        values = {c: (None if isinstance(v, float) and np.isnan(v) else str(v))
                  for c, v in values.items()}
        route = route_patient(model, values)
        assert route.outcome_box == scored["prunella_box"].iloc[row]
        assert route.boxes[0] == 1 and route.boxes[-1] == route.outcome_box
        assert model.node(route.outcome_box).leaf
        assert route.prediction == scored["prunella_prediction"].iloc[row]


def test_route_patient_missing_and_unreadable_values(demo):
    _, model = demo
    nothing = route_patient(model, {})
    # SpO2 is never blank in the demo: no branch for it, so the lookup asks for it (issue 10).
    assert (nothing.outcome_box, nothing.needs, nothing.waiting_box) == (0, "spo2", 1)
    assert nothing.prediction is None and nothing.boxes == (1,)
    # A word where a number is asked for is refused in the lookup's own words (issue 15,
    # item 14), not with the wording of a file's cells, and no route is given.
    odd = route_patient(model, {"spo2": "very low"})
    assert odd.outcome_box == 0 and odd.boxes == () and not odd.warnings
    assert odd.refused == (f"{model.spec('spo2').display} needs a number, and “very low” is "
                           "not one; type it in digits, or leave it blank if it was not "
                           "measured.",)


def test_route_patient_refuses_impossible_and_flags_unseen_values(demo):
    _, model = demo
    label = model.spec("spo2").display
    for slip in ("250", "150", "-3"):
        impossible = route_patient(model, {"spo2": slip}, {"spo2": (70.0, 100.0)})
        # No box for a value no patient can have, as for a typed word.
        assert impossible.outcome_box == 0 and impossible.boxes == () and not impossible.warnings
        assert impossible.refused == (
            f"{label} {slip}% is impossible for a percentage (0 to 100%), so the tree gives no "
            "outcome box for it; correct the value, or leave it blank if it was not measured.",)
    # Possible, but below every derivation patient's value: routed and flagged.
    unseen = route_patient(model, {"spo2": "60"}, {"spo2": (70.0, 100.0)})
    assert unseen.boxes[0] == 1 and not unseen.refused  # on its way (other values may wait)
    assert unseen.warnings[0] == (
        f"{label} 60% lies outside the values of the patients the tree was grown on (70 to "
        "100%), so the tree has not learnt about such a patient; check the value before "
        "relying on the answer.")
    edge = route_patient(model, {"spo2": "100"}, {"spo2": (70.0, 100.0)})
    assert edge.boxes[0] == 1 and not edge.refused and not edge.warnings  # a possible limit
    usual = route_patient(model, {"spo2": "88"}, {"spo2": (70.0, 100.0)})
    assert not any(label in w for w in usual.warnings)
    assert route_patient(model, {"spo2": "NA"}).refused == ()  # not recorded, not a word


def test_scored_table_columns(demo):
    table, model = demo
    scored, _ = scored_table(model, table.frame)
    assert list(scored.columns[-4:]) == ["prunella_box", "prunella_prediction",
                                         "prunella_share_yes", "prunella_missing"]
    assert len(scored) == len(table.frame)
    assert "prunella_box" not in table.frame.columns  # the input is not touched
    leaf = model.leaves[0]
    share = scored.loc[scored["prunella_box"] == leaf.id, "prunella_share_yes"].iloc[0]
    assert share == round(leaf.counts[1] / leaf.n, 4)


def test_a_regression_box_gives_the_middle_half_of_its_patients():
    """Issue 10.9: the app's box details give the 25th to 75th percentile of the box's
    derivation patients beside the interval of the mean, which is narrower."""
    table, dictionary, predictors = demo_inputs()
    request = DerivationRequest(DesignSpec("los_hours", predictors, patient_id="patient_id",
                                           task="regression"), size=4)
    model = derive(table, dictionary, request).model
    for leaf in model.leaves:
        details = box_details(model, leaf.id)
        low, high = details.quartiles
        assert low < high and details.quartiles == leaf.quartiles
        # The interval of the mean lies well inside the spread of patients.
        assert (details.mean_high - details.mean_low) < (high - low)


def test_the_dictionarys_plausible_values_are_kept_and_flag_the_lookup(demo, tmp_path):
    from dataclasses import replace

    from core.dictionary import ColumnSpec, DataDictionary
    from core.errors import InputError
    from core.model import TreeModel

    _, model = demo
    spec = replace(model.spec("spo2"), plausible=(50.0, 100.0))
    assert ColumnSpec.from_dict(spec.to_dict()) == spec
    assert "plausible" not in model.spec("spo2").to_dict()  # none given: files as before
    for bad in ([100, 50], [0], ["low", "high"], [0, float("nan")], True):
        with pytest.raises(InputError, match="'plausible' must be two numbers"):
            ColumnSpec.from_dict({**spec.to_dict(), "plausible": bad})
    # Kept by the dictionary's JSON and CSV files (a column only when used).
    dictionary = DataDictionary((spec, ColumnSpec("age", unit="years")))
    for name in ("d.json", "d.csv"):
        dictionary.save(tmp_path / name)
        assert DataDictionary.load(tmp_path / name).get("spo2").plausible == (50.0, 100.0)
    # The model carries them, so the lookup flags a value outside them.
    predictors = tuple(spec if c.name == "spo2" else c for c in model.predictors)
    limited = TreeModel(**{**model.__dict__, "predictors": predictors})
    limited.save(tmp_path / "m.json")
    again = TreeModel.load(tmp_path / "m.json")
    route = route_patient(again, {"spo2": "45"})
    assert route.outcome_box == 0 and route.boxes == () and not route.warnings
    assert route.refused == (f"{spec.display} 45% lies outside the plausible values the "
                             "data dictionary gives for it (50 to 100%), so the tree gives no "
                             "outcome box for it; correct the value, or leave it blank if it "
                             "was not measured.",)
    assert not route_patient(again, {"spo2": "88"}).warnings
