"""The Qt binding must not lose references to None.

PySide6 6.12.0 gives back one reference to None per call of a method that returns nothing;
before Python 3.12 (where None became immortal) the interpreter then aborts after some
thousands of repaints ("deallocating None"). pyproject.toml keeps PySide6 below 6.12; this
test fails loudly if an upgrade brings the bug back.
"""

from __future__ import annotations

import os
import sys

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402
from PySide6.QtGui import QImage, QPainter  # noqa: E402
from PySide6.QtWidgets import QLabel  # noqa: E402


@pytest.mark.skipif(sys.version_info >= (3, 12),
                    reason="None is immortal from Python 3.12: its reference count never changes, "
                           "so the check could not fail there")
def test_void_calls_keep_the_reference_count_of_none(qapp):
    label = QLabel()
    image = QImage(64, 64, QImage.Format.Format_ARGB32)
    before = sys.getrefcount(None)
    for _ in range(2000):
        label.setText("x")
        painter = QPainter(image)
        painter.drawLine(0, 0, 10, 10)
        painter.end()
    # A few references may come and go with Python's own bookkeeping; thousands must not.
    assert abs(sys.getrefcount(None) - before) < 100
