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
