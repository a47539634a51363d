"""The RBF dual solved with its points in the order of their first feature.

A narrow Gaussian kernel is local: beyond a distance r = sqrt(REACH / gamma),
k = exp(-gamma d^2) < exp(-REACH), far below what any figure of a fit can show.
With the points in the order of their first feature, the points within r of x_i
along it are one run of indices, found by bisection (``smo_core.window``), and
the compiled steps read and update kernel rows only there: the pair steps' F
update, the rows they compute, the face steps' catch-up.  At gamma 50 on
standardised data that is about half of each row.  The order is a permutation
of the problem, so the solution is put back in the caller's order.

Kernel values below exp(-REACH) are computed as 0 anywhere in the solver's rows
(``smo_core.FLOOR``): in this order a kernel block is nearly banded, and its far
entries (1e-200) made LAPACK's Cholesky factor of a working set 3.4 times slower
on products below the smallest normal double (900 points at gamma 50: 20.6 ms,
6.1 ms with them 0; the face steps' own factor likewise).
The entries left out are at most exp(-REACH) = 1e-20 each, also in the rows the
steps leave in the cache, which the certificate reads (``smo._fresh_F``): F
differs from the exact kernel's by at most 1e-20 sum(alpha), under 1e-12 at
n = 10,000 and C = 1e4, where a fit promises a relative gap of 1e-8.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

REACH = 46.0          # -ln of the kernel values the compiled steps treat as 0


def reach(X, gamma) -> float:
    """How far along the first feature the compiled steps read a row (inf: all of it):
    finite only when X is in the order of its first feature and a row's reach, 2 r, is
    at most half its span.  (Wider, the order saved nothing and cost 5-10%: n = 5,000
    blobs, gamma 2 and 10, n = 10,000 gamma 10, C 1, measured side by side.)"""
    first = X[:, 0]
    distance = float(np.sqrt(REACH / gamma))
    if len(first) < 2 or not np.all(first[1:] >= first[:-1]):
        return np.inf
    if 4 * distance > float(first[-1] - first[0]):
        return np.inf
    return distance


def along_first_feature(solve, gamma, X, y, penalties, guess_margin, alpha_start, *rest):
    """solve(X, y, penalties, guess_margin, alpha_start, *rest) on the points in the
    order of their first feature, its DualSolution put back in the given order; as
    they are when the order would not give the rows a finite reach."""
    order = np.argsort(X[:, 0], kind="stable")
    if np.array_equal(order, np.arange(len(order))) or reach(X[order], gamma) == np.inf:
        return solve(X, y, penalties, guess_margin, alpha_start, *rest)
    taken = [None if a is None else np.asarray(a)[order]
             for a in (X, y, penalties, guess_margin, alpha_start)]
    solution = solve(*taken, *rest)
    alpha, decision = np.empty_like(solution.alpha), np.empty_like(solution.decision)
    alpha[order], decision[order] = solution.alpha, solution.decision
    return replace(solution, alpha=alpha, decision=decision)
