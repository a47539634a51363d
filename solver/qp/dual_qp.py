"""One cvxopt QP of the kernel dual, with the diagonal-G KKT solver.

    minimise   1/2 a'Qa + c'a,   Q_ij = y_i y_j k(x_i, x_j)
    subject to 0 <= a_i <= C_i,  y'a = r

The full problem has c = -1 and r = 0; the working-set solver
(``working_set.py``) hands it sub-problems with other c and r.
"""

from __future__ import annotations

from dataclasses import dataclass

import cvxopt
import numpy as np
from cvxopt import lapack

from solver.errors import NotSeparableError



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
    quadratic: float | None = None   # a'Qa = |w|^2, when the solver has it exactly


def _kktsolver_factory(Q: np.ndarray, y: np.ndarray, hard: bool):
    """KKT systems for G = [-I; I] (or -I when hard) and the equality y'a = c.

    [Q  y  G'  ] [ux]   [bx]     uz = D^-2 (G ux - bz) leaves
    [y' 0  0   ] [uy] = [by]     H ux + y uy = r,  y'ux = by with
    [G  0 -W'W ] [uz]   [bz]     H = Q + diag(e1 + e2),  r = bx - e1 bz1 + e2 bz2,
    solved by one Cholesky of H and a rank-one elimination of uy.
    """
    m = len(y)
    Q_cvx = cvxopt.matrix(Q)

    def kktsolver(W):
        di = _vec(W["di"])
        e1 = di[:m] ** 2
        e2 = np.zeros(m) if hard else di[m:] ** 2
        # cvxopt's own LAPACK: about 3x faster than scipy's at these sizes
        H = +Q_cvx
        np.asarray(H)[np.diag_indices(m)] += e1 + e2   # a view, no copy
        try:
            lapack.potrf(H)        # raises ArithmeticError: cvxopt then stops gracefully
        except ValueError as exc:
            raise ArithmeticError(str(exc)) from None

        def cho_solve(rhs):
            out = cvxopt.matrix(rhs)
            lapack.potrs(H, out)
            return np.frombuffer(out, dtype=float)
        return box_kkt_solve(cho_solve, y, di, hard)
    return kktsolver


def box_kkt_solve(H_solve, y, di, hard):
    """cvxopt's solve(x, y, z) for G = [-I; I] (-I when hard) and one equality y'a = c,
    given H_solve(r) = H^-1 r with H = Q + diag(e1 + e2):

        H ux + y uy = bx - e1 bz1 + e2 bz2,  y'ux = by   (uy by a rank-one elimination),
        W uz = di * (G ux - bz).
    """
    m = len(y)
    e1 = di[:m] ** 2
    e2 = np.zeros(m) if hard else di[m:] ** 2
    Hy = H_solve(y)
    yHy = float(y @ Hy)

    def solve(x, yv, z):
        xv, yy, zv = _vec(x), _vec(yv), _vec(z)
        bz1 = zv[:m].copy()
        r = xv - e1 * bz1
        if not hard:
            bz2 = zv[m:].copy()
            r += e2 * bz2
        Hr = H_solve(r)
        uy = (float(y @ Hr) - yy[0]) / yHy
        ux = Hr - Hy * uy
        xv[:] = ux
        yy[0] = uy
        zv[:m] = di[:m] * (-ux - bz1)
        if not hard:
            zv[m:] = di[m:] * (ux - bz2)
    return solve


def solve_qp(Q, linear, y, upper, rhs, options, hard, start=None):
    """One QP: min 1/2 a'Qa + linear'a, 0 <= a <= upper, y'a = rhs.

    With ``start`` (a feasible point) cvxopt solves for the step d = a - start,

        min 1/2 d'Qd + (linear + Q start)'d,  -start <= d <= upper - start,  y'd = rhs - y'start,

    whose objective is the decrease itself: its relative tolerance then bites on
    the decrease, not on a large constant carried by variables held at C.
    """
    m = len(y)
    origin = np.zeros(m) if start is None else np.asarray(start, dtype=float)
    linear = np.asarray(linear, dtype=float) + (Q @ origin if start is not None else 0.0)
    if hard:
        G = cvxopt.spmatrix(-1.0, range(m), range(m))
        h = cvxopt.matrix(origin.copy())
    else:
        G = cvxopt.sparse([cvxopt.spmatrix(-1.0, range(m), range(m)),
                           cvxopt.spmatrix(1.0, range(m), range(m))])
        h = cvxopt.matrix(np.concatenate([origin, upper - origin]))
    solver_options = {"show_progress": False, "maxiters": options.max_iterations,
                      "abstol": options.abstol, "reltol": options.reltol,
                      "feastol": options.feastol}
    sol = cvxopt.solvers.coneqp(cvxopt.matrix(Q), cvxopt.matrix(linear), G, h,
                                A=cvxopt.matrix(np.asarray(y, dtype=float), (1, m)),
                                b=cvxopt.matrix([float(rhs - y @ origin)]),
                                kktsolver=_kktsolver_factory(Q, y, hard),
                                options=solver_options)
    alpha = origin + np.array(sol["x"]).ravel()
    alpha = np.maximum(alpha, 0.0) if hard else np.clip(alpha, 0.0, upper)
    return alpha, float(sol["y"][0]), int(sol["iterations"]), sol["status"], sol["gap"]


def check_conflicting_duplicates(X, y):
    _, inverse = np.unique(X, axis=0, return_inverse=True)
    inverse = inverse.ravel()
    signs = np.zeros((inverse.max() + 1, 2), dtype=bool)
    signs[inverse, (y > 0).astype(int)] = True
    if (signs.all(axis=1)).any():
        raise NotSeparableError(
            "two points at the same coordinates carry different labels, so no hard "
            "margin exists; use a finite C (a soft margin) instead")
