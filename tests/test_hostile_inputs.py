"""Hostile options, output paths and files (issue 15): each is refused with exit status 2 and
one sentence saying what is wrong, where and what to do, with no traceback, within seconds,
and with every input byte-identical (SHA-256 and modification time) afterwards.

The command line runs in this process (tests.helpers.prunella); a few cases run as a child
process (run_prunella). All data are invented for these tests.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest

from core.option_limits import OPTION_LIMITS, allowed, spin_range
from tests.helpers import prunella, run_prunella, sha256_of
from tests.test_bad_inputs import HEADER, base_rows, csv_text


def state(paths) -> dict:
    """Each existing path's SHA-256 and modification time (to show it was not touched)."""
    return {str(p): (sha256_of(p), os.stat(p).st_mtime_ns) for p in paths
            if Path(p).is_file()}


def refused(args, words, inputs=(), cwd=None):
    """Run ``prunella ARGS``; assert exit 2, one sentence with ``words``, inputs untouched."""
    before = state(inputs)
    ran = prunella(*args, cwd=cwd)
    assert ran.returncode == 2, (ran.returncode, ran.stderr)
    assert "Traceback" not in ran.stderr
    last = ran.stderr.strip().splitlines()[-1]
    assert last.startswith("prunella: "), ran.stderr
    for word in words:
        assert word.lower() in last.lower(), (word, last)
    assert state(inputs) == before
    return last


@pytest.fixture(scope="module")
def cohort(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("hostile")
    data = folder / "visits.csv"
    data.write_text(csv_text(HEADER, base_rows(120)), encoding="utf-8")
    return data


@pytest.fixture(scope="module")
def model_file(cohort) -> Path:
    model = cohort.parent / "tree.json"
    ran = prunella("fit", cohort, "--outcome", "admitted", "--folds", "3", "--model", model,
                   "--quiet")
    assert ran.returncode == 0, ran.stderr
    return model


def fit_args(cohort, *more):
    return ["fit", cohort, "--outcome", "admitted", "--model", cohort.parent / "new.json", *more]


# --- 1. options: one table of limits, checked before any work ----------------------------


@pytest.mark.parametrize("option, value, words", [
    ("--min-leaf", "0", ["--min-leaf", "whole number from 1", "not 0"]),
    ("--min-leaf", "-3", ["--min-leaf", "not -3"]),
    ("--max-depth", "0", ["--max-depth", "from 1 to 64"]),
    ("--max-depth", "-1", ["--max-depth"]),
    ("--repeats", "0", ["--repeats", "from 1 to 100"]),
    ("--repeats", "10000000", ["--repeats", "not 10000000"]),
    ("--folds", "1", ["--folds", "from 2 to 100"]),
    ("--holdout", "1.5", ["--holdout", "between 0 and 1"]),
    ("--holdout", "nan", ["--holdout"]),
    ("--miss-cost", "-2", ["--miss-cost", "above 0"]),
    ("--miss-cost", "inf", ["--miss-cost"]),
    ("--seed", "-1", ["--seed", "from 0"]),
    ("--jobs", "0", ["--jobs", "-1 (every core)"]),
    ("--size", "0", ["--size", "from 1"]),
    ("--size", "six", ["--size", "1se, min or a number of outcome boxes"]),
    ("--min-leaf", "many", ["--min-leaf", "not 'many'"]),
])
def test_an_option_outside_its_limits_is_refused_before_any_work(cohort, option, value, words):
    last = refused(fit_args(cohort, option, value), words + ["see 'prunella fit --help'"],
                   inputs=[cohort])
    assert "prunella prunella" not in last
    assert not (cohort.parent / "new.json").exists()


def test_an_unknown_option_names_the_subcommand_s_help(cohort):
    last = refused(fit_args(cohort, "--min-leaves", "3"), ["unrecognized arguments: --min-leaves",
                                                           "see 'prunella fit --help'"])
    assert "prunella prunella" not in last


def test_report_options_use_the_same_table(cohort, model_file):
    for option, value in (("--bootstrap", "-1"), ("--bootstrap", "99999999"),
                          ("--outer-folds", "1"), ("--jobs", "0")):
        refused(["report", model_file, cohort, "--out", cohort.parent / "r.pdf", option, value],
                [option, "see 'prunella report --help'"], inputs=[cohort, model_file])


def test_priors_outside_the_limits_are_refused(cohort):
    refused(fit_args(cohort, "--priors", "0.5,-1"), ["--priors", "not -1.0"], inputs=[cohort])


def test_a_child_process_refuses_min_leaf_zero_in_one_line(cohort):
    ran = run_prunella(*fit_args(cohort, "--min-leaf", "0"), timeout=60)
    assert ran.returncode == 2 and "Traceback" not in ran.stderr
    assert ran.stderr.strip().count("\n") == 0
    assert "see 'prunella fit --help'" in ran.stderr


def test_core_refuses_a_request_outside_the_table_before_any_work(cohort):
    from core.data import read_table
    from core.dictionary import infer_dictionary
    from core.design import DesignSpec
    from core.errors import InputError
    from core.sizing import CVSettings, DerivationRequest, TreeSettings, derive

    table = read_table(cohort)
    dictionary, _ = infer_dictionary(table.frame)
    design = DesignSpec(outcome="admitted", predictors=("age", "spo2"))
    for request in (DerivationRequest(design, tree=TreeSettings(min_leaf=0)),
                    DerivationRequest(design, tree=TreeSettings(max_depth=0)),
                    DerivationRequest(design, cv=CVSettings(repeats=10_000_000)),
                    DerivationRequest(design, holdout=1.0)):
        with pytest.raises(InputError, match="must be"):
            derive(table, dictionary, request)


def test_the_table_holds_every_default_and_the_spin_boxes_follow_it():
    from core.sizing import CVSettings, TreeSettings

    tree, cv = TreeSettings(), CVSettings()
    assert allowed("min_leaf", tree.min_leaf) and allowed("folds", cv.folds)
    assert allowed("repeats", cv.repeats) and allowed("seed", cv.seed)
    assert allowed("max_depth", None) and not allowed("min_leaf", None)
    assert not allowed("repeats", True)  # JSON's true is not a number of repeats
    assert not allowed("holdout", float("nan"))
    assert spin_range("folds") == (2, 100)
    assert all(limit.option.startswith("--") for limit in OPTION_LIMITS.values())


def test_a_project_file_uses_the_same_table(tmp_path):
    from core.errors import InputError
    from core.project.file_checks import check_project_document

    for tree, words in (({"min_leaf": 0}, "min_leaf"), ({"max_depth": 0}, "max_depth")):
        document = {"request": {"design": {"outcome": "y", "predictors": ["a"]}, "tree": tree}}
        with pytest.raises(InputError, match=words):
            check_project_document(document)
    document = {"request": {"design": {"outcome": "y", "predictors": ["a"]},
                            "cv": {"repeats": 10_000_000}}}
    with pytest.raises(InputError, match="repeats"):
        check_project_document(document)


@pytest.mark.parametrize("args, words", [
    (["--min-sensitivity", "2"], ["--min-sensitivity", "between 0 and 1", "not 2.0"]),
    (["--min-specificity", "nan"], ["--min-specificity", "between 0 and 1"]),
])
def test_a_goal_outside_its_limits_is_refused_before_any_reading(cohort, args, words):
    refused(fit_args(cohort, *args), words + ["see 'prunella fit --help'"], inputs=[cohort])


def test_the_chart_s_small_cell_uses_the_same_table(model_file, cohort):
    for value in ("-5", "99999999999999"):
        refused(["chart", model_file, "--out", cohort.parent / "c.pdf", "--small-cell", value],
                ["--small-cell", "from 0 to 1000000", "see 'prunella chart --help'"],
                inputs=[model_file])


# --- 4. tampered model files: an infinity written as 1e999 ---------------------------------


@pytest.mark.parametrize("command", ["chart", "score", "check", "report"])
def test_a_model_holding_1e999_is_refused_by_every_command(cohort, model_file, command):
    tampered = cohort.parent / "infinite.json"
    text = model_file.read_text(encoding="utf-8")
    tampered.write_text(text.replace('"n_rows": ', '"n_rows": 1e999, "was": ', 1),
                        encoding="utf-8")
    out = cohort.parent / "out.pdf"
    args = {"chart": ["chart", tampered, "--out", out],
            "score": ["score", tampered, cohort, "--out", cohort.parent / "scored.csv"],
            "check": ["check", tampered, cohort],
            "report": ["report", tampered, cohort, "--out", out]}[command]
    refused(args, ["infinity is not allowed", "infinite.json"], inputs=[tampered, cohort])


def test_a_model_without_its_settings_design_is_refused_by_report(cohort, model_file):
    raw = json.loads(model_file.read_text(encoding="utf-8"))
    del raw["settings"]["design"]  # settings without their design: a damaged file
    tampered = cohort.parent / "no-design.json"
    tampered.write_text(json.dumps(raw), encoding="utf-8")
    refused(["report", tampered, cohort, "--out", cohort.parent / "r.pdf"],
            ["no-design.json", "damaged at settings.design"], inputs=[tampered, cohort])
    del raw["settings"]  # no settings at all (a bare file): the chart prints, report cannot
    tampered.write_text(json.dumps(raw), encoding="utf-8")
    refused(["report", tampered, cohort, "--out", cohort.parent / "r.pdf"],
            ["no derivation settings", "fit the model again"], inputs=[tampered, cohort])
