"""Every save dialog in the app starts at a name beside the data and refuses to write over an
input file (the data, or the project when another file is being saved)."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402
from PySide6.QtWidgets import QFileDialog  # noqa: E402

from core.errors import InputError  # noqa: E402
from core.safe_files import names_an_input, refuse_overwrite  # noqa: E402


def test_names_an_input_by_any_path(tmp_path):
    data = tmp_path / "cohort.csv"
    data.write_text("a\n1\n", encoding="utf-8")
    assert names_an_input(str(tmp_path / "." / "cohort.csv"), None, str(data))
    assert not names_an_input(str(tmp_path / "other.csv"), str(data))
    assert not names_an_input(str(tmp_path / "gone.csv"), str(tmp_path / "gone.csv"))  # no file
    with pytest.raises(InputError, match="is an input file"):
        refuse_overwrite(str(data), str(data))
    refuse_overwrite(None, str(data))


@pytest.fixture
def starts(monkeypatch, dialogs):
    """The start name each save dialog offers, answered with the test's save name."""
    offered = []

    def ask(_parent, _caption, start, _filter, *args, **kwargs):
        offered.append(start)
        return dialogs.save_name, ""

    monkeypatch.setattr(QFileDialog, "getSaveFileName", staticmethod(ask))
    return offered


def _saves(window):
    chart, checking = window.panels["chart"], window.panels["checking"]
    return {
        "dictionary": window.panels["data"].save_dictionary,
        "model": chart.export_model,
        "rules": chart.export_rules,
        "scored": chart.export_scored,
        "report": checking.write_report,
        "project": window.save_as,
    }


def test_every_save_starts_beside_the_data_and_never_writes_over_it(demo, run, dialogs,
                                                                     starts, tmp_path):
    window = demo
    run(window)
    data = window.session.table.provenance.path
    stem = data[:-len(".csv")]
    before = open(data, "rb").read()
    dialogs.save_name = data
    # Saves that keep the name as given (the dictionary) or add a suffix the data file has.
    for name in ("dictionary", "scored"):
        dialogs.messages.clear()
        _saves(window)[name]()
        assert any("input files" in t for t in dialogs.texts("warning")), name
    assert open(data, "rb").read() == before
    dialogs.save_name = str(tmp_path / "elsewhere")
    for name, save in _saves(window).items():
        save()
    not_beside = [start for start in starts if not start.startswith(stem)]
    assert not not_beside, not_beside
    assert starts[-1] == stem + ".prunella"
    assert [s[len(stem):] for s in starts[2:]] == [
        ".dictionary.json", "-admitted.json", "-admitted.txt", "-admitted.csv",
        "-admitted-report.pdf", ".prunella"]


def test_only_the_project_save_may_write_over_the_project(demo, run, dialogs, starts, tmp_path):
    window = demo
    run(window)
    project = tmp_path / "work.prunella"
    dialogs.save_name = str(project)
    assert window.save_as()
    before = project.read_bytes()
    dialogs.messages.clear()
    window.panels["data"].save_dictionary()  # a dictionary may take any name: not this one
    assert any("input files" in t for t in dialogs.texts("warning"))
    assert project.read_bytes() == before
    dialogs.messages.clear()
    assert window.save_as()  # the project itself, saved again
    assert not dialogs.texts("warning")
    assert starts[-1] == str(project)
