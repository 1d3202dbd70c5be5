"""This computer's identifier key (core/checking/identifier_key.py): made once, private,
written whole, and refused in one sentence when it is not a private regular file."""

from __future__ import annotations

import os
import stat

import pytest

from core.checking.identifier_key import (KEY_BYTES, first_identifier_key, identifier_key,
                                          key_file_path, key_id)
from core.errors import InputError
from tests.helpers import DEMO_CSV, prunella


@pytest.fixture
def key_path(tmp_path, monkeypatch):
    path = tmp_path / "config" / "prunella" / "identifier_key"
    monkeypatch.setenv("PRUNELLA_IDENTIFIER_KEY_FILE", str(path))
    return path


def test_the_suite_never_uses_the_home_folder():
    assert not str(key_file_path()).startswith(os.path.expanduser("~/.config"))


def test_default_place_follows_the_config_folder(tmp_path, monkeypatch):
    monkeypatch.delenv("PRUNELLA_IDENTIFIER_KEY_FILE")
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path))
    assert key_file_path() == tmp_path / "prunella" / "identifier_key"
    monkeypatch.delenv("XDG_CONFIG_HOME")
    assert key_file_path() == __import__("pathlib").Path.home() / ".config" / "prunella" / \
        "identifier_key"


def test_made_once_private_and_kept(key_path):
    assert identifier_key(create=False) is None and not key_path.exists()
    key = identifier_key(create=True)
    assert len(key) == KEY_BYTES and key_path.read_bytes() == key
    assert stat.S_IMODE(key_path.stat().st_mode) == 0o600
    assert stat.S_IMODE(key_path.parent.stat().st_mode) == 0o700
    assert identifier_key(create=True) == key == identifier_key()
    assert os.listdir(key_path.parent) == ["identifier_key"]  # no temporary left behind
    assert len(key_id(key)) == 12 and key.hex()[:12] != key_id(key)


@pytest.mark.parametrize("mode", [0o640, 0o604, 0o660, 0o644])
def test_a_key_others_can_read_is_refused(key_path, mode):
    identifier_key(create=True)
    key_path.chmod(mode)
    with pytest.raises(InputError) as refused:
        identifier_key()
    text = str(refused.value)
    assert str(key_path) in text and "chmod 600" in text and text.count(". ") == 0


def test_a_link_is_refused(key_path, tmp_path):
    target = tmp_path / "elsewhere"
    target.write_bytes(os.urandom(KEY_BYTES))
    target.chmod(0o600)
    key_path.parent.mkdir(parents=True)
    key_path.symlink_to(target)
    with pytest.raises(InputError, match="is a link, not a private regular file"):
        identifier_key(create=True)


def test_a_pipe_is_refused_without_waiting(key_path):
    key_path.parent.mkdir(parents=True)
    os.mkfifo(key_path, 0o600)
    with pytest.raises(InputError, match="is not a regular file, not a private regular"):
        identifier_key()


def test_a_damaged_key_is_refused(key_path):
    key_path.parent.mkdir(parents=True)
    key_path.write_bytes(b"short")
    key_path.chmod(0o600)
    with pytest.raises(InputError, match="does not hold a key of 32 bytes"):
        identifier_key()


def test_the_command_line_refuses_an_unsafe_key_with_exit_2(key_path, tmp_path):
    from tests.helpers import DEMO_CSV

    identifier_key(create=True)
    key_path.chmod(0o644)
    ran = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--patient-id", "patient_id",
                   "--model", tmp_path / "m.json")
    assert ran.returncode == 2
    assert "not a private regular file" in ran.stderr and "Traceback" not in ran.stderr
    assert not (tmp_path / "m.json").exists()


def test_a_new_key_is_said_once(key_path):
    assert first_identifier_key() == key_path  # made just now
    key = identifier_key()
    assert first_identifier_key() is None and identifier_key() == key  # kept, not said again


def test_the_first_tree_with_a_patient_number_says_the_key_was_made(key_path, tmp_path):
    """Growing makes the key; the user is told where it is and to back it up, once."""
    args = ("fit", DEMO_CSV, "--outcome", "admitted", "--patient-id", "patient_id",
            "--folds", "3", "--model", tmp_path / "m.json")
    first = prunella(*args)
    assert first.returncode == 0, first.stderr
    said = [line for line in first.stderr.splitlines() if "new identifier key" in line]
    assert len(said) == 1 and str(key_path) in said[0] and "back it up" in said[0], said
    again = prunella(*args)
    assert again.returncode == 0 and "new identifier key" not in again.stderr
    without = prunella("fit", DEMO_CSV, "--outcome", "admitted", "--folds", "3", "--model",
                       tmp_path / "n.json")
    assert "new identifier key" not in without.stderr


def test_the_new_key_is_told_now_and_never_recorded(key_path):
    """Where the key is kept is for the user at this run, not for the methods report or the
    model file (the notes that are recorded)."""
    from core.design import DesignSpec
    from core.sizing import CVSettings, DerivationRequest, derive
    from tests.helpers import demo_inputs

    table, dictionary, predictors = demo_inputs()
    request = DerivationRequest(DesignSpec("admitted", predictors[:4], patient_id="patient_id"),
                                cv=CVSettings(folds=3))
    first = derive(table, dictionary, request)
    assert len(first.told_once) == 1 and str(key_path) in first.told_once[0]
    assert not any("identifier key" in note for note in first.notes)
    assert "identifier key" not in first.model.to_json()
    assert derive(table, dictionary, request).told_once == ()
