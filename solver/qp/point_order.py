"""The RBF dual solved with its points in the order of their first feature.

A narrow Gaussian kernel is local: beyond a distance r = sqrt(REACH / gamma),
k = exp(-gamma d^2) < exp(-REACH), far below what any figure of a fit can show.
With the points in the order of their first feature, the points within r of x_i
along it are one run of indices, found by bisection (``smo_core.window``), and
the compiled steps read and update kernel rows only there: the pair steps' F
update, the rows they compute, the face steps' catch-up.  At gamma 50 on
standardised data that is about half of each row.  The order is a permutation
of the problem, so the solution is put back in the caller's order.

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
    finite only when X is in the order of its first feature and the reach leaves out
    part of its span."""
    first = X[:, 0]
    distance = float(np.sqrt(REACH / gamma))
    if len(first) < 2 or not np.all(first[1:] >= first[:-1]):
        return np.inf
    if 2 * distance >= float(first[-1] - first[0]):
        return np.inf
    return distance


def along_first_feature(solve, X, y, penalties, guess_margin, alpha_start, *rest):
    """solve(X, y, penalties, guess_margin, alpha_start, *rest) on the points in the
    order of their first feature, its DualSolution put back in the given order."""
    order = np.argsort(X[:, 0], kind="stable")
    if np.array_equal(order, np.arange(len(order))):
        return solve(X, y, penalties, guess_margin, alpha_start, *rest)
    taken = [None if a is None else np.asarray(a)[order]
             for a in (X, y, penalties, guess_margin, alpha_start)]
    solution = solve(*taken, *rest)
    alpha, decision = np.empty_like(solution.alpha), np.empty_like(solution.decision)
    alpha[order], decision[order] = solution.alpha, solution.decision
    return replace(solution, alpha=alpha, decision=decision)
