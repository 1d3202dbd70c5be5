"""How many outcome boxes a legible one-page chart holds, and how long planning takes (a
benchmark, not a test).

Run:  .venv/bin/python tests/benchmarks/bench_chart_capacity.py [--seeds N] [--most N]

For every paper and orientation, at the default legibility floor (9 pt on A4 and Letter,
10.5 pt on A3 and Tabloid, for every character on the page), prints the largest tree that fits:

- for the reference trees of tests/chart_references.py (the Wisconsin breast cancer data with
  all 30 and its first 10 columns, the diabetes data as a regression, the invented demo
  cohort's admission tree): the largest tree of that run's pruning sequence that fits;
- for seeded random shapes: for each seed, the largest number of outcome boxes (1 to --most)
  whose random tree fits; the table shows the smallest and the median over the seeds, and how
  many seeds fit the target (8 boxes on A4 and Letter, 13 on A3 and Tabloid).

Then the planning time per tree: the whole plan (plan_chart) and the yes/no answer the app's
shading asks for (tree_fits), on each paper with the orientation chosen by trying both; and
sizes_that_fit over each reference run's whole pruning sequence, as the app calls it after
every run. The reference trees are regenerated here each run (seconds).
"""

from __future__ import annotations

import argparse
import datetime as dt
import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path[:0] = [str(ROOT), str(ROOT / "tests")]

from core.chart import (  # noqa: E402
    ChartOptions, ChartTooLarge, plan_chart, sizes_that_fit, tree_fits,
)
from core.sizing import choose_model  # noqa: E402

import chart_references as refs  # noqa: E402

PAPERS = ("a4", "letter", "a3", "tabloid")
ORIENTATIONS = ("portrait", "landscape")
TARGET = {"a4": 8, "letter": 8, "a3": 13, "tabloid": 13}  # issue 12: boxes each paper holds
DATE = dt.date(2025, 3, 14)


def largest_on_path(derivation, options: ChartOptions, most: int) -> int | None:
    """The largest tree of the run's pruning sequence (at most ``most`` boxes) that fits."""
    sizes = sorted({int(v) for v in derivation.path.leaves if v <= most}, reverse=True)
    return next((n for n in sizes if tree_fits(choose_model(derivation, n).model, options)),
                None)


def largest_random(seed: int, options: ChartOptions, most: int) -> int:
    return max((n for n in range(1, most + 1) if tree_fits(refs.random_model(seed, n), options)),
               default=0)


def milliseconds(work) -> float:
    """CPU milliseconds of ``work``: other work on a shared machine does not count."""
    start = time.process_time()
    work()
    return 1000 * (time.process_time() - start)


def planned(model, options: ChartOptions) -> None:
    try:
        plan_chart(model, options)
    except ChartTooLarge:
        pass  # refusing is planning too: every arrangement was tried


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, default=10, help="random shapes per size")
    parser.add_argument("--most", type=int, default=24, help="largest tree tried")
    args = parser.parse_args()
    start = time.perf_counter()
    references = {
        "Wisconsin 30 col.": refs.wisconsin(30),
        "Wisconsin 10 col.": refs.wisconsin(10),
        "diabetes (regr.)": refs.diabetes(),
        "demo admission": refs.demo_lowest_error(),
    }
    chosen = {name: len(d.model.leaves) for name, d in references.items()}
    chosen["diabetes (regr.)"] = 7  # the reference size for the regression tree
    print("Reference trees (outcome boxes chosen; largest on the pruning sequence tried):")
    for name, d in references.items():
        tried = max(int(v) for v in d.path.leaves if v <= args.most)
        print(f"  {name}: {chosen[name]} chosen, up to {tried} tried")
    built = time.perf_counter()
    heads = list(references) + ["random: least", "random: median", "random: target"]
    print(f"\n{'paper (floor)':<30}" + "".join(f"{h:>19}" for h in heads))
    for paper in PAPERS:
        for orientation in ORIENTATIONS:
            options = ChartOptions(paper=paper, orientation=orientation, printed=DATE).checked()
            row = [largest_on_path(d, options, args.most) for d in references.values()]
            randoms = [largest_random(seed, options, args.most) for seed in range(args.seeds)]
            hits = sum(n >= TARGET[paper] for n in randoms)
            row += [min(randoms), statistics.median(randoms)]
            label = f"{options.paper_name} {orientation} ({options.min_text:g} pt)"
            print(f"{label:<30}" + "".join(f"{'-' if v is None else f'{v:g}':>19}" for v in row)
                  + f"{f'{hits}/{args.seeds} hold {TARGET[paper]}':>19}")
    done = time.perf_counter()

    print("\nPlanning time per tree, CPU ms (plan_chart / tree_fits; orientation tried both ways):")
    trees = {name: choose_model(d, chosen[name]).model for name, d in references.items()}
    trees.update({"random, 8 boxes": refs.random_model(3, 8),
                  "random, 13 boxes": refs.random_model(4, 13)})
    print(f"{'tree':<22}" + "".join(f"{p:>16}" for p in PAPERS) + f"{'all papers':>16}")
    for name, model in trees.items():
        cells, total = [], 0.0
        for paper in PAPERS:
            options = ChartOptions(paper=paper, printed=DATE)
            plan = milliseconds(lambda: planned(model, options))
            fits = milliseconds(lambda: tree_fits(model, options))
            total += plan
            cells.append(f"{plan:.0f} / {fits:.0f}")
        print(f"{name:<22}" + "".join(f"{c:>16}" for c in cells) + f"{total:>16.0f}")
    print("\nsizes_that_fit over the whole pruning sequence, CPU ms (the app's shading, A4):")
    for name, d in references.items():
        print(f"  {name}: {milliseconds(lambda: sizes_that_fit(d, ChartOptions())):.0f}")
    # Before: version 0.1 drew every box with its outcome's name, the side panel at the floor
    # beside the tree in one place, and no rules form; its own measurement then (same floors).
    print("\nBefore (version 0.1, as measured then): A4 and Letter held 4 outcome boxes "
          "(5 for some shapes), A3 and Tabloid about 7; the 1-SE trees of Wisconsin (6 boxes), "
          "the demo's lowest-error tree (5) and a 7-box diabetes tree were refused on A4.")
    print(f"\nReference trees built in {built - start:.1f} s; table in {done - built:.1f} s.")


if __name__ == "__main__":
    main()
