"""Numbers are printed to the precision of the data (issue 10, item 8).

A length of stay recorded in whole days is summarised as '10.9 days', never '10.873 days':
means, quartiles, intervals and errors of an outcome get at most one decimal more than the
data were recorded with (common practice: a summary is not reported more precisely than its
measurements allow). The chart, the box details, the rules text, the report, ``prunella fit``
and ``prunella check`` all follow the one helper, core/precision.py.
"""

from __future__ import annotations

import io
import json
import re

import numpy as np
import pandas as pd
import pypdf
import pytest

from core.precision import decimals_observed, summary_decimals, summary_number
from tests.helpers import prunella

# A number with two or more decimals (12.34, 0.125): never printed for a whole-day outcome.
TWO_DECIMALS = re.compile(r"(?<![\d.,])\d[\d,]*\.\d{2,}(?!\d)")


def test_the_decimals_observed_are_those_of_the_data():
    assert decimals_observed([12, 7, 3]) == 0
    assert decimals_observed([36.6, 37.2, 38.0]) == 1
    assert decimals_observed([0.1 + 0.2, 1.5]) == 1  # a float's last bit is not a decimal
    assert decimals_observed([1 / 3]) is None  # computed values: no precision to follow
    assert decimals_observed([np.nan, 4.25]) == 2
    assert decimals_observed([np.nan]) is None


def test_a_summary_gets_at_most_one_decimal_more_than_the_data():
    assert summary_number(10.873, 0, "days") == "10.9 days"
    assert summary_number(2.4567, 0) == "2.5"  # three figures would be 2.46
    assert summary_number(0.04567, 2, "mmol/L") == "0.046 mmol/L"
    assert summary_number(37.4412, 1, "°C") == "37.4°C"  # three figures at most
    assert summary_number(12345.6, 0) == "12,346"  # three figures never add decimals
    assert summary_number(-0.04, 0) == "0.0"  # no minus sign on a zero
    assert summary_number(-1.26, 0) == "−1.3"  # a true minus sign
    # Not known (a model file written before the precision was recorded): three figures.
    assert summary_number(10.873) == "10.9" and summary_number(2.4567) == "2.46"
    assert summary_number(4.7126, 0, power=2) == "4.7"  # days², from whole days
    assert summary_number(0.04713, 1, power=2) == "0.047"  # (°C)², from tenths
    assert summary_decimals(float("nan"), 0) == 0 and summary_number(float("nan")) == "–"


@pytest.fixture(scope="module")
def ward(tmp_path_factory):
    """An invented surgical ward: stays recorded in whole days, record numbers, a later file."""
    folder = tmp_path_factory.mktemp("stays")
    rng = np.random.default_rng(31)
    n = 420
    frame = pd.DataFrame({
        "MRN": [f"H{100000 + i}" for i in range(n)],
        "Age (years)": rng.integers(18, 95, n),
        "Albumin g/L": rng.normal(36, 6, n).round(0),
        "Procedure": rng.choice(["hip", "knee", "none"], n),
    })
    frame["Length of stay (days)"] = (2 + (frame["Age (years)"] > 72) * 5
                                 + (frame["Albumin g/L"] < 31) * 4
                                 + rng.gamma(1.3, 1.7, n)).round(0).astype(int)
    frame.iloc[:320].to_csv(folder / "ward.csv", index=False)
    frame.iloc[320:].to_csv(folder / "ward_later.csv", index=False)
    fit = prunella("fit", folder / "ward.csv", "--outcome", "Length of stay (days)", "--patient-id",
                   "MRN", "--folds", "5", "--model", folder / "stay.json", "--rules",
                   folder / "rules.txt", cwd=folder)
    assert fit.returncode == 0, fit.stderr
    return folder, fit


def _means(text: str) -> list[str]:
    return re.findall(r"mean (\S+)", text)


def test_the_model_records_the_outcome_precision_and_its_texts_follow_it(ward):
    from core.model import TreeModel

    folder, fit = ward
    data = json.loads((folder / "stay.json").read_text(encoding="utf-8"))
    assert data["cohort"]["outcome_decimals"] == 0
    model = TreeModel.load(folder / "stay.json")
    assert model.outcome_decimals == 0 and len(model.leaves) > 1
    for leaf in model.leaves:
        shown = _means(leaf.text)[0]
        assert shown == f"{leaf.mean:.1f}" or shown == f"{leaf.mean:,.0f}", leaf.text
    rules = (folder / "rules.txt").read_text(encoding="utf-8")
    assert _means(rules) and not TWO_DECIMALS.search(rules), rules
    # The command line's root of the cross-validated error, in days, to one decimal.
    root = re.search(r"Root of the cross-validated error: (\S+) days \(training (\S+) days\)",
                     fit.stdout)
    assert root, fit.stdout
    assert root.group(1) == f"{np.sqrt(model.chosen['cv_risk']):.1f}"


def test_the_chart_prints_means_quartiles_and_intervals_to_the_data(ward):
    folder, _fit = ward
    done = prunella("chart", folder / "stay.json", "--out", folder / "stay.pdf", "--paper",
                    "a3", cwd=folder)
    assert done.returncode == 0, done.stderr
    words = " ".join(page.extract_text() for page in pypdf.PdfReader(folder / "stay.pdf").pages)
    assert "Mean " in words and "IQR" in words
    # The bands' ratio (× 1.25) is a setting, not a summary of the data.
    summaries = words.replace("Prunella 0.", "").replace("1.25", "")
    assert not TWO_DECIMALS.search(summaries), TWO_DECIMALS.findall(summaries)
    model = json.loads((folder / "stay.json").read_text(encoding="utf-8"))
    # The mean squared error is in days squared: the squares of whole days are whole too.
    assert f"mean squared error: {model['chosen']['cv_risk']:.1f} (SE" in " ".join(words.split())


def test_box_details_and_the_check_follow_the_data(ward):
    from core.checking import check_table
    from core.data import read_table
    from core.model import TreeModel, box_details

    folder, _fit = ward
    model = TreeModel.load(folder / "stay.json")
    leaf = model.leaves[0]
    details = box_details(model, leaf.id)
    assert details.decimals == 0
    assert details.number(details.mean, True) == f"{details.mean:.1f} days"
    assert details.number(details.quartiles[0]) == f"{details.quartiles[0]:.1f}"
    check = check_table(model, read_table(folder / "ward_later.csv"), source="later stays")
    rows = dict(check.measures.rows())
    assert rows["Root mean squared error"].startswith(f"{check.measures.rmse:.1f} days (")
    in_days = "\n".join(line for line in check.text().splitlines() if "R²" not in line)
    assert not TWO_DECIMALS.search(in_days), in_days  # R² has no unit: it keeps its decimals
    done = prunella("check", folder / "stay.json", folder / "ward_later.csv", cwd=folder)
    assert done.returncode == 0, done.stderr
    assert f"Root mean squared error                  {check.measures.rmse:.1f} days (" \
        in done.stdout


def test_the_report_prints_box_means_to_the_data(ward):
    from core.checking import check_table
    from core.data import read_table
    from core.dictionary import infer_dictionary
    from core.design import DesignSpec
    from core.report import prepare_report, render_report
    from core.sizing import CVSettings, DerivationRequest, derive

    folder, _fit = ward
    table = read_table(folder / "ward.csv")
    dictionary, _notes = infer_dictionary(table.frame)
    request = DerivationRequest(DesignSpec("Length of stay (days)", ("Age (years)", "Albumin g/L",
                                                                "Procedure"), patient_id="MRN"),
                                cv=CVSettings(folds=5))
    derivation = derive(table, dictionary, request)
    external = check_table(derivation.model, read_table(folder / "ward_later.csv"),
                           source="later stays")
    contents = prepare_report(derivation, external=(external,), nested=False, bootstrap=0,
                              printed="2026-01-31")
    words = " ".join(" ".join(page.extract_text() for page in
                              pypdf.PdfReader(io.BytesIO(render_report(contents))).pages).split())
    for leaf in derivation.model.leaves:
        assert f"mean {leaf.mean:.1f}" in words
    mean = float(pd.read_csv(folder / "ward.csv")["Length of stay (days)"].mean())
    assert f"{mean:.1f} days" in words
    # A measured outcome's boxes have means, not rates, wherever the report names them.
    assert "derivation rate" not in words
    # Stays 5 days longer elsewhere put every box's derivation mean outside the observed
    # interval: the limitation names the boxes' means.
    later = pd.read_csv(folder / "ward_later.csv")
    later["Length of stay (days)"] += 5
    longer = folder / "ward_longer.csv"
    later.to_csv(longer, index=False)
    shifted = check_table(derivation.model, read_table(longer), source="longer stays")
    assert shifted.calibration_outside
    contents = prepare_report(derivation, external=(shifted,), nested=False, bootstrap=0,
                              printed="2026-01-31")
    words = " ".join(" ".join(page.extract_text() for page in
                              pypdf.PdfReader(io.BytesIO(render_report(contents))).pages).split())
    assert "the derivation mean of box(es)" in words and "derivation rate" not in words


def test_an_older_model_file_keeps_three_significant_figures(ward):
    from core.model import TreeModel

    folder, _fit = ward
    data = json.loads((folder / "stay.json").read_text(encoding="utf-8"))
    del data["cohort"]["outcome_decimals"]  # as written before the precision was recorded
    older = TreeModel.from_dict(data)
    assert older.outcome_decimals is None
    root = older.root
    unit = f" {older.outcome.unit}" if older.outcome.unit else ""
    assert older.expected_outcome(root) == \
        f"{older.outcome.display}: mean {summary_number(root.mean)}{unit}"
    assert summary_number(root.mean) == f"{root.mean:.3g}"  # three figures, as then
