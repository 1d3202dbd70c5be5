"""The chosen tree as a plain model: JSON, scoring new rows, rules, costs and priors."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from core.data import LoadedTable, Provenance
from core.design import DesignSpec
from core.dictionary import ColumnSpec, DataDictionary
from core.errors import InputError
from core.model.tree import MODEL_FORMAT, TreeModel
from core.sizing import DerivationRequest, TreeSettings, choose_model, derive


def _clinic(n=1200, seed=0):
    """An invented clinic: risk rises with breathing rate and with arrival by ambulance."""
    rng = np.random.default_rng(seed)
    rate = rng.integers(10, 40, size=n)
    mode = rng.choice(["ambulance", "walked in", "GP referral"], size=n)
    lab = np.where(rng.random(n) < 0.3, np.nan, rng.normal(50, 20, size=n).round(1))
    p = 0.05 + 0.5 * (rate > 24) + 0.3 * (mode == "ambulance")
    frame = pd.DataFrame({"rate": rate, "mode": mode, "lab": lab,
                          "admitted": np.where(rng.random(n) < p, "yes", "no"),
                          "stay": 5 + 20 * (rate > 24) + rng.normal(0, 3, n)})
    dictionary = DataDictionary((
        ColumnSpec("rate", label="Breathing rate", unit="/min"),
        ColumnSpec("mode", kind="nominal", label="Arrival", levels=("ambulance", "GP referral", "walked in")),
        ColumnSpec("lab", label="Lactate-ish lab", unit="mg/L"),
        ColumnSpec("admitted", role="outcome", kind="binary", levels=("no", "yes")),
        ColumnSpec("stay", role="ignore", label="Stay", unit="h"),
    ))
    table = LoadedTable(frame, Provenance("clinic.csv", None, "a" * 64, n, frame.shape[1]))
    return table, dictionary


def _derive(outcome="admitted", **tree):
    table, dictionary = _clinic()
    request = DerivationRequest(DesignSpec(outcome, ("rate", "mode", "lab")),
                                tree=TreeSettings(**tree))
    return derive(table, dictionary, request)


def test_json_round_trip_keeps_everything_and_the_fingerprint(tmp_path):
    model = _derive().model
    path = tmp_path / "model.json"
    model.save(path)
    data = json.loads(path.read_text())
    assert data["format"] == MODEL_FORMAT
    for key in ("task", "outcome", "n_rows", "nodes", "path", "chosen"):
        assert key in data
    for key in ("leaves", "alpha", "train_risk", "cv_risk", "cv_se", "grid_alpha"):
        assert len(data["path"][key]) == len(data["path"]["leaves"])
    assert data["chosen"]["rule"] == "1se"
    assert all({"id", "leaf", "children", "n"} <= set(n) for n in data["nodes"])
    assert all(("question" in n) != n["leaf"] and ("outcome" in n) == n["leaf"] for n in data["nodes"])
    again = TreeModel.load(path)
    assert again.fingerprint == model.fingerprint
    assert again.to_json() == model.to_json()


def test_scoring_new_rows_matches_the_derivation_and_warns_on_unseen_levels():
    derivation = _derive()
    model = choose_model(derivation, 4).model
    assert "mode" in model.columns_asked()
    frame = derivation.table.frame
    scored = model.apply(frame)
    counts = np.bincount(scored.leaf, minlength=len(model.nodes) + 1)
    assert all(counts[leaf.id] == leaf.n for leaf in model.leaves)
    new = frame.head(5).copy()
    new["mode"] = ["helicopter", "ambulance", "walked in", None, "GP referral"]
    result = model.apply(new)
    assert any("helicopter" in w for w in result.warnings)
    # The unseen level goes where a missing value goes.
    blank = new.copy()
    blank.loc[0, "mode"] = None
    assert model.apply(blank).leaf[0] == result.leaf[0]


def test_missing_columns_are_named():
    model = _derive().model
    with pytest.raises(InputError, match="lacks column"):
        model.apply(pd.DataFrame({"other": [1, 2]}))


def test_rules_text_lists_every_box_with_yes_no_and_missing_routes():
    model = _derive().model
    rules = model.rules()
    for leaf in model.leaves:
        assert f"Box {leaf.id}: IF" in rules
    assert "YES" in rules and "NO" in rules
    assert "Breathing rate above 24 /min?" in rules


def test_missing_a_positive_costs_more_means_more_positives_flagged():
    plain = _derive(min_leaf=20).model
    careful = _derive(min_leaf=20, miss_cost=6.0).model
    def positive_share(model):
        return sum(n.n for n in model.leaves if n.prediction == "yes") / model.n_rows
    assert positive_share(careful) > positive_share(plain)
    assert careful.extra["costs"]["loss"] == [[0.0, 1.0], [6.0, 0.0]]


def test_equal_priors_and_regression_outcome():
    equal = _derive(priors="equal").model
    assert equal.extra["costs"]["priors"] == [0.5, 0.5]
    table, dictionary = _clinic()
    request = DerivationRequest(DesignSpec("stay", ("rate", "mode", "lab"), task="regression"))
    model = derive(table, dictionary, request).model
    assert model.task == "regression"
    assert model.root.question.column == "rate" and model.root.question.threshold == 24
    leaf = model.leaves[0]
    assert leaf.mean is not None and leaf.sd is not None and "Stay: mean" in leaf.text


def test_damaged_or_foreign_model_files_are_refused(tmp_path):
    model = _derive().model
    data = model.to_dict()
    with pytest.raises(InputError, match="cannot read"):
        TreeModel.from_dict({**data, "format": "prunella-model/99"})
    broken = dict(data)
    broken["nodes"] = data["nodes"][:1]
    with pytest.raises(InputError, match="damaged"):
        TreeModel.from_dict(broken)
    path = tmp_path / "x.json"
    path.write_text("not json")
    with pytest.raises(InputError, match="not valid JSON"):
        TreeModel.load(path)


def test_three_classes_with_a_nominal_predictor_and_a_loss_matrix():
    rng = np.random.default_rng(3)
    n = 900
    colour = rng.choice(["red", "green", "blue", "grey"], size=n)
    size = rng.normal(size=n)
    outcome = np.where(colour == "red", "A", np.where(size > 0.5, "B", "C"))
    flip = rng.random(n) < 0.1
    outcome[flip] = rng.choice(["A", "B", "C"], size=flip.sum())
    frame = pd.DataFrame({"colour": colour, "size": size, "kind": outcome})
    dictionary = DataDictionary((
        ColumnSpec("colour", kind="nominal", levels=("blue", "green", "grey", "red")),
        ColumnSpec("size"),
        ColumnSpec("kind", role="outcome", kind="nominal", levels=("A", "B", "C")),
    ))
    table = LoadedTable(frame, Provenance("k.csv", None, "b" * 64, n, 3))
    loss = ((0, 1, 1), (1, 0, 1), (5, 5, 0))  # missing a C is five times as bad
    request = DerivationRequest(DesignSpec("kind", ("colour", "size")), tree=TreeSettings(loss=loss))
    model = derive(table, dictionary, request).model
    assert model.classes == ("A", "B", "C")
    colour_questions = [n for n in model.nodes if n.question and n.question.column == "colour"]
    # Several classes: a nominal question asks about one level at a time, in words.
    assert colour_questions and colour_questions[0].question.yes_levels == ("red",)
    assert colour_questions[0].text == "colour: red?"
    predicted = model.apply(frame).prediction
    assert np.mean(predicted == outcome) > 0.8
    with pytest.raises(InputError, match="3×3"):
        derive(table, dictionary, DerivationRequest(DesignSpec("kind", ("colour",)),
                                                    tree=TreeSettings(loss=((0, 1), (1, 0)))))


def test_a_small_skewed_box_never_shows_an_impossible_mean_interval():
    """A t interval on a handful of long stays can reach below zero; a length of stay cannot,
    so box intervals stay within the outcome's observed range (common practice)."""
    table, dictionary = _clinic()
    frame = table.frame.copy()
    frame["stay"] = np.where(np.arange(len(frame)) % 97 == 0, 900.0, 2.0 + 20 * (frame["rate"] > 24))
    table = LoadedTable(frame, table.provenance)
    request = DerivationRequest(DesignSpec("stay", ("rate", "mode", "lab"), task="regression"),
                                tree=TreeSettings(min_leaf=3), size=10_000)  # the largest tree
    model = derive(table, dictionary, request).model
    low_end, high_end = model.extra["cohort"]["outcome_range"]
    assert (low_end, high_end) == (2.0, 900.0)
    from core.checking.intervals import mean_interval

    raw_lows = [mean_interval(n.mean, n.sd, n.n)[0] for n in model.leaves]
    assert min(raw_lows) < 0  # the unclipped interval would print a negative stay
    for leaf in model.leaves:
        low, high = model.mean_interval(leaf)
        assert low_end <= low <= leaf.mean <= high <= high_end
