"""Kernel (RBF) fits beside scikit-learn's SVC: the grid of issue 13.

Every cell: four data shapes (overlapping blobs, curved classes, rings,
clusters of different density), standardised; gamma in {0.1, 0.5, 2, 10, 50},
C in {1, 100}; n in {1,000, 5,000} and, on the blobs, 10,000.  Printed per cell: our whole-call
wall time, SVC's (default tol=1e-3) on the same data in the same run, the
ratio SVC / ours (above 1: we are faster), both dual objectives
D = 1'a - 1/2 a'Qa (SVC's from its dual coefficients; ours is the larger or
equal one when exact), our relative duality gap and rounds (on the RBF fast
path: stages of pair steps, 0 when warm face steps alone finished); after the
grid, the cells short of their target.  Then polynomial kernels (degree 2 and 3)
on the blobs at every n, warm steps at n = 1,000 (C +10%, gamma +10%) and the
peak memory of the largest cell.  Fits after
the first in a run reuse the kernel-row buffer the previous one handed back
(``kernel_cache.BUFFERS``), as fits in the window do; the first pays the page
faults of fresh memory (about 0.05 s for 200 MiB in small pages,
``kernel_cache._fresh``).
Cold cells do not reuse the kernel rows a cell before them computed on the same
points (``kernel_cache.RECENT`` is emptied first); warm steps do, as in the window.

Environment (to shrink the grid for a quick look):
  KERNEL_BENCH_N        sizes, e.g. "1000" (default "1000,5000,10000")
  KERNEL_BENCH_SHAPES   e.g. "blobs,moons" (default all four)
  KERNEL_BENCH_GAMMAS   e.g. "0.5,10" (default "0.1,0.5,2,10,50")
  KERNEL_BENCH_CS       e.g. "1" (default "1,100")
  KERNEL_BENCH_LARGE_SHAPES  shapes run at n > 5,000 (default "blobs": the narrow-kernel
                        cells at n = 10,000 take minutes; every shape runs up to 5,000)
  KERNEL_BENCH_PROFILE  "1": after each cell short of its target (n = 1,000: ratio
                        below 0.5; larger n: below 1), the top of a cProfile of our fit
"""

from __future__ import annotations

import cProfile
import gc
import io
import os
import pstats
import resource
import statistics
import time
import tracemalloc

import numpy as np
from sklearn.datasets import make_blobs, make_circles, make_moons
from sklearn.svm import SVC

from solver import FitConfig, fit
from solver.errors import ConvergenceError
from solver.kernels import rbf_matrix
from solver.kernels.polynomial import feature_map
from solver.qp.face_kept import FACTORS
from solver.qp.pair_rows import PAIR_BUFFERS
from solver.qp.kernel_cache import BUFFERS, MAPPED, RECENT
from solver.warm_up import prepare_kernel_solver


def _env_list(name, default, cast=float):
    return [cast(v) for v in os.environ.get(name, default).split(",") if v.strip()]


def _standardised(X):
    return (X - X.mean(axis=0)) / X.std(axis=0)


def shape(name: str, n: int, seed: int = 0):
    """(X standardised, y in {-1, +1}) of one of the four bench shapes."""
    rng = np.random.default_rng(seed)
    if name == "blobs":        # two unit Gaussians 1.5 apart on each axis: heavy overlap
        half = n // 2
        X = np.vstack([rng.normal([0.0, 0.0], 1.0, (half, 2)),
                       rng.normal([1.5, 1.5], 1.0, (n - half, 2))])
        y = np.r_[-np.ones(half), np.ones(n - half)]
    elif name == "moons":      # two interleaved half circles
        X, label = make_moons(n, noise=0.25, random_state=seed)
        y = 2.0 * label - 1.0
    elif name == "rings":      # one ring inside another
        X, label = make_circles(n, noise=0.15, factor=0.5, random_state=seed)
        y = 2.0 * label - 1.0
    elif name == "density":    # four clusters of spread 0.3 .. 1.5, classes across them
        X, label = make_blobs(n, centers=[[0, 0], [3, 0], [0, 3], [3, 3]],
                              cluster_std=[0.3, 1.2, 0.6, 1.5], random_state=seed)
        y = np.where(label % 3 == 0, 1.0, -1.0)
    else:
        raise ValueError(f"unknown bench shape {name!r}")
    return _standardised(X), y


def dual_objective(alpha, X, y, gamma):
    support = np.flatnonzero(alpha > 0)
    coef = alpha[support] * y[support]
    S = X[support]
    return float(alpha.sum() - 0.5 * coef @ rbf_matrix(S, S, gamma) @ coef)


def svc_alpha(svc, n):
    alpha = np.zeros(n)
    alpha[svc.support_] = np.abs(svc.dual_coef_[0])
    return alpha


def _ours(X, y, config, warm=None):
    if warm is None:
        RECENT.clear()       # a cold fit computes its kernel rows, even after a cell on the same points
    start = time.perf_counter()
    try:
        result = fit(X, y, config, warm_start=warm)
        note = ""
    except ConvergenceError as exc:
        result, note = exc.best, "NOT CONVERGED"
    return time.perf_counter() - start, result, note


def cell(name, n, gamma, C):
    X, y = shape(name, n)
    config = FitConfig(C=C, kernel="rbf", gamma=gamma)
    ours, result, note = _ours(X, y, config)
    start = time.perf_counter()
    svc = SVC(C=C, gamma=gamma, tol=1e-3).fit(X, y)
    theirs = time.perf_counter() - start
    d_ours = result.dual_objective if result is not None else float("nan")
    d_svc = dual_objective(svc_alpha(svc, n), X, y, gamma)
    gap = result.relative_gap if result is not None else float("nan")
    rounds = result.rounds if result is not None else 0
    print(f"{name:<8} {n:>6,} {gamma:>5g} {C:>5g} {ours * 1e3:>9.1f} {theirs * 1e3:>9.1f} "
          f"{theirs / ours:>6.2f} {d_ours:>15.8f} {d_svc:>15.8f} {gap:>8.1e} {rounds:>4} {note}",
          flush=True)
    if os.environ.get("KERNEL_BENCH_PROFILE") == "1" and theirs / ours < _target(n):
        _profile(X, y, config)
    return theirs / ours


def polynomial_cells(sizes):
    """Polynomial kernels beside SVC(kernel="poly") on the blobs.  Our fit is the primal
    over the exact feature map, so both are judged by the primal objective
    P = 1/2 |w|^2 + C sum xi there (SVC's w = sum_i a_i y_i phi(x_i))."""
    print("polynomial kernels (gamma 0.5, offset 1), blobs, beside SVC(kernel='poly', tol=1e-3):")
    print(f"{'n':>6} {'degree':>6} {'C':>5} {'ours ms':>9} {'SVC ms':>9} {'ratio':>6} "
          f"{'P ours':>15} {'P SVC':>15}")
    for n in sizes:
        X, y = shape("blobs", n)
        for degree in (2, 3):
            for C in (1.0, 100.0):
                config = FitConfig(C=C, kernel="polynomial", gamma=0.5, degree=degree,
                                   offset=1.0)
                ours, result, note = _ours(X, y, config)
                start = time.perf_counter()
                svc = SVC(kernel="poly", degree=degree, gamma=0.5, coef0=1.0, C=C,
                          tol=1e-3).fit(X, y)
                theirs = time.perf_counter() - start
                phi = feature_map(X, 0.5, degree, 1.0)
                w = phi[svc.support_].T @ svc.dual_coef_[0]
                slack = np.maximum(0.0, 1.0 - y * (phi @ w + svc.intercept_[0]))
                p_svc = 0.5 * float(w @ w) + C * float(slack.sum())
                print(f"{n:>6,} {degree:>6} {C:>5g} {ours * 1e3:>9.1f} {theirs * 1e3:>9.1f} "
                      f"{theirs / ours:>6.2f} {result.primal_objective:>15.8f} {p_svc:>15.8f} "
                      f"{note}", flush=True)


def _profile(X, y, config, top=8):
    profiler = cProfile.Profile()
    profiler.runcall(_ours, X, y, config)
    text = io.StringIO()
    pstats.Stats(profiler, stream=text).sort_stats("tottime").print_stats(top)
    lines = [line for line in text.getvalue().splitlines() if line.strip()]
    start = next((k for k, line in enumerate(lines) if "ncalls" in line), 0)
    print("    profile (own time):")
    for line in lines[start:start + top + 1]:
        print("    " + line)


def warm_steps(name="blobs", n=1_000, steps=5):
    """Slider steps from a converged fit: C +10% and gamma +10%, median of ``steps``."""
    X, y = shape(name, n)
    for gamma in (0.5, 2.0, 10.0):
        for C in (1.0, 100.0):
            base = FitConfig(C=C, kernel="rbf", gamma=gamma)
            for label, change in (("C +10%", "C"), ("gamma +10%", "gamma")):
                previous = fit(X, y, base)
                times, rounds = [], []
                for step in range(1, steps + 1):
                    value = getattr(base, change) * 1.1 ** step
                    seconds, result, _ = _ours(X, y, base.with_changes(**{change: value}),
                                               warm=previous)
                    times.append(seconds)
                    rounds.append(result.rounds)
                    previous = result
                print(f"warm {label:<11} {name} n={n:,} gamma={gamma:g} C={C:g}: median "
                      f"{statistics.median(times) * 1e3:6.1f} ms, max {max(times) * 1e3:6.1f} ms, "
                      f"rounds {rounds}", flush=True)


def peak_memory(name, n, gamma, C):
    X, y = shape(name, n)
    RECENT.clear()
    BUFFERS.clear()          # count the kernel-row buffer, which earlier fits left in the pool
    FACTORS.clear()          # ... and the face steps' factor
    PAIR_BUFFERS.clear()     # ... and the pair steps' single rows (n above 2,000)
    gc.collect()
    MAPPED.reset_peak()
    tracemalloc.start()
    fit(X, y, FitConfig(C=C, kernel="rbf", gamma=gamma))
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    mapped = MAPPED.peak     # the row cache and the factor are mapped, which tracemalloc misses
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"peak memory {name} n={n:,} gamma={gamma:g} C={C:g}: {peak / 2**20:.0f} MiB traced "
          f"(numpy) + {mapped / 2**20:.0f} MiB mapped (kernel rows, single rows, factor), process max RSS "
          f"so far {rss:.0f} MiB; an n x n matrix would be {8 * n * n / 2**20:.0f} MiB",
          flush=True)


def _target(n):
    """The least ratio SVC / ours issue 13 asks for: within 2x at n = 1,000, ahead above."""
    return 0.5 if n <= 1_000 else 1.0


def main():
    sizes = _env_list("KERNEL_BENCH_N", "1000,5000,10000", int)
    shapes = _env_list("KERNEL_BENCH_SHAPES", "blobs,moons,rings,density", str)
    large = _env_list("KERNEL_BENCH_LARGE_SHAPES", "blobs", str)
    gammas = _env_list("KERNEL_BENCH_GAMMAS", "0.1,0.5,2,10,50")
    Cs = _env_list("KERNEL_BENCH_CS", "1,100")
    fit(*shape("blobs", 300), FitConfig(kernel="rbf"))           # warm up imports
    # and both compiled paths (double and single rows): a cache emptied by an edit is
    # filled here, not in the first cell above 2,000 points (2.2 s of compiling there)
    prepare_kernel_solver()
    print("RBF fits beside SVC (tol=1e-3), same data, same run; ratio = SVC / ours.")
    print(f"{'shape':<8} {'n':>6} {'gamma':>5} {'C':>5} {'ours ms':>9} {'SVC ms':>9} "
          f"{'ratio':>6} {'D ours':>15} {'D SVC':>15} {'gap':>8} {'rnds':>4}")
    ratios = {}
    for n in sizes:
        for name in (shapes if n <= 5_000 else [s for s in shapes if s in large]):
            for gamma in gammas:
                for C in Cs:
                    ratios[(name, n, gamma, C)] = cell(name, n, gamma, C)
    for n in sizes:
        values = [r for key, r in ratios.items() if key[1] == n]
        if values:
            print(f"n={n:,}: SVC/ours min {min(values):.2f}, median "
                  f"{statistics.median(values):.2f} over {len(values)} cells")
    short = [f"{name} n={n:,} gamma {gamma:g} C {C:g} ({r:.2f})"
             for (name, n, gamma, C), r in ratios.items() if r < _target(n)]
    print("short of the target (n = 1,000: ratio 0.5; larger n: 1): "
          + ("; ".join(short) if short else "none"))
    polynomial_cells(sizes)
    warm_steps()
    peak_memory("blobs", max(sizes), 0.5, 1.0)


if __name__ == "__main__":
    main()
