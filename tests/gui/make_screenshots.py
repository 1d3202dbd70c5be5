"""Screenshots of every step on the demo cohort, for looking at (not a test).

Run under a display, e.g.
    Xvfb :99 -screen 0 1920x1080x24 &
    DISPLAY=:99 .venv/bin/python tests/gui/make_screenshots.py OUT_DIR 1366x768 1920x1080
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from PySide6.QtCore import QSettings  # noqa: E402

from gui.app import make_application  # noqa: E402


def _identity_cohort(path: Path) -> None:
    """An invented table with identity-like columns, and a dictionary beside it."""
    import numpy as np
    import pandas as pd

    from core.dictionary import infer_dictionary

    rng = np.random.default_rng(3)
    n = 240
    frame = pd.DataFrame({
        "age": rng.integers(18, 95, n), "sat": rng.integers(84, 100, n),
        "surname": rng.choice(["Okafor", "Lindqvist", "Moreau", "Tanaka", "Haddad"], n),
        "postcode": rng.choice(["FB1 2AB", "FB3 4CD", "FB5 6EF", "FB7 8GH"], n),
        "visit": [f"V{i:04d}" for i in range(n)],
    })
    frame["outcome"] = np.where((frame["sat"] < 91) | (rng.random(n) < 0.15), "yes", "no")
    frame.to_csv(path, index=False)
    dictionary, _ = infer_dictionary(frame)
    for name in ("surname", "postcode"):
        dictionary = dictionary.with_column(name, role="predictor")
    dictionary = dictionary.with_column("outcome", role="outcome")
    dictionary.save(path.with_name(path.stem + ".dictionary.json"))


def main(argv: list[str]) -> int:
    out = Path(argv[0] if argv else "screenshots")
    sizes = [tuple(int(v) for v in s.split("x")) for s in (argv[1:] or ["1366x768", "1920x1080"])]
    out.mkdir(parents=True, exist_ok=True)
    app = make_application()
    QSettings.setPath(QSettings.IniFormat, QSettings.UserScope, tempfile.mkdtemp())
    from gui.main_window import MainWindow

    window = MainWindow()
    window.settings.setValue("cautions_seen", True)
    window.show()

    def settle(seconds: float = 0.4, until=None) -> None:
        end = time.monotonic() + 60
        while until is not None and not until() and time.monotonic() < end:
            app.processEvents()
            time.sleep(0.01)
        stop = time.monotonic() + seconds
        while time.monotonic() < stop:
            app.processEvents()
            time.sleep(0.01)

    for width, height in sizes:
        window.resize(width, height)
        settle()
        if width == sizes[0][0]:
            window.go_to("data")
            window.grab().save(str(out / f"0-empty-{width}x{height}.png"))
            window.open_demo()
            settle(until=lambda: window.session.table is not None)
            window.go_to("tree")  # before any run: the banner that leads to step 3
            settle()
            window.grab().save(str(out / f"4a-tree-before-run-{width}x{height}.png"))
            window.panels["size"].holdout.setValue(25)  # so step 5 has a check to show
            window.panels["size"].run()
            settle(until=lambda: window.session.model is not None and not window.panels["size"].running)
            checking = window.panels["checking"]  # stability, for its figure
            checking.resamples.setValue(20)
            checking.run_stability()
            settle(until=lambda: window.session.stability is not None)
            tree = window.panels["tree"]
            tree.set_values({"spo2": "95", "resp_rate": "28", "arrival_mode": "ambulance"})
        for number, step in enumerate(("data", "outcome", "size", "tree", "checking", "chart"), 1):
            window.go_to(step)
            chart = window.panels["chart"]
            settle(1.5 if step == "chart" else 0.6,
                   until=(lambda: not chart.preview_busy) if step == "chart" else None)
            window.grab().save(str(out / f"{number}-{step}-{width}x{height}.png"))
            if step == "data":  # the spreadsheet's own rows, too
                window.panels["data"].tabs.setCurrentIndex(1)
                settle()
                window.grab().save(str(out / f"1a-data-rows-{width}x{height}.png"))
                window.panels["data"].tabs.setCurrentIndex(0)
        # Step 2's checks with the demo's leakage column ticked, and their line on step 3.
        outcome = window.panels["outcome"]
        if "bed_booked" not in window.session.design.predictors:
            outcome.keep_column("bed_booked")
        settle(until=lambda: not window.session.guard_pending and window.session.screen)
        for number, step in ((2, "outcome"), (3, "size")):
            window.go_to(step)
            settle(0.6)
            window.grab().save(str(out / f"{number}b-{step}-checks-{width}x{height}.png"))
    # Columns that identify patients: an invented cohort with a surname and a postcode,
    # marked as predictors by a hand-made dictionary.
    folder = Path(tempfile.mkdtemp())
    _identity_cohort(folder / "cohort.csv")
    window.panels["data"].open_path(str(folder / "cohort.csv"))
    settle(until=lambda: window.session.table is not None
           and Path(window.session.table.provenance.path).name == "cohort.csv")
    settle(until=lambda: not window.session.guard_pending and window.session.screen)
    for width, height in sizes:
        window.resize(width, height)
        for number, step in ((1, "data"), (2, "outcome")):
            window.go_to(step)
            settle(0.6)
            window.grab().save(str(out / f"{number}c-{step}-identity-{width}x{height}.png"))
    window.session.dirty = False
    window.close()
    print(f"screenshots in {out}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
