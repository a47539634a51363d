"""b and the duality gap of the whole kernel dual, from alpha and its gradient.

With g = Qa - 1 and G_i = -y_i g_i, the decision function on the training
points is f_i = y_i (g_i + 1) + b, so the hinge loss of point i is

    max(0, 1 - y_i f_i) = max(0, -g_i - y_i b) = max(0, y_i (G_i - b)).

For a fixed alpha the primal objective

    P(b) = 1/2 a'Qa + sum_i C_i max(0, y_i (G_i - b))

is convex and piecewise linear in b with kinks at the G_i; its slope is
sum_{y_i = -1, G_i < b} C_i - sum_{y_i = +1, G_i > b} C_i.  The b reported
minimises P, so the gap P - D (D = 1'a - 1/2 a'Qa) is the smallest this alpha
allows.  At the optimum the minimiser satisfies the KKT conditions over all
points: b = G_i on every free support vector; with none free, every b in the
interval between the kinks where the slope changes sign is optimal and the
midpoint is taken.  A sub-QP's equality multiplier is the right b only for
its own sub-problem, so it is never used.
"""

from __future__ import annotations

import numpy as np


def intercept(G: np.ndarray, y: np.ndarray, upper: np.ndarray, alpha: np.ndarray) -> float:
    """The b minimising P(b) (the midpoint of the minimisers when they form an interval)."""
    if not np.isfinite(upper).all():
        return _hard_intercept(G, y, alpha, upper)
    order = np.argsort(G, kind="stable")
    kinks, weights = G[order], np.where(y[order] > 0, upper[order], -upper[order])
    # slope just right of kink k: sum_{y=-1, G <= kink} C - sum_{y=+1, G > kink} C
    positive_total = float(upper[y > 0].sum())
    passed_neg = np.cumsum(np.where(weights < 0, -weights, 0.0))
    passed_pos = np.cumsum(np.where(weights > 0, weights, 0.0))
    slope_right = passed_neg - (positive_total - passed_pos)
    # sums of C_i carry rounding: a slope within eps of zero is zero
    eps = 1e-12 * float(upper.sum())
    k = int(np.searchsorted(slope_right, -eps, side="left"))  # first kink with slope >= 0
    if k >= len(kinks):
        return float(kinks[-1])
    if slope_right[k] > eps or k + 1 >= len(kinks):
        return float(kinks[k])
    # slope exactly zero between kinks k and k+1: every b there is optimal
    return float(0.5 * (kinks[k] + kinks[k + 1]))


def _hard_intercept(G, y, alpha, upper):
    """Hard margin: b in [max_{can go up} G, min_{can go down} G], its midpoint."""
    up = np.where(y > 0, alpha < upper, alpha > 0)
    down = np.where(y > 0, alpha > 0, alpha < upper)
    low = float(G[up].max()) if up.any() else float(G[down].min())
    high = float(G[down].min()) if down.any() else low
    return 0.5 * (low + high)


def objectives(alpha, gradient, y, upper, b) -> tuple[float, float]:
    """(primal P(b), dual D) of the whole problem."""
    quadratic = float(alpha @ (gradient + 1.0))          # a'Qa = a'(g + 1)
    dual = float(alpha.sum()) - 0.5 * quadratic
    loss = np.maximum(0.0, -gradient - y * b)             # max(0, 1 - y_i f_i)
    finite = np.isfinite(upper)
    if not finite.all() and float(loss[~finite].max(initial=0.0)) > 0:
        return np.inf, dual
    primal = 0.5 * quadratic + float(upper[finite] @ loss[finite])
    return primal, dual


def relative_gap(primal: float, dual: float) -> float:
    return abs(primal - dual) / max(1.0, abs(primal))


def violation(G, y, alpha, upper) -> float:
    """max_{i can go up} G_i - min_{i can go down} G_i (<= 0 at an exact optimum)."""
    up = np.where(y > 0, alpha < upper, alpha > 0)
    down = np.where(y > 0, alpha > 0, alpha < upper)
    if not up.any() or not down.any():
        return 0.0
    return float(G[up].max() - G[down].min())
