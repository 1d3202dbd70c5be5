"""Every text the main window shows, in every step, on the demo cohort (issue 10, item 8):
labels, buttons, group titles, text views, choices, table headers, tooltips, menu items, the
status bar, the plots and the tree view. None calls an outcome box a "leaf" or the error a
"risk" (read as the chance of the outcome); and as the demo's rows are visits (some patients
came more than once), no count calls them patients.

Invented demo cohort (sample_data/README.md); our own wording, not a reference.
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import re  # noqa: E402

import pandas as pd  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from gui.session import STEPS  # noqa: E402
from tests.gui.visible_text import visible_texts  # noqa: E402
from tests.helpers import DEMO_CSV as DEMO  # noqa: E402

# "risk" anywhere is read as the chance of the outcome; Prunella's numbers of that kind are
# called rates, shares or chances, and its errors errors. "leaf"/"leaves" is the grower's
# word for what the chart calls an outcome box.
FORBIDDEN = re.compile(r"\b(risks?|risky|leaf|leaves)\b", re.I)
# A count of patients: on visits it must be "N visits of M patients", or patients counted as
# patients ("126 patient(s) have more than one row").
PATIENTS = re.compile(r"\b\d[\d,]* patients?\b")


def _every_step(window, qtbot, state: str, found: list) -> None:
    for step in STEPS:
        window.go_to(step)
        if step == "tree" and window.session.model is not None:
            tree = window.panels["tree"]
            tree.show_box(window.session.model.leaves[0].id)
        qtbot.wait(250)  # widgets added while the step was hidden are shown by the event loop
        found += [(f"{state}, step {step}", where, text) for where, text in visible_texts(window)]
        if step == "tree" and window.session.model is not None:
            window.panels["tree"].show_box(1)  # a question's details too
            found += [(f"{state}, step tree, box 1", where, text)
                      for where, text in visible_texts(window)]
        if step == "size" and window.session.model is not None:
            view = window.panels["size"].view_combo
            if view.isEnabled():  # the curve's other view: sensitivity and specificity
                view.setCurrentIndex(view.findData("measures"))
                qtbot.wait(100)
                found += [(f"{state}, step size, measures", where, text)
                          for where, text in visible_texts(window)]
                view.setCurrentIndex(view.findData("error"))


def _offending(found) -> list[str]:
    bad = [f"{state} · {where}: {text[:200]}" for state, where, text in found
           if FORBIDDEN.search(text)]
    for state, where, text in found:
        for m in PATIENTS.finditer(text):
            before = text[max(0, m.start() - 10):m.start()]
            if not before.endswith("visits of ") and not text.startswith("(s)", m.end()):
                bad.append(f"{state} · {where}: counts visits as patients: "
                           f"{text[max(0, m.start() - 60):m.end() + 30]}")
    return sorted(set(bad))


def test_no_leaf_no_risk_and_visits_counted_as_visits(demo, run, qtbot, dialogs, tmp_path):
    window = demo
    found: list = []
    _every_step(window, qtbot, "demo opened", found)
    size = window.panels["size"]
    size.folds.setValue(5)
    size.holdout.setValue(20)
    run(window)
    # A check on another file, so step 5 and the chart say where it was made.
    frame = pd.read_csv(DEMO)
    path = tmp_path / "riverside.csv"
    frame[frame["campus"] == "Riverside"].to_csv(path, index=False)
    window.go_to("checking")
    checking = window.panels["checking"]
    dialogs.open_name = str(path)
    qtbot.mouseClick(checking.external_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: not checking.running and window.session.chart_check is not None,
                    timeout=30000)
    _every_step(window, qtbot, "admission tree, checked", found)
    # A measured outcome: the length of stay in hours.
    window.go_to("outcome")
    outcome = window.panels["outcome"].outcome_combo
    outcome.setCurrentIndex(outcome.findData("los_hours"))
    assert window.session.design.outcome == "los_hours"
    size.holdout.setValue(0)
    run(window)
    assert window.session.model.task == "regression"
    _every_step(window, qtbot, "length-of-stay tree", found)
    assert len(found) > 500  # the walk did reach the widgets
    assert any("outcome box" in text for _s, _w, text in found)
    offending = _offending(found)
    assert not offending, "\n".join(offending)


def test_the_sweep_names_what_it_finds():
    found = [("s", "QLabel(cv)", "Cross-validated risk 0.213"), ("s", "QPushButton", "Leaves: 7"),
             ("s", "QLabel(check)", "412 patients checked"),
             ("s", "QLabel(ok)", "412 visits of 300 patients; 12 outcome boxes")]
    offending = _offending(found)
    assert len(offending) == 3
    assert any("QLabel(cv)" in line for line in offending)
    assert any("QLabel(check): counts visits as patients" in line for line in offending)
    assert not any("QLabel(ok)" in line for line in offending)
