"""One fingerprint names the tree on screen (issue 10, item 8): checking a tree on another file
does not change its fingerprint, the check carries that same fingerprint, and the chart step and
the check step name it alike. When the size changes after a check, the app says the check
belongs to the earlier tree (fingerprint X) and the chart to this one (Y) until the file is
checked again for the new tree.

Invented demo cohort (sample_data/README.md); our own wording, not a reference.
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import re  # noqa: E402
import threading  # noqa: E402

import pandas as pd  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from tests.gui.visible_text import visible_texts  # noqa: E402
from tests.helpers import DEMO_CSV as DEMO  # noqa: E402

HEX = re.compile(r"\b[0-9a-f]{12}\b")


def _fingerprints_shown(window, qtbot, step: str) -> set[str]:
    """Every 12-digit fingerprint the step shows, besides the data file's."""
    window.go_to(step)
    qtbot.wait(200)  # widgets added while the step was hidden are shown by the event loop
    data = window.session.table.provenance.short_fingerprint
    return {h for _where, text in visible_texts(window) for h in HEX.findall(text)} - {data}


def test_one_fingerprint_for_the_tree_and_its_check(demo, run, qtbot, dialogs, tmp_path,
                                                    monkeypatch):
    window = demo
    window.panels["size"].folds.setValue(5)
    run(window)
    session, checking, chart = window.session, window.panels["checking"], window.panels["chart"]
    frame = pd.read_csv(DEMO)
    path = tmp_path / "riverside.csv"
    frame[frame["campus"] == "Riverside"].to_csv(path, index=False)
    window.go_to("checking")
    dialogs.open_name = str(path)
    qtbot.mouseClick(checking.external_button, Qt.LeftButton)
    qtbot.waitUntil(lambda: not checking.running and session.chart_check is not None,
                    timeout=30000)
    tree = session.model
    first = tree.short_fingerprint
    # The check is recorded without changing the tree's fingerprint, and names it.
    printed = session.chart_derivation().model
    assert printed.fingerprint == tree.fingerprint
    assert printed.extra["validation"]["model_fingerprint"] == tree.fingerprint
    assert session.chart_check.model_fingerprint == tree.fingerprint
    assert _fingerprints_shown(window, qtbot, "checking") == {first}
    shown = " ".join(text for _where, text in visible_texts(window))
    assert f"checked, on the tree with fingerprint {first}" in shown
    assert _fingerprints_shown(window, qtbot, "chart") == {first}
    assert first in chart.whose.text() and "prints its check on" in chart.whose.text()
    assert checking.whose.isHidden()

    # Another size while the file waits to be checked again: whose is which is said.
    release = threading.Event()
    import gui.panels.checking as checking_panel

    real = checking_panel.read_and_check

    def held(*args, **kwargs):
        release.wait(30)
        return real(*args, **kwargs)

    monkeypatch.setattr(checking_panel, "read_and_check", held)
    sizes = [n for n in tree.path["leaves"] if n != tree.chosen["leaves"] and 1 < n < 15]
    window.panels["size"].choose_size(sizes[0])
    qtbot.waitUntil(lambda: session.model.fingerprint != tree.fingerprint, timeout=20000)
    second = session.model.short_fingerprint
    said = (f"belongs to the earlier tree (fingerprint {first}); the chart is of this tree "
            f"(fingerprint {second})")
    window.go_to("checking")
    qtbot.waitUntil(lambda: checking.whose.isVisible(), timeout=5000)
    assert said in checking.whose.text.text()
    window.go_to("chart")
    assert said in chart.whose.text()
    # Until then the chart prints no check for the new tree: the earlier tree's is not its.
    assert session.chart_check is None
    assert session.chart_derivation().model.recorded_check is None
    release.set()
    qtbot.waitUntil(lambda: not checking.running and session.chart_check is not None,
                    timeout=30000)
    assert session.chart_check.model_fingerprint == session.model.fingerprint
    assert session.check_of_earlier_tree is None
    assert _fingerprints_shown(window, qtbot, "checking") == {second}
    assert _fingerprints_shown(window, qtbot, "chart") == {second}
    assert checking.whose.isHidden()
    assert not dialogs.texts("warning")
