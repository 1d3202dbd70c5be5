"""Large cohorts: coarsening, the floor, a Dask cluster and peak memory (a benchmark, not a test).

Run:  .venv/bin/python tests/benchmarks/bench_large_cohorts.py [--sizes 100000,1000000]
          [--coarsen 256] [--memory-rows 1000000] [--memory-coarsen N] [--skip-cv]

Part 1, for each size, on invented data with 30 continuous measurements (2% not recorded) and
a two-class outcome, minimum leaf 0.5% of rows, 10-fold CV, every run with both cores unless
said, printed side by side:
  plain       Prunella's whole-path CV on the measurements as they are,
  coarsened   the same with --coarsen N (each measurement as N quantile levels),
  floor       the K+1 plain scikit-learn fits on the same coarsened matrices, through the same
              pool of worker processes (the cost any exact CV of the path must pay); the
              coarsened run and the floor are measured --repeats times in turn (default 2)
              and the fastest of each is compared,
  Dask        the coarsened run on a local Dask cluster (two single-threaded worker processes
              on 127.0.0.1) against the same run through joblib's own processes;
with the speed gained by coarsening and the change it makes to the cross-validated error (of
the 1-SE tree and the lowest), and the sizes chosen.
Targets at 1,000,000 rows: coarsened ≤ 5 minutes, coarsened ÷ floor ≤ 1.1, Dask ÷ joblib ≤ 1.3.

Part 2 (--memory-rows): an invented 1,000,000-row × 50-column spreadsheet is written to /tmp,
then ``prunella fit`` loads it, grows and cross-validates (10 folds, minimum leaf 0.5%, both
cores) in a child process while the resident memory of that process and all its workers is
sampled; the peak of the sum is printed (target ≤ 4 GB), with each process's own peak.

Times depend on what else the machine is doing; say so when quoting them.
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import threading
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_pathcv import synthetic  # noqa: E402
from core.design.matrix import fit_encoding  # noqa: E402
from core.sizing import cross_validate_path  # noqa: E402
from core.sizing.folds import CVSettings, fold_plan  # noqa: E402
from core.sizing.grow import (TreeSettings, class_costs, growth_class_weights,  # noqa: E402
                              make_estimator)
from core.work_place import WorkPlace  # noqa: E402


def timed(work, *args, **kwargs):
    start = time.perf_counter()
    out = work(*args, **kwargs)
    return time.perf_counter() - start, out


def _plain_fit(X, y, settings, weights):
    X, y = np.array(X), np.array(y)  # joblib hands large arrays over read-only (memory-mapped)
    make_estimator("classification", settings, class_weight=weights).fit(X, y)


def floor_seconds(data, settings, cv, jobs=-1) -> float:
    """The K+1 plain fits on the coarsened matrices (made beforehand, not timed), through
    joblib's pool of processes as Prunella's own run uses it."""
    from joblib import Parallel, delayed

    costs = class_costs(settings, data.y, 2)
    folds = fold_plan(cv, data.n, y=data.y)
    work = []
    for rows in [np.arange(data.n)] + [f.train for f in folds]:
        X = fit_encoding(data, rows, coarsen=settings.coarsen).matrix(data, rows)
        work.append((X, data.y[rows], growth_class_weights(costs, data.y[rows])))
    start = time.perf_counter()
    Parallel(n_jobs=jobs)(delayed(_plain_fit)(X, y, settings, w) for X, y, w in work)
    return time.perf_counter() - start


def errors(path) -> tuple[float, float, int, int]:
    i = path.one_se_index
    return (float(path.cv_risk[i]), float(path.cv_risk.min()), int(path.leaves[i]),
            int(path.leaves[path.min_index]))


def cohort_run(n: int, coarsen: int, cv: CVSettings, dask: bool, repeats: int = 2) -> dict:
    data = synthetic(n, seed=1)
    plain = TreeSettings(min_leaf=max(1, n // 200), seed=0)
    coarse = TreeSettings(min_leaf=plain.min_leaf, seed=0, coarsen=coarsen)
    print(f"\n{n:,} rows × 30 continuous measurements, minimum leaf {plain.min_leaf}, "
          f"10-fold CV, both cores:", flush=True)
    warm = TreeSettings(min_leaf=10, seed=0, coarsen=coarsen)  # start the worker pool first
    cross_validate_path(data.subset(np.arange(min(n, 2000))), warm, cv, jobs=-1)
    # The ratio to the floor: each measured ``repeats`` times, in turn, and the fastest of each
    # kept, so a slow spell of the machine falls on both or is left out.
    coarse_times, floor_times = [], []
    for _ in range(repeats):
        elapsed, p_coarse = timed(cross_validate_path, data, coarse, cv, jobs=-1)
        coarse_times.append(elapsed)
        floor_times.append(floor_seconds(data, coarse, cv))
        print(f"  coarsened (--coarsen {coarsen}) {elapsed:8.1f} s, floor (K+1 plain fits on "
              f"the same data) {floor_times[-1]:8.1f} s", flush=True)
    t_coarse, t_floor = min(coarse_times), min(floor_times)
    print(f"  fastest of {repeats} in turn: coarsened {t_coarse:.1f} s (target ≤ 300 at 1,000,000 "
          f"rows), floor {t_floor:.1f} s: coarsened = {t_coarse / t_floor:5.2f} × floor "
          f"(target ≤ 1.1)", flush=True)
    out = {"n": n, "coarse": t_coarse, "floor": t_floor}
    if dask:
        from distributed import Client, LocalCluster

        with LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                          host="127.0.0.1", dashboard_address=None) as local, \
                Client(local) as client:
            client.wait_for_workers(2, timeout=120)
            place = WorkPlace(cluster=local.scheduler_address)
            t_dask, p_dask = timed(place.run, cross_validate_path, data, coarse, cv)
        same = np.array_equal(p_dask.cv_risk, p_coarse.cv_risk)
        print(f"  Dask local cluster (2 workers)    {t_dask:8.1f} s   = "
              f"{t_dask / t_coarse:5.2f} × joblib's processes (target ≤ 1.3); "
              f"identical CV risks: {same}", flush=True)
        out["dask"] = t_dask
    t_plain, p_plain = timed(cross_validate_path, data, plain, cv, jobs=-1)
    print(f"  plain (measurements as they are)  {t_plain:8.1f} s   coarsening is "
          f"{t_plain / t_coarse:5.2f} × faster", flush=True)
    (se_p, min_p, leaves_p, minl_p), (se_c, min_c, leaves_c, minl_c) = (errors(p_plain),
                                                                        errors(p_coarse))
    print(f"  CV error of the 1-SE tree  plain {se_p:.5f} ({leaves_p} boxes), coarsened "
          f"{se_c:.5f} ({leaves_c} boxes): change {se_c - se_p:+.5f} "
          f"({(se_c - se_p) / se_p:+.2%})", flush=True)
    print(f"  lowest CV error            plain {min_p:.5f} ({minl_p} boxes), coarsened "
          f"{min_c:.5f} ({minl_c} boxes): change {min_c - min_p:+.5f} "
          f"({(min_c - min_p) / min_p:+.2%})", flush=True)
    out.update(plain=t_plain, se_plain=se_p, se_coarse=se_c, min_plain=min_p, min_coarse=min_c)
    return out


def write_spreadsheet(path: Path, rows: int, seed: int = 0) -> None:
    """An invented clinic extract of ``rows`` rows × 50 columns: a record number, 45 decimal
    measurements (some not recorded), two whole counts, a ward and a two-class outcome."""
    import pandas as pd

    rng = np.random.default_rng(seed)
    block = 100_000
    with open(path, "w", encoding="utf-8", newline="") as out:
        for start in range(0, rows, block):
            n = min(block, rows - start)
            columns = {"record_no": np.arange(start, start + n) + 5_000_000}
            measures = rng.normal(size=(n, 45))
            for j in range(45):
                values = np.round(60 + 12 * measures[:, j], 2).astype(object)
                values[rng.random(n) < 0.03] = ""
                columns[f"measure_{j:02d}"] = values
            columns["visits_before"] = rng.poisson(2, n)
            columns["triage_level"] = rng.integers(1, 6, n)
            columns["ward"] = rng.choice(["Larch", "Rowan", "Hazel", "Alder", "Birch"], n)
            logit = 0.9 * (measures[:, 0] > 0.4) + 0.6 * measures[:, 1] - 0.5 * measures[:, 2]
            columns["readmitted"] = np.where(rng.random(n) < 1 / (1 + np.exp(1.2 - logit)),
                                             "yes", "no")
            pd.DataFrame(columns).to_csv(out, index=False, header=start == 0,
                                         lineterminator="\n")


def memory_run(rows: int, coarsen: int | None, keep: bool) -> None:
    """``prunella fit`` on the invented spreadsheet in a child process; the peak of the summed
    resident memory of it and its worker processes, sampled every 0.1 s."""
    import psutil

    path = Path("/tmp") / f"prunella_cohort_{rows}x50.csv"
    if not path.exists():
        elapsed, _ = timed(write_spreadsheet, path, rows)
        print(f"\nwrote {path} ({path.stat().st_size / 2**20:.0f} MB) in {elapsed:.0f} s",
              flush=True)
    model = Path("/tmp") / f"prunella_cohort_{rows}.model.json"
    model.unlink(missing_ok=True)
    command = [sys.executable, "-m", "gui", "fit", str(path), "--outcome", "readmitted",
               "--patient-id", "record_no", "--min-leaf", str(max(1, rows // 200)),
               "--folds", "10", "--jobs", "-1", "--model", str(model), "--quiet"]
    if coarsen:
        command += ["--coarsen", str(coarsen)]
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    start = time.perf_counter()
    child = subprocess.Popen(command, env=env, cwd=ROOT, stdout=subprocess.PIPE,
                             stderr=subprocess.PIPE, text=True)
    peaks: dict[int, int] = {}
    total_peak = [0, 0]  # summed RSS (counts shared pages once per process), summed PSS

    def sample() -> None:
        parent = psutil.Process(child.pid)
        tick = 0
        while child.poll() is None:
            try:
                family = [parent] + parent.children(recursive=True)
                total = 0
                for proc in family:
                    rss = proc.memory_info().rss
                    total += rss
                    peaks[proc.pid] = max(peaks.get(proc.pid, 0), rss)
                total_peak[0] = max(total_peak[0], total)
                if tick % 5 == 0:  # proportional set size: shared pages split fairly (slower)
                    total_peak[1] = max(total_peak[1], sum(p.memory_full_info().pss
                                                           for p in family))
            except psutil.Error:
                pass
            tick += 1
            time.sleep(0.1)

    watcher = threading.Thread(target=sample, daemon=True)
    watcher.start()
    out, err = child.communicate()
    watcher.join()
    elapsed = time.perf_counter() - start
    gib = 2**30
    print(f"\n{rows:,} rows × 50 columns: prunella fit (load, grow, 10-fold CV, minimum leaf "
          f"{max(1, rows // 200)}, both cores{', --coarsen ' + str(coarsen) if coarsen else ''}) "
          f"exit {child.returncode} in {elapsed:.0f} s", flush=True)
    print(f"  peak resident memory, this run's processes summed: {total_peak[0] / gib:.2f} GiB "
          f"RSS (shared pages counted in each process), {total_peak[1] / gib:.2f} GiB PSS "
          f"(shared pages split; sampled every 0.5 s) (target ≤ 4 GB); largest single process "
          f"{max(peaks.values()) / gib:.2f} GiB; {len(peaks)} processes seen", flush=True)
    if child.returncode:
        print(err[-2000:])
    if not keep:
        path.unlink(missing_ok=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", default="100000,1000000")
    parser.add_argument("--coarsen", type=int, default=256)
    parser.add_argument("--no-dask", action="store_true")
    parser.add_argument("--skip-cv", action="store_true", help="only the memory run")
    parser.add_argument("--memory-rows", type=int, default=1_000_000, help="0: no memory run")
    parser.add_argument("--memory-coarsen", type=int, default=None)
    parser.add_argument("--keep", action="store_true", help="keep the spreadsheet written")
    parser.add_argument("--repeats", type=int, default=2,
                        help="times the coarsened run and the floor are each measured, in turn")
    args = parser.parse_args()
    print(f"{os.cpu_count()} cores; started {time.strftime('%Y-%m-%d %H:%M:%S')}", flush=True)
    cv = CVSettings(folds=10, seed=0)
    results = []
    if not args.skip_cv:
        for n in [int(s) for s in args.sizes.split(",") if s]:
            results.append(cohort_run(n, args.coarsen, cv, dask=not args.no_dask,
                                      repeats=args.repeats))
    if len(results) > 1:
        print("\nside by side (seconds; both cores):")
        print("      rows   plain  coarsened  gained  floor  ÷floor   Dask  ÷joblib  "
              "Δ CV error (1-SE)  Δ lowest")
        for r in results:
            dask = r.get("dask", float("nan"))
            print(f"{r['n']:>10,} {r['plain']:7.1f} {r['coarse']:9.1f} {r['plain'] / r['coarse']:6.2f}× "
                  f"{r['floor']:6.1f} {r['coarse'] / r['floor']:6.2f} {dask:7.1f} "
                  f"{dask / r['coarse']:7.2f}  {r['se_coarse'] - r['se_plain']:+.5f} "
                  f"({(r['se_coarse'] - r['se_plain']) / r['se_plain']:+.2%})  "
                  f"{r['min_coarse'] - r['min_plain']:+.5f}", flush=True)
    if args.memory_rows:
        memory_run(args.memory_rows, args.memory_coarsen, args.keep)
    print(f"finished {time.strftime('%Y-%m-%d %H:%M:%S')}", flush=True)


if __name__ == "__main__":
    main()
