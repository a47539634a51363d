"""The face system and the step to the box, for the face steps in Python (``smo``).

On the free set S with the others held at their bounds, the optimum of the
face solves [K_SS 1; 1' 0] [d; b] = [F_S; -e] (e = y'a); a face step moves
alpha_S along d as far as the box allows.  The compiled steps (``face_core``)
do the same in their own loop.
"""

from __future__ import annotations

import cvxopt
import numpy as np
from cvxopt import lapack

NEAR_BOUND = 1e-2                # see step_in_box


def face_system(columns, excess, F, free):
    """(d, b) of [K_SS 1; 1' 0] [d; b] = [F_S; -excess], or None when it is singular.

    By a Cholesky factor of K_SS (with d = K^-1 F_S - b K^-1 1 and b from the
    last row), or, when K_SS is too near singular for one (a wide kernel), by a
    Bunch-Kaufman factorisation of the whole bordered system.
    """
    m = len(free)
    K = columns.block(free)
    factor = cvxopt.matrix(K)
    try:
        lapack.potrf(factor)
        both = cvxopt.matrix(np.column_stack([F[free], np.ones(m)]))
        lapack.potrs(factor, both)
        u, v = np.array(both[:, 0]).ravel(), np.array(both[:, 1]).ravel()
        b = (u.sum() + excess) / v.sum()
        d = u - b * v
        residual = np.abs(K @ d + b - F[free]).max(initial=0.0)
        if np.isfinite(residual) and residual <= 1e-9 * max(1.0, np.abs(F[free]).max()):
            return d, float(b)
    except ArithmeticError:
        pass
    system = np.empty((m + 1, m + 1))
    system[:m, :m] = K
    system[:m, m] = system[m, :m] = 1.0
    system[m, m] = 0.0
    right = np.empty(m + 1)
    right[:m] = F[free]
    right[m] = -excess
    matrix, solution = cvxopt.matrix(system), cvxopt.matrix(right)
    try:
        lapack.sysv(matrix, solution)
    except ArithmeticError:
        return None
    solution = np.array(solution).ravel()
    if not np.isfinite(solution).all():
        return None
    return solution[:m], float(solution[m])


def step_in_box(a, step, cap):
    """(t, new, dropped) for the largest t <= 1 keeping 0 <= a + t step <= cap.

    The variables that reach a bound at t are put exactly on it and dropped;
    so are those the full step would push out of the box that already sit
    within NEAR_BOUND * C of that bound (pair steps leave many such a hair
    off their bound, and one face step per variable would crawl).  Moving those
    breaks y'a = 0 a little, which the next face system restores (and _finish
    before it returns).  (Dropping every variable pushed out when the step is
    short made fits up to 7x slower: true free ones went and came back.)
    """
    target = a + step
    below, above = target < 0, target > cap
    if not (below.any() or above.any()):
        return 1.0, target, np.zeros(len(a), dtype=bool)
    with np.errstate(divide="ignore", invalid="ignore"):
        t_low = np.where(below, a / -step, np.inf)
        t_high = np.where(above, (cap - a) / step, np.inf)
    t = float(min(t_low.min(), t_high.min(), 1.0))
    new = np.clip(a + t * step, 0.0, cap)
    to_low = below & ((t_low <= t * (1 + 1e-12)) | (a <= NEAR_BOUND * cap))
    to_high = above & ((t_high <= t * (1 + 1e-12)) | (a >= (1 - NEAR_BOUND) * cap))
    new[to_low] = 0.0
    new[to_high] = cap[to_high]
    return t, new, to_low | to_high
