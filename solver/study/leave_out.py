"""The fit without one support vector, by walking its alpha down to zero.

Leaving point c out of the training set gives the same optimum as keeping it
with alpha_c held at 0.  So instead of solving a new QP, start from the full
solution and lower alpha_c continuously while every other point keeps its
optimality conditions (the decremental step of Cauwenberghs & Poggio,
"Incremental and decremental support vector machine learning", NIPS 2000).

Notation (in the space the fit ran in, after feature scaling):

    Q_ij = y_i y_j k(x_i, x_j),   g_j = y_j f(x_j) - 1
    E: points on the band edge (0 < alpha < C_j, g = 0)
    L: points held inside (alpha = C_j, g <= 0);  R: points outside (alpha = 0, g >= 0)

Lowering alpha_c by t keeps g_E = 0 and sum_j alpha_j y_j = 0 when

    [Q_EE  y_E] [d_alpha_E]     [Q_Ec]
    [y_E'   0 ] [   d_b   ] = - [y_c ] * d_alpha_c,       d_alpha_c = -t,

and every margin moves as d_g_j = gamma_j d_alpha_c with
gamma_j = Q_jc + Q_jE beta_E + y_j beta_b.  The walk stops at the first event
(a point of E reaches 0 or C_j; a point of L or R reaches g = 0; alpha_c
reaches 0), moves the point to its new set and goes on.  With E empty, only
b can move: it shifts (alpha fixed) until a point that can take over part of
alpha_c's role reaches the band edge.

Each step costs one small solve (|E| + 1 unknowns) and an O(n |E|) update.
Where the walk cannot go on exactly (a singular E-system: duplicate or
collinear points on the edge; too many steps), the caller refits instead.
"""

from __future__ import annotations

import numpy as np
from scipy.linalg.lapack import dgesv as _gesv

from solver.result import INSIDE, MISCLASSIFIED, ON_MARGIN

MAX_STEPS = 500
_KKT_TOLERANCE = 1e-6
GRAM_LIMIT = 3000      # up to this many points the whole kernel matrix is kept (72 MB)


class PathBroken(Exception):
    """The exact walk cannot continue; refit instead."""


class FeatureSpace:
    """Q through an explicit feature map: Q_jk = y_j y_k phi_j . phi_k (linear, polynomial)."""

    def __init__(self, phi: np.ndarray, y: np.ndarray):
        self.phi, self.y = phi, y
        self.yphi = y[:, None] * phi                           # rows y_j phi_j

        self.largest = float((phi * phi).sum(axis=1).max())    # max_j Q_jj

    width = property(lambda self: self.phi.shape[1])

    def row(self, k: int) -> np.ndarray:
        """What the walk keeps of an edge point: y_k phi_k."""
        return self.yphi[k]

    def edge_system(self, Z, E, c):
        """(Q_EE, Q_Ec) from the kept rows Z = y_E phi_E."""
        return Z @ Z.T, Z @ self.yphi[c]

    def gamma(self, Z, c, beta, beta_b):
        """Q_:c + Q_:E beta + y beta_b = y (phi . (y_c phi_c + sum_E beta_k y_k phi_k) + beta_b)."""
        direction = self.yphi[c] + beta @ Z
        return self.y * (self.phi @ direction + beta_b)


class GramSpace:
    """Q from the kernel matrix, whole (n <= GRAM_LIMIT) or by cached columns."""

    def __init__(self, kernel_block, n: int, y: np.ndarray):
        self.y = y
        self._block = kernel_block                             # kernel_block(rows, cols) -> K
        self.Q = None
        if n <= GRAM_LIMIT:
            everything = np.arange(n)
            self.Q = (y[:, None] * y[None, :]) * kernel_block(everything, everything)
        self._rows: dict[int, np.ndarray] = {}
        self.largest = 1.0 if self.Q is None else float(np.abs(np.diag(self.Q)).max())

    width = property(lambda self: len(self.y))

    def row(self, k: int) -> np.ndarray:
        """Q[k, :] (= Q[:, k]), what the walk keeps of an edge point."""
        if self.Q is not None:
            return self.Q[k]
        row = self._rows.get(k)
        if row is None:
            row = self.y[k] * self.y * self._block(np.array([k]), None)[0]
            self._rows[k] = row
        return row

    def rows(self, E) -> np.ndarray:
        return self.Q[E] if self.Q is not None else np.vstack([self.row(k) for k in E])

    def edge_system(self, R, E, c):
        """(Q_EE, Q_Ec) from the kept rows R = Q[E, :]."""
        return R[:, E], R[:, c]

    def gamma(self, R, c, beta, beta_b):
        """Q_:c + Q_:E beta + y beta_b."""
        return self.row(c) + beta @ R + self.y * beta_b


class LeaveOut:
    """Leave-one-out solutions of a FitResult, in the space its fit ran in.

    ``space`` is a FeatureSpace or GramSpace over the training points.
    """

    def __init__(self, result, space):
        self.y = np.asarray(result.y, dtype=float)
        self.C = np.asarray(result.penalties, dtype=float)
        self.space = space
        status, support = result.status, np.zeros(len(self.y), dtype=bool)
        support[result.support] = True
        edge = (status == ON_MARGIN) & support
        held = ((status == INSIDE) | (status == MISCLASSIFIED)) & support & np.isfinite(self.C)
        held &= ~edge
        # snap the interior-point solution onto its partition: alpha exactly 0 or C
        alpha = np.where(support, np.asarray(result.alpha, dtype=float), 0.0)
        alpha[held] = self.C[held]
        self.alpha = alpha
        self.g0 = self.y * np.asarray(result.decision, dtype=float) - 1.0
        self.g0[edge] = 0.0
        # side of each point: +1 outside the band (g >= 0), -1 held inside (g <= 0), 0 edge
        self.side0 = np.where(edge, 0.0, np.where(held, -1.0, 1.0))
        self.edge0 = [int(k) for k in np.flatnonzero(edge)]
        self.b0 = float(result.model.b)
        self._tiny = 1e-12 * max(1e-300, space.largest)

    def without(self, c: int):
        """(changed indices S, new alpha on S, new b, new g) of the fit without point c.

        S includes c (whose new alpha is 0); g_j = y_j f_without(x_j) - 1 for
        every training point.  Raises PathBroken when the walk cannot go on exactly.
        """
        y, C, space, tiny = self.y, self.C, self.space, self._tiny
        alpha, g, side = self.alpha.copy(), self.g0.copy(), self.side0.copy()
        b = self.b0
        side[c] = 0.0                  # c takes no part in the events
        E = [k for k in self.edge0 if k != c]
        changed = {c, *E}
        # rows of the edge points, slot i for E[i]: one row in or out per step, not |E|
        kept = np.empty((max(16, 2 * len(E)), space.width))
        for i, k in enumerate(E):
            kept[i] = space.row(k)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            for _ in range(MAX_STEPS):
                if alpha[c] <= 0.0:
                    break
                if not E:
                    b = self._shift_b(c, g, b, side, E)
                    changed.update(E)
                    kept[0] = space.row(E[0])
                    continue
                Ei = np.array(E)
                m = len(E)
                rows = kept[:m]
                Q_EE, Q_Ec = space.edge_system(rows, Ei, c)
                y_E = y[Ei]
                M = np.empty((m + 1, m + 1))
                M[:m, :m] = Q_EE
                M[:m, m] = y_E
                M[m, :m] = y_E
                M[m, m] = 0.0
                rhs = np.empty(m + 1)
                rhs[:m] = -Q_Ec
                rhs[m] = -y[c]
                solution = _solve(M, rhs)
                beta, beta_b = solution[:m], solution[m]
                gamma = space.gamma(rows, c, beta, beta_b)     # d_g = gamma d_alpha_c
                # edge points reaching a bound: alpha_k - beta_k t = 0 (beta > 0) or C_k
                a_E = alpha[Ei]
                t_bound = np.where(beta > 0, a_E, a_E - C[Ei]) / beta
                t_bound[~(t_bound >= 0)] = np.inf
                # off-edge points moving towards g = 0 (g moves by -gamma t)
                t_join = g / gamma
                t_join[side * gamma <= tiny] = np.inf
                t, kind, k = alpha[c], 0, c
                kb, kj = int(t_bound.argmin()), int(t_join.argmin())
                if t_bound[kb] < t:
                    t, kind, k = t_bound[kb], 1, kb
                if t_join[kj] < t:
                    t, kind, k = t_join[kj], 2, kj
                t = max(float(t), 0.0)
                # d_alpha_c = -t: alpha_E moves by -beta t, b by -beta_b t, g by -gamma t
                alpha[c] -= t
                alpha[Ei] -= beta * t
                b -= beta_b * t
                g -= gamma * t
                g[Ei] = 0.0
                if kind == 1:                 # edge point E[k] reached 0 (-> outside) or C
                    point = E[k]
                    side[point] = 1.0 if beta[k] > 0 else -1.0
                    alpha[point] = 0.0 if beta[k] > 0 else C[point]
                    E[k] = E[-1]              # the last slot fills the gap
                    kept[k] = kept[m - 1]
                    E.pop()
                elif kind == 2:
                    if m == len(kept):
                        kept = np.vstack([kept, np.empty_like(kept)])
                    kept[m] = space.row(k)
                    E.append(k)
                    changed.add(k)
                    side[k], g[k] = 0.0, 0.0
            else:
                raise PathBroken(f"no end after {MAX_STEPS} steps")
            alpha[c] = 0.0
            self._check(alpha, g, side, E)
        S = np.array(sorted(changed))
        return S, alpha[S], b, g

    def _shift_b(self, c, g, b, side, E):
        """No point on the edge: move b (alpha fixed) in direction -y_c until a point
        of c's class outside the band, or of the other class held inside, reaches it."""
        y = self.y
        direction = -y[c]
        # d_g_j = y_j * direction * step: those with side_j * y_j * direction < 0 approach 0
        approaching = side * y * direction < 0
        if not approaching.any():
            raise PathBroken("no point can take the place of the left-out one")
        distance = np.where(approaching, np.abs(g), np.inf)
        k = int(np.argmin(distance))
        step = float(distance[k])
        g += y * (direction * step)
        g[k], side[k] = 0.0, 0.0
        E.append(k)
        return b + direction * step

    def _check(self, alpha, g, side, E):
        """The end point must satisfy the optimality conditions of the smaller problem:
        g >= 0 outside (side +1), g <= 0 held inside (side -1), 0 <= alpha_E <= C_E."""
        tol = _KKT_TOLERANCE
        a_E = alpha[E]
        if (float((g * side).min()) < -tol or (len(E) and (a_E.min() < -tol or
                                                           (a_E > self.C[E] * (1 + tol)).any()))
                or abs(float(alpha @ self.y)) > tol * max(1.0, float(alpha.sum()))):
            raise PathBroken("the end point fails the optimality check")


def _solve(M, rhs):
    """x with M x = rhs: LAPACK's gesv (numpy's solve costs more than the solve here).

    Rounded readings make the edge system singular often: duplicate points, or
    more points on a band edge than the feature space has dimensions.  The
    system is then still consistent (every edge point satisfies y f = 1), and
    any solution is a valid direction; the least-norm one is taken, provided
    it solves the system to rounding accuracy.
    """
    _, _, x, info = _gesv(M, rhs)
    if info == 0 and np.abs(x).max() < 1e8:         # False for NaN too
        return x
    x = np.linalg.lstsq(M, rhs, rcond=1e-12)[0]
    if not np.abs(M @ x - rhs).max() <= 1e-9 * max(1.0, float(np.abs(rhs).max())):
        raise PathBroken("the edge system has no solution")
    return x
