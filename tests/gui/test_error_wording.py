"""Training error is never shown without the cross-validated error beside it: steps 3 and 5
say both from one wording, with the same numbers."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from types import SimpleNamespace  # noqa: E402

from gui.panels.wording import SIZE_RULES, errors_beside  # noqa: E402


def test_errors_beside_says_both_numbers():
    chosen = {"cv_risk": 0.2346, "cv_se": 0.0123, "train_risk": 0.1789}
    model = SimpleNamespace(chosen=chosen, task="classification")
    text = errors_beside(model)
    assert text.startswith("cross-validated error 0.235 ± 0.012")
    assert "training error 0.179" in text
    assert text.index("cross-validated") < text.index("training")
    assert errors_beside(model, sentence=True).startswith("Cross-validated error 0.235")


def test_steps_3_and_5_use_the_one_wording(demo, run):
    window = demo
    run(window)
    chosen = window.session.model.chosen
    wording = errors_beside(window.session.model, sentence=True)
    assert wording in window.panels["size"].choice.text()
    assert SIZE_RULES[chosen["rule"]] in window.panels["size"].choice.text()
    window.go_to("checking")
    shown = window.panels["checking"].cv_label.text()
    assert wording in shown and SIZE_RULES[chosen["rule"]] in shown


def test_a_measured_outcome_is_listed_at_its_precision_with_its_root(tmp_path):
    """Whole days: the size list and the chosen size's sentence print a mean squared error
    to one decimal at most, and its root in days (core/model/path_table.py)."""
    import re

    from core.model import path_rows
    from gui.panels.wording import size_choice
    from tests.test_path_errors import _derive
    from tests.test_visits_or_patients import _cohort

    path = tmp_path / "stays.csv"
    _cohort(200, 2, 11).to_csv(path, index=False)
    model = _derive(path).model
    rows = path_rows(model, class_decimals=3)
    for k, row in enumerate(rows):
        listed = size_choice(model, k)
        assert f"cross-validated error {row.cv} ± {row.se} (root {row.cv_root} days)" in listed
        assert listed.index("cross-validated") < listed.index("training")
        assert not re.search(r"\d\.\d\d", listed), listed
    said = errors_beside(model, sentence=True)
    assert "(root " in said and " days)" in said and not re.search(r"\d\.\d\d", said), said
