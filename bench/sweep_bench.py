"""C sweep benchmark: 40 values of C x 5 folds, warm starts against cold solves.

    python -m bench sweep_bench            # the workloads of the issue
    SWEEP_BENCH_SCALE=0.2 python -m bench sweep_bench   # smaller n, for a quick look

Invented demo data: two overlapping clouds of gauge readings (pass / fail).
"""

from __future__ import annotations

import os
import time

import numpy as np

from solver.config import FitConfig
from solver.study.sweep import SweepSettings, run_sweep

WORKLOADS = [("linear", 1000, FitConfig(kernel="linear")),
             ("rbf", 500, FitConfig(kernel="rbf", gamma=0.5))]
SETTINGS = SweepSettings(c_from=1e-3, c_to=1e4, steps=40, folds=5, seed=0)


def overlapping_clouds(n: int, seed: int = 0):
    rng = np.random.default_rng(seed)
    half = n // 2
    X = np.r_[rng.normal([0.0, 0.0], 1.0, (half, 2)), rng.normal([1.5, 1.0], 1.0, (n - half, 2))]
    return X, np.r_[np.ones(half, int), -np.ones(n - half, int)]


def timed(X, y, config, warm_start, n_jobs):
    start = time.perf_counter()
    sweep = run_sweep(X, y, config, SETTINGS, warm_start=warm_start, n_jobs=n_jobs)
    return time.perf_counter() - start, sweep


def main() -> None:
    scale = float(os.environ.get("SWEEP_BENCH_SCALE", "1"))
    n_jobs = int(os.environ.get("SWEEP_BENCH_JOBS", "1"))
    fits = SETTINGS.steps * (int(SETTINGS.folds) + 1)
    print(f"{SETTINGS.steps} values of C x ({SETTINGS.folds} folds + all points) = {fits} fits "
          f"per sweep, joblib n_jobs={n_jobs}")
    print(f"{'kernel':<8}{'n':>6}{'warm s':>9}{'cold s':>9}{'speed-up':>10}"
          f"{'ms/fit warm':>13}{'failed':>8}{'CV cells differ':>16}")
    X, y = overlapping_clouds(40)
    run_sweep(X, y, FitConfig(), SweepSettings(steps=2, folds=5), n_jobs=n_jobs)  # start the pool
    for name, n, config in WORKLOADS:
        n = max(20, int(n * scale))
        X, y = overlapping_clouds(n)
        warm_s, warm = timed(X, y, config, True, n_jobs)
        cold_s, cold = timed(X, y, config, False, n_jobs)
        differ = int(np.sum(np.nan_to_num(warm.fold_errors, nan=-1)
                            != np.nan_to_num(cold.fold_errors, nan=-1)))
        print(f"{name:<8}{n:>6}{warm_s:>9.2f}{cold_s:>9.2f}{cold_s / warm_s:>9.2f}x"
              f"{1e3 * warm_s / fits:>13.1f}{len(warm.failures):>8}{differ:>16}", flush=True)


if __name__ == "__main__":
    main()
