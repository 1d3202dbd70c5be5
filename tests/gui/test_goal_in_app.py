"""Sizing the tree by a clinical goal in the app (issue 13, item 1): step 2 offers "catch at
least S% of patients with the outcome" instead of a miss cost, step 3 runs the goal search in
the background with progress and Cancel and gives the same tree as core's search; a project
keeps the goal; an outcome that is not two-class has no goal to offer.

Invented data written by the test (tests/gui/test_cost_in_words.py: a falls audit).
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import Qt  # noqa: E402

from core.project.project import load_project, save_project  # noqa: E402
from core.sizing import derive  # noqa: E402
from tests.gui.test_cost_in_words import falls_frame  # noqa: E402


def _open_falls(window, qtbot, dialogs, tmp_path, n=700):
    path = tmp_path / "falls_audit.csv"
    falls_frame(n).to_csv(path, index=False)
    dialogs.open_name = str(path)
    window.open_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    window.go_to("outcome")
    panel = window.panels["outcome"]
    panel.outcome_combo.setCurrentIndex(panel.outcome_combo.findData("Outcome at 30 days"))
    panel.positive_combo.setCurrentIndex(panel.positive_combo.findData("fell"))
    return panel


def test_a_goal_chosen_in_step_2_sizes_the_tree_as_core_does(window, qtbot, run, dialogs,
                                                            tmp_path):
    panel = _open_falls(window, qtbot, dialogs, tmp_path)
    assert panel.goal_combo.isVisibleTo(panel) and not panel.goal_spin.isEnabled()
    panel.goal_combo.setCurrentIndex(panel.goal_combo.findData("sensitivity"))
    panel.goal_spin.setValue(80)
    assert window.session.goal.measure == "sensitivity"
    assert abs(window.session.goal.at_least - 0.80) < 1e-12
    assert not panel.cost_spin.isEnabled()  # the search tries the costs itself
    request = window.session.request()
    run(window, timeout=120000)
    chosen = window.session.model.chosen
    assert chosen["rule"] == "goal" and chosen["goal"]["at_least"] == 0.8
    assert chosen["cv_sensitivity"] >= 0.8
    # The same tree as core's own search on the same data and choices.
    core_model = derive(window.session.table, window.session.dictionary, request).model
    assert core_model.chosen["leaves"] == chosen["leaves"]
    assert core_model.chosen["miss_cost"] == chosen["miss_cost"]
    assert core_model.fingerprint == window.session.model.fingerprint
    # The curve can show CV sensitivity and specificity by size, the goal as a line and the
    # chosen size marked; its numbers are core's (the chosen size's equal the model's).
    size = window.panels["size"]
    window.go_to("size")
    assert size.view_combo.isEnabled()
    size.view_combo.setCurrentIndex(size.view_combo.findData("measures"))
    legend = size.curve.legend_texts()
    assert "Goal: sensitivity at least 80%" in legend
    assert any(t.startswith("Chosen (") for t in legend)
    assert any(t.startswith("Sensitivity") for t in legend)
    data = size.curve._data
    at = list(data.leaves).index(chosen["leaves"])
    assert abs(data.measures["cv_sensitivity"][at] - chosen["cv_sensitivity"]) < 1e-12
    low, high = data.measures["cv_sensitivity_interval"][at]
    assert low <= chosen["cv_sensitivity"] <= high
    assert size.curve.axes.get_ylabel() == "Cross-validated share (%)"
    size_text = window.panels["size"].choice.text()
    assert "goal" in size_text and "sensitivity" in size_text
    # Step 2's words name the catch rate the goal reached.
    window.go_to("outcome")
    assert "catches about" in panel.cost_words.text()
    # The project keeps the goal and reopens to the same tree.
    project = window.session.to_project()
    assert project.request.goal == window.session.goal and project.size == "goal"
    save_project(project, tmp_path / "falls.prunella.json")
    reopened = load_project(tmp_path / "falls.prunella.json")  # through the file checks
    assert reopened.request.goal == window.session.goal and reopened.size == "goal"
    again = derive(window.session.table, window.session.dictionary, reopened.request).model
    assert again.fingerprint == window.session.model.fingerprint
    # A measured outcome: no goal to offer, none sent.
    panel.task_combo.setCurrentIndex(panel.task_combo.findData("regression"))
    window.session.choose_outcome("Age (years)")
    assert window.session.request() is None or window.session.request().goal is None
    assert not panel.goal_combo.isVisibleTo(panel)


def test_a_goal_search_can_be_cancelled(window, qtbot, dialogs, tmp_path):
    panel = _open_falls(window, qtbot, dialogs, tmp_path, n=4000)
    panel.goal_combo.setCurrentIndex(panel.goal_combo.findData("sensitivity"))
    size = window.panels["size"]
    window.go_to("size")
    size.repeats.setValue(20)  # many fits per cost: far longer than it takes to cancel
    qtbot.mouseClick(size.run_button, Qt.LeftButton)
    assert size.running and size.cancel_button.isEnabled()
    qtbot.waitUntil(lambda: size.progress.value() >= 1, timeout=30000)
    with qtbot.waitSignal(size.run_finished, timeout=30000):
        qtbot.mouseClick(size.cancel_button, Qt.LeftButton)
    assert window.session.model is None and "Cancelled" in size.status.text()
