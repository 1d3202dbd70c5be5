"""core needs no Qt, and a command that does little starts without the statistics libraries.

Both are checked in a fresh interpreter (a child process), the only place where what gets
imported can be seen: with PySide6 and shiboken6 made unimportable, a fit with its chart and a
report run through the command line in that process; and ``prunella --help`` or a refused
input loads none of scikit-learn, SciPy, matplotlib and reportlab.
"""

from __future__ import annotations

import subprocess
import sys

from tests.helpers import DEMO_CSV, DEMO_DICTIONARY, ROOT

_NO_QT = '''
import importlib.abc, sys

class NoQt(importlib.abc.MetaPathFinder):
    def find_spec(self, name, path=None, target=None):
        if name.split(".")[0] in ("PySide6", "shiboken6"):
            raise ImportError(f"Qt is not available here ({name})")
        return None

sys.meta_path.insert(0, NoQt())
try:
    import PySide6  # noqa: F401
except ImportError:
    pass
else:
    raise SystemExit("the blocker let PySide6 in")
'''


def _child(code: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True,
                          timeout=300)


def test_a_fit_its_chart_and_a_report_run_with_qt_unimportable(tmp_path):
    model, chart, report = tmp_path / "m.json", tmp_path / "chart.pdf", tmp_path / "report.pdf"
    code = _NO_QT + f'''
from core.cli import main
assert main(["fit", {str(DEMO_CSV)!r}, "--outcome", "admitted", "--dictionary",
             {str(DEMO_DICTIONARY)!r}, "--folds", "3", "--model", {str(model)!r},
             "--chart", {str(chart)!r}, "--paper", "a3", "--quiet"]) == 0
assert main(["report", {str(model)!r}, {str(DEMO_CSV)!r}, "--no-nested", "--bootstrap", "2",
             "--out", {str(report)!r}]) == 0
loaded = sorted(m for m in sys.modules if m.split(".")[0] in ("PySide6", "shiboken6"))
assert not loaded, loaded
print("without Qt")
'''
    done = _child(code)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip().endswith("without Qt")
    for path in (model, chart, report):
        assert path.stat().st_size > 1000, path
    assert chart.read_bytes().startswith(b"%PDF") and report.read_bytes().startswith(b"%PDF")


def test_help_and_a_refused_input_load_no_statistics_or_drawing_library(tmp_path):
    missing = tmp_path / "absent.csv"
    data = tmp_path / "data.csv"
    data.write_text("x,y\n" + "".join(f"{i},{'yes' if i % 2 else 'no'}\n" for i in range(30)),
                    encoding="utf-8")
    code = f'''
import contextlib, io, sys
from core.cli import main

runs = [["--help"], ["fit", "--help"],
        ["fit", {str(missing)!r}, "--outcome", "y", "--model", {str(tmp_path / "m.json")!r}],
        ["fit", {str(data)!r}, "--outcome", "nope", "--model", {str(tmp_path / "m.json")!r}]]
for argv in runs:
    with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
        try:
            status = main(argv)
        except SystemExit as exit_:
            status = exit_.code
    assert status in (0, 2), (argv, status)
heavy = sorted({{m.split(".")[0] for m in sys.modules}}
               & {{"sklearn", "scipy", "matplotlib", "reportlab"}})
print(heavy)
'''
    done = _child(code)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "[]", done.stdout
