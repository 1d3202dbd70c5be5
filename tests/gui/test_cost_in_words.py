"""Step 2 says, for the chosen cost, what it means on the cohort in clinical words, from the
chosen tree's pooled cross-validated counts (issue 13, item 4); the words follow the chosen
size, are said to belong to the earlier tree once the choices change, and leave with the file.

Invented data written by the test (a falls audit in care homes: a rare outcome, "fell").
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402

from core.sizing import chosen_in_words  # noqa: E402


def falls_frame(n: int = 700, seed: int = 11) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    gait = rng.integers(0, 13, n)
    sedated = rng.choice(["yes", "no"], n, p=[0.3, 0.7])
    age = rng.integers(65, 99, n)
    risk = 0.03 + 0.25 * (gait >= 9) + 0.12 * ((sedated == "yes") & (age >= 85))
    fell = np.where(rng.random(n) < risk, "fell", "no fall")
    return pd.DataFrame({"Resident record": [f"CH{100000 + i}" for i in range(n)],
                         "Age (years)": age, "Gait score": gait, "Sedative at night": sedated,
                         "Outcome at 30 days": fell})


def test_step_2_says_what_the_cost_means_in_the_outcomes_own_words(window, qtbot, run, dialogs,
                                                                   tmp_path):
    path = tmp_path / "falls_audit.csv"
    falls_frame().to_csv(path, index=False)
    dialogs.open_name = str(path)
    window.open_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    window.go_to("outcome")
    panel = window.panels["outcome"]
    assert panel.cost_words.isHidden()  # nothing grown yet: nothing to say
    panel.outcome_combo.setCurrentIndex(panel.outcome_combo.findData("Outcome at 30 days"))
    panel.positive_combo.setCurrentIndex(panel.positive_combo.findData("fell"))
    panel.cost_spin.setValue(4.0)
    run(window, timeout=60000)
    window.go_to("outcome")
    words = chosen_in_words(window.session.chosen)
    text = panel.cost_words.text()
    assert panel.cost_words.isVisibleTo(panel) and words and words[1:] in text
    assert "4 times as bad" in text and "“fell”" in text
    assert f"({len(window.session.model.leaves)} outcome box" in text
    # Another cost: the words are said to belong to the earlier tree until step 3 runs again.
    panel.cost_spin.setValue(6.0)
    assert "earlier tree" in panel.cost_words.text()
    # Another file with a measured outcome: no leftover sentence about falls.
    window.demo_action.trigger()
    qtbot.waitUntil(lambda: window.session.model is None, timeout=30000)
    assert panel.cost_words.isHidden() and panel.cost_words.text() == ""
