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

from tests.helpers import prunella, run_prunella
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


# --- a stored check counts only for the tree whose fingerprint it carries -------------------

UNCHECKED = "Not yet checked on separate patients"


@pytest.mark.parametrize("name, change", [
    ("another tree", lambda record: record.update(model_fingerprint="0" * 64)),
    ("version 0.1", lambda record: record.pop("model_fingerprint")),
    ("hand-made", lambda record: (record.clear(), record.update(source="trust me", n=9999))),
])
def test_a_stored_check_that_does_not_name_the_tree_leaves_the_banner(checked_file, name,
                                                                       change):
    lying = tampered(checked_file, f"check of {name}.json",
                     lambda document: change(document["validation"]))
    out = lying.parent / f"check of {name}.pdf"
    before = state([lying])
    ran = prunella("chart", lying, "--out", out, "--paper", "a3")
    assert ran.returncode == 0, ran.stderr
    assert "Traceback" not in ran.stderr
    warning = ran.stderr.strip().splitlines()[-1]
    assert warning.startswith("prunella: warning: ")
    for words in ("does not name this tree", "not yet checked", "run the check again"):
        assert words in warning, warning
    words = chart_words(out)
    assert UNCHECKED in words
    assert "Checked on separate patients" not in words and "trust me" not in words
    assert state([lying]) == before


def test_the_tree_s_own_check_replaces_the_banner(checked_file):
    out = checked_file.parent / "own check.pdf"
    ran = prunella("chart", checked_file, "--out", out, "--paper", "a3")
    assert ran.returncode == 0 and "warning" not in ran.stderr, ran.stderr
    words = chart_words(out)
    assert UNCHECKED not in words and "Checked on separate patients" in words


def test_check_records_the_tree_s_fingerprint_so_its_chart_counts_it(checked_file, cohort):
    """prunella check writes the checked tree's fingerprint into the record it stores, and a
    file whose stored check named another tree is checked afresh."""
    from core.model import TreeModel

    other = tampered(checked_file, "rechecked input.json",
                     lambda document: document["validation"].update(model_fingerprint="1" * 64))
    before = state([other, cohort])
    checked = cohort.parent / "rechecked.json"
    ran = prunella("check", other, cohort, "--source", "the spring ward list",
                   "--checked-model", checked)
    assert ran.returncode == 0, ran.stderr
    assert state([other, cohort]) == before
    model = TreeModel.load(checked)
    assert model.extra["validation"]["model_fingerprint"] == model.fingerprint
    assert model.recorded_check is not None and model.stored_check_refused is None
    out = cohort.parent / "rechecked.pdf"
    assert prunella("chart", checked, "--out", out, "--paper", "a3").returncode == 0
    words = chart_words(out)
    assert UNCHECKED not in words and "the spring ward list" in words


# --- impossible values are refused by every command, naming the field -----------------------


@pytest.fixture(scope="module")
def regression_file(cohort) -> Path:
    """A regression tree (breathing rate from the rest) with its own check."""
    model = cohort.parent / "breathing.json"
    ran = prunella("fit", cohort, "--outcome", "resp_rate", "--task", "regression", "--folds",
                   "3", "--holdout", "0.25", "--model", model, "--quiet")
    assert ran.returncode == 0, ran.stderr
    assert "rmse" in json.loads(model.read_text(encoding="utf-8"))["validation"]
    return model


def leaf(document: dict) -> dict:
    return next(node for node in document["nodes"] if node["leaf"])


def set_in(*keys, value):
    """A change that sets the field at ``keys`` (the last may be a list index)."""
    def change(document):
        target = document
        for key in keys[:-1]:
            target = target[key]
        target[keys[-1]] = value(target[keys[-1]]) if callable(value) else value
    return change


def reversed_triple(triple):
    value, low, high = triple
    return [value, high, low]


CLASSIFICATION_LIES = [
    ("an inverted interval", set_in("validation", "sensitivity", value=reversed_triple),
     ["validation.sensitivity", "lower end", "above its upper end"]),
    ("an AUC above 1", set_in("validation", "auc", value=[1.3, 1.2, 1.4]),
     ["validation.auc", "between 0 and 1", "1.3"]),
    ("a share above 1", set_in("validation", "accuracy", value=1.2),
     ["validation.accuracy", "between 0 and 1"]),
    ("a sensitivity outside its interval", set_in("validation", "specificity",
                                                 value=[0.2, 0.6, 0.7]),
     ["validation.specificity", "outside its own interval"]),
    ("a negative count checked", set_in("validation", "n", value=-40),
     ["validation.n", "cannot be negative"]),
    ("more patients than visits checked", set_in("validation", "patients", value=10 ** 6),
     ["validation.patients", "cannot have made only"]),
    ("a negative outcome count", set_in("cohort", "outcome_counts", "yes", value=-3),
     ["cohort.outcome_counts.yes", "cannot be negative"]),
    ("more patients than visits", set_in("cohort", "patients", value=10 ** 6),
     ["cohort.patients", "cannot have made only"]),
    ("priors outside 0-1", set_in("costs", "priors", value=[1.5, -0.5]),
     ["costs.priors[0]", "between 0 and 1"]),
    ("a negative standard error on the path", set_in("path", "cv_se", 1, value=-0.01),
     ["path.cv_se[1]", "standard error", "cannot be negative"]),
    ("a negative chosen error", set_in("chosen", "cv_risk", value=-0.2),
     ["chosen.cv_risk", "cannot be negative"]),
    ("a CV sensitivity above 1", set_in("path", "cv_sensitivity", 0, value=1.7),
     ["path.cv_sensitivity[0]", "between 0 and 1"]),
    ("an inverted CV interval", set_in("path", "cv_specificity_interval", 0,
                                       value=lambda pair: pair[::-1]),
     ["path.cv_specificity_interval[0]", "above its upper end"]),
    ("a tree no better than no tree said to be better", lambda document: (
        document["path"]["cv_risk"].__setitem__(-1, document["chosen"]["cv_risk"]),
        document["chosen"].update(one_box_cv_risk=document["chosen"]["cv_risk"])),
     ["chosen.better_than_no_tree", "says the tree is better than no tree",
      "pruning path says otherwise"]),
    ("a one-box error off the path", set_in("chosen", "one_box_cv_risk",
                                            value=lambda risk: risk * 3),
     ["chosen.one_box_cv_risk", "pruning path's error for one box"]),
    ("a cohort larger than the tree", set_in("cohort", "visits", value=lambda n: n + 25),
     ["cohort.visits", "must equal the patients of box 1"]),
    ("outcome counts swapped", lambda document: document["cohort"].update(outcome_counts=dict(
        zip(document["classes"], document["nodes"][0]["counts"][::-1]))),
     ["cohort.outcome_counts.no", "must equal box 1's count"]),
    ("a first date after the last", lambda document: document["cohort"].update(
        date_column="Seen on", first_date="2025-06-30", last_date="2024-01-02"),
     ["cohort.first_date", "is after the last"]),
    ("a negative count in a box", lambda document: leaf(document).update(
        counts=[-1] + leaf(document)["counts"][1:]), ["box", "whole numbers"]),
]

REGRESSION_LIES = [
    ("a negative SD", lambda document: leaf(document).update(sd=-2.5),
     ["box", "'sd' cannot be negative"]),
    ("quartiles out of order", lambda document: leaf(document).update(
        quartiles=leaf(document)["quartiles"][::-1]), ["box", "quartiles", "lower first"]),
    ("a mean outside the outcomes grown on",
     lambda document: leaf(document).update(mean=900.0, prediction=900.0),
     ["mean", "outside the outcomes the tree was grown on", "cohort.outcome_range"]),
    ("a prediction other than the box's mean", lambda document: leaf(document).update(
        prediction=leaf(document)["mean"] + 3), ["prediction", "a box predicts its mean"]),
    ("a mean outcome outside its range", set_in("cohort", "outcome_mean", value=-4.0),
     ["cohort.outcome_mean", "outside the outcome's range"]),
    ("a negative RMSE", set_in("validation", "rmse", value=-1.0),
     ["validation.rmse", "cannot be negative"]),
    ("an R² above 1", set_in("validation", "r2", value=1.4), ["validation.r2", "above 1"]),
    ("an inverted error interval", set_in("validation", "mae_interval",
                                          value=lambda pair: pair[::-1]),
     ["validation.mae_interval", "above its upper end"]),
]


def command_args(command: str, model: Path, data: Path) -> list:
    out = model.parent / "out"
    return {"chart": ["chart", model, "--out", out.with_suffix(".pdf")],
            "score": ["score", model, data, "--out", out.with_suffix(".csv")],
            "check": ["check", model, data, "--checked-model", out.with_suffix(".json")],
            "report": ["report", model, data, "--out", out.with_suffix(".pdf"), "--no-nested",
                       "--bootstrap", "0"]}[command]


@pytest.mark.parametrize("name, change, words", CLASSIFICATION_LIES,
                         ids=[case[0] for case in CLASSIFICATION_LIES])
def test_an_impossible_value_is_refused_by_every_command(checked_file, cohort, name, change,
                                                          words):
    lying = tampered(checked_file, f"{name}.json", change)
    for command in ("chart", "score", "check", "report"):
        last = refused(command_args(command, lying, cohort), words + ["save the model again"],
                       inputs=[lying, cohort])
        assert f"{name}.json" in last or "model file" in last


@pytest.mark.parametrize("name, change, words", REGRESSION_LIES,
                         ids=[case[0] for case in REGRESSION_LIES])
def test_an_impossible_regression_value_is_refused_by_every_command(regression_file, cohort,
                                                                     name, change, words):
    lying = tampered(regression_file, f"{name}.json", change)
    for command in ("chart", "score", "check", "report"):
        refused(command_args(command, lying, cohort), words + ["save the model again"],
                inputs=[lying, cohort])


def test_the_files_prunella_writes_hold_no_impossible_value(checked_file, regression_file):
    """The checks refuse only what no tree can have: every file fitted here passes them."""
    from core.model import TreeModel

    for path in (checked_file, regression_file):
        assert TreeModel.load(path).recorded_check is not None


def test_a_child_process_refuses_an_inverted_interval_in_one_line(checked_file):
    """As a user runs it: the real entry point, exit 2, one line, no traceback."""
    lying = tampered(checked_file, "inverted as run.json",
                     set_in("validation", "sensitivity", value=reversed_triple))
    before = state([lying])
    ran = run_prunella("chart", lying, "--out", lying.parent / "as run.pdf", timeout=60)
    assert ran.returncode == 2, ran.stderr
    assert "Traceback" not in ran.stderr
    lines = ran.stderr.strip().splitlines()
    assert len(lines) == 1 and "validation.sensitivity" in lines[0], lines
    assert not (lying.parent / "as run.pdf").exists()
    assert state([lying]) == before


def test_a_smaller_tree_cut_from_a_checked_one_is_not_checked(checked_file):
    """The check names the tree it checked: a smaller tree of its pruning sequence does not
    borrow it (only the measuring of what fits on a page lends it, as the tree will print
    once checked)."""
    from core.chart.fitting import as_checked, pruned_model, smaller_trees
    from core.model import TreeModel

    model = TreeModel.load(checked_file)
    trees = smaller_trees(model)
    assert len(trees) > 1 and model.recorded_check is not None
    smaller = pruned_model(model, trees[1][1])
    assert smaller.recorded_check is None and smaller.stored_check_refused
    measured = as_checked(smaller, model.recorded_check)
    assert measured.recorded_check["summary"] == model.recorded_check["summary"]
    assert as_checked(smaller, None) is smaller


# --- the check's summary line is built from its numbers -------------------------------------


def test_the_check_s_line_on_the_chart_says_what_its_numbers_say(checked_file, regression_file):
    """Words edited beside the numbers (the fingerprint kept) are not printed: the line is
    built from the numbers, as prunella check words it, so a real check prints unchanged."""
    from core.checking.new_patients import record_summary
    from core.model import TreeModel

    for path in (checked_file, regression_file):
        model = TreeModel.load(path)
        record = model.recorded_check
        assert record_summary(record, model) == record["summary"]
    true_line = TreeModel.load(checked_file).recorded_check["summary"]
    boasting = tampered(checked_file, "boasting words.json", set_in(
        "validation", "summary", value="Sensitivity 99% (98–100%), specificity 99% (98–100%)"))
    out = boasting.parent / "boasting words.pdf"
    before = state([boasting])
    ran = prunella("chart", boasting, "--out", out, "--paper", "a3")
    assert ran.returncode == 0 and "warning" not in ran.stderr, ran.stderr
    words = chart_words(out)
    assert "Sensitivity 99%" not in words
    assert " ".join(true_line.split()) in words
    assert state([boasting]) == before


def test_the_report_is_not_fooled_by_a_check_copied_into_the_file(checked_file, cohort):
    """prunella report grows the tree again from the settings and checks only what it can
    check itself: a model without patients set aside, given another tree's check, still
    reports the tree as not yet checked."""
    unchecked = cohort.parent / "unchecked.json"
    ran = prunella("fit", cohort, "--outcome", "admitted", "--folds", "3", "--model",
                   unchecked, "--quiet")
    assert ran.returncode == 0, ran.stderr
    borrowed = json.loads(checked_file.read_text(encoding="utf-8"))["validation"]
    forged = tampered(unchecked, "borrowed check.json",
                      lambda document: document.update(validation=borrowed))
    before = state([forged, cohort])
    out = cohort.parent / "borrowed check report.pdf"
    ran = prunella("report", forged, cohort, "--out", out, "--no-nested", "--bootstrap", "0",
                   "--date", "2026-01-05")
    assert ran.returncode == 0, ran.stderr
    words = chart_words(out)
    assert UNCHECKED in words
    assert " ".join(borrowed["summary"].split()) not in words
    assert state([forged, cohort]) == before
