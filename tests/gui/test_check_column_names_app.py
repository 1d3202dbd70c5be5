"""The app checks a tree on another file as prunella check does: a header that differs only in
case and spaces is taken, and a file whose column only looks like the tree's ("resp-rate" for
"resp_rate") is refused naming that column. Invented demo cohort; our own checks."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pandas as pd  # noqa: E402

from tests.helpers import DEMO_CSV as DEMO, sha256_of  # noqa: E402


def test_check_on_another_file_names_a_near_column(demo, run, qtbot, tmp_path):
    window = demo
    window.panels["size"].folds.setValue(5)
    run(window)
    session, checking = window.session, window.panels["checking"]
    asked = session.model.columns_asked()
    assert "resp_rate" in asked and "spo2" in asked
    frame = pd.read_csv(DEMO)
    riverside = frame[frame["campus"] == "Riverside"]
    near = tmp_path / "riverside near.csv"
    riverside.rename(columns={"resp_rate": "resp-rate"}).to_csv(near, index=False)
    before = (sha256_of(near), os.stat(near).st_mtime_ns)
    window.go_to("checking")
    checking.check_file(str(near))
    qtbot.waitUntil(lambda: not checking.running, timeout=30000)
    text = checking.status.text()
    assert "lacks column(s) the tree asks about: 'resp_rate'" in text
    assert "the file's 'resp-rate' (for 'resp_rate') looks meant" in text
    assert "rename that column" in text
    assert session.chart_check is None
    assert (sha256_of(near), os.stat(near).st_mtime_ns) == before
    # Capitals and spaces are not a different column: the check is made.
    odd = tmp_path / "riverside odd.csv"
    riverside.rename(columns={"spo2": "SpO2", "resp_rate": "Resp_Rate"}).to_csv(odd, index=False)
    checking.check_file(str(odd))
    qtbot.waitUntil(lambda: not checking.running and session.chart_check is not None,
                    timeout=30000)
    assert session.chart_check.n == len(riverside)
