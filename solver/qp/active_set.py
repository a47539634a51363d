"""A primal active-set method for a round's sub-QP, started from where it stands.

    minimise 1/2 a'Qa + c'a,  0 <= a <= u,  y'a = r,   from a feasible a0.

A warm start (C or gamma moved a little, or a late round) leaves few
variables to move, and then a few exact steps beat an interior-point solve:
each step solves the equality-constrained problem on the current face (the
free set F; others held at 0 or u, see dual_polish._solve_face), then

- if that optimum is inside the box, bound variables whose multiplier has the
  wrong sign (s_i = (Qa + c + nu y)_i < 0 at 0, > 0 at u) are released into F;
  none left: the KKT conditions hold and the point is the optimum;
- otherwise it moves towards that optimum as far as the box allows, and the
  variables that reach a bound join it.

Every step keeps a feasible and lowers the objective (the direction is a
descent direction of a convex quadratic), so when the step budget runs out
the point reached is still a valid, better iterate for the decomposition.
"""

from __future__ import annotations

import numpy as np

from solver.qp.dual_polish import _solve_face

RELEASE = 8          # violating bound variables released per step, worst first, at least
RELEASE_SHARE = 4    # ... or this share of them (1/4) when there are many


def active_set(Q, linear, y, upper, rhs, a0, steps):
    """(a, optimal): the point reached from the feasible a0, and whether it is the optimum."""
    cap = np.where(np.isfinite(upper), upper, np.inf)
    a = a0.copy()
    at_zero = a <= 0
    at_upper = np.isfinite(cap) & (a >= cap)
    scale = 1e-12 * max(1.0, float(np.abs(linear).max()))
    for _ in range(steps):
        target, nu = _solve_face(Q, linear, y, cap, rhs, at_zero, at_upper)
        if target is None:
            return a, False
        free = ~at_zero & ~at_upper
        below = free & (target < 0)
        above = free & (target > cap)
        if not (below.any() or above.any()):
            a = target
            reduced = Q @ a + linear + nu * y
            wrong = np.where(at_zero, -reduced, np.where(at_upper, reduced, 0.0))
            wrong[wrong <= scale] = 0.0
            if not wrong.any():
                return a, True
            count = max(RELEASE, int(np.count_nonzero(wrong)) // RELEASE_SHARE)
            release = np.argsort(-wrong, kind="stable")[:count]
            release = release[wrong[release] > 0]
            at_zero[release] = False
            at_upper[release] = False
            continue
        # the largest t in (0, 1] keeping a + t (target - a) in the box
        direction = target - a
        with np.errstate(divide="ignore", invalid="ignore"):
            t_low = np.where(below, a / -direction, np.inf)
            t_high = np.where(above, (cap - a) / direction, np.inf)
        t = float(min(t_low.min(), t_high.min(), 1.0))
        a = a + t * direction
        hit_low = below & (t_low <= t * (1 + 1e-12))
        hit_high = above & (t_high <= t * (1 + 1e-12))
        a[hit_low] = 0.0
        a[hit_high] = cap[hit_high]
        at_zero |= hit_low
        at_upper |= hit_high
    return a, False
