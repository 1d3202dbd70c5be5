"""A tampered or inconsistent project file opened in the app (issue 15, items 4 and 5): the app
shows the checker's one sentence, naming the field by its path, with its advice; it never
crashes, starts no work, and leaves the file byte-identical. The cohort is invented
(tests/test_tampered_models.py)."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import json  # noqa: E402

import pytest  # noqa: E402

from tests.helpers import sha256_of  # noqa: E402
from tests.test_tampered_models import invented_visits  # noqa: E402


@pytest.fixture
def project_file(tmp_path):
    """A valid project on the invented visits, as core saves it."""
    from core.data import file_sha256, read_table
    from core.design import DesignSpec
    from core.dictionary import dictionary_for
    from core.project import Project, save_project
    from core.sizing import DerivationRequest

    data = tmp_path / "visits.csv"
    data.write_text(invented_visits(), encoding="utf-8")
    dictionary, _ = dictionary_for(read_table(data), None)
    request = DerivationRequest(DesignSpec("admitted", ("spo2", "resp_rate", "arrival")))
    project = Project(data_path=str(data), data_sha256=file_sha256(data),
                      dictionary=dictionary, request=request)
    target = tmp_path / "ward.prunella"
    save_project(project, target)
    return target


def _nested(depth):
    value: list = []
    for _ in range(depth):
        value = [value]
    return value


TAMPERED = [
    ("ten million repeats", ("request", "cv", "repeats"), 10_000_000,
     ["request.cv.repeats", "from 1 to 100"]),
    ("a million folds", ("request", "cv", "folds"), 1_000_000, ["request.cv.folds"]),
    ("min leaf zero", ("request", "tree", "min_leaf"), 0, ["request.tree.min_leaf"]),
    ("folds as a text", ("request", "cv", "folds"), "10", ["request.cv.folds"]),
    ("no design", ("request", "design"), None, ["request.design", "null"]),
    ("a predictor as a number", ("request", "design", "predictors"), ["spo2", 7],
     ["request.design.predictors[1]"]),
    ("a 2 MB title", ("chart", "title"), "t" * 2_000_000, ["chart.title", "characters"]),
    ("nesting 40 deep", ("chart", "subtitle"), _nested(40), ["nested more than 20 deep"]),
    ("priors as a word", ("request", "tree", "priors"), "tilted", ["request.tree.priors"]),
    ("a size of ten million boxes", ("size",), 10_000_000, ["damaged at size"]),
]


@pytest.mark.parametrize("name, path, value, words", TAMPERED, ids=[t[0] for t in TAMPERED])
def test_a_tampered_project_shows_the_checker_s_sentence(window, dialogs, project_file, name,
                                                         path, value, words):
    raw = json.loads(project_file.read_text(encoding="utf-8"))
    target = raw
    for key in path[:-1]:
        target = target.setdefault(key, {})
    target[path[-1]] = value
    project_file.write_text(json.dumps(raw), encoding="utf-8")
    before = (sha256_of(project_file), project_file.stat().st_mtime_ns)
    window.open_any(str(project_file))
    shown = dialogs.texts("warning")
    assert shown, "no message"
    message = shown[-1]
    assert "The project file ward.prunella is damaged at" in message, message
    for word in words:
        assert word in message, (word, message)
    assert "What to do:" in message  # the catalogue's advice beside the sentence
    assert "Traceback" not in message and len(message) < 2_000
    assert window.isVisible() and window.session.table is None
    assert window.session.request() is None  # nothing of the tampered file was taken
    assert (sha256_of(project_file), project_file.stat().st_mtime_ns) == before


def test_the_untampered_project_is_accepted_by_the_same_checker(project_file):
    from core.project import load_project

    project = load_project(project_file)
    assert project.request is not None and project.request.cv.repeats == 1
