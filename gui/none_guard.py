"""Keeping ``None`` alive under PySide6 6.12 on Python 3.10 and 3.11.

Each call of a PySide6 6.12.0 method that returns nothing (``setText``, ``update``, every
``QPainter`` drawing call ...) gives back one reference to ``None`` that it never took. From
Python 3.12 ``None`` is immortal and this is harmless; before it, ``None``'s reference count
falls by one per call, and after some thousands of repaints the interpreter aborts with
"deallocating None". The app therefore raises the count whenever it runs low (from a timer),
so it stays far from zero however long the app is used. The references are added to the
count itself, not held in a list, so that nothing gives them back when Python shuts down.
"""

from __future__ import annotations

import ctypes
import sys

LOW = 25_000_000  # top up when fewer references than this are left (a repaint of a big
FULL = 50_000_000  # tree costs thousands) ... back to this many
CHECK_MS = 1000

_timers: list = []


def needed() -> bool:
    """Whether this interpreter counts references to None at all (before Python 3.12)."""
    return sys.version_info < (3, 12)


def _count_field() -> ctypes.c_ssize_t | None:
    """None's reference count as a C field (CPython: the first field of every object), or
    None if this interpreter does not lay it out that way."""
    field = ctypes.c_ssize_t.from_address(id(None))
    return field if field.value == sys.getrefcount(None) - 1 else None


def top_up() -> int:
    """Add references to None when its count runs low; returns how many were added."""
    if not needed():
        return 0
    count = sys.getrefcount(None)
    if count >= LOW:
        return 0
    field = _count_field()
    if field is None:
        return 0
    missing = FULL - count
    field.value += missing
    return missing


def install(app) -> None:
    """Top up now and every second while the event loop runs (once per application)."""
    if not needed() or _timers:
        return
    from PySide6.QtCore import QTimer

    top_up()
    timer = QTimer(app)
    timer.setInterval(CHECK_MS)
    timer.timeout.connect(top_up)
    timer.start()
    _timers.append(timer)
