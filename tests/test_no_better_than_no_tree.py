"""A tree no better than no tree is said to be so (issue 10, item 2).

Generated data: an outcome drawn at random, independent of three random predictors, so the
best tree is the root. The judgement is the one the 1-SE rule makes (Breiman, Friedman,
Olshen & Stone 1984, §3.4.3): a tree is better than one box only if its cross-validated error
is lower by at least one standard error. A one-box tree is never printed as a decision chart
(common practice: a chart with no question is no decision aid).
"""

from __future__ import annotations

import io
import json
import re

import numpy as np
import pandas as pd
import pypdf
import pytest

from core.chart import ChartOptions, render_chart
from core.data import read_table
from core.design import DesignSpec
from core.dictionary import infer_dictionary
from core.errors import InputError
from core.model import TreeModel
from core.model.tree import NO_BETTER
from core.report import ReportContents, render_report
from core.sizing import CVSettings, DerivationRequest, TreeSettings, choose_model, derive
from tests.helpers import prunella

STATEMENT = NO_BETTER["classification"]


def random_frame(n: int = 400, seed: int = 3) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    return pd.DataFrame({"x1": np.round(rng.normal(size=n), 2),
                         "x2": np.round(rng.normal(size=n), 2),
                         "x3": rng.integers(0, 50, n),
                         "outcome": rng.choice(["yes", "no"], n, p=[0.35, 0.65])})


def _words(pdf: bytes) -> str:
    return " ".join(" ".join(p.extract_text() for p in pypdf.PdfReader(io.BytesIO(pdf)).pages)
                    .split())


@pytest.fixture(scope="module")
def random_run(tmp_path_factory):
    path = tmp_path_factory.mktemp("random") / "random.csv"
    random_frame().to_csv(path, index=False)
    table = read_table(path)
    dictionary, _ = infer_dictionary(table.frame)
    dictionary = dictionary.with_column("outcome", role="outcome")
    # Large boxes keep the random trees small enough to print.
    request = DerivationRequest(DesignSpec("outcome", ("x1", "x2", "x3"), positive="yes"),
                                tree=TreeSettings(min_leaf=40), cv=CVSettings(folds=5))
    return derive(table, dictionary, request), path


def test_the_root_is_chosen_and_recorded_as_no_better(random_run):
    derivation, _ = random_run
    model = derivation.model
    assert len(model.leaves) == 1
    data = json.loads(model.to_json())
    assert data["chosen"]["better_than_no_tree"] is False
    assert data["chosen"]["one_box_cv_risk"] == pytest.approx(model.path["cv_risk"][-1])
    assert model.no_better_statement == STATEMENT
    assert STATEMENT in model.rules()


def test_a_larger_tree_on_random_data_is_no_better_and_says_so(random_run):
    derivation, _ = random_run
    smallest = min(n for n in derivation.model.path["leaves"] if n > 1)
    bigger = choose_model(derivation, smallest).model
    k = bigger.path["leaves"].index(bigger.chosen["leaves"])
    risk, se = bigger.path["cv_risk"], bigger.path["cv_se"]
    assert risk[-1] - risk[k] < se[k]  # the premise: not lower by one SE
    assert bigger.chosen["better_than_no_tree"] is False
    words = _words(render_chart(bigger, ChartOptions(paper="a3")))
    assert STATEMENT in words and "How to read" not in words
    rules = _words(render_chart(bigger, ChartOptions(paper="a3", form="rules")))
    assert STATEMENT in rules and "How to read" not in rules
    # An older file without the field is judged from its own path.
    data = json.loads(bigger.to_json())
    del data["chosen"]["better_than_no_tree"]
    assert TreeModel.from_dict(data).better_than_no_tree is False


def test_a_one_box_tree_is_never_printed_as_a_chart(random_run):
    model = random_run[0].model
    for form in ("tree", "rules"):
        with pytest.raises(InputError) as refused:
            render_chart(model, ChartOptions(form=form))
        assert str(refused.value).startswith(STATEMENT)
        assert "no decision chart to print" in str(refused.value)


def test_the_report_says_it_in_its_limitations(random_run):
    words = _words(render_report(ReportContents(random_run[0])))
    limitations = words[words.rindex("Limitations and cautions"):]
    assert STATEMENT in limitations and "by at least one SE" in limitations
    assert "so no decision chart is printed" in words


def test_a_real_signal_is_better_than_no_tree(tmp_path):
    rng = np.random.default_rng(5)
    x = np.round(rng.uniform(size=600), 3)
    pd.DataFrame({"x": x, "outcome": np.where(x > 0.5, "yes", "no")}).to_csv(
        tmp_path / "signal.csv", index=False)
    table = read_table(tmp_path / "signal.csv")
    dictionary, _ = infer_dictionary(table.frame)
    dictionary = dictionary.with_column("outcome", role="outcome")
    model = derive(table, dictionary, DerivationRequest(
        DesignSpec("outcome", ("x",), positive="yes"), cv=CVSettings(folds=5))).model
    assert model.chosen["better_than_no_tree"] is True and model.no_better_warning() is None
    assert "How to read" in _words(render_chart(model, ChartOptions()))


def test_command_line_says_so(random_run, tmp_path):
    _, path = random_run
    fit = prunella("fit", path, "--outcome", "outcome", "--folds", "5", "--min-leaf", "40",
                   "--model", tmp_path / "m.json")
    assert fit.returncode == 0, fit.stderr
    assert f"Warning: {STATEMENT}" in fit.stdout
    assert STATEMENT not in fit.stderr  # said once, not again on stderr
    # --quiet leaves the summary out: the warning still goes to stderr.
    quiet = prunella("fit", path, "--outcome", "outcome", "--folds", "5", "--min-leaf", "40",
                     "--model", tmp_path / "q.json", "--quiet")
    assert quiet.returncode == 0 and not quiet.stdout.strip()
    assert f"warning: {STATEMENT}" in quiet.stderr
    charted = prunella("fit", path, "--outcome", "outcome", "--folds", "5", "--min-leaf", "40",
                       "--model", tmp_path / "m2.json", "--chart", tmp_path / "c.pdf")
    assert charted.returncode == 2 and "no decision chart to print" in charted.stderr
    # A chart refused for its one box still leaves the pruning table and the chosen size.
    assert "Chosen: 1 outcome box" in charted.stdout and "Traceback" not in charted.stderr
    assert not (tmp_path / "c.pdf").exists()
    chart = prunella("chart", tmp_path / "m.json", "--out", tmp_path / "c2.pdf")
    assert chart.returncode == 2 and STATEMENT in chart.stderr


def test_a_costly_miss_names_the_answer_one_box_gives(tmp_path):
    """With a miss cost that makes one box answer the rarer outcome, "the most common outcome"
    would name the wrong comparison: the sentence says the single box treats everyone as it."""
    frame = random_frame(seed=11)
    frame["outcome"] = np.random.default_rng(11).choice(["yes", "no"], len(frame), p=[0.1, 0.9])
    path = tmp_path / "rare.csv"
    frame.to_csv(path, index=False)
    table = read_table(path)
    dictionary, _ = infer_dictionary(table.frame)
    dictionary = dictionary.with_column("outcome", role="outcome")
    request = DerivationRequest(DesignSpec("outcome", ("x1", "x2", "x3"), positive="yes"),
                                tree=TreeSettings(min_leaf=40, miss_cost=20.0),
                                cv=CVSettings(folds=5))
    model = derive(table, dictionary, request).model
    assert model.root.prediction == "yes"  # 10% × 20 outweighs 90% × 1
    assert model.better_than_no_tree is False
    assert model.no_better_statement == ("This tree predicts no better than treating everyone "
                                         "as yes, the answer its miss cost gives when no "
                                         "question is asked.")
    assert "most common" not in model.no_better_warning()
    assert model.no_better_statement in model.rules()


def test_the_warning_prints_errors_as_the_app_and_the_path_do(random_run):
    """'(0.08035) … SE (0.007)' mixed precisions; the warning prints its errors as step 3's
    '0.088 ± 0.008' does (common practice: one precision for numbers compared together)."""
    from core.model.path_table import error_text

    model = random_run[0].model
    chosen = model.chosen
    warning = model.no_better_warning()
    assert f"({error_text(model, chosen['cv_risk'])})" in warning
    assert f"by at least one SE ({error_text(model, chosen['cv_se'])})" in warning
    assert re.findall(r"\((\d+\.\d+)\)", warning) and all(
        len(number.split(".")[1]) == 3 for number in re.findall(r"\((\d+\.\d+)\)", warning))
