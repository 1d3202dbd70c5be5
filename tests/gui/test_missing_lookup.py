"""The app's one-patient lookup asks for a value the tree has no branch for (issue 10, item 1).

Generated data (tests/test_missing_evidence.py): lactate is never blank, CRP often is. A
patient entered without lactate stops at lactate's question, and the app names the value to
measure; a patient without CRP follows CRP's learnt branch. Common practice (no single source).
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from tests.test_missing_evidence import generated_frame  # noqa: E402


def test_lookup_names_the_value_to_measure(window, qtbot, run, dialogs, tmp_path):
    path = tmp_path / "cohort.csv"
    generated_frame().to_csv(path, index=False)
    dialogs.open_name = str(path)
    window.open_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    window.go_to("outcome")
    combo = window.panels["outcome"].outcome_combo
    combo.setCurrentIndex(combo.findData("admitted"))
    run(window)
    model = window.session.model
    assert set(model.columns_asked()) == {"lactate", "crp"}
    window.go_to("tree")
    tree = window.panels["tree"]
    tree.set_values({"crp": "150"})
    route = tree.last_route
    lactate = next(n for n in model.nodes if n.question and n.question.column == "lactate")
    assert route.outcome_box == 0 and route.needs == "lactate"
    text = tree.result.text()
    assert f"Stops at box {lactate.id}" in text
    assert f"{model.spec('lactate').display} is needed" in text and "measure it first" in text
    # The question's own details say why.
    tree.show_box(lactate.id)
    assert "measure it first" in tree.details.toPlainText()
    # With lactate entered and CRP blank, CRP's learnt branch is followed.
    tree.set_values({"lactate": "1.0", "crp": None})
    assert tree.last_route.outcome_box > 0 and tree.last_route.needs is None
    assert f"Reaches box {tree.last_route.outcome_box}" in tree.result.text()
