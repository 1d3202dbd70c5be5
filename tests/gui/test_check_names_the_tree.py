"""In the app, a check counts only for the tree whose fingerprint it carries (issue 15, item
11): a reopened project whose tree comes back with a check naming another tree shows the tree
as not yet checked, on step 5 and on the chart."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import dataclasses  # noqa: E402
import shutil  # noqa: E402

import core.sizing.derivation  # noqa: E402
from core.cautions import UNCHECKED_BANNER  # noqa: E402
from core.chart.content import chart_text  # noqa: E402
from tests.helpers import DEMO_CSV, DEMO_DICTIONARY, sha256_of  # noqa: E402


def test_a_reopened_tree_whose_check_names_another_tree_is_not_yet_checked(
        window, qtbot, run, dialogs, tmp_path, monkeypatch):
    from gui.main_window import MainWindow

    folder = tmp_path / "ward"
    folder.mkdir()
    data = folder / "visits.csv"
    shutil.copy(DEMO_CSV, data)
    shutil.copy(DEMO_DICTIONARY, folder / "visits.dictionary.json")
    window.panels["data"].open_path(str(data))
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    size = window.panels["size"]
    size.folds.setValue(3)
    size.holdout.setValue(25)
    run(window)
    assert window.session.checks  # the run's own held-out check names its tree
    dialogs.save_name = str(folder / "ward.prunella")
    assert window.save()
    inputs = {p: (sha256_of(p), os.stat(p).st_mtime_ns)
              for p in (data, folder / "ward.prunella")}

    # The held-out check comes back naming another tree, and is recorded in the tree anyway
    # (as a file edited by hand or an older Prunella would carry it).
    real_check = core.sizing.derivation.check_heldout

    def check_of_another_tree(*args, **kwargs):
        return dataclasses.replace(real_check(*args, **kwargs), model_fingerprint="0" * 64)

    def recorded_anyway(model, result):
        return dataclasses.replace(model, extra={**model.extra,
                                                 "validation": result.to_model_record()})

    monkeypatch.setattr(core.sizing.derivation, "check_heldout", check_of_another_tree)
    monkeypatch.setattr(core.sizing.derivation, "with_check", recorded_anyway)
    again = MainWindow()
    qtbot.addWidget(again)
    with qtbot.waitSignal(again.panels["size"].run_finished, timeout=60000):
        again.open_any(str(folder / "ward.prunella"))
    session = again.session
    assert session.model.extra["validation"]["model_fingerprint"] == "0" * 64
    assert session.checks == ()
    again.go_to("checking")
    checking = again.panels["checking"]
    assert not checking.unchecked.isHidden()
    assert UNCHECKED_BANNER in checking.unchecked.text.text()
    words = chart_text(session.chart_derivation().model, session.chart.checked())
    assert words.banner is not None and words.banner[0] == UNCHECKED_BANNER
    assert not any(s.title.startswith("Checked on") for s in words.sections)
    assert {p: (sha256_of(p), os.stat(p).st_mtime_ns) for p in inputs} == inputs
    session.dirty = False
