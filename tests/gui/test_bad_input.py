"""Broken files give one clear message in the app, never a crash, and the app stays usable."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402


@pytest.mark.parametrize("name, content, words", [
    ("empty.csv", b"", "empty"),
    ("header.csv", b"a,b,c\n", "no rows"),
    ("binary.csv", bytes(range(256)) * 40, "binary"),
    ("book.xlsx", b"this is not a workbook at all", "is a text file, not an Excel workbook"),
    ("zipped.csv", b"PK\x03\x04" + b"\x00" * 200, "zip archive, not a spreadsheet"),
])
def test_broken_spreadsheet_shows_a_message(window, qtbot, dialogs, tmp_path, name, content, words):
    path = tmp_path / name
    path.write_bytes(content)
    window.open_any(str(path))
    qtbot.waitUntil(lambda: bool(dialogs.texts("warning")), timeout=10000)
    assert any(words in t for t in dialogs.texts("warning")), dialogs.texts("warning")
    assert path.read_bytes() == content  # never modified
    assert window.session.table is None
    panel = window.panels["data"]
    qtbot.waitUntil(lambda: panel.open_button.isEnabled(), timeout=5000)  # ready for another


def test_after_a_broken_file_the_next_one_opens(window, qtbot, dialogs, tmp_path):
    path = tmp_path / "empty.csv"
    path.write_bytes(b"")
    window.open_any(str(path))
    qtbot.waitUntil(lambda: bool(dialogs.texts("warning")), timeout=10000)
    window.demo_action.trigger()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=15000)
    assert window.session.table.provenance.n_rows == 3950


@pytest.mark.parametrize("content, words", [
    ("{{{", "not valid JSON"),
    ('{"format": "prunella-project/7"}', "newer Prunella"),
    ('{"format": "something-else/1"}', "not a Prunella project"),
    ('{"format": "prunella-project/1", "data": {"path": ""}}', "damaged"),
    ('{"format": "prunella-project/1", "chart": ' + "[" * 50000 + "]" * 50000 + "}",
     "nested too deeply"),
    ('{"format": "prunella-project/1", "chart": {"min_text": NaN}}', "NaN is not allowed"),
    ('{"format": "prunella-project/1", "size": true}', "damaged at size"),
])
def test_broken_project_shows_a_message(window, dialogs, tmp_path, content, words):
    path = tmp_path / "bad.prunella"
    path.write_text(content, encoding="utf-8")
    window.open_any(str(path))
    assert any(words in t for t in dialogs.texts("warning")), dialogs.texts("warning")
    assert "What to do:" in dialogs.texts("warning")[-1]  # the catalogue's advice beside it
    assert window.session.table is None and window.isVisible()


def test_broken_dictionary_shows_a_message(demo, dialogs, tmp_path, qtbot):
    window = demo
    before = window.session.dictionary
    bad = tmp_path / "bad.dictionary.json"
    bad.write_text('{"format": "prunella-dictionary/1", "columns": [{"role": "x"}]}',
                   encoding="utf-8")
    window.panels["data"].load_dictionary_file(str(bad))  # read in the background
    qtbot.waitUntil(lambda: any("no 'name'" in t for t in dialogs.texts("warning")), timeout=15000)
    assert window.session.dictionary == before


def test_refused_dictionary_edit_shows_core_message(demo, dialogs):
    window = demo
    model = window.panels["data"].dictionary_model
    index = model.index(4, 1)  # the 'age' row, its use
    assert not model.setData(index, "wizard")
    assert any("role 'wizard'" in t for t in dialogs.texts("warning"))


def test_run_that_core_refuses_shows_its_message(demo, qtbot, run, dialogs):
    window = demo
    window.panels["size"].min_leaf.setValue(3000)  # more than half the rows
    run(window)
    assert any("too few" in t for t in dialogs.texts("warning")), dialogs.texts("warning")
    assert window.session.model is None
    assert window.panels["size"].run_button.isEnabled()


def test_spin_boxes_take_their_limits_from_core_s_table(window):
    from core.option_limits import spin_range

    size, checking = window.panels["size"], window.panels["checking"]
    assert (size.min_leaf.minimum(), size.min_leaf.maximum()) == spin_range("min_leaf")
    assert (size.folds.minimum(), size.folds.maximum()) == spin_range("folds")
    assert (size.repeats.minimum(), size.repeats.maximum()) == spin_range("repeats")
    assert size.max_depth.maximum() == spin_range("max_depth")[1]  # 0 is "no limit"
    assert checking.outer_folds.maximum() == spin_range("outer_folds")[1]


def test_a_key_file_others_can_read_stops_the_run_with_one_sentence(demo, qtbot, run, dialogs,
                                                                     tmp_path, monkeypatch):
    """The identifier key (core/checking/identifier_key.py) must be private: a run with a
    patient identifier is refused in one sentence, and the app stays usable."""
    from core.checking.identifier_key import identifier_key

    key = tmp_path / "identifier_key"
    monkeypatch.setenv("PRUNELLA_IDENTIFIER_KEY_FILE", str(key))
    identifier_key(create=True)
    key.chmod(0o644)
    window = demo
    assert window.session.design.patient_id  # the demo's patients have repeat visits
    run(window)
    said = [t for t in dialogs.texts("warning") if "not a private regular file" in t]
    assert len(said) == 1 and str(key) in said[0], dialogs.texts("warning")
    assert window.session.model is None and window.panels["size"].run_button.isEnabled()
    key.chmod(0o600)
    run(window)
    assert window.session.model is not None
