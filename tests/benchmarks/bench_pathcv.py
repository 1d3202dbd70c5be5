"""Speed of cross-validating the whole pruning path (a benchmark, not a test).

Run:  .venv/bin/python tests/benchmarks/bench_pathcv.py [--quick] [--large-only]

Prints, for synthetic data of 20,000 rows × 30 predictors with a binary outcome, all with one
worker so the ratios compare like with like:
  floor   the K+1 plain scikit-learn fits that any exact cross-validation of the path needs,
  ours    Prunella's 10-fold CV over the whole path (one fit per fold + the full tree),
  naive   refitting per α on a 50-α grid, measured on two folds and scaled to ten;
then Prunella with all cores, and time and peak memory at 100,000 and 1,000,000 rows
(minimum leaf 0.5% of rows) with the share spent on pruning and routing.
Targets: ours ≤ 1.3 × floor, naive ≥ 30 × ours.
"""

from __future__ import annotations

import argparse
import os
import resource
import sys
import time
import tracemalloc
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

import core.sizing.cross_validated_path as pathcv  # noqa: E402
from core.sizing import cross_validate_path  # noqa: E402
from core.sizing.folds import CVSettings, fold_plan  # noqa: E402
from core.sizing.grow import TreeSettings, growth_class_weights, make_estimator  # noqa: E402
from tests.helpers import analysis_from_arrays  # noqa: E402


def synthetic(n: int, p: int = 30, seed: int = 0):
    rng = np.random.default_rng(seed)
    X = rng.normal(size=(n, p))
    logit = 1.2 * (X[:, 0] > 0.5) + 0.8 * X[:, 1] - 0.6 * (X[:, 2] < -1) + 0.4 * X[:, 3] * X[:, 4]
    y = (rng.random(n) < 1 / (1 + np.exp(-(logit - 0.5)))).astype(int)
    X[rng.random(X.shape) < 0.02] = np.nan  # some values not recorded
    return analysis_from_arrays(X, y, "classification")[0]


def floor_seconds(data, settings, cv) -> float:
    """K+1 plain fits with the same settings: the cost any exact CV of the path must pay."""
    X = np.column_stack([p.numbers for p in data.predictors]).astype(np.float32)
    folds = fold_plan(cv, data.n, y=data.y)
    from core.sizing.grow import class_costs

    costs = class_costs(settings, data.y, 2)
    start = time.perf_counter()
    for rows in [np.arange(data.n)] + [f.train for f in folds]:
        make_estimator("classification", settings,
                       class_weight=growth_class_weights(costs, data.y[rows])).fit(X[rows], data.y[rows])
    return time.perf_counter() - start


def naive_seconds(data, settings, cv, grid_size=50, measured_folds=2) -> float:
    """Refit per α on a 50-α grid for two folds, scaled to all folds (plus the full-data path)."""
    X = np.column_stack([p.numbers for p in data.predictors]).astype(np.float32)
    from core.sizing.grow import class_costs

    costs = class_costs(settings, data.y, 2)
    folds = fold_plan(cv, data.n, y=data.y)
    start = time.perf_counter()
    full = make_estimator("classification", settings,
                          class_weight=growth_class_weights(costs, data.y))
    alphas = full.cost_complexity_pruning_path(X, data.y).ccp_alphas
    grid = np.quantile(alphas, np.linspace(0, 1, grid_size))
    setup = time.perf_counter() - start
    start = time.perf_counter()
    for fold in folds[:measured_folds]:
        weights = growth_class_weights(costs, data.y[fold.train])
        for alpha in grid:
            est = make_estimator("classification", settings, class_weight=weights)
            est.set_params(ccp_alpha=float(alpha)).fit(X[fold.train], data.y[fold.train])
            est.predict(X[fold.test])
    per_fold = (time.perf_counter() - start) / measured_folds
    return setup + per_fold * len(folds)


class PhaseClock:
    """Accumulate time spent in pruning (collapse α's) and routing during a CV run."""

    def __init__(self):
        self.prune = 0.0
        self.route = 0.0

    def install(self):
        real_collapse, real_nodes = pathcv.collapse_alphas, pathcv.path_nodes

        def collapse(*a, **k):
            t = time.perf_counter()
            out = real_collapse(*a, **k)
            self.prune += time.perf_counter() - t
            return out

        def nodes(*a, **k):
            t = time.perf_counter()
            out = real_nodes(*a, **k)
            self.route += time.perf_counter() - t
            return out

        pathcv.collapse_alphas, pathcv.path_nodes = collapse, nodes
        return real_collapse, real_nodes


def ours_seconds(data, settings, cv, jobs=1, clock=None) -> float:
    restore = clock.install() if clock else None
    start = time.perf_counter()
    cross_validate_path(data, settings, cv, jobs=jobs)
    elapsed = time.perf_counter() - start
    if restore:
        pathcv.collapse_alphas, pathcv.path_nodes = restore
    return elapsed


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--quick", action="store_true", help="skip the 1,000,000-row run")
    parser.add_argument("--large-only", action="store_true",
                        help="only the 100,000- and 1,000,000-row runs (time and memory)")
    args = parser.parse_args()
    cv = CVSettings(folds=10, seed=0)
    if not args.large_only:
        compare_at_20000(cv)
    sizes = [100_000] if args.quick else [100_000, 1_000_000]
    for n in sizes:
        large_run(n, cv)


def compare_at_20000(cv: CVSettings) -> None:
    """Floor, Prunella and the naive way side by side, one worker; then all cores."""
    data = synthetic(20_000)
    settings = TreeSettings(min_leaf=5, seed=0)
    ours_seconds(data, settings, cv)  # warm-up (imports, caches)
    floor = min(floor_seconds(data, settings, cv) for _ in range(2))
    clock = PhaseClock()
    ours = min(ours_seconds(data, settings, cv, clock=clock if i == 0 else None) for i in range(2))
    naive = naive_seconds(data, settings, cv)
    cores = os.cpu_count() or 1
    parallel = ours_seconds(data, settings, cv, jobs=-1)
    print("20,000 rows × 30 predictors, binary outcome, minimum leaf 5, 10-fold CV, one worker:")
    print(f"  floor (K+1 plain fits)        {floor:8.2f} s")
    print(f"  Prunella (whole path)         {ours:8.2f} s   = {ours / floor:5.2f} × floor  (target ≤ 1.3)")
    print(f"    of which pruning {clock.prune:.2f} s, routing {clock.route:.2f} s")
    print(f"  naive (50-α refits, scaled)   {naive:8.2f} s   = {naive / ours:5.1f} × Prunella (target ≥ 30)")
    print(f"  Prunella with all {cores} cores     {parallel:8.2f} s   = {ours / parallel:5.2f} × faster", flush=True)


def large_run(n: int, cv: CVSettings) -> None:
    """Time and peak memory of the whole-path CV at n rows, minimum leaf 0.5% of rows."""
    big = synthetic(n, seed=1)
    settings = TreeSettings(min_leaf=max(1, n // 200), seed=0)
    clock = PhaseClock()
    tracemalloc.start()
    elapsed = ours_seconds(big, settings, cv, clock=clock)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    share = (clock.prune + clock.route) / elapsed
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"{n:>9,} rows, minimum leaf {settings.min_leaf}: {elapsed:7.1f} s, peak traced memory "
          f"{peak / 2**20:5.0f} MiB (process peak RSS so far {rss:5.0f} MiB); pruning "
          f"{clock.prune:.2f} s + routing {clock.route:.2f} s = {share:.1%} of the total", flush=True)


if __name__ == "__main__":
    main()
