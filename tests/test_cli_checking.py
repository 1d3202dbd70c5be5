"""`prunella check` and `prunella report` on the command line: each command once as a child
process (as a user runs it), the fit before them and the refusals in this process."""

from __future__ import annotations

import json

import pytest
from pypdf import PdfReader

from tests.helpers import DEMO_CSV, DEMO_DICTIONARY, DEMO_XLSX, prunella, run_prunella


@pytest.fixture(scope="module")
def fitted(tmp_path_factory):
    folder = tmp_path_factory.mktemp("cli")
    model = folder / "admitted.json"
    done = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--dictionary",
                    DEMO_DICTIONARY, "--predictors",
                    "age,resp_rate,spo2,arrival_mode,crp", "--folds", "5", "--holdout", "0.2",
                    "--model", model, "--quiet", cwd=folder)
    assert done.returncode == 0, done.stderr
    return folder, model


def test_check_prints_measures_and_writes_results(fitted):
    folder, model = fitted
    done = run_prunella("check", model, DEMO_XLSX, "--sheet", "visits", "--source",
                        "the whole demo file", "--out", folder / "results.json", "--checked-model",
                        folder / "checked.json", cwd=folder)
    assert done.returncode == 0, done.stderr
    for piece in ("Checked on: the whole demo file", "Sensitivity", "ROC area",
                  "Confusion matrix", "Calibration by outcome box"):
        assert piece in done.stdout
    results = json.loads((folder / "results.json").read_text(encoding="utf-8"))
    assert results["n"] == 3950 and results["source"] == "the whole demo file"
    assert results["summary"].startswith("Sensitivity")
    checked = json.loads((folder / "checked.json").read_text(encoding="utf-8"))
    assert checked["validation"]["source"] == "the whole demo file"
    assert checked["validation"]["summary"] == results["summary"]


def test_report_reruns_the_derivation_and_writes_the_pdf(fitted):
    folder, model = fitted
    out = folder / "report.pdf"
    # The workbook holds the same rows as the CSV the model was fitted on, but other bytes:
    # the report warns about the fingerprint and re-derives the same tree.
    done = run_prunella("report", model, DEMO_XLSX, "--external",
                        DEMO_CSV, "--external-source", "demo CSV file",
                        "--bootstrap", "2", "--outer-folds", "2", "--date", "2025-06-30",
                        "--out", out, cwd=folder)
    assert done.returncode == 0, done.stderr
    assert "SHA-256" in done.stderr and "differs from the one the model was fitted on" in done.stderr
    assert "re-derived from the data differs" not in done.stderr
    words = " ".join(" ".join(p.extract_text() for p in PdfReader(out).pages).split())
    for piece in ("1. Data source", "8.2 Nested cross-validation", "Held-out check",
                  "External check: demo CSV file", "9. Stability", "11. TRIPOD checklist",
                  "differs from the one the model was fitted on", "printed 2025-06-30"):
        assert piece in words, piece
    # The file's own date is the report's (not reportlab's fixed 2000-01-01), so reruns with
    # the same --date give the same bytes.
    assert PdfReader(out).metadata.creation_date.date().isoformat() == "2025-06-30"


@pytest.mark.parametrize("args, says", [
    (("check", "{data}", "{data}"), "not a Prunella model"),
    (("report", "{model}", "{data}", "--out", "{data}"), "input file"),
    (("report", "{model}", "{data}", "--out", "r.pdf", "--date", "30/06/2025"), "YYYY-MM-DD"),
])
def test_bad_input_is_one_sentence_and_exit_2(fitted, args, says):
    folder, model = fitted
    filled = [a.format(model=model, data=DEMO_CSV) for a in args]
    done = prunella(*filled, cwd=folder)
    assert done.returncode == 2
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and says in lines[0] and "Traceback" not in done.stderr
