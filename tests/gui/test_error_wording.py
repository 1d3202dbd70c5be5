"""Training error is never shown without the cross-validated error beside it: steps 3 and 5
say both from one wording, with the same numbers."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from gui.panels.wording import SIZE_RULES, errors_beside  # noqa: E402


def test_errors_beside_says_both_numbers():
    chosen = {"cv_risk": 0.2346, "cv_se": 0.0123, "train_risk": 0.1789}
    text = errors_beside(chosen)
    assert text.startswith("cross-validated error 0.235 ± 0.012")
    assert "training error 0.179" in text
    assert text.index("cross-validated") < text.index("training")
    assert errors_beside(chosen, sentence=True).startswith("Cross-validated error 0.235")


def test_steps_3_and_5_use_the_one_wording(demo, run):
    window = demo
    run(window)
    chosen = window.session.model.chosen
    wording = errors_beside(chosen, sentence=True)
    assert wording in window.panels["size"].choice.text()
    assert SIZE_RULES[chosen["rule"]] in window.panels["size"].choice.text()
    window.go_to("checking")
    shown = window.panels["checking"].cv_label.text()
    assert wording in shown and SIZE_RULES[chosen["rule"]] in shown
