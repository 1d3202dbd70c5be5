"""The app counts rows as the command line, chart and report do: "visits" only where a patient
number is set and some patients came more than once, "patients" otherwise (core/phrases.py).

Invented data (tests/test_visits_or_patients.py); our own wording, not a reference.
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import re  # noqa: E402

from PySide6.QtCore import Qt  # noqa: E402

from gui.session import STEPS  # noqa: E402
from tests.gui.visible_text import visible_texts  # noqa: E402
from tests.test_visits_or_patients import PATIENTS, VISITS, _cohort  # noqa: E402


def _grow(window, qtbot, run, dialogs, path, patient_id):
    dialogs.open_name = str(path)
    window.open_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    window.go_to("outcome")
    outcome = window.panels["outcome"]
    outcome.outcome_combo.setCurrentIndex(outcome.outcome_combo.findData("transfused"))
    combo = outcome.patient_combo
    combo.setCurrentIndex(combo.findData(patient_id) if patient_id else 0)
    assert window.session.design.patient_id == patient_id
    window.panels["size"].folds.setValue(5)
    run(window)


def _every_step(window, qtbot, dialogs, external) -> str:
    """The texts of every step, with an outcome box's details open and a check on ``external``."""
    checking = window.panels["checking"]
    window.go_to("checking")
    dialogs.open_name = str(external)
    qtbot.mouseClick(checking.external_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: not checking.running and any(
        r.kind == "external" for r in checking.checks), timeout=30000)
    texts = []
    for step in STEPS:
        window.go_to(step)
        if step == "tree":
            window.panels["tree"].show_box(window.session.model.leaves[0].id)
        qtbot.wait(200)  # widgets added while the step was hidden are shown by the event loop
        texts += [text for _where, text in visible_texts(window)]
    return "\n".join(texts)


def test_repeat_visits_are_visits_in_every_step(window, qtbot, run, dialogs, tmp_path):
    path, external = tmp_path / "transfusion.csv", tmp_path / "elsewhere.csv"
    frame, other = _cohort(200, 3, 1), _cohort(80, 3, 3, 9000)
    frame.to_csv(path, index=False)
    other.to_csv(external, index=False)
    _grow(window, qtbot, run, dialogs, path, "Record no")
    assert window.session.model.rows_word == "visits"
    shown = _every_step(window, qtbot, dialogs, external)
    visits, patients = len(frame), frame["Record no"].nunique()
    assert f"{visits} visits of {patients} patients" in shown  # grown on, step 5
    assert f"{len(other)} visits of {other['Record no'].nunique()} patients checked" in shown
    assert re.search(r"\d visits? reach this box", shown), "the box's details count visits"
    assert "Fewest visits in an outcome box:" in shown  # step 3: the grower counts rows
    # Every count of patients is "N visits of M patients", or counts patients as patients
    # ("126 patient(s) have more than one row").
    stray = [shown[max(0, m.start() - 60):m.end() + 20] for m in PATIENTS.finditer(shown)
             if not re.search(r"visits of $", shown[max(0, m.start() - 10):m.start()])
             and not shown.startswith("(s) have more than one row", m.end())]
    assert not stray, stray


def test_one_row_per_patient_is_patients_in_every_step(window, qtbot, run, dialogs, tmp_path):
    path, external = tmp_path / "transfusion.csv", tmp_path / "elsewhere.csv"
    _cohort(220, 1, 2).drop(columns="Record no").to_csv(path, index=False)
    _cohort(90, 1, 4, 20000).to_csv(external, index=False)
    _grow(window, qtbot, run, dialogs, path, None)
    assert window.session.model.rows_word == "patients"
    shown = _every_step(window, qtbot, dialogs, external)
    assert "220 patients" in shown and "90 patients checked" in shown
    assert re.search(r"\d patients? reach this box", shown)
    assert "Fewest patients in an outcome box:" in shown
    assert not VISITS.search(shown), VISITS.findall(shown)



def test_the_smallest_box_setting_says_what_it_counts_before_anything_is_grown(
        window, qtbot, dialogs, tmp_path):
    """Step 3's smallest-box setting follows step 2's patient number at once, and a new file."""
    repeat, single = tmp_path / "transfusion.csv", tmp_path / "one_each.csv"
    _cohort(200, 3, 1).to_csv(repeat, index=False)
    _cohort(120, 1, 2).to_csv(single, index=False)
    dialogs.open_name = str(repeat)
    window.open_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    size = window.panels["size"]
    # Before an outcome is chosen there are no step-2 choices: step 1's patient number counts.
    assert window.session.design is None
    assert window.session.dictionary.get("Record no").role == "patient_id"
    assert size.min_leaf_label.text() == "Fewest visits in an outcome box:"
    outcome = window.panels["outcome"]
    outcome.outcome_combo.setCurrentIndex(outcome.outcome_combo.findData("transfused"))
    combo = outcome.patient_combo
    combo.setCurrentIndex(combo.findData("Record no"))
    assert window.session.design.patient_id == "Record no"
    assert size.min_leaf_label.text() == "Fewest visits in an outcome box:"
    assert "fewer visits than this" in size.min_leaf.toolTip()
    combo.setCurrentIndex(0)  # no patient number: every row is a patient
    assert window.session.design.patient_id is None
    assert size.min_leaf_label.text() == "Fewest patients in an outcome box:"
    combo.setCurrentIndex(combo.findData("Record no"))
    first = window.session.serial
    dialogs.open_name = str(single)  # one visit each: the same column counts patients
    window.open_action.trigger()
    qtbot.waitUntil(lambda: window.session.serial != first, timeout=15000)
    outcome.outcome_combo.setCurrentIndex(outcome.outcome_combo.findData("transfused"))
    if window.session.design.patient_id != "Record no":
        combo.setCurrentIndex(combo.findData("Record no"))
    assert window.session.design.patient_id == "Record no"
    assert size.min_leaf_label.text() == "Fewest patients in an outcome box:"
