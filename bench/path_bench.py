"""The exact C path over 1e-3 .. 1e4 beside 40 separate SVC fits over the same range.

    python -m bench path_bench
    SLACKLINE_PATH_BENCH_SVC_BUDGET=600 python -m bench path_bench   # let SVC run longer

Workloads (targets in DEVELOPERS.md): linear n = 1,000 (<= 0.3 s) and
n = 10,000 (<= 5 s), RBF n = 1,000 (gamma 0.5, standardised, <= 3 s), on the
same generated overlapping classes as solver_bench.  The reference is
scikit-learn's SVC at its default tol, one fit per C on a 40-value log grid;
when its fits exceed the budget (seconds) the rest are skipped and the ratio
is a lower bound (marked ">").

Accuracy at 50 log-uniform random C per workload: the path's objective against
a fresh cvxopt solve (solver.fit), its own relative duality gap, and the
statuses, where a difference counts only for a point within 1e-6 of a status
change (an event of that point within 1e-6 relative in C, or y f within 1e-6
of 1 or 0, or alpha within 1e-6 C_i of a bound).
"""

from __future__ import annotations

import os
import statistics
import time

import numpy as np
from sklearn.svm import SVC

from bench.solver_bench import overlapping_classes
from solver import FitConfig, compute_path, fit
from solver.errors import SlacklineError

GRID = np.logspace(-3, 4, 40)
SVC_BUDGET = float(os.environ.get("SLACKLINE_PATH_BENCH_SVC_BUDGET", "120"))
WORKLOADS = [
    ("linear n=1,000", 1_000, FitConfig(kernel="linear"), 5, 0.3),
    ("linear n=10,000", 10_000, FitConfig(kernel="linear"), 2, 5.0),
    ("rbf n=1,000", 1_000, FitConfig(kernel="rbf", gamma=0.5, scaling="zscore"), 3, 3.0),
]


def _svc_grid_seconds(X, y, config):
    """Seconds for SVC fits at each C of GRID (stopped at the budget), and fits done."""
    if config.kernel == "rbf":
        X = (X - X.mean(axis=0)) / X.std(axis=0)
        params = dict(kernel="rbf", gamma=config.gamma)
    else:
        params = dict(kernel="linear")
    start, done = time.perf_counter(), 0
    for C in GRID:
        SVC(C=C, **params).fit(X, y)
        done += 1
        if time.perf_counter() - start > SVC_BUDGET:
            break
    return time.perf_counter() - start, done


def _near_a_change(path, result, point, C, tolerance=1e-6):
    margin = result.functional_margin[point]
    share = result.alpha[point] / result.penalties[point]
    if min(abs(margin - 1.0), abs(margin), share, abs(1.0 - share)) <= tolerance:
        return True
    return any(event.point == point and abs(np.log(event.C / C)) <= tolerance
               for event in path.events)


def accuracy(path, X, y, config, count=50, seed=0):
    """(worst objective difference, worst own gap, worst fit gap, status differences
    not near a change, objective passes) over ``count`` random C."""
    worst_objective = worst_gap = worst_fit_gap = 0.0
    unexplained = passes = 0
    for C in 10 ** np.random.default_rng(seed).uniform(-3, 4, count):
        ours = path.evaluate(C)
        try:
            fresh = fit(X, y, config.with_changes(C=C))
        except SlacklineError as exc:          # a stopped QP: compare with its last iterate
            fresh = exc.best
        difference = abs(ours.primal_objective - fresh.primal_objective) / \
            max(1.0, abs(fresh.primal_objective))
        worst_objective = max(worst_objective, difference)
        passes += difference <= 1e-7
        worst_gap = max(worst_gap, ours.relative_gap)
        worst_fit_gap = max(worst_fit_gap, fresh.relative_gap)
        for point in np.flatnonzero(ours.status != fresh.status):
            unexplained += not _near_a_change(path, ours, point, C)
    return worst_objective, worst_gap, worst_fit_gap, unexplained, passes


def main() -> None:
    print("Exact C path over 1e-3 .. 1e4 vs SVC (default tol) fitted at 40 C over the same "
          "range, same data, same run.")
    print(f"{'workload':<18} {'path s':>8} {'target':>7} {'SVC 40 fits s':>14} {'ratio':>8} "
          f"{'breakpoints':>11} {'re-anchors':>10}")
    for label, n, config, repeats, target in WORKLOADS:
        X, y = overlapping_classes(n)
        times, path = [], None
        for _ in range(repeats):
            path = compute_path(X, y, config)
            times.append(path.seconds)
        ours = statistics.median(times)
        theirs, done = _svc_grid_seconds(X, y, config)
        bound = "" if done == len(GRID) else ">"
        scaled = theirs * len(GRID) / done
        print(f"{label:<18} {ours:>8.3f} {target:>7.1f} {scaled:>13.2f}{bound or ' '} "
              f"{bound}{scaled / ours:>6.1f}x {len(path.breakpoints):>11} "
              f"{len(path.reanchors):>10}", flush=True)
        if done < len(GRID):
            print(f"{'':<18} SVC stopped after {done} of {len(GRID)} fits ({theirs:.0f} s); "
                  f"its time is extrapolated from those", flush=True)
        worst, gap, fit_gap, unexplained, passes = accuracy(path, X, y, config)
        print(f"{'':<18} at 50 random C: objective vs fresh cvxopt worst {worst:.1e} "
              f"({passes}/50 within 1e-7); path gap worst {gap:.1e}; cvxopt's own gap "
              f"worst {fit_gap:.1e}; status differences away from a change: {unexplained}",
              flush=True)


if __name__ == "__main__":
    main()
