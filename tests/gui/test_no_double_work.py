"""A change is shown once: choosing the outcome fills step 2's form once, and the window's
step list is updated once per change of the session."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


def test_choosing_the_outcome_fills_the_form_once(demo, monkeypatch):
    window = demo
    panel = window.panels["outcome"]
    window.go_to("outcome")
    fills = []
    real = panel.bindings.show
    monkeypatch.setattr(panel.bindings, "show",
                        lambda: (fills.append(window.session.design), real()))
    combo = panel.outcome_combo
    other = next(i for i in range(combo.count())
                 if combo.itemData(i) and combo.itemData(i) != combo.currentData())
    combo.setCurrentIndex(other)
    assert len(fills) == 1 and fills[0].outcome == combo.itemData(other)
    assert window.session.design.outcome == combo.itemData(other)


def test_the_step_list_is_updated_once_per_change(demo, monkeypatch):
    window = demo
    titles = []
    real = window.setWindowTitle
    # update_state ends by setting the title, and nothing else sets it after start-up.
    monkeypatch.setattr(window, "setWindowTitle", lambda text: (titles.append(text), real(text)))
    dictionary = window.session.dictionary
    window.session.set_dictionary(dictionary.with_column(dictionary.names[-1],
                                                         label="A label for the test"))
    assert len(titles) == 1
    assert window.isWindowModified()
