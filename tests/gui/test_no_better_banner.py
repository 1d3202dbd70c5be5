"""Steps 3, 4 and 6 say when the chosen tree predicts no better than no tree (issue 10, item 2).

Generated data: a random outcome, so the 1-SE rule (Breiman et al. 1984, §3.4.3) chooses the
one-box tree; its chart is refused with the same sentence (common practice: a chart with no
question is no decision aid).
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from core.model.tree import NO_BETTER  # noqa: E402
from tests.test_no_better_than_no_tree import random_frame  # noqa: E402


def test_banner_on_size_tree_and_chart_steps(window, qtbot, run, dialogs, tmp_path):
    path = tmp_path / "random.csv"
    random_frame().to_csv(path, index=False)
    dialogs.open_name = str(path)
    window.open_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    window.go_to("outcome")
    combo = window.panels["outcome"].outcome_combo
    combo.setCurrentIndex(combo.findData("outcome"))
    run(window, timeout=60000)
    model = window.session.model
    assert len(model.leaves) == 1 and model.chosen["better_than_no_tree"] is False
    statement = NO_BETTER["classification"]
    for step in ("size", "tree", "chart"):
        window.go_to(step)
        banner = window.panels[step].no_better_banner
        qtbot.waitUntil(banner.isVisible, timeout=5000)
        assert banner.text.text().startswith(statement)
    assert window.panels["tree"].size_label.text() == "0 questions, 1 outcome box"
    for step in ("data", "outcome", "checking"):
        assert window.panels[step].no_better_banner.isHidden()
    from gui.panels.checking import cross_validated_html
    assert "1 outcome box (" in cross_validated_html(model)  # not "1 outcome boxes"
    chart = window.panels["chart"]
    chart.render_preview()
    qtbot.waitUntil(lambda: statement in chart.preview_note.text(), timeout=60000)
    assert statement in chart.preview_note.text()
    assert "no decision chart to print" in chart.preview_note.text()
    assert not chart.export_button.isEnabled() and not chart.print_button.isEnabled()
    assert chart.model_button.isEnabled()  # the model itself can still be saved
    # A new file clears it.
    window.demo_action.trigger()
    qtbot.waitUntil(lambda: window.session.model is None, timeout=30000)
    assert window.panels["size"].no_better_banner.isHidden()
