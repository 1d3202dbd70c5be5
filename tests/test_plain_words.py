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
