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
        Hy_cvx = cvxopt.matrix(y)
        lapack.potrs(H, Hy_cvx)
        Hy = np.array(Hy_cvx).ravel()
        yHy = float(y @ Hy)

        def cho_solve(factor, rhs):
            out = cvxopt.matrix(rhs)
            lapack.potrs(factor, out)
            return np.frombuffer(out, dtype=float)
        factor = H

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


def solve_qp(Q, linear, y, upper, rhs, options, hard):
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
