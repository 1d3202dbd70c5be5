"""Opening another file starts every step afresh, settings included: a miss cost, priors or a
goal belong to the previous outcome's classes, and the README promises a fresh start, so every
widget of steps 2 and 3 shows its default again and a run uses the defaults."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import pytest  # noqa: E402

from core.design import default_design  # noqa: E402
from core.sizing import CVSettings, TreeSettings  # noqa: E402


@pytest.fixture
def clinic_file(tmp_path):
    """An invented clinic audit: other column names, a rare-ish outcome, record numbers."""
    rng = np.random.default_rng(5)
    n = 240
    frame = pd.DataFrame({
        "record_no": [f"R{50000 + i}" for i in range(n)],
        "heart_rate": rng.integers(50, 150, n),
        "crp_mg_l": rng.gamma(2.0, 20.0, n).round(0),
        "smoker": rng.choice(["yes", "no", "none"], n),
    })
    frame["readmitted"] = np.where((frame["crp_mg_l"] > 60) & (rng.random(n) < 0.8),
                                   "back within 30 days", "not back")
    path = tmp_path / "clinic audit.csv"
    frame.to_csv(path, index=False)
    return path


def _pick(combo, data) -> None:
    index = combo.findData(data)
    assert index >= 0, data
    combo.setCurrentIndex(index)
    combo.activated.emit(index)


def test_another_file_resets_every_setting(demo, qtbot, run, clinic_file):
    window, session = demo, demo.session
    outcome, size = window.panels["outcome"], window.panels["size"]
    window.go_to("outcome")
    _pick(outcome.positive_combo, "no")  # the other class to catch
    assert session.design.positive == "no"
    outcome.cost_spin.setValue(3.0)
    assert session.tree.miss_cost == 3.0
    assert "3.0" in outcome.cost_spin.text()
    _pick(outcome.goal_combo, "sensitivity")
    outcome.goal_spin.setValue(90)
    assert session.goal is not None and session.goal.at_least == pytest.approx(0.9)
    window.go_to("size")
    size.min_leaf.setValue(12)
    size.max_depth.setValue(4)
    _pick(size.criterion, "entropy")
    _pick(size.risk, "impurity")
    _pick(size.priors, "equal")
    size.coarsen.setValue(50)
    size.folds.setValue(5)
    size.repeats.setValue(2)
    size.share.setValue(30)
    size.grouped.setChecked(False)
    size.stratified.setChecked(False)
    size.seed.setValue(7)
    size.holdout.setValue(20)
    _pick(size.plan, "split")
    assert session.tree == TreeSettings(min_leaf=12, max_depth=4, criterion="entropy",
                                        priors="equal", miss_cost=3.0, risk="impurity",
                                        seed=7, coarsen=50)
    assert session.cv == CVSettings(plan="split", folds=5, repeats=2, validation_share=0.3,
                                    grouped=False, stratified=False, seed=7)
    assert session.holdout == pytest.approx(0.2)

    before = session.table
    window.panels["data"].open_path(str(clinic_file))
    qtbot.waitUntil(lambda: session.table is not None and session.table is not before,
                    timeout=20000)
    # The session holds the defaults ...
    assert session.tree == TreeSettings() and session.cv == CVSettings()
    assert session.holdout is None and session.goal is None
    window.go_to("outcome")
    combo = outcome.outcome_combo
    _pick(combo, "readmitted")
    assert session.design.outcome == "readmitted"
    assert session.tree == TreeSettings() and session.cv == CVSettings() and session.goal is None
    default = default_design(session.dictionary, "readmitted")
    assert session.design.positive == default.positive == "back within 30 days"
    # ... and every widget shows them.
    assert outcome.positive_combo.currentData() == "back within 30 days"
    assert outcome.cost_spin.value() == 1.0
    assert outcome.goal_combo.currentData() == "cost" and outcome.goal_spin.value() == 95
    assert outcome.cost_spin.isEnabled() and not outcome.goal_spin.isEnabled()
    assert "Missing a patient with" in outcome.cost_before.text()
    assert "3.0" not in outcome.cost_spin.text()
    window.go_to("size")
    assert size.min_leaf.value() == 5 and size.max_depth.value() == 0
    assert size.criterion.currentData() is None and size.risk.currentData() == "cost"
    assert size.priors.currentData() == "observed" and size.coarsen.value() == 1
    assert size.plan.currentData() == "kfold" and size.folds.value() == 10
    assert size.repeats.value() == 1 and size.share.value() == 25
    assert size.grouped.isChecked() and size.stratified.isChecked()
    assert size.seed.value() == 0 and size.holdout.value() == 0
    assert size.folds.isVisible() and not size.share.isVisible()

    # A run sends the defaults and the tree is grown with them.
    request = session.request()
    assert request.tree == TreeSettings() and request.cv == CVSettings()
    assert request.holdout is None and request.goal is None
    run(window)
    grown = session.chosen.request
    assert grown.tree == TreeSettings() and grown.cv == CVSettings()
    assert grown.holdout is None and grown.goal is None
    assert session.model.chosen["rule"] == "1se"
    assert not any(r.kind == "held-out" for r in session.checks)
