"""Step 5 in the app: cross-validated error beside training error, the held-out check, a
check on another file (printed on the chart), nested cross-validation, stability, the report."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pandas as pd  # noqa: E402
import pytest  # noqa: E402
from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg  # noqa: E402
from pypdf import PdfReader  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from tests.helpers import DEMO_CSV as DEMO  # noqa: E402


def _labels(panel) -> str:
    from PySide6.QtWidgets import QLabel

    return "\n".join(label.text() for label in panel.findChildren(QLabel) if label.isVisible())


@pytest.fixture
def grown(demo, run):
    window = demo
    size = window.panels["size"]
    size.folds.setValue(5)
    size.holdout.setValue(25)
    assert window.session.holdout == 0.25
    run(window)
    window.go_to("checking")
    return window


def test_cv_beside_training_and_the_heldout_check(grown):
    window = grown
    checking = window.panels["checking"]
    chosen = window.session.model.chosen
    text = checking.cv_label.text()
    assert f"{chosen['cv_risk']:.3f}" in text and f"{chosen['train_risk']:.3f}" in text
    expected = window.session.chosen.check_on_heldout()  # the numbers come from core
    assert checking.unchecked.isHidden()
    shown = _labels(checking)
    assert f"{expected.counted} checked" in shown
    assert expected.measures.headline.sensitivity.text() in shown
    # The Brier score's bootstrap interval over whole patients, its resamples stated (10.10).
    low, high = expected.measures.brier_interval
    assert f"{expected.measures.brier:.3f} ({low:.3f}–{high:.3f})" in shown
    assert "1000 resamples of whole patients" in shown
    assert "Calibration by outcome box" in shown
    assert len(checking.findChildren(FigureCanvasQTAgg)) >= 2  # calibration and ROC plots


def test_check_on_another_file_is_printed_on_the_chart(grown, qtbot, dialogs, tmp_path):
    window = grown
    checking = window.panels["checking"]
    frame = pd.read_csv(DEMO)
    riverside = frame[frame["campus"] == "Riverside"]
    path = tmp_path / "riverside.csv"
    riverside.to_csv(path, index=False)
    dialogs.open_name = str(path)
    qtbot.mouseClick(checking.external_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: not checking.running and len(checking.checks) == 2, timeout=20000)
    external = checking.checks[-1]
    assert external.kind == "external" and external.n == len(riverside)
    assert "an external file (riverside.csv)" in _labels(checking).lower()
    assert checking.on_chart.isVisible() and checking.on_chart.isChecked()
    record = window.session.chart_derivation().model.extra["validation"]
    assert record["kind"] == "external" and record["n"] == len(riverside)
    checking.on_chart.setChecked(False)  # back to the held-out record
    assert window.session.chart_derivation().model.extra["validation"]["kind"] == "held-out"
    checking.on_chart.setChecked(True)
    # Another size: the file is checked again for the new tree.
    path_sizes = window.session.model.path["leaves"]
    other = next(n for n in path_sizes if n != window.session.model.chosen["leaves"] and n < 15)
    window.panels["size"].choose_size(other)
    qtbot.waitUntil(lambda: not checking.running and len(checking.checks) == 2, timeout=20000)
    assert checking.checks[-1].model_fingerprint != external.model_fingerprint
    assert window.session.chart_check is checking.checks[-1]
    assert not dialogs.texts("warning")


def test_nested_cv_stability_and_report(grown, qtbot, dialogs, tmp_path):
    window = grown
    checking = window.panels["checking"]
    checking.outer_folds.setValue(3)
    qtbot.mouseClick(checking.nested_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: not checking.running, timeout=60000)
    assert checking.nested is not None and len(checking.nested.folds) == 3
    assert "Nested cross-validated error" in checking.nested_label.text()
    assert "Beside it: cross-validated error" in checking.nested_label.text()
    checking.resamples.setValue(10)
    qtbot.mouseClick(checking.stability_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: not checking.running, timeout=60000)
    assert checking.stability is not None and checking.stability.resamples == 10
    assert "bootstrap resamples" in checking.stability_label.text()
    dialogs.save_name = str(tmp_path / "report")
    qtbot.mouseClick(checking.report_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: not checking.running, timeout=60000)
    report = PdfReader(tmp_path / "report.pdf")
    assert len(report.pages) > 2
    text = " ".join(page.extract_text() for page in report.pages)
    assert "Nested" in text or "nested" in text
    assert not dialogs.texts("warning")


def test_stability_can_be_cancelled(grown, qtbot):
    window = grown
    checking = window.panels["checking"]
    checking.resamples.setValue(500)
    qtbot.mouseClick(checking.stability_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: checking.progress.value() >= 1, timeout=30000)
    qtbot.mouseClick(checking.cancel_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: not checking.running, timeout=30000)
    assert checking.stability is None and "Cancelled" in checking.status.text()
    assert checking.stability_button.isEnabled()


def test_the_decision_curve_sentence_sits_below_its_plot(demo, run):
    """With nothing set aside, step 5 shows the cross-validated decision curve; its sentence
    on how to read it is laid out under the plot, never painted over the axis."""
    from PySide6.QtWidgets import QLabel

    window = demo
    window.panels["size"].folds.setValue(5)
    run(window)
    window.go_to("checking")
    checking = window.panels["checking"]
    canvases = checking.findChildren(FigureCanvasQTAgg)
    assert canvases
    for canvas in canvases:
        holder = canvas.parentWidget()
        for words in holder.findChildren(QLabel):
            if "Decision curve" in words.text():
                assert words.geometry().top() >= canvas.geometry().bottom()
                assert words.geometry().height() >= words.heightForWidth(words.width())


def test_a_tree_grown_on_another_computer_leaves_the_overlap_not_known(
        grown, qtbot, dialogs, tmp_path, monkeypatch):
    """The key of the identifier digests is on the computer the tree was grown on: here (a
    new key) the check says once that the overlap cannot be checked, and never calls its
    patients separate or not."""
    from core.checking.identifier_key import identifier_key
    from gui.panels.checking import check_html

    monkeypatch.setenv("PRUNELLA_IDENTIFIER_KEY_FILE", str(tmp_path / "other_key"))
    identifier_key(create=True)
    window = grown
    checking = window.panels["checking"]
    frame = pd.read_csv(DEMO)
    path = tmp_path / "north.csv"
    frame[frame["campus"] == "North"].to_csv(path, index=False)
    dialogs.open_name = str(path)
    qtbot.mouseClick(checking.external_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: not checking.running and len(checking.checks) == 2, timeout=20000)
    external = checking.checks[-1]
    assert external.kind == "external" and external.separate is None
    sentence = "can only be checked on the computer the tree was grown on"
    from PySide6.QtWidgets import QLabel

    shown = "\n".join(label.text() for label in checking.findChildren(QLabel))
    assert shown.count(sentence) == 1
    assert "from an external file (north.csv)" in _labels(checking)
    assert "separate patients" not in check_html(external)
    record = window.session.chart_derivation().model.extra["validation"]
    assert record["overlap_known"] is False and "separate" not in record
