"""Solver speed beside scikit-learn's SVC on the same generated data, same run.

Workloads (targets in DEVELOPERS.md): linear at n = 1,000 / 10,000 / 100,000,
RBF at n = 1,000 / 2,000 cold, and RBF warm re-solves after a small change
of C.  Reported: our median solve wall time, SVC's, the ratio, and the
relative difference of the dual objectives (SVC's dual computed from its
dual coefficients).
"""

from __future__ import annotations

import os
import statistics
import time
import tracemalloc

import numpy as np
from sklearn.svm import SVC

from solver import FitConfig, fit
from solver.kernels import rbf_matrix

REPEATS = int(os.environ.get("SLACKLINE_BENCH_REPEATS", "5"))


def overlapping_classes(n: int, seed: int = 0):
    """Two unit-variance Gaussians 1.5 apart on each axis: heavy overlap."""
    rng = np.random.default_rng(seed)
    half = n // 2
    X = np.vstack([rng.normal([0.0, 0.0], 1.0, (half, 2)),
                   rng.normal([1.5, 1.5], 1.0, (n - half, 2))])
    return X, np.r_[-np.ones(half), np.ones(n - half)]


def _median_seconds(call, repeats):
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        value = call()
        times.append(time.perf_counter() - start)
    return statistics.median(times), value


def _reference_dual(svc, X, y, config):
    alpha = np.zeros(len(y))
    alpha[svc.support_] = np.abs(svc.dual_coef_[0])
    coef = alpha[svc.support_] * y[svc.support_]
    S = X[svc.support_]
    if config.kernel == "linear":
        w = S.T @ coef
        quadratic = w @ w
    else:
        quadratic = coef @ rbf_matrix(S, S, config.gamma) @ coef
    return alpha.sum() - 0.5 * quadratic


def _row(label, ours, theirs, rel, extra=""):
    ratio = theirs / ours if ours > 0 else float("inf")
    print(f"{label:<28} {ours * 1e3:>10.1f} {theirs * 1e3:>11.1f} {ratio:>7.1f}x "
          f"{rel:>10.1e}  {extra}", flush=True)


def linear(n: int, repeats: int, reference: bool = True):
    X, y = overlapping_classes(n)
    config = FitConfig(C=1.0)
    result = fit(X, y, config)                         # warm up imports and caches
    solve_times = [fit(X, y, config).seconds for _ in range(repeats)]
    ours = statistics.median(solve_times)
    tracemalloc.start()
    fit(X, y, config)
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    if reference:
        theirs, svc = _median_seconds(
            lambda: SVC(kernel="linear", C=1.0, tol=1e-3).fit(X, y), 1 if n > 5000 else 3)
        rel = abs(result.dual_objective - _reference_dual(svc, X, y, config)) / \
            abs(result.dual_objective)
    else:
        theirs, rel = float("nan"), float("nan")
    _row(f"linear n={n:,}", ours, theirs, rel,
         f"{result.iterations} its, peak {peak / 2**20:.1f} MiB "
         f"({peak / n:.0f} B/point), gap {result.relative_gap:.1e}")


def rbf(n: int, repeats: int):
    X, y = overlapping_classes(n)
    config = FitConfig(C=1.0, kernel="rbf", gamma=0.5)
    fit(X, y, config)
    cold = []
    for _ in range(repeats):
        result = fit(X, y, config)
        cold.append(result.seconds)
    theirs, svc = _median_seconds(lambda: SVC(kernel="rbf", C=1.0, gamma=0.5,
                                              tol=1e-3).fit(X, y), 3)
    rel = abs(result.dual_objective - _reference_dual(svc, X, y, config)) / \
        abs(result.dual_objective)
    _row(f"rbf n={n:,} cold", statistics.median(cold), theirs, rel,
         f"{result.rounds} rounds, final working set {result.working_set}, "
         f"{result.n_support} support vectors")
    warm = []
    previous = result
    for step in range(repeats):
        C = 1.0 * 1.1 ** (step + 1)                      # a slider step: +10% in C
        moved = fit(X, y, config.with_changes(C=C), warm_start=previous)
        warm.append(moved.seconds)
        previous = moved
    svc_warm = SVC(kernel="rbf", C=C, gamma=0.5, tol=1e-3).fit(X, y)
    rel = abs(moved.dual_objective - _reference_dual(svc_warm, X, y, moved.config)) / \
        abs(moved.dual_objective)
    _row(f"rbf n={n:,} warm (C +10%)", statistics.median(warm), theirs, rel,
         f"{moved.rounds} rounds")


def main():
    print("Solver vs scikit-learn SVC (same data, same run). Times in ms (median).")
    print("SVC runs at its default tol=1e-3; 'rel diff' = |D_ours - D_svc| / |D_ours|.")
    print(f"{'workload':<28} {'ours ms':>10} {'SVC ms':>11} {'ratio':>8} {'rel diff':>10}")
    linear(1_000, 3 * REPEATS)
    linear(10_000, REPEATS)
    linear(100_000, 3, reference=os.environ.get("SLACKLINE_BENCH_SVC_100K") == "1")
    rbf(1_000, REPEATS)
    rbf(2_000, REPEATS)


if __name__ == "__main__":
    main()
