"""Issue 10, items 8 and 11: words a clinician reads one way, in the README, the command
line's help, the chart and the report. The wording rules here are common practice in
clinical writing (say what a number is, in the reader's unit); the method's name and its
source are Breiman, Friedman, Olshen & Stone (1984), *Classification and Regression Trees*."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from core.phrases import METHOD_NAME
from tests.helpers import prunella

ROOT = Path(__file__).resolve().parents[1]
ACRONYM = re.compile(r"\bCART\b", re.IGNORECASE)


def test_the_method_is_spelled_out_in_the_readme_never_its_acronym():
    readme = re.sub(r"\s+", " ", (ROOT / "README.md").read_text(encoding="utf-8"))
    assert not ACRONYM.search(readme)
    assert "classification and regression trees (Breiman, Friedman, Olshen and Stone, 1984)" \
        in readme


@pytest.mark.parametrize("command", [[], ["fit"], ["score"], ["check"], ["report"], ["chart"]])
def test_help_texts_never_use_the_acronym(command):
    result = prunella(*command, "--help")
    assert result.returncode == 0
    assert not ACRONYM.search(result.stdout)
    if not command:
        assert METHOD_NAME in re.sub(r"\s+", " ", result.stdout)


# Words that read one way to a clinician and another to the program (issue 10.8): an error is
# an error (never a "risk", read as a probability of the outcome), sizes are outcome boxes,
# settings are said in plain words.
UNCLEAR = ("Impurity, as scikit-learn prunes", "Outcome groups count", "Error promised inside",
           "Nested risk", "training risk", "cross-validated risk", "minimum risk",
           "Inner CV risk", "leaves)", " leaves chosen")


def _user_facing_strings() -> str:
    """Every string constant written in gui/ and in core's chart, report, checking and
    command-line code, and the message catalogue (comments and docstrings are left out)."""
    import ast

    texts = []
    folders = ["gui", "core/chart", "core/report", "core/checking", "core/cli", "core/messages"]
    for folder in folders:
        for path in (ROOT / folder).rglob("*.py"):
            tree = ast.parse(path.read_text(encoding="utf-8"))
            docstrings = {id(node.body[0].value) for node in ast.walk(tree)
                          if isinstance(node, (ast.Module, ast.FunctionDef, ast.ClassDef))
                          and node.body and isinstance(node.body[0], ast.Expr)}
            texts += [node.value for node in ast.walk(tree) if isinstance(node, ast.Constant)
                      and isinstance(node.value, str) and id(node) not in docstrings]
    return "\n".join(texts)


def test_no_unclear_words_in_what_users_read():
    strings = _user_facing_strings()
    for words in UNCLEAR:
        assert words not in strings, words


def test_the_fit_summary_puts_the_cross_validated_error_first(tmp_path):
    from tests.helpers import DEMO_CSV

    result = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--folds", "3",
                      "--model", tmp_path / "m.json")
    assert result.returncode == 0, result.stderr
    header = next(line for line in result.stdout.splitlines() if "CV error" in line)
    assert header.index("CV error") < header.index("training")
    assert "leaves" not in result.stdout and " risk" not in result.stdout


# --- issue 10, item 8: the error is an error, the boxes are outcome boxes --------------------

# "risk" reads as the probability of the outcome; "leaf" is the grower's word. Option names
# (--risk, --min-leaf) and JSON keys may keep them; the words a clinician reads may not.
CLINICIAN_MISREADS = re.compile(r"\b(risk|risks|leaf|leaves)\b", re.IGNORECASE)
OPTION_NAMES = re.compile(r"\{[a-z_!r]+\}|--[a-z-]+|\{cost,impurity\}|[A-Z_]{3,}")


def _words_only(text: str) -> str:
    """The text without option names and metavars (--min-leaf, MIN_LEAF), which stay."""
    return OPTION_NAMES.sub(" ", text)


def test_no_message_calls_the_error_a_risk_or_a_box_a_leaf():
    from core.messages.catalogue import ENTRIES

    wrong = [(code, found.group(0)) for code, _, template, advice in ENTRIES
             for found in [CLINICIAN_MISREADS.search(_words_only(template + " " + advice))]
             if found]
    assert wrong == []


@pytest.mark.parametrize("command", [["fit"], ["score"], ["check"], ["report"], ["chart"]])
def test_help_says_outcome_boxes_and_errors_and_explains_the_grower_criteria(command):
    result = prunella(*command, "--help")
    assert result.returncode == 0
    words = _words_only(re.sub(r"\s+", " ", result.stdout))
    assert not CLINICIAN_MISREADS.search(words), CLINICIAN_MISREADS.search(words).group(0)
    if command == ["fit"]:
        # Each of the grower's own criterion names comes with a plain explanation.
        for name, plain in (("gini", "how mixed the classes are"),
                            ("squared_error", "the spread about each side's mean"),
                            ("friedman_mse", "favouring even splits")):
            assert re.search(rf"{name} \([^)]*{re.escape(plain)}", words), name


def test_the_size_step_tooltips_use_plain_words():
    pytest.importorskip("PySide6")
    import os

    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    from PySide6.QtWidgets import QApplication, QWidget

    from gui.session import Session
    from gui.panels.size import SizePanel

    app = QApplication.instance() or QApplication([])
    panel = SizePanel(Session())
    tips = " ".join(w.toolTip() for w in panel.findChildren(QWidget) if w.toolTip())
    assert tips and not CLINICIAN_MISREADS.search(tips), CLINICIAN_MISREADS.search(tips)
    for banned in ("Impurity, as scikit-learn prunes", "Outcome groups count",
                   "Error promised inside", "Nested risk"):
        assert banned not in tips
    del app


def test_a_regression_fit_gives_its_error_in_the_outcomes_unit(tmp_path):
    """The cross-validated mean squared error is in days squared; its root, in days, is what
    compares with a held-out RMSE (common practice)."""
    import math

    import numpy as np
    import pandas as pd

    rng = np.random.default_rng(4)
    n = 300
    frame = pd.DataFrame({"MRN": [f"M{1000 + i}" for i in range(n)],
                          "Age (years)": rng.integers(20, 95, n),
                          "Haemoglobin g/L": rng.normal(125, 20, n).round(0)})
    frame["Length of stay (days)"] = (2 + (frame["Age (years)"] > 70) * 4
                                      + (frame["Haemoglobin g/L"] < 110) * 3
                                      + rng.gamma(1.5, 1, n)).round(0)
    frame.to_csv(tmp_path / "stay.csv", index=False)
    done = prunella("fit", tmp_path / "stay.csv", "--outcome", "Length of stay (days)",
                    "--folds", "5", "--model", tmp_path / "m.json", cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    import json

    chosen = json.loads((tmp_path / "m.json").read_text(encoding="utf-8"))["chosen"]
    out = " ".join(done.stdout.split())
    assert "mean squared error (in days squared)" in out
    # Stays recorded in whole days: the root is printed to one decimal more (core/precision.py).
    assert f"Root of the cross-validated error: {math.sqrt(chosen['cv_risk']):.1f} days" in out
    assert "Length of stay (Length of stay" not in out


def test_a_label_inside_a_sentence_keeps_its_abbreviations():
    """'Decision tree for picu transfer' broke the abbreviation (common practice: an
    abbreviation keeps its capitals inside a sentence)."""
    from core.phrases import in_sentence

    assert in_sentence("Length of stay") == "length of stay"
    assert in_sentence("PICU transfer") == "PICU transfer"
    assert in_sentence("Systolic BP") == "systolic BP"
    assert in_sentence("SpO2 on air") == "SpO2 on air"
    assert in_sentence("Went to") == "went to"


def test_one_shared_patient_was_among_the_derivation_patients():
    from core.phrases import shared_patients

    assert shared_patients(1) == "1 of these patients was among the derivation patients"
    assert shared_patients(1200) == "1,200 of these patients were among the derivation patients"
