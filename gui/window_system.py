"""Whether this computer can open a window at all, asked before Qt is started.

On a minimal Linux without a desktop, Qt's X11 plugin ("xcb") cannot load until a few system
libraries are installed, and Qt then aborts with a page of plugin names. Loading the plugin
ourselves first (the dynamic loader names the first library it misses) lets the app say in
one sentence what is wrong and which Debian/Ubuntu package to install. Whatever else stops Qt
from starting (a plugin it does not have, one that fails later) is caught as Qt gives up and
said in one sentence too.
"""

from __future__ import annotations

import ctypes
import os
import re
import sys
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Callable, Mapping

from core.messages import say

# Every library the X11 plugin needs beyond a basic system, as Debian/Ubuntu packages (the
# README lists the same line).
XCB_PACKAGES = ("libxcb-cursor0", "libxcb-icccm4", "libxcb-image0", "libxcb-keysyms1",
                "libxcb-randr0", "libxcb-render-util0", "libxcb-shape0", "libxcb-xkb1",
                "libxkbcommon-x11-0", "libx11-xcb1", "libegl1", "libgl1", "libfontconfig1",
                "libdbus-1-3")
_MISSING = re.compile(r"(lib[^\s:/]+\.so(?:\.\d+)*)\s*:\s*cannot open shared object file")


def debian_package(soname: str) -> str:
    """The Debian/Ubuntu package that ships a shared library, by Debian's naming rule for
    library packages (Debian Policy 8.1: the soname's base in lower case, then its version,
    with a hyphen between when the base ends in a digit): libxcb-icccm.so.4 → libxcb-icccm4,
    libxkbcommon-x11.so.0 → libxkbcommon-x11-0."""
    base, _, version = soname.partition(".so")
    version = version.lstrip(".").split(".")[0]
    base = base.lower()
    if not version:
        return base
    return f"{base}-{version}" if base[-1].isdigit() else f"{base}{version}"


def _uses_x11(environ: Mapping[str, str]) -> bool:
    """Whether Qt will pick its X11 plugin (the default on Linux, unless told otherwise or in a
    Wayland session)."""
    chosen = environ.get("QT_QPA_PLATFORM", "").split(";")[0].split(":")[0].strip()
    if chosen:
        return chosen == "xcb"
    return not (environ.get("XDG_SESSION_TYPE") == "wayland" and environ.get("WAYLAND_DISPLAY"))


def _x11_plugin() -> Path:
    from PySide6.QtCore import QLibraryInfo  # no window is made: the core library only

    return Path(QLibraryInfo.path(QLibraryInfo.LibraryPath.PluginsPath)) / "platforms" / "libqxcb.so"


def why_no_window(environ: Mapping[str, str] | None = None, platform: str | None = None,
                  plugin: Path | None = None,
                  load: Callable[[str], object] = ctypes.CDLL) -> str | None:
    """One sentence saying why the app cannot open a window here, with the likely fix; None
    when it can (or when this cannot be known before Qt starts, as on Windows and macOS)."""
    environ = os.environ if environ is None else environ
    platform = sys.platform if platform is None else platform
    if not platform.startswith("linux") or not _uses_x11(environ):
        return None
    if not environ.get("DISPLAY"):
        return say("app.no_display")
    plugin = _x11_plugin() if plugin is None else plugin
    if not plugin.is_file():
        return None  # a Qt built another way: let Qt say what it finds
    try:
        load(str(plugin))
    except OSError as exc:
        missing = _MISSING.search(str(exc))
        packages = " ".join(XCB_PACKAGES)
        if missing is None:
            return say("app.plugin_fails", detail=str(exc), packages=packages)
        return say("app.missing_library", library=missing.group(1),
                   package=debian_package(missing.group(1)), packages=packages)
    if not _display_answers(environ["DISPLAY"], load):
        return say("app.display_silent", display=environ["DISPLAY"])
    return None


def _display_answers(display: str, load: Callable[[str], object]) -> bool:
    """Whether the X server named by ``display`` accepts a connection (asked through libxcb,
    as Qt will; True when libxcb cannot be asked, so that Qt has the last word)."""
    try:
        xcb = load("libxcb.so.1")
        connect, has_error, disconnect = (xcb.xcb_connect, xcb.xcb_connection_has_error,
                                          xcb.xcb_disconnect)
    except (OSError, AttributeError):
        return True
    connect.restype = ctypes.c_void_p
    connect.argtypes = [ctypes.c_char_p, ctypes.c_void_p]
    has_error.argtypes = disconnect.argtypes = [ctypes.c_void_p]
    connection = connect(display.encode(), None)
    answered = has_error(connection) == 0
    disconnect(connection)
    return answered


_NOT_FOUND = re.compile(r'Could not find the Qt platform plugin "([^"]*)"')
_AVAILABLE = re.compile(r"Available platform plugins are:\s*([^\n]*?)\.?\s*$", re.MULTILINE)


def why_qt_aborted(messages: list[str]) -> str:
    """One sentence from what Qt said before it gave up starting (a plugin it does not have,
    or one that does not load), with the likely fix."""
    said = "\n".join(messages)
    wanted, available = _NOT_FOUND.search(said), _AVAILABLE.search(said)
    if wanted is not None and wanted.group(1):
        names = available.group(1).strip() if available else "xcb, wayland, offscreen"
        return say("app.unknown_platform", name=wanted.group(1)[:40], available=names)
    last = next((m for m in reversed(messages) if m.strip()), "no reason given")
    detail = last.strip().splitlines()[0][:200].rstrip(".")
    return say("app.plugin_fails", detail=detail, packages=" ".join(XCB_PACKAGES))


@contextmanager
def sentence_if_qt_aborts(stream=None) -> Iterator[None]:
    """While inside (the QApplication being made), a Qt failure to start that would abort the
    process with a page of plugin names is said in one sentence instead, and the process ends
    with exit status 2. Qt's other messages meanwhile are passed on as Qt would print them."""
    from PySide6.QtCore import QtMsgType, qInstallMessageHandler

    stream = sys.stderr if stream is None else stream
    heard: list[str] = []

    def handler(kind, _context, text) -> None:
        heard.append(text)
        if kind == QtMsgType.QtFatalMsg:  # Qt aborts as soon as this returns
            stream.write(why_qt_aborted(heard) + "\n")
            stream.flush()
            os._exit(2)

    earlier = qInstallMessageHandler(handler)
    try:
        yield
    finally:
        qInstallMessageHandler(earlier)
        for text in heard:  # it started after all: Qt's warnings as they would have been
            stream.write(text + "\n")
