"""Speed of the search for a tree built for a clinical goal (a benchmark, not a test).

Run:  .venv/bin/python tests/benchmarks/bench_goal_search.py [--jobs N] [--rows N]

Prints, side by side in one run, on the invented demo cohort and on generated rows (20,000 by
default): the time of one cross-validation of the pruning path, the time of the goal search
over its miss-cost grid, the grid's size, and the search's time over (grid size × one path
CV). Target: that ratio at most 1 (the search shares one parallel pool across every fold of
every cost, so it should cost no more than one path CV per cost).
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from core.design import DesignSpec, prepare_analysis  # noqa: E402
from core.sizing import cross_validate_path  # noqa: E402
from core.sizing.folds import CVSettings  # noqa: E402
from core.sizing.goal import Goal  # noqa: E402
from core.sizing.goal_search import search_goal  # noqa: E402
from core.sizing.grow import TreeSettings  # noqa: E402
from tests.helpers import analysis_from_arrays, demo_inputs  # noqa: E402


def demo():
    table, dictionary, predictors = demo_inputs()
    return prepare_analysis(table.frame, dictionary,
                            DesignSpec("admitted", predictors, patient_id="patient_id"))


def generated(n: int, p: int = 30, seed: int = 0):
    rng = np.random.default_rng(seed)
    X = rng.normal(size=(n, p))
    logit = 1.2 * (X[:, 0] > 0.5) + 0.8 * X[:, 1] - 0.6 * (X[:, 2] < -1) + 0.4 * X[:, 3] * X[:, 4]
    y = (rng.random(n) < 1 / (1 + np.exp(-(logit - 1.5)))).astype(int)  # about 1 in 4 positive
    X[rng.random(X.shape) < 0.02] = np.nan  # some values not recorded
    return analysis_from_arrays(X, y, "classification")[0]


def measure(name, data, settings, cv, goal, jobs):
    cross_validate_path(data, settings, CVSettings(folds=2), jobs=jobs)  # start the pool first
    start = time.perf_counter()
    cross_validate_path(data, settings, cv, jobs=jobs)
    one = time.perf_counter() - start
    start = time.perf_counter()
    search = search_goal(data, settings, cv, goal, jobs=jobs)
    whole = time.perf_counter() - start
    grid = len(search.miss_costs)
    print(f"{name:<22}{data.n:>8}{one:>12.2f}{whole:>12.2f}{grid:>6}"
          f"{whole / (grid * one):>18.2f}", flush=True)


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--jobs", type=int, default=-1, help="worker processes (-1: all cores)")
    parser.add_argument("--rows", type=int, default=20_000)
    args = parser.parse_args()
    goal = Goal("sensitivity", 0.95)
    cv = CVSettings(folds=10)
    print(f"Goal: {goal.describe()}; 10-fold CV; jobs={args.jobs}")
    print(f"{'cohort':<22}{'rows':>8}{'1 path CV s':>12}{'search s':>12}{'grid':>6}"
          f"{'search/(grid×CV)':>18}")
    measure("demo (invented)", demo(), TreeSettings(min_leaf=5), cv, goal, args.jobs)
    measure("generated", generated(args.rows), TreeSettings(min_leaf=max(5, args.rows // 200)),
            cv, goal, args.jobs)


if __name__ == "__main__":
    main()
