"""Net benefit (decision curve analysis).

Reference (docs/references.md): Vickers & Elkin, "Decision curve analysis: a novel method for
evaluating prediction models", Med Decis Making 2006;26:565–574: at threshold probability pt,
NB = TP/n − FP/n · pt/(1 − pt); treating all gives prevalence − (1 − prevalence) · pt/(1 − pt);
treating none gives 0. The values are recomputed here from the model's own box counts (each
box's derivation share of the positive class decides who is treated), not from Prunella's code.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
from sklearn.datasets import load_breast_cancer

from core.checking.net_benefit import THRESHOLDS, net_benefit, useful_thresholds
from core.report import DECISION_CURVE_READING, decision_curve_figure
from core.chart.style import CURVE
from core.sizing import cross_validate_path
from core.sizing.folds import CVSettings
from core.sizing.grow import TreeSettings
from tests.helpers import analysis_from_arrays, prunella


def _formula(y, share, pt):
    """Vickers & Elkin (2006): NB = TP/n − FP/n · pt/(1 − pt)."""
    treated = share >= pt
    n = len(y)
    tp = np.sum(treated & (y == 1))
    fp = np.sum(treated & (y == 0))
    return tp / n - fp / n * pt / (1 - pt)


def test_thresholds_run_from_1_to_50_percent():
    assert THRESHOLDS[0] == 0.01 and THRESHOLDS[-1] == 0.5 and len(THRESHOLDS) == 50


def test_check_reports_net_benefit_recomputed_from_the_model_box_counts(tmp_path):
    """Wisconsin diagnostic breast cancer data (Wolberg, Street & Mangasarian; UCI, shipped
    with scikit-learn): fit with 30% set aside, check on the whole file."""
    data = load_breast_cancer()
    frame = pd.DataFrame(data.data[:, :10], columns=[f"f{j}" for j in range(10)])
    frame["diagnosis"] = np.where(data.target == 0, "malignant", "benign")
    csv = tmp_path / "bc.csv"
    frame.to_csv(csv, index=False)
    model_path, results, scored = tmp_path / "m.json", tmp_path / "r.json", tmp_path / "s.csv"
    assert prunella("fit", csv, "--outcome", "diagnosis", "--positive", "malignant",
                    "--holdout", "0.3", "--model", model_path, "--dictionary", "none",
                    "--quiet").returncode == 0
    assert prunella("check", model_path, csv, "--out", results).returncode == 0
    assert prunella("score", model_path, csv, "--out", scored).returncode == 0
    model = json.loads(model_path.read_text())
    positive = model["classes"].index("malignant")
    share_of_box = {node["id"]: node["counts"][positive] / node["n"]
                    for node in model["nodes"] if not node.get("children")}
    boxes = pd.read_csv(scored)["prunella_box"].to_numpy()
    share = np.array([share_of_box[b] for b in boxes])
    y = (frame["diagnosis"] == "malignant").to_numpy().astype(int)
    reported = json.loads(results.read_text())["measures"]["net_benefit"]
    assert [p["threshold"] for p in reported] == pytest.approx(list(THRESHOLDS))
    prevalence = y.mean()
    for point in reported:
        pt = point["threshold"]
        assert point["tree"] == pytest.approx(_formula(y, share, pt), abs=1e-12)
        assert point["treat_all"] == pytest.approx(prevalence - (1 - prevalence) * pt / (1 - pt),
                                                   abs=1e-12)
        assert point["treat_none"] == 0
    # A useful tree on this data: above both references over some range of thresholds.
    assert useful_thresholds(net_benefit(y, share)) is not None
    # The held-out check recorded in the model carries it too (the report's figure).
    printed = prunella("check", model_path, csv).stdout
    assert "Net benefit at a 10% threshold" in printed


def test_cross_validated_net_benefit_of_the_chosen_size_follows_the_formula():
    X, y = load_breast_cancer(return_X_y=True)
    data = analysis_from_arrays(X[:, :6], y, "classification")[0]
    path = cross_validate_path(data, TreeSettings(min_leaf=10), CVSettings(folds=5))
    k = path.one_se_index
    counts = path.counts
    y = data.y  # class codes: 1 is the positive class
    points = counts.net_benefit_at(k)
    n = counts.positives[k] + counts.negatives[k]
    assert n == len(y)  # every patient held out once
    for t, point in enumerate(points):
        pt = THRESHOLDS[t]
        tp, fp = counts.treated[k, t, 1], counts.treated[k, t, 0]
        assert point.tree == pytest.approx(tp / n - fp / n * pt / (1 - pt), abs=1e-12)
        assert point.treat_all == pytest.approx(y.mean() - (1 - y.mean()) * pt / (1 - pt))
    # Treated counts never rise with the threshold (a stricter bar treats fewer).
    assert np.all(np.diff(counts.treated[k], axis=0) <= 0)


def test_decision_curve_figure_draws_tree_all_and_none_in_the_curve_palette():
    points = net_benefit(np.array([1, 0, 1, 0, 0]), np.array([0.8, 0.1, 0.6, 0.3, 0.05]))
    fig = decision_curve_figure(points)
    ax = fig.axes[0]
    colours = [line.get_color() for line in ax.get_lines()]
    assert colours[:2] == [CURVE["cross-validated"], CURVE["training"]]
    labels = [t.get_text() for t in ax.get_legend().get_texts()]
    assert labels == ["the tree", "treat all", "treat none"]
    assert "above both" in DECISION_CURVE_READING
