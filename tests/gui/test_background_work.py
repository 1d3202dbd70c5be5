"""Long work runs off the UI thread: Cancel stops a run and leaves the app usable, and the UI
thread is never blocked for more than 100 ms while a 20,000-row tree is grown."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
from PySide6.QtCore import QElapsedTimer, Qt, QTimer  # noqa: E402


def test_cancel_stops_a_run_and_the_app_stays_usable(demo, qtbot, run):
    window = demo
    size = window.panels["size"]
    window.go_to("size")
    size.repeats.setValue(30)  # 300 fits: far longer than the moment it takes to cancel
    qtbot.mouseClick(size.run_button, Qt.LeftButton)
    assert size.running and size.cancel_button.isEnabled() and not size.run_button.isEnabled()
    qtbot.waitUntil(lambda: size.progress.value() >= 2, timeout=20000)  # a fold or two done
    steps = []
    size.running_job.progressed.connect(lambda done, total: steps.append((done, total)))
    with qtbot.waitSignal(size.run_finished, timeout=20000):
        qtbot.mouseClick(size.cancel_button, Qt.LeftButton)
    # It stopped after the folds in hand, not at the end of all 300 fits.
    assert not steps or steps[-1][0] < steps[-1][1]
    assert window.session.model is None  # nothing half-done was kept
    assert "Cancelled" in size.status.text()
    assert size.run_button.isEnabled() and not size.cancel_button.isEnabled()
    # Still usable: a quicker run completes and is shown.
    size.repeats.setValue(1)
    size.folds.setValue(5)
    run(window)
    assert window.session.model is not None
    assert window.session.model.path["folds"] == 5


def _synthetic_cohort(path, n: int = 20_000, seed: int = 7) -> None:
    """An invented cohort, made here: numbers, categories and missing values, outcome by rule."""
    rng = np.random.default_rng(seed)
    frame = pd.DataFrame({
        "patient": [f"P{i // 2:05d}" for i in range(n)],
        "age": rng.integers(18, 99, n),
        "rate": rng.normal(20, 5, n).round(0),
        "sat": np.clip(rng.normal(95, 3, n), 70, 100).round(0),
        "pulse": rng.normal(90, 15, n).round(0),
        "lab": np.where(rng.random(n) < 0.3, np.nan, rng.gamma(2, 20, n).round(1)),
        "mode": rng.choice(["ambulance", "walked in", "referral"], n),
        "level": rng.integers(1, 6, n),
    })
    risk = (0.1 + 0.5 * (frame["sat"] < 92) + 0.2 * (frame["rate"] > 24)
            + 0.1 * (frame["mode"] == "ambulance"))
    frame["outcome"] = np.where(rng.random(n) < risk.clip(0, 0.95), "yes", "no")
    frame.to_csv(path, index=False)


def test_ui_thread_stays_responsive_during_a_20000_row_fit(window, qtbot, tmp_path, run):
    data = tmp_path / "synthetic.csv"
    _synthetic_cohort(data)
    window.panels["data"].open_path(str(data))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=30000)
    window.go_to("outcome")
    combo = window.panels["outcome"].outcome_combo
    combo.setCurrentIndex(combo.findData("outcome"))
    assert window.session.design.outcome == "outcome"
    size = window.panels["size"]
    window.go_to("size")
    size.folds.setValue(5)  # six fits of 20,000 rows: long enough to measure, quick enough
    qtbot.waitExposed(size.curve)
    # A pause caused by the app (work done on the UI thread) happens in every run; a pause
    # caused by other programs taking both cores happens in some. So the best of up to three
    # runs is measured: the test still fails whenever the app itself blocks the UI thread.
    longest: list[int] = []
    for _attempt in range(3):
        _settle(size, qtbot)
        gaps = _ui_pauses_during_a_run(size, qtbot)
        assert window.session.model is not None and window.session.model.n_rows == 20_000
        assert len(gaps) > 20  # the timer kept firing all through the run
        longest.append(max(gaps))
        print(f"longest pause of the UI thread during the fit: {max(gaps)} ms over {len(gaps)} ticks")
        if max(gaps) <= 100:
            break
    assert min(longest) <= 100, f"the UI thread was blocked for {longest} ms in each run"


def _settle(size, qtbot) -> None:
    """Let the previous run's follow-up work (the sizes that fit the paper) and its drawing of
    the curve finish, so that each measured run starts from the same quiet state."""
    qtbot.waitUntil(lambda: not size.fitting.busy, timeout=60000)
    size.curve.draw()
    qtbot.wait(100)


def _ui_pauses_during_a_run(size, qtbot) -> list[int]:
    """The gaps (ms) between 10 ms timer ticks on the UI thread while one run is going on."""
    gaps: list[int] = []
    clock = QElapsedTimer()

    def tick() -> None:
        if size.running:
            gaps.append(clock.restart())
        else:
            clock.restart()

    timer = QTimer()
    timer.setInterval(10)
    timer.timeout.connect(tick)
    clock.start()
    timer.start()
    with qtbot.waitSignal(size.run_finished, timeout=120000):
        qtbot.mouseClick(size.run_button, Qt.LeftButton)
    timer.stop()
    return gaps
