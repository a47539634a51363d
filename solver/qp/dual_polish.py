"""An exact step onto the face the interior-point solution points at.

Interior-point alphas approach their bounds but never reach them, and the
free ones are accurate to about the method's tolerance; that leaves a duality
gap near 1e-8 that more rounds cannot remove.  For the sub-QP

    minimise 1/2 a'Qa + c'a,  0 <= a <= u,  y'a = r

stationarity reads Qa + c + nu y = z0 - zu with multipliers z0, zu >= 0 of
the bounds a >= 0 and a <= u.  With the reduced gradient s = Qa + c + nu y,
an interior-point iterate tells the face apart by complementarity: a_i sits
at 0 (set Z) when a_i < s_i, at u_i (set U) when u_i - a_i < -s_i, and is
free (F) otherwise.  The optimum on that face solves one linear system:

    [Q_FF  y_F] [a_F]   [-(c_F + Q_FU u_U)]
    [y_F'   0 ] [nu ] = [ r - y_U' u_U    ]

If a bound variable then has the wrong sign of s, or a free one leaves the
box, the face is corrected and the system solved again (a few active-set
steps).  The result is kept when it is feasible and does not raise the
objective; otherwise the interior-point solution, snapped, stands.
"""

from __future__ import annotations

import cvxopt
import numpy as np
from cvxopt import lapack

FACE_STEPS = 4


def polish(Q, linear, y, upper, rhs, alpha, nu, tau):
    """(alpha, exact): alpha replaced by the exact optimum of its face when that is
    feasible and better (exact = True), else snapped onto its bounds."""
    finite = np.isfinite(upper)
    cap = np.where(finite, upper, np.inf)
    reduced = Q @ alpha + linear + nu * y
    at_zero = alpha < np.maximum(reduced, 0.0)
    at_upper = finite & ~at_zero & (cap - alpha < np.maximum(-reduced, 0.0))
    best = face_optimum(Q, linear, y, cap, rhs, at_zero, at_upper, FACE_STEPS)
    if best is None:
        return _snap(alpha, upper, tau), False
    # against the interior-point solution itself: a snapped one may break y'a = r
    interior = _objective(Q, linear, alpha)
    if _objective(Q, linear, best) > interior + 1e-12 * max(1.0, abs(interior)):
        return _snap(alpha, upper, tau), False
    return best, True


def face_optimum(Q, linear, y, cap, rhs, at_zero, at_upper, steps):
    """The sub-QP's exact optimum found from a guessed face by at most ``steps``
    active-set corrections, or None.  Accepted only when it satisfies every KKT
    condition of the sub-QP (inside the box, multipliers of the right sign):
    for a convex QP that makes it the optimum."""
    for _ in range(steps):
        candidate, nu_face = _solve_face(Q, linear, y, cap, rhs, at_zero, at_upper)
        if candidate is None:
            return None
        reduced = Q @ candidate + linear + nu_face * y
        scale = 1e-12 * max(1.0, float(np.abs(linear).max()))
        wrong_zero = at_zero & (reduced < -scale)
        wrong_upper = at_upper & (reduced > scale)
        free = ~at_zero & ~at_upper
        below, above = free & (candidate < 0), free & (candidate > cap)
        if not (wrong_zero.any() or wrong_upper.any() or below.any() or above.any()):
            return candidate
        at_zero = (at_zero & ~wrong_zero) | below
        at_upper = (at_upper & ~wrong_upper) | above
    return None


def _solve_face(Q, linear, y, cap, rhs, at_zero, at_upper):
    """The face's bordered system, symmetric indefinite: one Bunch-Kaufman
    factorisation (better conditioned here than a Cholesky of Q_FF, which a wide
    kernel makes nearly singular)."""
    free = np.flatnonzero(~at_zero & ~at_upper)
    held = np.flatnonzero(at_upper)
    a = np.where(at_upper, cap, 0.0)
    m = len(free)
    if not m:
        return None, 0.0
    system = np.empty((m + 1, m + 1))
    system[:m, :m] = Q.take(free, axis=0).take(free, axis=1)
    system[:m, m] = system[m, :m] = y[free]
    system[m, m] = 0.0
    right = np.empty(m + 1)
    right[:m] = -(linear[free] + Q.take(free, axis=0).take(held, axis=1) @ cap[held])
    right[m] = rhs - float(y[held] @ cap[held])
    # cvxopt's LAPACK: numpy's threaded solver was ten times slower on a busy 2-core machine
    matrix, solution = cvxopt.matrix(system), cvxopt.matrix(right)
    try:
        lapack.sysv(matrix, solution)
    except ArithmeticError:
        return None, 0.0
    solution = np.array(solution).ravel()
    if not np.isfinite(solution).all():
        return None, 0.0
    a[free] = solution[:m]
    return a, float(solution[m])


def _snap(alpha, upper, tau):
    """Values within tau * C of a bound are put on it (tau * max alpha when hard)."""
    scale = np.where(np.isfinite(upper), upper, max(float(alpha.max()), 1.0))
    alpha = np.where(alpha <= tau * scale, 0.0, alpha)
    return np.where(np.isfinite(upper) & (alpha >= (1 - tau) * upper), upper, alpha)


def _objective(Q, linear, a):
    return 0.5 * float(a @ Q @ a) + float(linear @ a)
