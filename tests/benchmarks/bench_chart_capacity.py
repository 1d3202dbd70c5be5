"""How many outcome boxes a legible one-page chart holds (a benchmark, not a test).

Run:  .venv/bin/python tests/benchmarks/bench_chart_capacity.py [--seeds N] [--most N]

For every paper and orientation, at the default legibility floor (9 pt on A4 and Letter,
10.5 pt on A3 and Tabloid, for every character on the page), prints the largest tree that fits:

- for the reference trees of tests/chart_references.py (the Wisconsin breast cancer data with
  all 30 and its first 10 columns, the diabetes data as a regression, the invented demo
  cohort's admission tree): the largest tree of that run's pruning sequence that fits;
- for seeded random shapes: for each seed, the largest number of outcome boxes (1 to --most)
  whose random tree fits; the table shows the smallest and the median over the seeds.

The reference trees are regenerated here each run (seconds). The time taken is printed too.
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

from core.chart import ChartOptions, tree_fits  # noqa: E402
from core.sizing import choose_model  # noqa: E402

import chart_references as refs  # noqa: E402

PAPERS = ("a4", "letter", "a3", "tabloid")
ORIENTATIONS = ("portrait", "landscape")
DATE = dt.date(2025, 3, 14)


def largest_on_path(derivation, options: ChartOptions, most: int) -> int | None:
    """The largest tree of the run's pruning sequence (at most ``most`` boxes) that fits."""
    sizes = sorted({int(v) for v in derivation.path.leaves if v <= most}, reverse=True)
    return next((n for n in sizes if tree_fits(choose_model(derivation, n).model, options)),
                None)


def largest_random(seed: int, options: ChartOptions, most: int) -> int:
    return max((n for n in range(1, most + 1) if tree_fits(refs.random_model(seed, n), options)),
               default=0)


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
    heads = list(references) + ["random: least", "random: median"]
    print(f"\n{'paper (floor)':<30}" + "".join(f"{h:>19}" for h in heads))
    for paper in PAPERS:
        for orientation in ORIENTATIONS:
            options = ChartOptions(paper=paper, orientation=orientation, printed=DATE).checked()
            row = [largest_on_path(d, options, args.most) for d in references.values()]
            randoms = [largest_random(seed, options, args.most) for seed in range(args.seeds)]
            row += [min(randoms), statistics.median(randoms)]
            label = f"{options.paper_name} {orientation} ({options.min_text:g} pt)"
            print(f"{label:<30}" + "".join(f"{'-' if v is None else f'{v:g}':>19}" for v in row))
    done = time.perf_counter()
    print(f"\nReference trees built in {built - start:.1f} s; table in {done - built:.1f} s.")


if __name__ == "__main__":
    main()
