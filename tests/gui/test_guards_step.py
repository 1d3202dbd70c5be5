"""The guards on step 2 (core.design.guards through gui/guard_watch.py): identity-like columns left out
with a warning and kept only on purpose, probable leakage flagged, the findings repeated on
step 3 before Run, advice from the message catalogue beside core's messages, and the checks
made off the UI thread, restarted when the choices change.

The demo cohort is invented (sample_data/README.md): `bed_booked` is its planted leakage column
(agrees with `admitted` for 98 % of visits, recorded after the decision); SpO2 carries the
planted, real-looking signal and must not be flagged.
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import threading  # noqa: E402
import time  # noqa: E402

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

import gui.guard_watch as guard_watch  # noqa: E402
from core.dictionary import infer_dictionary  # noqa: E402
from gui.widgets.checklist import NAME_ROLE  # noqa: E402

GUARD_TIMEOUT = 30000


def settled(window, qtbot) -> None:
    """Wait until the checks of step 2 are done for the choices as they are now."""
    session, watch = window.session, window.panels["outcome"].watch
    qtbot.waitUntil(lambda: not session.guard_pending and session.screen is not None
                    and session.screen.key == watch.key(), timeout=GUARD_TIMEOUT)


def tick(panel, name: str, checked: bool = True) -> None:
    """Tick a column in the checklist as a user does (its check box, one item)."""
    model = panel.checklist._model
    for row in range(model.rowCount()):
        item = model.item(row)
        if item.data(NAME_ROLE) == name:
            item.setCheckState(Qt.Checked if checked else Qt.Unchecked)
            return
    raise AssertionError(f"{name} is not in the checklist")


def rows_of(panel, kind: str | None = None, column: str | None = None):
    return [r for r in panel.findings.rows
            if (kind is None or r.finding.kind == kind)
            and (column is None or r.finding.column == column)]


@pytest.fixture
def identity_cohort(tmp_path):
    """An invented cohort with a surname and a postcode column, and a dictionary beside it
    that (wrongly) marks both as predictors, as a hand-made dictionary might."""
    rng = np.random.default_rng(3)
    n = 240
    frame = pd.DataFrame({
        "age": rng.integers(18, 95, n),
        "sat": rng.integers(84, 100, n),
        "surname": rng.choice(["Okafor", "Lindqvist", "Moreau", "Tanaka", "Haddad", "Novak",
                               "Fitzgerald", "Ruiz"], n),
        "postcode": rng.choice(["FB1 2AB", "FB3 4CD", "FB5 6EF", "FB7 8GH"], n),
    })
    frame["outcome"] = np.where((frame["sat"] < 91) | (rng.random(n) < 0.15), "yes", "no")
    data = tmp_path / "cohort.csv"
    frame.to_csv(data, index=False)
    dictionary, _ = infer_dictionary(frame)
    for name in ("surname", "postcode"):
        dictionary = dictionary.with_column(name, role="predictor")
    dictionary = dictionary.with_column("outcome", role="outcome")
    dictionary.save(tmp_path / "cohort.dictionary.json")
    return data


def open_cohort(window, qtbot, path) -> None:
    window.panels["data"].open_path(str(path))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    window.go_to("outcome")
    settled(window, qtbot)


def test_identity_columns_are_left_out_with_a_warning_and_kept_only_on_purpose(
        window, qtbot, identity_cohort):
    open_cohort(window, qtbot, identity_cohort)
    panel, session = window.panels["outcome"], window.session
    assert session.design.outcome == "outcome"
    # Left out by default, although the dictionary marks them as predictors ...
    assert {"surname", "postcode"}.isdisjoint(session.design.predictors)
    assert {"age", "sat"} <= set(session.design.predictors)
    assert {"surname", "postcode"}.isdisjoint(panel.checklist.checked())
    # ... with a visible warning each, the catalogue's advice, and a mark in the list.
    for name in ("surname", "postcode"):
        (row,) = rows_of(panel, "identity", name)
        assert row.finding.severity == "warning" and row.isVisibleTo(window)
        assert "is left out of the predictors" in row.finding.text
        assert row.advice is not None and "What to do:" in row.advice.text()
        assert "left out" in panel.checklist.mark_of(name)
    assert len(rows_of(panel, "identity")) == 2
    assert "warnings</b>" in panel.findings.status.text()

    # Ticking every column with the button keeps nothing that identifies patients.
    qtbot.mouseClick(panel.checklist.all_button, Qt.LeftButton)
    settled(window, qtbot)
    assert {"surname", "postcode"}.isdisjoint(session.design.predictors)
    assert session.kept == frozenset()

    # Ticking one back on purpose keeps it, like naming it in --predictors.
    tick(panel, "postcode")
    settled(window, qtbot)
    assert "postcode" in session.design.predictors and "postcode" in session.kept
    assert "surname" not in session.design.predictors
    (kept,) = rows_of(panel, "identity_kept", "postcode")
    assert "because you ticked it" in kept.finding.text
    assert "kept" in panel.checklist.mark_of("postcode")
    # The button beside a warning does the same.
    qtbot.mouseClick(rows_of(panel, "identity", "surname")[0].button, Qt.LeftButton)
    settled(window, qtbot)
    assert {"surname", "postcode"} <= set(session.design.predictors)
    # ... and the run uses the kept columns (the request is what Run sends).
    assert {"surname", "postcode"} <= set(session.request().design.predictors)
    # Unticking a kept column leaves it out again, with its warning back.
    qtbot.mouseClick(rows_of(panel, "identity_kept", "surname")[0].button, Qt.LeftButton)
    settled(window, qtbot)
    assert "surname" not in session.design.predictors and "surname" not in session.kept
    assert rows_of(panel, "identity", "surname")


def test_bed_booked_is_flagged_as_probable_leakage_and_spo2_is_not(demo, qtbot):
    window = demo
    window.go_to("outcome")
    panel, session = window.panels["outcome"], window.session
    assert session.design.outcome == "admitted"
    settled(window, qtbot)
    assert not rows_of(panel, "leakage")  # the dictionary's predictors are clean
    assert "spo2" in session.design.predictors
    tick(panel, "bed_booked")
    settled(window, qtbot)
    assert "bed_booked" in session.design.predictors  # a warning, not a removal
    leaks = rows_of(panel, "leakage")
    assert [r.finding.column for r in leaks] == ["bed_booked"]
    (row,) = leaks
    assert row.finding.severity == "warning"
    assert "Probable leakage" in row.finding.text and "Check when it is recorded" in row.finding.text
    assert "--exclude" not in row.finding.text  # the command line's option is not app advice
    assert "recorded after the decision" in row.advice.text()
    assert panel.checklist.mark_of("bed_booked") == "⚠ probable leakage"
    assert panel.checklist.mark_of("spo2") == ""
    # Repeat visits are found and handled (grouped by the patient number, the default).
    (repeats,) = rows_of(panel, "repeat_visits")
    assert repeats.finding.severity == "note" and "same fold" in repeats.finding.text
    assert session.cv.grouped and session.design.patient_id == "patient_id"
    # "Leave it out" unticks it.
    qtbot.mouseClick(row.button, Qt.LeftButton)
    settled(window, qtbot)
    assert "bed_booked" not in session.design.predictors and not rows_of(panel, "leakage")


def test_findings_are_shown_on_the_size_step_and_lead_back(demo, qtbot):
    window = demo
    panel, size = window.panels["outcome"], window.panels["size"]
    window.go_to("outcome")
    settled(window, qtbot)
    tick(panel, "bed_booked")
    window.go_to("size")
    assert size.guard_line.isVisible()  # "checking…" at once, then the findings
    settled(window, qtbot)
    text = size.guard_line.text.text()
    assert "1 warning on step 2" in text and "probable leakage" in text and "bed_booked" in text
    qtbot.mouseClick(size.guard_line.button, Qt.LeftButton)
    assert window.current_step() == "outcome"
    # Without a patient number, repeat visits become a warning with a way to fix it.
    panel.leave_out("bed_booked")
    panel.patient_combo.setCurrentIndex(panel.patient_combo.findData(""))
    settled(window, qtbot)
    (row,) = rows_of(panel, "repeat_visits")
    assert row.finding.severity == "warning" and row.button.text() == "Use as patient number"
    assert "repeat visits" in size.guard_line.text.text()
    qtbot.mouseClick(row.button, Qt.LeftButton)
    settled(window, qtbot)
    assert window.session.design.patient_id == "patient_id"
    assert not size.guard_line.isVisibleTo(window)  # nothing left to warn about


def test_checks_run_off_the_ui_thread_and_restart_when_the_choices_change(
        demo, qtbot, monkeypatch):
    window = demo
    panel = window.panels["outcome"]
    window.go_to("outcome")
    settled(window, qtbot)
    calls: list[tuple] = []
    real = guard_watch.screen_design

    def slow_screen(*args, cancel=None, **kwargs):
        calls.append((threading.current_thread() is threading.main_thread(), args[2]))
        stop = time.monotonic() + 1.0  # a long check, as on a big file
        while time.monotonic() < stop:
            if cancel():
                from core.errors import Cancelled
                raise Cancelled()
            time.sleep(0.01)
        return real(*args, cancel=cancel, **kwargs)

    monkeypatch.setattr(guard_watch, "screen_design", slow_screen)
    # Two ticks in a row start one check (the watch waits for the choices to settle).
    tick(panel, "bed_booked")
    tick(panel, "los_hours")
    qtbot.waitUntil(lambda: len(calls) == 1 and panel.watch.running, timeout=5000)
    first = panel.watch.job
    # A change while it runs cancels it and starts again on the new choices.
    tick(panel, "los_hours", False)
    qtbot.waitUntil(lambda: len(calls) == 2, timeout=5000)
    assert first.cancel_requested
    settled(window, qtbot)
    assert [on_main for on_main, _ in calls] == [False, False]  # pool threads, never the UI's
    assert "los_hours" in calls[0][1].predictors and "los_hours" not in calls[1][1].predictors
    assert [r.finding.column for r in rows_of(panel, "leakage")] == ["bed_booked"]


def test_run_waits_for_the_checks_and_grows_without_the_left_out_columns(
        window, qtbot, identity_cohort, run):
    window.panels["data"].open_path(str(identity_cohort))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    assert window.session.guard_pending  # Run is pressed before the checks are back
    run(window)
    model = window.session.model
    assert model is not None
    assert {"surname", "postcode"}.isdisjoint(p.name for p in model.predictors)


def test_messages_from_core_come_with_what_to_do(window, qtbot, dialogs, tmp_path):
    empty = tmp_path / "empty.csv"
    empty.write_bytes(b"")
    window.open_any(str(empty))
    qtbot.waitUntil(lambda: bool(dialogs.texts("warning")), timeout=10000)
    assert "What to do:" in dialogs.texts("warning")[-1]
    # The data step's notes carry the catalogue's advice too.
    lab = tmp_path / "labs.csv"
    rng = np.random.default_rng(5)
    values = [str(v) for v in rng.integers(5, 60, 60)]
    values[3], values[10] = "<5", ">100"
    pd.DataFrame({"crp": values, "age": rng.integers(20, 90, 60),
                  "outcome": rng.choice(["yes", "no"], 60)}).to_csv(lab, index=False)
    window.panels["data"].open_path(str(lab))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    rows = window.panels["data"].notes_view.rows
    limits = [r for r in rows if "<5" in r.finding.text]
    assert limits, [r.finding.text for r in rows]
    assert limits[0].finding.severity == "warning" and rows[0].finding.severity == "warning"
    assert "What to do:" in limits[0].advice.text()


def test_warnings_in_pages_carry_the_advice_without_command_line_options():
    """The checking step and the patient look-up show core's warnings through warning_html."""
    from core.messages import say
    from gui.panels.wording import warning_html, with_advice

    leak = say("guard.leakage", column="bed_booked", outcome="admitted", evidence="ROC area 0.99")
    html = warning_html(leak)
    assert html.startswith("<p>⚠ Probable leakage") and "<i>What to do: A value recorded" in html
    assert "--exclude" not in html
    assert warning_html("Something core never says.") == "<p>⚠ Something core never says.</p>"
    assert with_advice(leak).count("What to do:") == 1
