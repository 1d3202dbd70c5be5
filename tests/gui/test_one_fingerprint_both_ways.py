"""The same tree has one fingerprint whether it was grown by ``prunella fit`` or by the app:
the outcome's entry always says "outcome" and each predictor's "predictor", whichever
dictionary roles the path started from.

Invented demo cohort (sample_data/README.md) and an invented clinic file; our own checks.
"""

from __future__ import annotations

import json
import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402

from tests.helpers import DEMO_CSV as DEMO, prunella  # noqa: E402


def _differences(a: dict, b: dict, where: str = "") -> list[str]:
    if isinstance(a, dict) and isinstance(b, dict):
        return [d for k in sorted(set(a) | set(b))
                for d in _differences(a.get(k), b.get(k), f"{where}.{k}")]
    if isinstance(a, list) and isinstance(b, list) and len(a) == len(b):
        return [d for i, (x, y) in enumerate(zip(a, b)) for d in _differences(x, y, f"{where}[{i}]")]
    return [] if a == b else [f"{where}: {a!r} != {b!r}"]


def _tree_of(path) -> dict:
    data = json.loads(path.read_text(encoding="utf-8"))
    return {k: v for k, v in data.items() if k not in ("findings", "validation")}


def test_fit_and_app_give_one_fingerprint_on_the_demo(demo, run, tmp_path):
    out = tmp_path / "cli.json"
    result = prunella("fit", str(DEMO), "--outcome", "admitted", "--folds", "5",
                      "--model", str(out))
    assert result.returncode == 0, result.stderr
    window = demo
    window.panels["size"].folds.setValue(5)
    run(window)
    app = window.session.model
    cli = _tree_of(out)
    assert _differences(cli, {k: v for k, v in app.to_dict().items()
                              if k not in ("findings", "validation")}) == []
    from core.model import TreeModel

    assert TreeModel.load(out).fingerprint == app.fingerprint
    assert json.loads(out.read_text(encoding="utf-8"))["outcome_spec"]["role"] == "outcome"


def test_fit_and_app_give_one_fingerprint_without_a_dictionary(window, qtbot, run, tmp_path):
    """A spreadsheet with no dictionary beside it: the command line guesses every column's
    role (the outcome was "predictor" before it was chosen), the app says the choice."""
    rng = np.random.default_rng(8)
    n = 220
    frame = pd.DataFrame({
        "Record No": [f"K{7000 + i // 2}" for i in range(n)],
        "Pulse": rng.integers(45, 150, n),
        "Lactate (mmol/L)": rng.gamma(2.0, 1.0, n).round(1),
        "Oxygen given": rng.choice(["Yes", "No", "none"], n),
    })
    frame["Went to ICU"] = np.where((frame["Lactate (mmol/L)"] > 3) & (rng.random(n) < 0.8),
                                    "Yes", "No")
    data = tmp_path / "icu audit.csv"
    frame.to_csv(data, index=False)
    out = tmp_path / "cli.json"
    result = prunella("fit", str(data), "--outcome", "Went to ICU", "--patient-id", "Record No",
                      "--folds", "5", "--model", str(out))
    assert result.returncode == 0, result.stderr
    window.panels["data"].open_path(str(data))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20000)
    window.go_to("outcome")
    outcome = window.panels["outcome"]
    index = outcome.outcome_combo.findData("Went to ICU")
    outcome.outcome_combo.setCurrentIndex(index)
    outcome.outcome_combo.activated.emit(index)
    patient = outcome.patient_combo
    patient.setCurrentIndex(patient.findData("Record No"))
    patient.activated.emit(patient.findData("Record No"))
    window.panels["size"].folds.setValue(5)
    assert window.session.design.patient_id == "Record No"
    run(window)
    app = window.session.model
    assert _differences(_tree_of(out), {k: v for k, v in app.to_dict().items()
                                        if k not in ("findings", "validation")}) == []
    from core.model import TreeModel

    assert TreeModel.load(out).fingerprint == app.fingerprint
    assert json.loads(out.read_text(encoding="utf-8"))["outcome_spec"]["role"] == "outcome"
