"""The app's state lives in one place (gui/session.py): opening another file leaves nothing of
the first on any step; the chart's title belongs to the file and outcome it was written for;
step 1's "Use" column and step 2's choices always agree."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import pytest  # noqa: E402
from pypdf import PdfReader  # noqa: E402

from core.chart.content import default_subtitle, default_title  # noqa: E402


@pytest.fixture
def ward_file(tmp_path):
    """An invented ward audit: other column names, a rare outcome, dd/mm dates."""
    rng = np.random.default_rng(11)
    n = 260
    frame = pd.DataFrame({
        "mrn": [f"H{100000 + i // 2}" for i in range(n)],
        "seen_on": [f"{1 + i % 28:02d}/{1 + i % 12:02d}/2025" for i in range(n)],
        "pulse_rate": rng.integers(50, 140, n),
        "lactate_mmol": rng.gamma(2.0, 0.9, n).round(1),
        "sepsis_screen": rng.choice(["positive", "negative", "none"], n),
    })
    frame["icu_transfer"] = np.where((frame["lactate_mmol"] > 3.5) & (rng.random(n) < 0.7),
                                     "transferred", "stayed")
    path = tmp_path / "ward_audit.csv"
    frame.to_csv(path, index=False)
    return path


def _open(window, qtbot, path) -> None:
    before = window.session.table
    window.panels["data"].open_path(str(path))
    qtbot.waitUntil(lambda: window.session.table is not None and window.session.table
                    is not before, timeout=20000)


def _choose_outcome(window, name: str) -> None:
    combo = window.panels["outcome"].outcome_combo
    combo.setCurrentIndex(combo.findData(name))


def test_another_file_leaves_nothing_of_the_first(demo, qtbot, run, ward_file):
    window, session = demo, demo.session
    size = window.panels["size"]
    size.folds.setValue(5)
    size.holdout.setValue(25)
    run(window)
    size.choose_size(int(session.model.path["min_leaves"]))
    window.panels["chart"].title_edit.setText("Who is admitted?")
    window.panels["chart"].title_edit.textEdited.emit("Who is admitted?")
    session.set_status("A message about the demo")
    assert session.checks and session.chart.title == "Who is admitted?"
    window.panels["tree"]._fields["spo2"].setText("85")

    _open(window, qtbot, ward_file)
    # Every step's results, the size, the chart's words and the status bar start afresh.
    assert session.derivation is None and session.chosen is None and session.size == "1se"
    assert session.checks == () and session.nested is None and session.stability is None
    assert session.shading is None and session.external_path is None
    assert session.chart.title is None and session.chart.subtitle is None
    assert window.statusBar().currentMessage() == ""
    assert "Tree" not in window.fingerprints.text()
    assert not any("out of date" in window.steps.item(r).text() for r in range(6))
    assert window.panels["chart"].title_edit.text() == ""
    assert size.size_combo.count() == 0 and size.status.text() == ""
    assert window.panels["tree"].view.boxes == {} and window.panels["tree"]._fields == {}
    for step in ("tree", "checking", "chart"):
        assert not window.panels[step].content.isVisibleTo(window)
    # Step 2 shows the new file's columns only.
    outcome = window.panels["outcome"]
    offered = {outcome.outcome_combo.itemData(i) for i in range(outcome.outcome_combo.count())}
    assert "admitted" not in offered and "icu_transfer" in offered
    assert set(outcome.checklist.names()).isdisjoint({"spo2", "resp_rate"})


def test_title_belongs_to_the_file_and_the_outcome(demo, qtbot, run, ward_file):
    """Open the demo, set a title, open another file, choose another outcome: the chart shows
    the new defaults (issue 10.6)."""
    window, session = demo, demo.session
    chart = window.panels["chart"]
    session.set_chart(title="Who is admitted?", subtitle="Demo, both campuses")
    _open(window, qtbot, ward_file)
    assert (session.chart.title, session.chart.subtitle) == (None, None)
    window.go_to("outcome")
    # (The other way round from before: sepsis_screen is random, its tree one box, which is
    # never printed as a chart.)
    _choose_outcome(window, "sepsis_screen")
    session.set_chart(title="Sepsis screen (written for sepsis_screen)")
    _choose_outcome(window, "icu_transfer")
    assert session.chart.title is None and chart.title_edit.text() == ""
    window.panels["size"].folds.setValue(5)
    run(window)
    window.go_to("chart")
    qtbot.waitUntil(lambda: not chart.preview_busy and chart.pdf_path is not None,
                    timeout=30000)
    text = " ".join(PdfReader(chart.pdf_path).pages[0].extract_text().split())
    model = session.model
    assert model.outcome.name == "icu_transfer"
    assert " ".join(default_title(model).split()) in text
    assert " ".join(default_subtitle(model).split())[:40] in text
    assert "Who is admitted?" not in text and "Sepsis screen" not in text


def _use(window, column: str) -> str:
    model = window.panels["data"].dictionary_model
    return model.index(model.dictionary.names.index(column), 1).data()


def test_use_column_agrees_with_step_2(demo):
    window, session = demo, demo.session
    outcome, data = window.panels["outcome"], window.panels["data"]
    window.go_to("outcome")
    _choose_outcome(window, "los_hours")
    assert _use(window, "los_hours") == "outcome" and _use(window, "admitted") == "leave out"
    outcome.patient_combo.setCurrentIndex(outcome.patient_combo.findData(""))
    assert session.design.patient_id is None and _use(window, "patient_id") == "leave out"
    # And the other way: step 1's Use column changes step 2's choices.
    model = data.dictionary_model
    names = model.dictionary.names
    assert model.setData(model.index(names.index("patient_id"), 1), "patient_id")
    assert session.design.patient_id == "patient_id"
    assert outcome.patient_combo.currentData() == "patient_id"
    assert model.setData(model.index(names.index("admitted"), 1), "outcome")
    assert session.design.outcome == "admitted" and outcome.outcome_combo.currentData() == "admitted"
    assert _use(window, "los_hours") == "leave out"
    assert [c.name for c in session.dictionary.by_role("outcome")] == ["admitted"]


def test_before_an_outcome_is_chosen_step_2_shows_step_1s_roles(demo, qtbot, ward_file):
    """A file whose outcome is not guessed: step 2 still shows the patient number and the
    predictors step 1 proposes, not "every row is a different patient"."""
    window = demo
    _open(window, qtbot, ward_file)
    assert window.session.design is None
    assert _use(window, "mrn") == "patient number"
    window.go_to("outcome")
    outcome = window.panels["outcome"]
    assert outcome.patient_combo.currentData() == "mrn"
    proposed = {c.name for c in window.session.dictionary.by_role("predictor")}
    assert proposed and set(outcome.checklist.checked()) == proposed


def test_a_project_opened_in_the_same_window_restores_its_own(demo, qtbot, run, dialogs,
                                                             ward_file, tmp_path):
    window, session = demo, demo.session
    session.set_chart(title="Who is admitted?")
    dialogs.save_name = str(tmp_path / "demo.prunella")
    assert window.save_as()
    _open(window, qtbot, ward_file)  # another file, worked on a little
    window.go_to("outcome")
    _choose_outcome(window, "icu_transfer")
    window.panels["size"].folds.setValue(5)
    run(window)
    session.set_chart(title="ICU transfers")
    session.dirty = False
    with qtbot.waitSignal(window.panels["size"].run_finished, timeout=60000):
        window.open_any(str(tmp_path / "demo.prunella"))
    assert session.chart.title == "Who is admitted?"  # the project's own title
    assert session.model.outcome.name == "admitted" and session.design.outcome == "admitted"
    assert all(r.kind == "held-out" for r in session.checks)
    assert window.panels["chart"].title_edit.text() == "Who is admitted?"
    assert "icu_transfer" not in session.dictionary.names
