"""A first solve of the whole kernel dual on a low-rank kernel (Fine & Scheinberg,
"Efficient SVM Training Using Low-Rank Kernel Representations", JMLR 2, 2001).

A pivoted (incomplete) Cholesky factor gives K ~ V'V + diag(d): V is r x n,
built one pivot at a time from the column of the largest residual diagonal,
and d keeps the residual diagonal so that k(x, x) stays exact.  With it the
interior-point KKT system of the whole problem,

    H = Y (V'V + diag(d)) Y + diag(e1 + e2) = diag(s) + U'U,   U = V Y,

is solved through Sherman-Morrison-Woodbury in O(n r^2) per iteration:

    H^-1 r = r/s - (1/s) U' M^-1 U (r/s),   M = I + V diag(1/s) V'   (r x r),

and the equality y'a = 0 by the same rank-one elimination as in dual_qp.
The answer is an approximation (the kernel is not exact); the decomposition
starts from it and restores the exact kernel.
"""

from __future__ import annotations

import cvxopt
import numpy as np
from cvxopt import lapack

from solver.qp.dual_qp import box_kkt_solve

DIAGONAL_BLOCK = 256


def kernel_diagonal(columns) -> np.ndarray:
    """k(x_i, x_i) for every point, in blocks (the diagonals of small Gram blocks)."""
    X = columns.X
    out = np.empty(len(X))
    for start in range(0, len(X), DIAGONAL_BLOCK):
        part = X[start:start + DIAGONAL_BLOCK]
        out[start:start + len(part)] = np.diagonal(columns.kernel_matrix(part, part))
    return out


def pivoted_cholesky(columns, max_rank: int, tol: float):
    """(V, d, pivots): K ~ V'V + diag(d), pivoting on the largest residual diagonal,
    until it is at most tol (relative to the largest k(x, x)) or r = max_rank."""
    n = len(columns.X)
    residual = kernel_diagonal(columns)
    stop = tol * float(residual.max())
    V = np.empty((min(max_rank, n), n))
    pivots = []
    for k in range(len(V)):
        i = int(np.argmax(residual))
        if residual[i] <= stop:
            break
        column = columns.rows(np.array([i]))[0]
        if k:
            column = column - V[:k, i] @ V[:k]          # K[:, i] - V' V[:, i]
        V[k] = column / np.sqrt(residual[i])
        residual -= V[k] ** 2
        residual[i] = 0.0
        np.maximum(residual, 0.0, out=residual)
        pivots.append(i)
    r = len(pivots)
    return V[:r], residual, np.array(pivots, dtype=np.intp)


def solve_low_rank(V, d, y, upper, options, hard):
    """Interior-point solution of min 1/2 a'Q~a - 1'a, 0 <= a <= C, y'a = 0 with
    Q~ = Y (V'V + diag(d)) Y.  Returns (alpha, b, iterations, status)."""
    n = len(y)

    def P(u, v, alpha=1.0, beta=0.0):
        uy = y * np.frombuffer(u, dtype=float)
        out = y * (V.T @ (V @ uy) + d * uy)
        vv = np.frombuffer(v, dtype=float)
        vv *= beta
        vv += alpha * out

    if hard:
        G = cvxopt.spmatrix(-1.0, range(n), range(n))
        h = cvxopt.matrix(np.zeros(n))
    else:
        G = cvxopt.sparse([cvxopt.spmatrix(-1.0, range(n), range(n)),
                           cvxopt.spmatrix(1.0, range(n), range(n))])
        h = cvxopt.matrix(np.concatenate([np.zeros(n), upper]))
    solver_options = {"show_progress": False, "maxiters": options.max_iterations,
                      "abstol": options.abstol, "reltol": options.reltol,
                      "feastol": options.feastol}
    try:
        sol = cvxopt.solvers.coneqp(P, cvxopt.matrix(-np.ones(n)), G, h,
                                    A=cvxopt.matrix(y, (1, n)), b=cvxopt.matrix([0.0]),
                                    kktsolver=_kktsolver_factory(V, d, y, hard),
                                    options=solver_options)
    except (ArithmeticError, ValueError):
        return None
    alpha = np.array(sol["x"]).ravel()
    alpha = np.maximum(alpha, 0.0) if hard else np.clip(alpha, 0.0, upper)
    return alpha, float(sol["y"][0]), int(sol["iterations"]), sol["status"]


def _kktsolver_factory(V, d, y, hard):
    """As dual_qp's KKT solver, with H^-1 through Sherman-Morrison-Woodbury."""
    n = len(y)
    r = len(V)

    def kktsolver(W):
        di = np.frombuffer(W["di"], dtype=float)
        e1 = di[:n] ** 2
        e2 = np.zeros(n) if hard else di[n:] ** 2
        s = d + e1 + e2
        inv_s = 1.0 / s
        M = cvxopt.matrix((V * inv_s) @ V.T)
        np.asarray(M)[np.diag_indices(r)] += 1.0
        try:
            lapack.potrf(M)
        except ValueError as exc:
            raise ArithmeticError(str(exc)) from None

        def H_solve(rhs):
            t = rhs * inv_s
            z = cvxopt.matrix(V @ (y * t))
            lapack.potrs(M, z)
            return t - inv_s * (y * (V.T @ np.frombuffer(z, dtype=float)))

        return box_kkt_solve(H_solve, y, di, hard)
    return kktsolver
