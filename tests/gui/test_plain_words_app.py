"""Issue 10, items 8 and 11, in the app: the method spelled out (Breiman, Friedman, Olshen
& Stone 1984), plain words in every step."""

from __future__ import annotations

import os
import re

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from core.phrases import METHOD_NAME  # noqa: E402


def test_about_names_the_method_in_full_never_its_acronym(window, dialogs):
    window.show_about()
    (text,) = dialogs.texts("about")
    assert METHOD_NAME in text
    assert not re.search(r"\bCART\b", text, re.IGNORECASE)


def test_the_outcome_step_catches_the_event_by_default(window, qtbot, tmp_path):
    """'fell' over 'no fall' even where falls are the commoner outcome, with a saved data
    dictionary that marks the outcome but names no level to catch (common practice: the
    event of interest is the level caught)."""
    from dataclasses import replace

    import numpy as np
    import pandas as pd

    from core.data import read_table
    from core.dictionary import DataDictionary, dictionary_for

    rng = np.random.default_rng(2)
    frame = pd.DataFrame({"age": rng.integers(60, 95, 200),
                          "outcome": np.where(rng.random(200) < 0.7, "fell", "no fall")})
    path = tmp_path / "falls.csv"
    frame.to_csv(path, index=False)
    inferred, _ = dictionary_for(read_table(path))
    DataDictionary(tuple(replace(c, positive=None, role="outcome") if c.name == "outcome" else c
                         for c in inferred.columns)).save(tmp_path / "falls.dictionary.json")
    window.open_any(str(path))
    qtbot.waitUntil(lambda: window.session.design is not None, timeout=15000)
    assert window.session.design.outcome == "outcome"
    assert window.session.design.positive == "fell"
    window.go_to("outcome")
    assert window.panels["outcome"].positive_combo.currentText() == "fell"
