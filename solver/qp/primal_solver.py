"""The primal over a feature map, solved on a working set of points.

Only points near the band edges decide (w, b).  Split the points into

    Z  held outside the band  (alpha_i = 0: the constraint is inactive),
    U  held inside the band   (alpha_i = C_i: xi_i = 1 - y_i f_i > 0),
    W  the working set,

and the primal becomes a QP over W alone, U entering linearly:

    minimise   1/2 |w|^2 + sum_U C_i (1 - y_i (w.phi_i + b)) + sum_W C_i xi_i
    subject to y_i (w.phi_i + b) >= 1 - xi_i,  xi_i >= 0   (i in W),

i.e. the QP of ``primal.py`` with the extra linear term
-sum_U C_i y_i [phi_i, 1] on v = (w, b).  Its optimum is the full optimum
exactly when every held point keeps its side: y_i f_i >= 1 on Z and
y_i f_i <= 1 on U.  The worst violators join W and the QP is solved again;
W only grows, so the rounds end.  There is no equality constraint in the
primal (b is a free variable), so any split is feasible.
"""

from __future__ import annotations

import logging
from dataclasses import replace

import numpy as np

from solver.errors import ConvergenceError
from solver.qp.subsample import stratified_subsample
from solver.qp.primal_qp import PrimalSolution, check_separable, solve_primal_qp

FULL_QP_LIMIT = 600     # up to this many points: one QP on all of them,
WIDE_FULL_QP_LIMIT = 5_000   # ... and this many for a feature map wider than 2 (polynomial:
                             # 6 or 10 columns; one QP beat the working set at every n from
                             # 1,000 to 5,000, e.g. degree 3, C 1: 18.8 -> 12.7 ms at 1,000,
                             # 28 -> 19 ms at 2,000; linear: the working set wins from 1,500)
SUBSAMPLE = 400         # points in the first, guessing fit
FIRST_WORKING_SET = 150
ADD_PER_ROUND = 100
MAX_ROUNDS = 50
log = logging.getLogger(__name__)   # rounds at DEBUG level: logging.getLogger('solver').setLevel(...)


def solve_primal(phi: np.ndarray, y: np.ndarray, penalties: np.ndarray | None, options,
                 guess_margin: np.ndarray | None = None, refinement: int = 0) -> PrimalSolution:
    """Solve the primal; ``penalties`` None is a hard margin.  ``guess_margin``
    (y_i f_i from a previous fit) seeds the split; ``refinement``: see solve_primal_qp."""
    if penalties is None:
        check_separable(phi, y)
    n = len(y)
    if n <= (FULL_QP_LIMIT if phi.shape[1] <= 2 else WIDE_FULL_QP_LIMIT):
        return solve_primal_qp(phi, y, penalties, options, refinement=refinement)
    if guess_margin is None:
        guess_margin = _margins_from_subsample(phi, y, penalties, options)
    return _solve_on_working_set(phi, y, penalties, options, guess_margin, refinement)


def _solve_on_working_set(phi, y, penalties, options, guess_margin,
                          refinement=0) -> PrimalSolution:
    n = len(y)
    tol = max(1e-7, 10 * options.feastol)
    work = np.zeros(n, dtype=bool)
    # the guess's margins are off by O(1/sqrt(subsample)); so many points sit
    # that close to a band edge that W must start at a multiple of sqrt(n)
    first = max(FIRST_WORKING_SET, int(8 * np.sqrt(n)))
    work[np.argsort(np.abs(guess_margin - 1.0))[:first]] = True
    inside = (guess_margin < 1.0) & ~work if penalties is not None else np.zeros(n, bool)
    iterations = 0
    design = np.column_stack([phi, np.ones(n)]) * y[:, None]      # rows y_i [phi_i, 1]
    for rounds in range(1, MAX_ROUNDS + 1):
        if penalties is not None:
            _balance(work, inside, y, penalties, guess_margin)
        held_in = np.flatnonzero(inside)
        linear_v = None
        if penalties is not None and len(held_in):
            linear_v = -(penalties[held_in] @ design[held_in])
        widx = np.flatnonzero(work)
        sol = solve_primal_qp(phi[widx], y[widx], None if penalties is None
                              else penalties[widx], options, linear_v, refinement)
        iterations += sol.iterations
        margin = design @ np.append(sol.w, sol.b)                  # y_i f(x_i)
        outside_bad = ~work & ~inside & (margin < 1.0 - tol)
        inside_bad = inside & (margin > 1.0 + tol)
        violation = np.where(outside_bad, 1.0 - margin, 0.0) + \
            np.where(inside_bad, margin - 1.0, 0.0)
        if not violation.any():
            alpha = np.zeros(n)
            alpha[widx] = sol.alpha
            if penalties is not None:
                alpha[held_in] = penalties[held_in]
            return replace(sol, alpha=alpha, iterations=iterations)
        count = int(np.count_nonzero(violation))
        log.debug("round %d: |W| = %d, held inside %d, %d violators, worst %.2e",
                  rounds, len(widx), len(held_in), count, violation.max())
        worst = np.argsort(-violation)[:max(ADD_PER_ROUND, count)]
        worst = worst[violation[worst] > 0]
        work[worst] = True
        inside[worst] = False
        guess_margin = margin
    raise ConvergenceError(f"the working-set primal did not settle after {MAX_ROUNDS} rounds")


def _balance(work, inside, y, penalties, margin, batch=20):
    """Grow W (in place) until b's stationarity can hold.

    d/db of the QP is -sum_U C_i y_i - sum_W alpha_i y_i = 0 with
    0 <= alpha_i <= C_i, so sum_U C_i y_i must lie within what W can
    offset; ask for half that room so W is not pinned to its bounds.
    Points of the heavy class held inside, and of the other class held
    outside, nearest to the band edge, join W first.
    """
    order = np.argsort(np.abs(margin - 1.0))
    while True:
        excess = float(penalties[inside] @ y[inside])      # sum_U C_i y_i
        room_neg = float(penalties[work & (y < 0)].sum())
        room_pos = float(penalties[work & (y > 0)].sum())
        if -0.5 * room_pos <= -excess <= 0.5 * room_neg:
            return
        heavy = 1 if excess > 0 else -1
        from_inside = order[inside[order] & (y[order] == heavy)][:batch]
        from_outside = order[~work[order] & ~inside[order] & (y[order] == -heavy)][:batch]
        if len(from_inside) == 0 and len(from_outside) == 0:
            return
        work[from_inside] = True
        inside[from_inside] = False
        work[from_outside] = True


def _margins_from_subsample(phi, y, penalties, options):
    """y_i f(x_i) for all points from a fit on a seeded, stratified subsample.

    The subsample is a tenth of the points (at least SUBSAMPLE) and is itself
    solved this way, so each level hands the next a close guess.  It carries
    m/n of the loss terms, so its C is scaled by n/m to keep the balance of
    1/2 |w|^2 against the loss.
    """
    n = len(y)
    sub = stratified_subsample(y, max(SUBSAMPLE, n // 10))
    sub_penalties = None if penalties is None else penalties[sub] * (n / len(sub))
    if len(sub) <= FULL_QP_LIMIT:
        sol = solve_primal_qp(phi[sub], y[sub], sub_penalties, options)
    else:
        sub_guess = _margins_from_subsample(phi[sub], y[sub], sub_penalties, options)
        sol = _solve_on_working_set(phi[sub], y[sub], sub_penalties, options, sub_guess)
    return y * (phi @ sol.w + sol.b)
