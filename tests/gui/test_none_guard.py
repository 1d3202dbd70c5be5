"""The app outlives PySide6 6.12's lost references to None (Python before 3.12)."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import sys  # noqa: E402

import pytest  # noqa: E402
from PySide6.QtGui import QImage, QPainter  # noqa: E402

from gui import none_guard  # noqa: E402

pytestmark = pytest.mark.skipif(not none_guard.needed(), reason="None is immortal here")


def test_the_reserve_keeps_none_far_from_zero(qapp):
    assert sys.getrefcount(None) >= none_guard.LOW  # installed with the application
    image = QImage(8, 8, QImage.Format_ARGB32)
    painter = QPainter(image)
    before = sys.getrefcount(None)
    for _ in range(20_000):  # more painting than a bare interpreter's None could survive
        painter.save()
        painter.restore()
    painter.end()
    lost = before - sys.getrefcount(None)
    assert lost >= 0  # (0 once PySide6 is fixed)
    field = none_guard._count_field()
    assert field is not None  # CPython's layout: the count is the object's first field
    field.value -= sys.getrefcount(None) - none_guard.LOW + 10  # as if much painting had run
    assert sys.getrefcount(None) < none_guard.LOW
    assert none_guard.top_up() > 0
    assert sys.getrefcount(None) >= none_guard.FULL - 10
    assert none_guard.top_up() == 0  # nothing to do when the count is high


def test_painting_the_tree_many_times_does_not_abort(qtbot):
    """Panning a big tree repaints it hundreds of times; this used to end the interpreter."""
    from gui.widgets.tree_view import TreeView

    view = TreeView()
    qtbot.addWidget(view)
    view.resize(600, 400)
    view.show()
    qtbot.waitExposed(view)
    for _ in range(50):
        view.viewport().repaint()
        none_guard.top_up()
    assert sys.getrefcount(None) >= none_guard.LOW


def test_the_app_shuts_down_cleanly_after_much_painting(tmp_path):
    """A whole interpreter: paint a great deal, then exit; the references added are never
    given back, so shutting down does not meet 'deallocating None'."""
    import subprocess
    from pathlib import Path

    root = Path(__file__).resolve().parents[2]
    script = tmp_path / "paint.py"
    script.write_text(
        "from gui.app import make_application\n"
        "from gui import none_guard\n"
        "from PySide6.QtGui import QImage, QPainter\n"
        "app = make_application()\n"
        "image = QImage(8, 8, QImage.Format_ARGB32)\n"
        "p = QPainter(image)\n"
        "for _ in range(30):\n"
        "    for _ in range(20000):\n"
        "        p.save(); p.restore()\n"
        "    none_guard.top_up()\n"
        "p.end()\n"
        "print('painted')\n", encoding="utf-8")
    env = dict(os.environ, PYTHONPATH=str(root), QT_QPA_PLATFORM="offscreen")
    done = subprocess.run([sys.executable, str(script)], cwd=root, env=env,
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr[-2000:]
    assert "painted" in done.stdout and "deallocating None" not in done.stderr
