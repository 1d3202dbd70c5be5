"""A model file that lies (issue 15, item 11): the chart prints the question the split asks,
never the words a file stores; impossible values are refused in one sentence; and a stored
check counts only when it carries the fingerprint of the tree it checked.

Every case runs the command line in this process (tests.helpers.prunella) and asserts exit
status 2 with one sentence (or the true question printed), no traceback, and every input
byte-identical (SHA-256 and modification time). The cohort is invented for these tests.
"""

from __future__ import annotations

import io
import json
from pathlib import Path

import pypdf
import pytest

from tests.helpers import prunella
from tests.test_bad_inputs import HEADER, base_rows, csv_text
from tests.test_hostile_inputs import refused, state


def chart_words(path: Path) -> str:
    reader = pypdf.PdfReader(io.BytesIO(path.read_bytes()))
    return " ".join(" ".join(page.extract_text() for page in reader.pages).split())


@pytest.fixture(scope="module")
def cohort(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("lies")
    data = folder / "ward visits.csv"
    data.write_text(csv_text(HEADER, base_rows(400, seed=3)), encoding="utf-8")
    return data


@pytest.fixture(scope="module")
def checked_file(cohort) -> Path:
    """A model fitted with a quarter of the patients set aside, so it carries its check."""
    model = cohort.parent / "checked.json"
    ran = prunella("fit", cohort, "--outcome", "admitted", "--folds", "3", "--holdout", "0.25",
                   "--model", model, "--quiet")
    assert ran.returncode == 0, ran.stderr
    assert "validation" in json.loads(model.read_text(encoding="utf-8"))
    return model


def tampered(original: Path, name: str, change) -> Path:
    """A copy of ``original`` with ``change(document)`` applied, written as a user's edit."""
    document = json.loads(original.read_text(encoding="utf-8"))
    change(document)
    path = original.parent / name
    path.write_text(json.dumps(document, indent=1), encoding="utf-8")
    return path


def first_question(document: dict) -> dict:
    return next(node for node in document["nodes"] if not node["leaf"])


# --- the printed question is built from the split -----------------------------------------


def test_the_chart_prints_the_question_the_split_asks_not_the_stored_words(checked_file):
    split = first_question(json.loads(checked_file.read_text(encoding="utf-8")))["split"]
    assert split["kind"] == "above" and split["threshold"] != 7

    def lie(document):
        first_question(document)["question"] = f"{split['column'].title()} above 7?"

    lying = tampered(checked_file, "lying words.json", lie)
    out = lying.parent / "lying words.pdf"
    before = state([lying])
    for form in ("tree", "rules"):
        ran = prunella("chart", lying, "--out", out, "--paper", "a3", "--form", form)
        assert ran.returncode == 0, ran.stderr
        words = chart_words(out)
        assert "above 7?" not in words
        threshold = f"{split['threshold']:g}"
        assert f"above {threshold}" in words, (threshold, words[:400])
    assert state([lying]) == before


def test_a_split_moved_under_its_words_prints_where_it_now_splits(checked_file, cohort):
    """The other lie: the threshold edited, the words left. Patients are scored by the split,
    so the chart says what the split asks."""
    original = first_question(json.loads(checked_file.read_text(encoding="utf-8")))

    def move(document):
        first_question(document)["split"]["threshold"] = 55.5

    moved = tampered(checked_file, "moved split.json", move)
    out = moved.parent / "moved split.pdf"
    before = state([moved, cohort])
    ran = prunella("chart", moved, "--out", out, "--paper", "a3")
    assert ran.returncode == 0, ran.stderr
    words = chart_words(out)
    assert "above 55.5" in words
    assert original["question"] not in words
    assert prunella("score", moved, cohort, "--out", moved.parent / "scored.csv").returncode == 0
    assert state([moved, cohort]) == before
