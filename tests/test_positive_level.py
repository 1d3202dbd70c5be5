"""The level of a two-class outcome a tree catches by default: the event, not the level that
sorts last. "Fell" over "no fall", "yes" over "no"; a negated level ("no X", "not X",
"none", "negative") is the non-event; with no such words, the rarer level. Common practice
in coding clinical outcomes (no single source): the event of interest is the positive
class, and it is usually the rarer one."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from core.data import read_table
from core.dictionary import dictionary_for
from core.dictionary.typed_columns import event_level, says_no_event
from tests.helpers import prunella


@pytest.mark.parametrize("levels, counts, event", [
    (("fell", "no fall"), (700, 300), "fell"),       # the event, even when it is commoner
    (("no fall", "fell"), None, "fell"),
    (("no", "yes"), (10, 990), "yes"),
    (("Not admitted", "Admitted"), (100, 900), "Admitted"),
    (("none", "delirium"), None, "delirium"),
    (("negative", "positive"), None, "positive"),
    (("non-smoker", "smoker"), (10, 90), "smoker"),
    (("alive", "dead"), (900, 100), "dead"),          # no negation: the rarer level
    (("dead", "alive"), (100, 900), "dead"),
    (("ward", "home"), (300, 700), "ward"),
    (("a", "b"), None, "b"),                          # nothing to go by: the second level
    (("0", "1"), (5, 95), "1"),
])
def test_the_event_is_caught(levels, counts, event):
    assert event_level(levels, counts) == event


def test_negations_are_told_from_words_that_only_start_alike():
    assert says_no_event("no fall") and says_no_event("not_admitted") and says_no_event("None")
    assert not says_no_event("nodal spread") and not says_no_event("normotensive")
    assert not says_no_event("fell")


def _falls(tmp_path, events: str, non_events: str, share: float):
    rng = np.random.default_rng(4)
    n = 400
    x = rng.normal(size=n)
    fell = rng.random(n) < np.where(x > 0, share + 0.2, share - 0.2)
    frame = pd.DataFrame({"age": np.round(70 + 8 * x), "outcome": np.where(fell, events, non_events)})
    path = tmp_path / "falls.csv"
    frame.to_csv(path, index=False)
    return path


def test_inferred_dictionary_names_the_event(tmp_path):
    path = _falls(tmp_path, "fell", "no fall", 0.7)
    dictionary, _ = dictionary_for(read_table(path))
    assert dictionary.get("outcome").positive == "fell"


@pytest.mark.parametrize("events, non_events, share, caught", [
    ("fell", "no fall", 0.7, "fell"),   # commoner, but the event
    ("dead", "alive", 0.3, "dead"),     # the rarer level
    ("alive", "dead", 0.7, "dead"),
])
def test_fit_catches_the_event_by_default(tmp_path, events, non_events, share, caught):
    path = _falls(tmp_path, events, non_events, share)
    model = tmp_path / "m.json"
    ran = prunella("fit", path, "--outcome", "outcome", "--model", model, "--quiet")
    assert ran.returncode == 0, ran.stderr
    assert json.loads(model.read_text())["positive"] == caught


def test_a_saved_dictionary_that_names_no_positive_keeps_the_event(tmp_path):
    path = _falls(tmp_path, "fell", "no fall", 0.7)
    saved = tmp_path / "falls.dictionary.json"
    dictionary, _ = dictionary_for(read_table(path))
    from dataclasses import replace

    from core.dictionary import DataDictionary
    entries = tuple(replace(c, positive=None) for c in dictionary.columns)
    DataDictionary(entries).save(saved)
    again, _ = dictionary_for(read_table(path), saved)
    assert again.get("outcome").positive == "fell"


def _icu_file(tmp_path):
    """An invented audit whose file writes "Yes" and "No" (read as the levels yes and no)."""
    rng = np.random.default_rng(9)
    n = 300
    lactate = rng.gamma(2.0, 1.0, n).round(1)
    icu = np.where((lactate > 3) & (rng.random(n) < 0.8), "Yes", "No")
    path = tmp_path / "icu audit.csv"
    pd.DataFrame({"Lactate": lactate, "Pulse": rng.integers(45, 150, n),
                  "Went to ICU": icu}).to_csv(path, index=False)
    return path


def test_positive_class_is_taken_in_any_case(tmp_path):
    """`--positive Yes` (as the file writes it) and " YES " name the level yes: the same tree,
    with the same fingerprint, as `--positive yes`."""
    from core.model import TreeModel

    path = _icu_file(tmp_path)
    prints = set()
    for given in ("yes", "Yes", " YES "):
        model = tmp_path / f"m{len(prints)}.json"
        ran = prunella("fit", path, "--outcome", "Went to ICU", "--positive", given,
                       "--folds", "5", "--model", model, "--quiet")
        assert ran.returncode == 0, ran.stderr
        assert json.loads(model.read_text())["positive"] == "yes"
        prints.add(TreeModel.load(model).fingerprint)
    assert len(prints) == 1


def test_a_positive_class_that_is_no_level_is_still_refused(tmp_path):
    path = _icu_file(tmp_path)
    ran = prunella("fit", path, "--outcome", "Went to ICU", "--positive", "Yess",
                   "--model", tmp_path / "m.json")
    assert ran.returncode == 2 and "Traceback" not in ran.stderr
    assert "'Yess' is not a level" in ran.stderr and "'no', 'yes'" in ran.stderr
    assert not (tmp_path / "m.json").exists()


def test_same_level_needs_exactly_one_match():
    from core.design.analysis import same_level

    assert same_level("Yes", ("no", "yes")) == "yes"
    assert same_level("  no ", ("no", "yes")) == "no"
    assert same_level("Yes", ("Yes", "yes")) == "Yes"   # the exact level first
    assert same_level("YES", ("Yes", "yes")) == "YES"   # two matches: none chosen
    assert same_level("maybe", ("no", "yes")) == "maybe"
