"""What the app saves gets the user's normal file mode, never owner-only (issue 15, items 12
and 14): the chart PDF, the methods report, the model, the rules and the project are 0644
under umask 022, each a private (0600) temporary file while it is written; a temporary file
an earlier, killed save left in the folder is removed and the app says so."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402

from tests.test_file_modes import _leftover, mode_of, temporary_modes, umask  # noqa: E402,F401

pytestmark = pytest.mark.skipif(os.name != "posix", reason="POSIX file modes")


def test_the_apps_saves_get_the_users_normal_mode(demo, run, dialogs, qtbot, tmp_path, umask,
                                                   temporary_modes):
    umask(0o022)
    window = demo
    run(window)
    chart, checking = window.panels["chart"], window.panels["checking"]
    out = tmp_path / "saved"
    out.mkdir()
    for name, save in (("chart.pdf", chart.export_pdf), ("tree.json", chart.export_model),
                       ("rules.txt", chart.export_rules)):
        dialogs.save_name = str(out / name)
        save()
        qtbot.waitUntil(lambda: (out / name).exists(), timeout=30000)
    dialogs.save_name = str(out / "work.prunella")
    assert window.save_as()
    checking.outer_folds.setValue(checking.outer_folds.minimum())
    checking.resamples.setValue(checking.resamples.minimum())
    dialogs.save_name = str(out / "report.pdf")
    checking.write_report()
    qtbot.waitUntil(lambda: not checking.running, timeout=120000)
    written = sorted(p.name for p in out.iterdir())
    assert written == ["chart.pdf", "report.pdf", "rules.txt", "tree.json", "work.prunella"]
    assert {n: mode_of(out / n) for n in written} == dict.fromkeys(written, 0o644)
    # Every save to the chosen folder was private while written (the chart preview's own
    # file, in the app's temporary folder, too).
    assert len(temporary_modes) >= 5 and set(temporary_modes) == {0o600}
    assert not dialogs.texts("warning") and not dialogs.texts("information")


def test_the_app_says_it_removed_a_leftover_temporary_file(demo, run, dialogs, qtbot,
                                                           tmp_path):
    window = demo
    run(window)
    leftover = _leftover(tmp_path, "work.prunella")
    dialogs.save_name = str(tmp_path / "work.prunella")
    assert window.save_as()
    assert not leftover.exists()
    shown = dialogs.texts("information")
    assert len(shown) == 1
    assert shown[0].startswith(f"Removed 1 temporary file left in {tmp_path} by an earlier save")
    assert leftover.name in shown[0] and "Nothing to do" in shown[0]  # with its advice
    # The report is written in the background: its note is shown by the window all the same.
    checking = window.panels["checking"]
    checking.outer_folds.setValue(checking.outer_folds.minimum())
    checking.resamples.setValue(checking.resamples.minimum())
    second = _leftover(tmp_path, "report.pdf")
    dialogs.save_name = str(tmp_path / "report.pdf")
    checking.write_report()
    qtbot.waitUntil(lambda: not checking.running, timeout=120000)
    assert (tmp_path / "report.pdf").exists() and not second.exists()
    shown = dialogs.texts("information")
    assert len(shown) == 2 and second.name in shown[1]
