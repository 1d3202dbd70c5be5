"""The wall chart prints the data's fingerprint, and the data file's name only when asked
(issue 15, item 10): a file's name may hold a patient's name, a date of birth or a record
number. Invented data written by the test."""

from __future__ import annotations

import numpy as np
import pandas as pd
from pypdf import PdfReader

from core.chart import ChartOptions
from core.chart.content import chart_text
from core.project.project import chart_options, chart_settings
from tests.helpers import prunella

NAMED = "Okafor_Margaret_MRN0042_falls.csv"


def _words(text) -> str:
    return " ".join(item.text for section in text.sections for item in section.items)


def _frame(n: int = 600, seed: int = 3) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    gait = rng.integers(0, 13, n)
    return pd.DataFrame({"Age (years)": rng.integers(65, 99, n), "Gait score": gait,
                         "Fell": np.where(rng.random(n) < 0.05 + 0.7 * (gait >= 9), "yes", "no")})


def _fitted(tmp_path):
    data = tmp_path / NAMED
    _frame().to_csv(data, index=False)
    model = tmp_path / "falls.model.json"
    done = prunella("fit", data, "--outcome", "Fell", "--folds", "3", "--model", model)
    assert done.returncode == 0, done.stderr
    return model


def _pdf_text(path) -> str:
    return " ".join(page.extract_text() for page in PdfReader(str(path)).pages)


def test_the_chart_names_the_file_only_when_asked(tmp_path):
    from core.model import TreeModel

    model_path = _fitted(tmp_path)
    model = TreeModel.load(model_path)
    plain = chart_text(model, ChartOptions().checked())
    assert NAMED not in _words(plain) and "Okafor" not in _words(plain)
    assert f"Data {model.extra['data']['sha256'][:12]}" in plain.footer[0]  # the fingerprint
    asked = chart_text(model, ChartOptions(show_file_name=True).checked())
    assert f"Data file: {NAMED}." in _words(asked)
    # The command line: off by default, --show-file-name to print it.
    for extra, shown in (((), False), (("--show-file-name",), True)):
        out = tmp_path / f"chart{len(extra)}.pdf"
        done = prunella("chart", model_path, "--out", out, *extra)
        assert done.returncode == 0, done.stderr
        assert ("Okafor" in _pdf_text(out)) is shown


def test_a_project_keeps_the_choice():
    settings = chart_settings(ChartOptions(show_file_name=True))
    assert settings["show_file_name"] is True
    assert chart_options(settings).show_file_name is True
    assert chart_options({}).show_file_name is False  # older projects: not printed


def test_a_check_names_its_file_on_the_chart_only_when_asked(tmp_path):
    """The held-out part and an external file are checks of patients from named files: the
    chart's "Checked on" panel says where they came from in words, and the file only on
    request; the command line's own output (the user's screen) names it."""
    from core.model import TreeModel

    data = tmp_path / NAMED
    _frame().to_csv(data, index=False)
    other = tmp_path / "Brennan_Olu_DOB_1941-02-03.csv"
    _frame(300, seed=8).to_csv(other, index=False)
    held = tmp_path / "held.model.json"
    done = prunella("fit", data, "--outcome", "Fell", "--folds", "3", "--holdout", "0.25",
                    "--model", held)
    assert done.returncode == 0, done.stderr
    checked = tmp_path / "checked.model.json"
    done = prunella("check", held, other, "--checked-model", checked)
    assert done.returncode == 0, done.stderr
    assert "an external file (Brennan_Olu_DOB_1941-02-03.csv)" in done.stdout
    model = TreeModel.load(checked)
    assert model.extra["validation"]["file"] == other.name
    plain = _words(chart_text(model, ChartOptions().checked()))
    assert "from an external file:" in plain and "Brennan" not in plain
    asked = _words(chart_text(model, ChartOptions(show_file_name=True).checked()))
    assert f"from an external file ({other.name}):" in asked
    held_words = _words(chart_text(TreeModel.load(held), ChartOptions().checked()))
    assert "held-out part of the derivation file" in held_words and "Okafor" not in held_words
