"""The kernel dual on a working set, with shrinking.

    minimise   1/2 a'Qa - 1'a,   Q_ij = y_i y_j k(x_i, x_j)
    subject to 0 <= a_i <= C_i,  y'a = 0

Only a working set W of free candidates (points near f = +-1) enters the QP.
Every other variable is fixed at 0 or at C_i; the fixed-at-C ones move into
the linear term and the equality's right-hand side:

    minimise   1/2 a_W' Q_WW a_W + (Q_WU C_U - 1)' a_W
    subject to 0 <= a_W <= C_W,  y_W' a_W = -y_U' C_U

After each round the KKT conditions are checked on all points with the new
b; violators join W and settled variables leave it, until none is violated.
"""

from __future__ import annotations

from dataclasses import dataclass

import cvxopt
import numpy as np
from scipy.linalg import cho_factor, cho_solve

from .errors import ConvergenceError, NotSeparableError

FULL_QP_LIMIT = 250       # below this many points, one QP on all of them
FIRST_ROUND = 120         # size of the first working set guessed from a subsample
MAX_ROUNDS = 60


def _vec(matrix) -> np.ndarray:
    return np.frombuffer(matrix, dtype=float)


@dataclass(frozen=True)
class DualSolution:
    alpha: np.ndarray
    b: float
    decision: np.ndarray   # f(x_i) on all points
    iterations: int
    rounds: int
    working_set: int
    status: str
    gap: float


def _kktsolver_factory(Q: np.ndarray, y: np.ndarray, hard: bool):
    """KKT systems for G = [-I; I] (or -I when hard) and the equality y'a = c.

    [Q  y  G'  ] [ux]   [bx]     uz = D^-2 (G ux - bz) leaves
    [y' 0  0   ] [uy] = [by]     H ux + y uy = r,  y'ux = by with
    [G  0 -W'W ] [uz]   [bz]     H = Q + diag(e1 + e2),  r = bx - e1 bz1 + e2 bz2,
    solved by one Cholesky of H and a rank-one elimination of uy.
    """
    m = len(y)

    def kktsolver(W):
        di = _vec(W["di"])
        e1 = di[:m] ** 2
        e2 = np.zeros(m) if hard else di[m:] ** 2
        H = Q.copy()
        H[np.diag_indices(m)] += e1 + e2
        factor = cho_factor(H)
        Hy = cho_solve(factor, y)
        yHy = float(y @ Hy)

        def solve(x, yv, z):
            xv, yy, zv = _vec(x), _vec(yv), _vec(z)
            bz1 = zv[:m].copy()
            r = xv - e1 * bz1
            if not hard:
                bz2 = zv[m:].copy()
                r += e2 * bz2
            Hr = cho_solve(factor, r)
            uy = (float(y @ Hr) - yy[0]) / yHy
            ux = Hr - Hy * uy
            xv[:] = ux
            yy[0] = uy
            zv[:m] = di[:m] * (-ux - bz1)          # W uz = di * (G ux - bz)
            if not hard:
                zv[m:] = di[m:] * (ux - bz2)
        return solve
    return kktsolver


def _solve_qp(Q, linear, y, upper, rhs, options, hard):
    """One QP: min 1/2 a'Qa + linear'a, 0 <= a <= upper, y'a = rhs."""
    m = len(y)
    if hard:
        G = cvxopt.spmatrix(-1.0, range(m), range(m))
        h = cvxopt.matrix(np.zeros(m))
    else:
        G = cvxopt.sparse([cvxopt.spmatrix(-1.0, range(m), range(m)),
                           cvxopt.spmatrix(1.0, range(m), range(m))])
        h = cvxopt.matrix(np.concatenate([np.zeros(m), upper]))
    solver_options = {"show_progress": False, "maxiters": options.max_iterations,
                      "abstol": options.abstol, "reltol": options.reltol,
                      "feastol": options.feastol}
    sol = cvxopt.solvers.coneqp(cvxopt.matrix(Q), cvxopt.matrix(linear), G, h,
                                A=cvxopt.matrix(np.asarray(y, dtype=float), (1, m)), b=cvxopt.matrix([float(rhs)]),
                                kktsolver=_kktsolver_factory(Q, y, hard),
                                options=solver_options)
    alpha = np.array(sol["x"]).ravel()
    alpha = np.clip(alpha, 0.0, upper)
    return alpha, float(sol["y"][0]), int(sol["iterations"]), sol["status"], sol["gap"]


class _KernelRows:
    """k(x_i, x_j) on demand; Q is never formed beyond the working set."""

    def __init__(self, X, kernel_matrix):
        self.X = X
        self.kernel_matrix = kernel_matrix

    def block(self, rows, cols):
        return self.kernel_matrix(self.X[rows], self.X[cols])


def solve_dual(X, y, penalties, kernel_matrix, options, guess_margin=None) -> DualSolution:
    """Solve the kernel dual; ``penalties`` holds C_i (inf everywhere = hard margin)."""
    y = np.asarray(y, dtype=float)
    n = len(y)
    hard = bool(np.isinf(penalties).all())
    if hard:
        _check_conflicting_duplicates(X, y)
    K = _KernelRows(X, kernel_matrix)
    upper = np.where(np.isinf(penalties), 0.0, penalties)  # unused when hard
    if n <= FULL_QP_LIMIT:
        return _solve_all(K, y, penalties, upper, options, hard)

    if guess_margin is None:
        guess_margin = _margins_from_subsample(X, y, penalties, kernel_matrix, options)
    at_c, work = _initial_partition(guess_margin, hard)
    alpha = np.zeros(n)
    b, iterations, status, gap = 0.0, 0, "optimal", 0.0
    kkt_tol = max(1e-7, 10 * options.feastol)
    for rounds in range(1, MAX_ROUNDS + 1):
        work = _make_feasible(work, at_c, y, upper, hard, guess_margin)
        fixed_c = np.flatnonzero(at_c & ~work)
        widx = np.flatnonzero(work)
        alpha[:] = 0.0
        alpha[fixed_c] = upper[fixed_c]
        yw = y[widx]
        Kww = K.block(widx, widx)
        Q = yw[:, None] * yw[None, :] * Kww
        linear = -np.ones(len(widx))
        if len(fixed_c):
            linear += yw * (K.block(widx, fixed_c) @ (y[fixed_c] * upper[fixed_c]))
        rhs = -float(y[fixed_c] @ upper[fixed_c])
        a_w, b, its, status, gap = _solve_qp(Q, linear, yw, upper[widx], rhs, options, hard)
        iterations += its
        alpha[widx] = a_w
        support = np.flatnonzero(alpha > 0)
        decision = K.block(np.arange(n), support) @ (alpha[support] * y[support]) + b
        margin = y * decision
        # KKT on the variables outside W: zero needs y f >= 1, at C needs y f <= 1.
        zero_bad = ~work & ~at_c & (margin < 1 - kkt_tol)
        c_bad = ~work & at_c & (margin > 1 + kkt_tol)
        if not (zero_bad.any() or c_bad.any()):
            return DualSolution(alpha, b, decision, iterations, rounds, len(widx), status,
                                float(gap) if gap is not None else np.inf)
        # Shrink: variables in W that settled well away from the band leave it.
        bound = ~hard & (upper > 0) & (alpha >= upper * (1 - 1e-9))
        settled_zero = work & (alpha <= 1e-9 * np.maximum(upper, 1.0)) & (margin > 1.5)
        settled_c = work & bound & (margin < 0.5)
        at_c = bound
        work = (work & ~settled_zero & ~settled_c) | zero_bad | c_bad
        guess_margin = margin
    raise ConvergenceError(f"the working-set solver did not settle after {MAX_ROUNDS} rounds")


def _solve_all(K, y, penalties, upper, options, hard) -> DualSolution:
    n = len(y)
    idx = np.arange(n)
    Kall = K.block(idx, idx)
    Q = y[:, None] * y[None, :] * Kall
    alpha, b, its, status, gap = _solve_qp(Q, -np.ones(n), y.astype(float), upper, 0.0,
                                           options, hard)
    decision = Kall @ (alpha * y) + b
    return DualSolution(alpha, b, decision, its, 1, n, status,
                        float(gap) if gap is not None else np.inf)


def _margins_from_subsample(X, y, penalties, kernel_matrix, options):
    """y f(x) on all points from a fit on a seeded, stratified subsample."""
    rng = np.random.default_rng(0)
    picks = []
    for sign in (-1, 1):
        members = np.flatnonzero(y == sign)
        share = max(2, int(round(FULL_QP_LIMIT * len(members) / len(y))))
        picks.append(rng.choice(members, size=min(share, len(members)), replace=False))
    sub = np.sort(np.concatenate(picks))
    sol = _solve_all(_KernelRows(X[sub], kernel_matrix), y[sub], penalties[sub],
                     np.where(np.isinf(penalties[sub]), 0.0, penalties[sub]), options,
                     bool(np.isinf(penalties).all()))
    support = np.flatnonzero(sol.alpha > 0)
    decision = kernel_matrix(X, X[sub][support]) @ (sol.alpha[support] * y[sub][support]) + sol.b
    return y * decision


def _initial_partition(margin, hard):
    """Guess: deep inside the band -> at C; the FIRST_ROUND nearest |y f - 1| -> W."""
    n = len(margin)
    closeness = np.abs(margin - 1.0)
    work = np.zeros(n, dtype=bool)
    work[np.argsort(closeness)[:min(n, FIRST_ROUND)]] = True
    at_c = np.zeros(n, dtype=bool) if hard else (margin < 1.0) & ~work
    return at_c, work


def _make_feasible(work, at_c, y, upper, hard, margin):
    """Grow W until y_W' a_W = -y_U' C_U has a solution inside the box."""
    if hard:
        return work
    work = work.copy()
    order = np.argsort(np.abs(margin - 1.0))
    while True:
        fixed_c = at_c & ~work
        rhs = -float(y[fixed_c] @ upper[fixed_c])
        low = -float(upper[work & (y < 0)].sum())
        high = float(upper[work & (y > 0)].sum())
        if low <= rhs <= high and work.sum() >= 2:
            return work
        # the class whose fixed-at-C points outweigh the other needs room in W
        excess = 1 if rhs < low else -1
        candidates = [i for i in order if not work[i] and (y[i] == -excess or
                                                             (at_c[i] and y[i] == excess))]
        if not candidates:
            return work | True
        work[candidates[:max(1, len(candidates) // 10)]] = True


def _check_conflicting_duplicates(X, y):
    _, inverse = np.unique(X, axis=0, return_inverse=True)
    inverse = inverse.ravel()
    signs = np.zeros((inverse.max() + 1, 2), dtype=bool)
    signs[inverse, (y > 0).astype(int)] = True
    if (signs.all(axis=1)).any():
        raise NotSeparableError(
            "two points at the same coordinates carry different labels, so no hard "
            "margin exists; use a finite C (a soft margin) instead")
