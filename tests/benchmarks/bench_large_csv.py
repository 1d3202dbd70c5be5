"""Loading a large spreadsheet and inferring its data dictionary (a benchmark, not a test).

Run:  .venv/bin/python tests/benchmarks/bench_large_csv.py [--rows N] [--keep]

Writes an invented 1,000,000-row × 50-column CSV to /tmp (about 255 MB; kept between runs
with --keep), then, in fresh child processes so that memory figures are their own, reads it
with ``core.data.table.read_table`` and infers its dictionary with ``infer_dictionary``, printing
the time of each step and the process's peak resident size (getrusage), and then, in a second
run, the peak of Python allocations (tracemalloc, which also sees NumPy's). Columns mix what clinical files
hold: whole and decimal numbers, gaps, a -99 code, lab limits like "<5", yes/no in several
spellings, categories, dates, a record number and a free-text column.
"""

from __future__ import annotations

import argparse
import os
import resource
import subprocess
import sys
import time
import tracemalloc
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))


def write_csv(path: Path, rows: int, seed: int = 0) -> None:
    """The invented table, written in blocks so generating it stays small."""
    import pandas as pd

    rng = np.random.default_rng(seed)
    block = 100_000
    with open(path, "w", encoding="utf-8", newline="") as out:
        for start in range(0, rows, block):
            n = min(block, rows - start)
            columns = {"record": np.arange(start, start + n) + 1_000_000,
                       "patient": [f"P{v:07d}" for v in rng.integers(0, rows // 2, n)],
                       "arrival": pd.Timestamp("2020-01-01")
                       + pd.to_timedelta(rng.integers(0, 1800, n), unit="D")}
            for j in range(22):  # decimal measurements, some gaps
                values = np.round(rng.normal(50 + j, 10, n), 1).astype(object)
                values[rng.random(n) < 0.05] = ""
                columns[f"measure_{j:02d}"] = values
            for j in range(12):  # whole numbers, one with a -99 code
                values = rng.integers(0, 200, n).astype(object)
                if j == 0:
                    values[rng.random(n) < 0.01] = -99
                columns[f"count_{j:02d}"] = values
            lab = np.round(rng.gamma(2, 20, n), 1).astype(object)
            lab[rng.random(n) < 0.02] = "<5"
            lab[rng.random(n) < 0.01] = ">200"
            columns["crp"] = lab
            for j in range(5):
                columns[f"group_{j}"] = rng.choice(["ambulance", "walked in", "GP referral",
                                                    "transfer"], n)
            for j in range(4):
                columns[f"flag_{j}"] = rng.choice(["yes", "no", "Yes", "N", "TRUE"], n)
            columns["triage_level"] = rng.integers(1, 6, n)
            columns["ward"] = rng.choice([f"Ward {k}" for k in range(30)], n)
            columns["comment"] = [f"note {v}" for v in rng.integers(0, 10**6, n)]
            frame = pd.DataFrame(columns)
            frame.to_csv(out, index=False, header=start == 0, lineterminator="\n")


def measure(path: Path, trace: bool) -> None:
    """Read and infer in this (fresh) process; print time and peak memory of each step.

    With ``trace``, Python allocations are traced (tracemalloc slows object-heavy work a lot,
    so the times of that run are not the ones to quote)."""
    from core.data import read_table
    from core.dictionary import infer_dictionary

    if trace:
        tracemalloc.start()
    t0, c0 = time.perf_counter(), time.process_time()
    table = read_table(path)
    t1, c1 = time.perf_counter(), time.process_time()
    read_peak = tracemalloc.get_traced_memory()[1] if trace else 0
    rss_read = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # KiB on Linux
    if trace:
        tracemalloc.reset_peak()
    dictionary, notes = infer_dictionary(table.frame, table.row_numbers)
    t2, c2 = time.perf_counter(), time.process_time()
    infer_peak = tracemalloc.get_traced_memory()[1] if trace else 0
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    if trace:
        print(f"peak Python memory   read_table {read_peak / 2**20:.0f} MB, "
              f"infer_dictionary {infer_peak / 2**20:.0f} MB (tracemalloc)")
        return
    frame_mb = table.frame.memory_usage(deep=True).sum() / 2**20
    print(f"rows × columns       {table.frame.shape[0]:,} × {table.frame.shape[1]}")
    print(f"read_table           {t1 - t0:6.1f} s wall, {c1 - c0:6.1f} s CPU; "
          f"process peak so far {rss_read:.0f} MB")
    print(f"infer_dictionary     {t2 - t1:6.1f} s wall, {c2 - c1:6.1f} s CPU; "
          f"process peak {rss:.0f} MB")
    print(f"frame in memory      {frame_mb:.0f} MB (pandas, deep)")
    kinds: dict[str, int] = {}
    for spec in dictionary.columns:
        kinds[spec.kind] = kinds.get(spec.kind, 0) + 1
    print("kinds                " + ", ".join(f"{k} {v}" for k, v in sorted(kinds.items())))
    print(f"notes                {len(notes)}")


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=1_000_000)
    parser.add_argument("--keep", action="store_true", help="keep the CSV for the next run")
    parser.add_argument("--measure", help=argparse.SUPPRESS)  # the child process
    parser.add_argument("--trace", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.measure:
        measure(Path(args.measure), args.trace)
        return 0
    path = Path("/tmp") / f"prunella_bench_{args.rows}x50.csv"
    if not path.exists():
        start = time.perf_counter()
        write_csv(path, args.rows)
        print(f"wrote {path} ({path.stat().st_size / 2**20:.0f} MB) in "
              f"{time.perf_counter() - start:.0f} s")
    else:
        print(f"using {path} ({path.stat().st_size / 2**20:.0f} MB)")
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    try:
        for extra in ([], ["--trace"]):  # timing and process peak; then traced allocations
            subprocess.run([sys.executable, __file__, "--measure", str(path)] + extra,
                           check=True, env=env)
    finally:
        if not args.keep:
            path.unlink(missing_ok=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
