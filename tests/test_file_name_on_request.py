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


def _fitted(tmp_path):
    rng = np.random.default_rng(3)
    n = 600
    gait = rng.integers(0, 13, n)
    frame = pd.DataFrame({"Age (years)": rng.integers(65, 99, n), "Gait score": gait,
                          "Fell": np.where(rng.random(n) < 0.05 + 0.7 * (gait >= 9), "yes", "no")})
    data = tmp_path / NAMED
    frame.to_csv(data, index=False)
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
