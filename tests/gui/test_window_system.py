"""When the app cannot open a window (a minimal Linux without the X11 libraries Qt needs, or
no display at all) it says so in one sentence with the likely fix, instead of Qt's abort.

Tested without a broken machine: the plugin loader is replaced by one that fails as the
dynamic loader does, and the real entry point is started with no display."""

from __future__ import annotations

import ctypes
import os
import subprocess
import sys
from pathlib import Path

import pytest

from gui.window_system import XCB_PACKAGES, _x11_plugin, debian_package, why_no_window

X11 = {"DISPLAY": ":0"}


def _missing(soname: str):
    def load(_path: str):
        raise OSError(f"{soname}: cannot open shared object file: No such file or directory")
    return load


def test_library_names_become_debian_package_names():
    # Debian Policy 8.1 (library package names), checked against the packages' real names.
    assert debian_package("libxcb-icccm.so.4") == "libxcb-icccm4"
    assert debian_package("libxcb-cursor.so.0") == "libxcb-cursor0"
    assert debian_package("libxkbcommon-x11.so.0") == "libxkbcommon-x11-0"
    assert debian_package("libX11-xcb.so.1") == "libx11-xcb1"
    assert debian_package("libdbus-1.so.3") == "libdbus-1-3"
    assert debian_package("libEGL.so.1") == "libegl1"


def test_a_missing_library_is_named_with_its_package(tmp_path):
    plugin = tmp_path / "libqxcb.so"
    plugin.write_bytes(b"")
    text = why_no_window(X11, "linux", plugin, load=_missing("libxcb-cursor.so.0"))
    assert text.startswith("Prunella cannot open a window")
    assert "libxcb-cursor.so.0" in text and "sudo apt-get install libxcb-cursor0" in text
    assert all(name in text for name in XCB_PACKAGES)
    assert text.count(". ") == 0 and text.endswith(").")  # one sentence
    # A plugin that loads: nothing to say.
    assert why_no_window(X11, "linux", plugin, load=lambda _p: None) is None


def test_no_display_and_other_systems():
    assert "no display is set" in why_no_window({}, "linux", Path("unused"))
    assert why_no_window({}, "win32") is None and why_no_window({}, "darwin") is None
    # Qt told to use another plugin (the tests' offscreen one, or Wayland): Qt decides.
    assert why_no_window({"QT_QPA_PLATFORM": "offscreen"}, "linux") is None
    assert why_no_window({"XDG_SESSION_TYPE": "wayland", "WAYLAND_DISPLAY": "wayland-0"},
                         "linux") is None


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="the X11 plugin is Linux's")
def test_the_real_plugin_agrees_with_the_dynamic_loader():
    """On this machine: the sentence is given exactly when the real plugin does not load."""
    plugin = _x11_plugin()
    try:
        ctypes.CDLL(str(plugin))
        loads = True
    except OSError:
        loads = False
    # The real plugin, but no X server asked (this test is about the libraries).
    text = why_no_window(X11, "linux",
                         load=lambda p: ctypes.CDLL(p) if p.endswith("libqxcb.so") else None)
    assert (text is None) == loads
    if text is not None:
        assert "sudo apt-get install" in text


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="DISPLAY is X11's")
def test_the_app_started_without_a_display_says_so_and_exits_2():
    env = {k: v for k, v in os.environ.items()
           if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM", "XDG_SESSION_TYPE")}
    done = subprocess.run([sys.executable, "-m", "gui"], env=env, capture_output=True,
                          text=True, timeout=60, cwd=Path(__file__).resolve().parents[2])
    assert done.returncode == 2
    assert done.stderr.strip().startswith("Prunella cannot open a window: no display is set")
    assert "qt.qpa" not in done.stderr and "Traceback" not in done.stderr


def test_a_display_that_does_not_answer_is_named():
    from gui.window_system import _display_answers

    try:
        ctypes.CDLL("libxcb.so.1")
    except OSError:
        pytest.skip("libxcb is not installed here (the plugin check names it first)")
    assert not _display_answers(":4321", ctypes.CDLL)  # no X server has that number
    text = why_no_window({"DISPLAY": ":4321"}, "linux", _x11_plugin(),
                         load=lambda p: None if p.endswith("libqxcb.so") else ctypes.CDLL(p))
    assert text == ("Prunella cannot open a window: the display :4321 does not answer; start "
                    "it from a desktop session, or set DISPLAY to a running one.")


def test_a_display_plugin_qt_does_not_have_is_said_in_one_sentence_and_exits_2():
    """QT_QPA_PLATFORM naming a plugin Qt lacks made Qt abort (status 134) with a page of
    plugin names; the real entry point now says it in one sentence with the fix."""
    env = {**os.environ, "QT_QPA_PLATFORM": "bogus"}
    done = subprocess.run([sys.executable, "-m", "gui"], env=env, capture_output=True,
                          text=True, timeout=60, cwd=Path(__file__).resolve().parents[2])
    assert done.returncode == 2
    text = done.stderr.strip()
    assert text.startswith("Prunella cannot open a window: Qt has no display plugin called "
                           "“bogus”")
    assert "unset QT_QPA_PLATFORM" in text and "offscreen" in text and "xcb" in text
    assert len(text.splitlines()) == 1 and text.endswith(".")
    assert "Traceback" not in done.stderr and "Reinstalling" not in done.stderr
    assert done.stdout == ""


def test_what_qt_says_as_it_gives_up_becomes_one_sentence():
    from gui.window_system import why_qt_aborted

    unknown = why_qt_aborted(['Could not find the Qt platform plugin "wayland-x" in ""',
                              "This application failed to start because no Qt platform plugin "
                              "could be initialized.\n\nAvailable platform plugins are: "
                              "offscreen, xcb.\n"])
    assert "no display plugin called “wayland-x”" in unknown
    assert unknown.endswith("name one Qt has: offscreen, xcb.")
    other = why_qt_aborted(['Could not load the Qt platform plugin "xcb" in "" even though it '
                            "was found."])
    assert other.startswith("Prunella cannot open a window: Qt's display plugin does not load "
                            "(Could not load the Qt platform plugin")
    assert "sudo apt-get install " + " ".join(XCB_PACKAGES) in other


def test_qt_options_keep_their_values():
    from gui.app import parse_arguments

    args, qt_args = parse_arguments(["-platform", "offscreen", "--demo"])
    assert args.demo and args.file is None and qt_args == ["-platform", "offscreen"]
    args, qt_args = parse_arguments(["cohort.csv", "-style", "fusion", "-reverse"])
    assert args.file == "cohort.csv" and qt_args == ["-style", "fusion", "-reverse"]
