"""The whole job in the app, offscreen, on the invented demo cohort: open, choose the outcome,
run, choose a size on the curve, look at the tree, export."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import json  # noqa: E402

import pandas as pd  # noqa: E402
from pypdf import PdfReader  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from core.model import TreeModel  # noqa: E402
from core.sizing import choose_model  # noqa: E402


def _choose_outcome(window, name: str) -> None:
    combo = window.panels["outcome"].outcome_combo
    combo.setCurrentIndex(combo.findData(name))


def test_open_choose_run_pick_size_and_export(demo, qtbot, run, dialogs, tmp_path):
    window = demo
    session = window.session
    assert window.panels["data"].frame_model.rowCount() == 3950
    # Step 2: choose another outcome, then the admission outcome again, through the combo.
    window.go_to("outcome")
    _choose_outcome(window, "los_hours")
    assert session.design.outcome == "los_hours" and session.design.task == "regression"
    _choose_outcome(window, "admitted")
    assert session.design.outcome == "admitted" and session.design.task == "classification"
    assert session.design.positive == "yes"
    assert "bed_booked" not in session.design.predictors  # the dictionary leaves it out
    # Step 3: run in the background.
    run(window)
    assert session.model is not None and not session.is_stale()
    size = window.panels["size"]
    path = session.model.path
    assert session.model.chosen["leaves"] == path["one_se_leaves"]
    # Choose another size by clicking its point on the curve.
    wanted = next(n for n in path["leaves"] if n not in (path["one_se_leaves"], path["min_leaves"])
                  and 5 < n < 30)
    qtbot.mouseClick(size.curve, Qt.LeftButton, pos=size.curve.position_of(wanted))
    assert session.model.chosen["leaves"] == wanted
    assert session.model.chosen["rule"] == "user"
    expected = choose_model(session.derivation, wanted).model
    assert session.model.fingerprint == expected.fingerprint  # every number from core
    # The tree view updated at once: one box per node of the chosen tree.
    tree = window.panels["tree"]
    assert len(tree.view.boxes) == len(expected.nodes)
    assert sum(1 for b in tree.view.boxes.values() if b.leaf) == wanted
    assert size.size_combo.currentData() == wanted
    # Back to the 1-SE choice with its button.
    qtbot.mouseClick(size.one_se_button, Qt.LeftButton)
    assert session.model.chosen["rule"] == "1se"
    # Step 6: the chart, exported as a one-page PDF, and the other exports. The 1-SE tree (7
    # outcome boxes) is printed on A3, which the app names when A4 is too small for it.
    window.go_to("chart")
    chart = window.panels["chart"]
    chart.paper_combo.setCurrentIndex(chart.paper_combo.findData("a3"))
    qtbot.waitUntil(lambda: not chart.preview_busy and chart.pdf_path is not None, timeout=30000)
    dialogs.save_name = str(tmp_path / "admitted-chart.pdf")
    qtbot.mouseClick(chart.export_button, Qt.LeftButton)
    pdf = PdfReader(tmp_path / "admitted-chart.pdf")
    assert len(pdf.pages) == 1
    text = " ".join(pdf.pages[0].extract_text().split())
    assert session.model.fingerprint[:12] in text and "Decision support only" in text
    dialogs.save_name = str(tmp_path / "admitted-model.json")
    qtbot.mouseClick(chart.model_button, Qt.LeftButton)
    saved = TreeModel.load(tmp_path / "admitted-model.json")
    assert saved.fingerprint == session.model.fingerprint
    dialogs.save_name = str(tmp_path / "admitted-rules")  # the suffix is added
    qtbot.mouseClick(chart.rules_button, Qt.LeftButton)
    assert (tmp_path / "admitted-rules.txt").read_text(encoding="utf-8") == session.model.rules()
    dialogs.save_name = str(tmp_path / "scored.csv")
    qtbot.mouseClick(chart.scored_button, Qt.LeftButton)
    scored = pd.read_csv(tmp_path / "scored.csv")
    assert len(scored) == 3950 and "prunella_box" in scored.columns
    assert set(scored["prunella_box"]) <= {n.id for n in session.model.leaves}
    assert not dialogs.texts("warning")


def test_export_refuses_to_overwrite_the_data(demo, qtbot, run, dialogs):
    window = demo
    run(window)
    window.go_to("chart")
    dialogs.save_name = window.session.table.provenance.path
    before = open(dialogs.save_name, "rb").read()
    qtbot.mouseClick(window.panels["chart"].scored_button, Qt.LeftButton)
    assert any("input files" in t for t in dialogs.texts("warning"))
    assert open(dialogs.save_name, "rb").read() == before


def test_tree_view_click_and_patient_lookup(demo, qtbot, run):
    window = demo
    run(window)
    window.go_to("tree")
    tree = window.panels["tree"]
    model = window.session.model
    # Clicking a box shows its details.
    leaf = model.leaves[0]
    item = tree.view.boxes[leaf.id]
    tree.view.fit()
    centre = tree.view.mapFromScene(item.sceneBoundingRect().center())
    qtbot.mouseClick(tree.view.viewport(), Qt.LeftButton, pos=centre)
    html = tree.details.toHtml()
    # The demo's rows are visits (some patients came more than once): counted as visits.
    assert f"Box {leaf.id}" in html and f"{leaf.n:,} visits reach this box" in html
    # A patient with low oxygen saturation lights the path to the SpO2 box.
    fields = tree._fields
    assert "spo2" in fields
    # Triage level is never blank in the demo either: without it the lookup would ask for it.
    tree.set_values({"spo2": "85", "triage_level": "2"})
    route = tree.last_route
    assert route is not None and route.boxes[0] == 1
    assert model.node(route.outcome_box).leaf
    assert all(tree.view.boxes[b].lit for b in route.boxes)
    assert not any(item.lit for b, item in tree.view.boxes.items() if b not in route.boxes)
    assert f"Reaches box {route.outcome_box}" in tree.result.text()
    # Zoom and fit keep working.
    before = tree.view.transform().m11()
    tree.view.zoom_in()
    assert tree.view.transform().m11() > before
    tree.view.fit()
    tree.clear_lookup()
    assert tree.last_route is None and not any(i.lit for i in tree.view.boxes.values())


def test_model_file_keeps_the_settings(demo, qtbot, run, tmp_path, dialogs):
    window = demo
    window.panels["size"].min_leaf.setValue(20)
    run(window)
    dialogs.save_name = str(tmp_path / "m.json")
    window.panels["chart"].export_model()
    data = json.loads((tmp_path / "m.json").read_text(encoding="utf-8"))
    assert data["settings"]["tree"]["min_leaf"] == 20
