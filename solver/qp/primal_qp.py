"""The primal QP over an explicit feature map, O(n) per interior-point iteration.

Variables x = (v, xi) with v = (w, b) in R^(m+1) and slacks xi in R^n.
With A = diag(y) [Phi 1] (n x (m+1)):

    minimise   1/2 |w|^2 + sum_i C_i xi_i
    subject to -A v - xi <= -1      (y_i (w.phi_i + b) >= 1 - xi_i)
                    - xi <=  0

so G = [[-A, -I], [0, -I]] and P = diag(1_m, 0, 0_n).  A hard margin drops
xi: G = -A.  Neither P nor G is ever formed; both are callables, and the KKT
system of each iteration collapses to an (m+1) x (m+1) solve (see
``_kkt_soft``).
"""

from __future__ import annotations

from dataclasses import dataclass

import cvxopt
import numpy as np
from scipy.optimize import linprog

from solver.errors import NotSeparableError


def _vec(matrix) -> np.ndarray:
    """A writable numpy view of a cvxopt column (no copy)."""
    return np.frombuffer(matrix, dtype=float)


@dataclass(frozen=True)
class PrimalSolution:
    w: np.ndarray          # over the feature map
    b: float
    alpha: np.ndarray      # multipliers of the margin constraints
    iterations: int
    status: str
    gap: float             # cvxopt's final duality gap (complementarity)


class _Problem:
    """Operators of one primal QP: phi (n x m), signs y, penalties C (None = hard)."""

    def __init__(self, phi: np.ndarray, y: np.ndarray, penalties: np.ndarray | None,
                 linear_v: np.ndarray | None = None):
        n, m = phi.shape
        self.n, self.m = n, m
        self.hard = penalties is None
        self.A = y[:, None] * np.column_stack([phi, np.ones(n)])   # diag(y) [Phi 1]
        self.At = np.ascontiguousarray(self.A.T)
        self.nv = m + 1
        self.size = self.nv + (0 if self.hard else n)
        self.p_diag = np.zeros(self.nv)
        self.p_diag[:m] = 1.0

        q = np.zeros(self.size)
        if linear_v is not None:
            q[:self.nv] = linear_v     # points held at alpha = C elsewhere (working set)
        if not self.hard:
            q[self.nv:] = penalties
        self.q = cvxopt.matrix(q)
        h = -np.ones(n) if self.hard else np.concatenate([-np.ones(n), np.zeros(n)])
        self.h = cvxopt.matrix(h)
        self.dims = {"l": len(h), "q": [], "s": []}

    # P(u, v): v := alpha P u + beta v, P = diag(1_m, 0, 0_n)
    def P(self, u, v, alpha=1.0, beta=0.0):
        uv, vv = _vec(u), _vec(v)
        vv *= beta
        vv[:self.nv] += alpha * self.p_diag * uv[:self.nv]

    # G(u, v): v := alpha G u + beta v (or G' when trans == 'T')
    def G(self, u, v, alpha=1.0, beta=0.0, trans="N"):
        uv, vv = _vec(u), _vec(v)
        n, nv = self.n, self.nv
        vv *= beta
        if trans == "N":
            Av = self.A @ uv[:nv]
            if self.hard:
                vv -= alpha * Av
            else:
                xi = uv[nv:]
                vv[:n] -= alpha * (Av + xi)
                vv[n:] -= alpha * xi
        else:
            if self.hard:
                vv -= alpha * (self.At @ uv)
            else:
                vv[:nv] -= alpha * (self.At @ uv[:n])
                vv[nv:] -= alpha * (uv[:n] + uv[n:])

    def kktsolver(self, W):
        return self._kkt_hard(W) if self.hard else self._kkt_soft(W)

    def _kkt_soft(self, W):
        """Solve [P G'; G -W'W] [ux; uz] = [bx; bz] and return z := W uz.

        With D^-2 = diag(e1, e2), e = 1/d^2, eliminate uz = D^-2 (G ux - bz):
            (P + G' D^-2 G) ux = bx + G' D^-2 bz =: r
        whose blocks are   [Pv + A'E1A   A'E1   ] [v ]   [rv ]
                           [E1 A         E1 + E2] [xi] = [rxi].
        Eliminating xi (diagonal block) leaves the (m+1) x (m+1) system
            S v = rv - A' (E1/(E1+E2) rxi),  S = Pv + A' diag(E1 E2/(E1+E2)) A,
        then xi = (rxi - E1 A v) / (E1 + E2).
        """
        n, nv, A, At = self.n, self.nv, self.A, self.At
        di = _vec(W["di"])
        e1, e2 = di[:n] ** 2, di[n:] ** 2
        denom = e1 + e2
        joint, share = _combined_scalings(e1, e2)
        S = (At * joint) @ A
        S[np.diag_indices(nv)] += self.p_diag

        def solve(x, y, z):
            xv, zv = _vec(x), _vec(z)
            bz1, bz2 = zv[:n].copy(), zv[n:].copy()
            e1bz1 = e1 * bz1
            rxi = xv[nv:] - e1bz1 - e2 * bz2
            rhs = xv[:nv] - At @ (e1bz1 + share * rxi)
            v = _solve_small(S, rhs)
            Av = A @ v
            with np.errstate(over="ignore", invalid="ignore"):
                xi = (rxi - e1 * Av) / denom
            off = ~np.isfinite(xi)
            if off.any():                  # e1 A v overflowed: the same, divided first
                xi[off] = rxi[off] / denom[off] - share[off] * Av[off]
            xv[:nv] = v
            xv[nv:] = xi
            # W uz = d * D^-2 (G ux - bz) = di * (G ux - bz)
            zv[:n] = di[:n] * (-Av - xi - bz1)
            zv[n:] = di[n:] * (-xi - bz2)
        return solve

    def _kkt_hard(self, W):
        """Hard margin: G = -A, so (P + A' E A) v = bx - A' (E bz), z = di (-A v - bz)."""
        nv, A, At = self.nv, self.A, self.At
        di = _vec(W["di"])
        e = di ** 2
        S = (At * e) @ A
        S[np.diag_indices(nv)] += self.p_diag

        def solve(x, y, z):
            xv, zv = _vec(x), _vec(z)
            bz = zv.copy()
            rhs = xv - At @ (e * bz)
            v = _solve_small(S, rhs)
            xv[:] = v
            zv[:] = di * (-(A @ v) - bz)
        return solve


def _combined_scalings(e1, e2):
    """(E1 E2 / (E1 + E2), E1 / (E1 + E2)) of the soft-margin KKT step, entrywise.

    Near the end of a fit some scalings d^-2 pass 1e154, and E1 E2 overflows though
    the ratio is finite (seen once in the whole suite, as a warning from a linear fit);
    there the same values come from 1 / (1/E1 + 1/E2) and 1 / (1 + E2/E1).  Elsewhere
    they are computed as before, to the bit."""
    with np.errstate(over="ignore", invalid="ignore"):
        joint = e1 * e2 / (e1 + e2)
        share = e1 / (e1 + e2)
    off = ~np.isfinite(joint)
    if off.any():
        joint[off] = 1.0 / (1.0 / e1[off] + 1.0 / e2[off])
    off = ~np.isfinite(share)
    if off.any():
        share[off] = 1.0 / (1.0 + e2[off] / e1[off])
    return joint, share


def _solve_small(S: np.ndarray, rhs: np.ndarray) -> np.ndarray:
    """S v = rhs for the (m+1) x (m+1) reduced system.

    cvxopt ends an iteration gracefully (status 'unknown', last iterate kept)
    on ArithmeticError, so a singular or non-finite S is reported as one.
    """
    try:
        v = np.linalg.solve(S, rhs)
    except np.linalg.LinAlgError as exc:
        raise ArithmeticError(f"singular reduced KKT system: {exc}") from None
    if not np.isfinite(v).all():
        raise ArithmeticError("non-finite step in the reduced KKT system")
    return v


def check_separable(phi: np.ndarray, y: np.ndarray) -> None:
    """Raise NotSeparableError unless some (w, b) has y_i (w.phi_i + b) >= 1 for all i.

    A feasibility LP, minimise 0 subject to -A v <= -1, solved by HiGHS
    (scipy), which proves infeasibility when there is no such v.
    """
    A = y[:, None] * np.column_stack([phi, np.ones(len(y))])
    lp = linprog(np.zeros(A.shape[1]), A_ub=-A, b_ub=-np.ones(len(y)),
                 bounds=[(None, None)] * A.shape[1], method="highs")
    if lp.status == 2:
        raise NotSeparableError(
            "the points are not linearly separable; use a finite C (a soft margin) "
            "instead of a hard margin")


def solve_primal_qp(phi: np.ndarray, y: np.ndarray, penalties: np.ndarray | None,
                    options, linear_v: np.ndarray | None = None,
                    refinement: int = 0) -> PrimalSolution:
    """One primal QP on these points; ``penalties`` None means a hard margin.

    ``linear_v`` adds a linear term on v = (w, b) to the objective.  ``refinement``:
    steps of iterative refinement per KKT solve (cvxopt's option), for a second try
    when a first fit did not converge (see ``fit``): each makes an iteration about
    45% dearer (measured, polynomial, n = 1,000-5,000), so not by default.
    """
    problem = _Problem(phi, y, penalties, linear_v)
    solver_options = {
        "show_progress": False,
        "maxiters": options.max_iterations,
        "abstol": options.abstol,
        "reltol": options.reltol,
        "feastol": options.feastol,
        "refinement": refinement,
    }
    sol = _coneqp(problem, solver_options, penalties)
    x = np.array(sol["x"]).ravel()
    z = np.array(sol["z"]).ravel()
    m = problem.m
    return PrimalSolution(w=x[:m].copy(), b=float(x[m]), alpha=z[:problem.n].copy(),
                          iterations=int(sol["iterations"]), status=sol["status"],
                          gap=float(sol["gap"]) if sol["gap"] is not None else np.inf)


def _coneqp(problem, solver_options, penalties):
    try:
        return cvxopt.solvers.coneqp(problem.P, problem.q, problem.G, problem.h,
                                     problem.dims, kktsolver=problem.kktsolver,
                                     options=solver_options)
    except (ArithmeticError, ValueError, np.linalg.LinAlgError) as exc:
        if penalties is None:
            raise NotSeparableError(
                "the hard-margin problem has no solution the solver can reach "
                f"({exc}); use a finite C instead") from exc
        raise
