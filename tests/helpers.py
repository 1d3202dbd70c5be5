"""Small builders shared by the tests: tables in memory turned into AnalysisData, the
invented demo cohort's files, the command line run in this process or as a child process,
file fingerprints."""

from __future__ import annotations

import contextlib
import hashlib
import io
import os
import subprocess
import sys
import traceback
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

import numpy as np
import pandas as pd

from core.data import LoadedTable, read_table
from core.design import DesignSpec, prepare_analysis
from core.dictionary import DataDictionary, infer_dictionary

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_data"
# The invented demo cohort (sample_data/README.md): exercises the code, never a reference.
DEMO_CSV = SAMPLE / "breathless_ed.csv"
DEMO_XLSX = SAMPLE / "breathless_ed.xlsx"
DEMO_DICTIONARY = SAMPLE / "breathless_ed.dictionary.json"
# The largest tree of the demo's admission pruning sequence that A4 and US Letter hold at 9 pt
# with the present chart layout. Its 1-SE tree (7 outcome boxes) needs A3 or Tabloid until the
# layout holds more.
DEMO_A4_LEAVES = 4


@lru_cache(maxsize=None)
def demo_inputs() -> tuple[LoadedTable, DataDictionary, tuple[str, ...]]:
    """The demo CSV as read, its saved dictionary, and the dictionary's predictors.

    Read once per test session and shared: copy ``table.frame`` before changing it."""
    table = read_table(DEMO_CSV)
    dictionary = DataDictionary.load(DEMO_DICTIONARY)
    predictors = tuple(c.name for c in dictionary.columns if c.role == "predictor")
    return table, dictionary, predictors


# The demo's planted admission boxes, written out from sample_data/README.md (not taken from
# the generator, so a change there is caught), each with whether most of its visits are admitted.
DEMO_PLANTED_BOXES = {
    "low SpO2, aged 70+ or triage 1-2": True,
    "low SpO2, under 70, triage 3-5": False,
    "fast breathing, ambulance or transfer": True,
    "fast breathing, walked in or GP referral": False,
    "slower breathing, recorded CRP above 100": True,
    "slower breathing, the rest": False,
}


def demo_planted_box(frame: pd.DataFrame) -> pd.Series:
    """The planted admission box (a DEMO_PLANTED_BOXES key) of each visit of the demo table."""
    low_spo2 = frame["spo2"] <= 91
    fast = frame["resp_rate"] > 24
    brought = frame["arrival_mode"].isin(["ambulance", "inter-hospital transfer"])
    crp = pd.to_numeric(frame["crp"], errors="coerce")  # blank = not recorded: never high
    names = list(DEMO_PLANTED_BOXES)
    box = np.select([low_spo2 & ((frame["age"] >= 70) | (frame["triage_level"] <= 2)), low_spo2,
                     fast & brought, fast, crp > 100], names[:5], default=names[5])
    return pd.Series(box, index=frame.index)


def run_prunella(*args, cwd=ROOT, timeout: float = 300) -> subprocess.CompletedProcess:
    """``python -m gui ARGS`` as a user would run it: a child process with this checkout on
    PYTHONPATH, output captured as text. ``timeout`` only stops a hung child. Slow (the child
    imports everything again): keep it for a few cases, use :func:`prunella` for the rest."""
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.run([sys.executable, "-m", "gui", *map(str, args)], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=timeout)


@dataclass(frozen=True)
class Ran:
    """What a command printed and the exit status it gave (as a child process's result)."""

    args: tuple[str, ...]
    returncode: int
    stdout: str
    stderr: str


def prunella(*args, cwd=None) -> Ran:
    """``prunella ARGS`` run in this process through ``core.cli.main``, with its output
    captured and its exit status (argparse's exits included) returned. A traceback must never
    reach the user: any exception that escapes the command line fails the calling test."""
    from core.cli import main

    argv = [str(a) for a in args]
    out, err = io.StringIO(), io.StringIO()
    status, escaped = 0, None
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err), _inside(cwd):
        try:
            status = main(argv)
        except SystemExit as exit_:  # argparse: --help, --version and usage errors
            status = exit_.code if isinstance(exit_.code, int) else 2
        except Exception:  # noqa: BLE001 - what a user would see as a traceback
            escaped = traceback.format_exc()
    if escaped is not None:
        raise AssertionError(f"prunella {' '.join(argv)} let a traceback escape:\n{escaped}")
    return Ran(tuple(argv), int(status or 0), out.getvalue(), err.getvalue())


@contextlib.contextmanager
def _inside(folder):
    """Run in ``folder`` (relative paths are the user's), then come back."""
    if folder is None:
        yield
        return
    before = os.getcwd()
    os.chdir(folder)
    try:
        yield
    finally:
        os.chdir(before)


def sha256_of(path) -> str:
    """Hex SHA-256 of a file's bytes (to show an input file was not changed)."""
    return hashlib.sha256(Path(path).read_bytes()).hexdigest()


def analysis_from_arrays(X: np.ndarray, y: np.ndarray, task: str, names=None, **design):
    """AnalysisData for a numeric matrix and an outcome (classes as strings c0, c1, ...)."""
    names = names or [f"x{j}" for j in range(X.shape[1])]
    frame = pd.DataFrame(X, columns=names)
    frame["outcome"] = y if task == "regression" else [f"c{int(v)}" for v in y]
    dictionary, _ = infer_dictionary(frame)
    for name in names:
        dictionary = dictionary.with_column(name, kind="numeric", role="predictor", levels=())
    if task == "classification":
        levels = tuple(sorted(frame["outcome"].unique()))
        dictionary = dictionary.with_column("outcome", role="outcome", kind="nominal" if len(levels) > 2 else "binary",
                                            levels=levels)
    spec = DesignSpec(outcome="outcome", predictors=tuple(names), task=task, **design)
    return prepare_analysis(frame, dictionary, spec), frame, dictionary
