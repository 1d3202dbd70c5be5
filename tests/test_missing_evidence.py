"""'Not recorded' only where the data say so (issue 10, item 1).

Generated data: ``lactate`` is never blank, ``crp`` is blank for about 30% of the patients.
A question on a value no derivation patient at its box lacked has no branch for a missing
value: the model file says so (``missing_in_derivation`` 0, ``missing_goes`` null), the chart
and the rules print no "or not recorded" for it and say once to measure such a value, and
scoring leaves the row without a box and names the column. Where missing values were seen,
the grower's branch stays, labelled.

No published source rules on this: not routing a patient whose value the tree has never seen
missing, and asking for the measurement instead, is common practice for decision aids used
at the bedside (a rule is applied only to patients like those it was derived from).
"""

from __future__ import annotations

import io
import json

import numpy as np
import pandas as pd
import pypdf
import pytest

from core.chart import ChartOptions, render_chart
from core.chart.content import NOT_RECORDED
from core.data import LoadedTable, read_table
from core.design import DesignSpec
from core.dictionary import infer_dictionary
from core.model import TreeModel, route_patient, scored_table
from core.model.tree import MEASURE_FIRST
from core.sizing import CVSettings, DerivationRequest, derive
from tests.helpers import prunella


def generated_frame(n: int = 800, seed: int = 7) -> pd.DataFrame:
    """High lactate admits; among the rest, a high CRP admits; a blank CRP behaves as low."""
    rng = np.random.default_rng(seed)
    lactate = np.round(rng.uniform(0.5, 6.0, n), 1)
    crp = np.round(rng.uniform(1, 200, n))
    blank = rng.random(n) < 0.3
    admit = (lactate > 3.0) | (~blank & (crp > 100))
    admit = np.where(rng.random(n) < 0.05, ~admit, admit)  # a little noise
    return pd.DataFrame({"lactate": lactate, "crp": np.where(blank, np.nan, crp),
                         "admitted": np.where(admit, "yes", "no")})


def write_csv(frame: pd.DataFrame, path) -> None:
    frame.to_csv(path, index=False)


@pytest.fixture(scope="module")
def fitted(tmp_path_factory):
    folder = tmp_path_factory.mktemp("missing")
    frame = generated_frame()
    path = folder / "cohort.csv"
    write_csv(frame, path)
    table = read_table(path)
    dictionary, _ = infer_dictionary(table.frame)
    dictionary = dictionary.with_column("admitted", role="outcome")
    request = DerivationRequest(DesignSpec("admitted", ("lactate", "crp"), positive="yes"),
                                cv=CVSettings(folds=5))
    derivation = derive(table, dictionary, request)
    return derivation, frame, folder


def _questions(model):
    return {n.question.column: n for n in model.nodes if n.question is not None}


def test_model_file_counts_missing_values_per_question(fitted):
    derivation, frame, _ = fitted
    model = derivation.model
    asked = _questions(model)
    assert set(asked) == {"lactate", "crp"}
    data = model.to_dict()
    lactate = next(n["split"] for n in data["nodes"] if n.get("split", {}).get("column") == "lactate")
    assert lactate["missing_in_derivation"] == 0 and lactate["missing_goes"] is None
    crp_node = asked["crp"]
    crp = crp_node.question
    # The count is of the derivation patients reaching that box with a blank CRP.
    at = model.route(model.asked_values(derivation.data.predictors), derivation.data.n)
    reached = np.zeros(derivation.data.n, dtype=bool)
    for leaf in model.leaves:
        if crp_node.id in [s.box for s in model.steps_to(leaf.id)]:
            reached |= at == leaf.id
    blank = np.isnan(derivation.data.predictors[1].numbers) if \
        derivation.data.predictors[1].spec.name == "crp" else \
        np.isnan(derivation.data.predictors[0].numbers)
    assert crp.missing_in_derivation == int((reached & blank).sum()) > 0
    assert crp.missing_goes in ("yes", "no") and crp.routes_missing
    # The file reloads to the same tree.
    again = TreeModel.from_dict(json.loads(model.to_json()))
    assert again.fingerprint == model.fingerprint


def test_rules_and_chart_say_not_recorded_only_where_seen(fitted):
    model = fitted[0].model
    rules = model.rules()
    assert rules.count(MEASURE_FIRST) == 1
    crp = _questions(model)["crp"].question
    steps = [s for leaf in model.leaves for s in model.steps_to(leaf.id)]
    for step in steps:
        column = model.node(step.box).question.column
        marked = step.answer == crp.missing_goes.upper() if column == "crp" else False
        assert step.includes_missing == marked
        assert (f"{step.phrase()}" in rules)
    assert any(s.includes_missing for s in steps) and "(or not recorded)" in rules
    for form in ("tree", "rules"):
        pdf = render_chart(model, ChartOptions(form=form, paper="a3"))
        text = " ".join(pypdf.PdfReader(io.BytesIO(pdf)).pages[0].extract_text().split())
        assert text.count(" ".join(MEASURE_FIRST.split())) == 1, form
        if form == "tree":
            # One "If not recorded" line in CRP's box, and the key's entry for it.
            assert text.count(NOT_RECORDED) == 2


def test_scoring_leaves_the_box_empty_and_names_the_column(fitted):
    model = fitted[0].model
    rows = pd.DataFrame({"lactate": [np.nan, 5.0, 1.0, 1.0], "crp": [150, np.nan, np.nan, 150]})
    out, notes = scored_table(model, rows)
    assert pd.isna(out["prunella_box"].iloc[0]) and pd.isna(out["prunella_prediction"].iloc[0])
    assert pd.isna(out["prunella_share_yes"].iloc[0])
    assert out["prunella_missing"].tolist()[0] == "lactate"
    # A blank CRP follows its learnt branch: routed, nothing to measure.
    assert out["prunella_box"].iloc[1:].notna().all()
    assert out["prunella_missing"].iloc[1:].isna().all()
    assert any("1 row(s) got no outcome box" in n and "prunella_missing" in n for n in notes)
    # The one-patient lookup names the value needed.
    route = route_patient(model, {"crp": "150"})
    assert route.outcome_box == 0 and route.needs == "lactate" and route.prediction is None
    assert route.waiting_box == _questions(model)["lactate"].id


def test_an_older_model_file_is_read_the_safe_way(fitted):
    """A file written before the count was kept: its fingerprint and routing of recorded
    values stay; a missing value has no evidence behind a branch, so it is measured first."""
    model = fitted[0].model
    data = json.loads(model.to_json())
    for node in data["nodes"]:
        if "split" in node:
            node["split"].pop("missing_in_derivation")
            node["split"]["missing_goes"] = node["split"]["missing_goes"] or "no"
    old = TreeModel.from_dict(data)
    assert "missing_in_derivation" not in json.dumps(old.to_dict())
    assert TreeModel.from_dict(json.loads(old.to_json())).fingerprint == old.fingerprint
    assert old.asks_unroutable() and "(or not recorded)" not in old.rules()
    route = route_patient(old, {"lactate": "1.0"})
    assert route.outcome_box == 0 and route.needs == "crp"
    whole = route_patient(old, {"lactate": "1.0", "crp": "150"})
    assert whole.outcome_box == route_patient(model, {"lactate": "1.0", "crp": "150"}).outcome_box


def test_a_check_leaves_out_rows_that_wait_for_a_value(fitted):
    derivation, frame, folder = fitted
    from core.checking.new_patients import check_table

    other = generated_frame(n=200, seed=11)
    other.loc[:9, "lactate"] = np.nan
    result = check_table(derivation.model, LoadedTable(other, derivation.table.provenance))
    assert result.needs_value == (("lactate", 10),)
    assert result.n == 190
    assert any("10 row(s) were left out of the check" in w for w in result.warnings)
    assert result.to_dict()["needs_value"] == [["lactate", 10]]


def test_command_line_fit_and_score(fitted, tmp_path):
    _, frame, _ = fitted
    write_csv(frame, tmp_path / "cohort.csv")
    fit = prunella("fit", tmp_path / "cohort.csv", "--outcome", "admitted", "--folds", "5",
                   "--model", tmp_path / "m.json", "--rules", tmp_path / "r.txt")
    assert fit.returncode == 0, fit.stderr
    assert MEASURE_FIRST in fit.stdout and MEASURE_FIRST in (tmp_path / "r.txt").read_text()
    new = pd.DataFrame({"lactate": [np.nan, 2.0], "crp": [50, 50]})
    write_csv(new, tmp_path / "new.csv")
    score = prunella("score", tmp_path / "m.json", tmp_path / "new.csv", "--out",
                     tmp_path / "scored.csv")
    assert score.returncode == 0, score.stderr
    assert "got no outcome box" in score.stderr and "Lactate" in score.stderr
    scored = pd.read_csv(tmp_path / "scored.csv")
    assert pd.isna(scored["prunella_box"][0]) and scored["prunella_missing"][0] == "lactate"
    assert scored["prunella_box"][1] >= 1 and pd.isna(scored["prunella_missing"][1])
