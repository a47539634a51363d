"""Face systems of the RBF finish from one Cholesky factor, kept across steps.

Each face step of ``smo._face_steps`` solves, on the current free set S,

    K_SS d + b 1 = F_S,   1'd = -e.

From one step to the next S loses the few variables that reached a bound
(D) or gains the few released (A).  Refactoring K_SS each time costs |S|^3/3;
instead the factor of K_00 on the set S0 it was made for is kept and the
change is eliminated through a small Schur complement: with T = S0 + A,

    [K_00  K_0A  1  E_D] [x0]   [F_0]      E_D: unit columns at D,
    [K_A0  K_AA  1   0 ] [xA] = [F_A]      its multipliers take up the rows
    [1'    1'    0   0 ] [b ]   [-e ]      of D, whose d is held at 0
    [E_D'  0     0   0 ] [mu]   [ 0 ]

x0 = K_00^-1 (F_0 - K_0A xA - b 1 - E_D mu) leaves a system of size
|A| + 1 + |D|; a step costs |S0|^2 (|A| + |D| + 2).  After REFACTOR changes
the factor is made afresh on the current S.
"""

from __future__ import annotations

import numpy as np
import scipy.linalg as sla

REFACTOR = 48       # changes to S0 (dropped + added) before a fresh factor
CHECKED = 32        # rows of the face system checked after each solve


class FaceFactor:
    """Solves face systems on free sets near the one its factor was made for."""

    def __init__(self, columns):
        self.columns = columns
        self.base = None            # S0, sorted indices
        self.factor = None
        self.ones = None            # K_00^-1 1
        self.solved = {}

    def solve(self, free, F, excess):
        """(d over ``free``, b), or None when K_SS admits no Cholesky factor."""
        if self.base is None or not self._near(free):
            if not self._refactor(free):
                return None
        base = self.base
        dropped = np.setdiff1d(base, free, assume_unique=True)
        added = np.setdiff1d(free, base, assume_unique=True)
        m, a, k = len(base), len(added), len(dropped)
        where_dropped = np.searchsorted(base, dropped)
        K_0A = self.columns.rows(added)[:, base].T if a else np.zeros((m, 0))
        # K_00^-1 of F changes every step; those of the columns of A and D are kept
        # (D and A change by a few variables a step: one solve with few right sides)
        new_added = [v for v in added.tolist() if v not in self.solved]
        new_dropped = [v for v in dropped.tolist() if v not in self.solved]
        right = np.zeros((m, 1 + len(new_added) + len(new_dropped)))
        right[:, 0] = F[base]
        if new_added:
            right[:, 1:1 + len(new_added)] = K_0A[:, np.searchsorted(added, new_added)]
        right[np.searchsorted(base, new_dropped), 1 + len(new_added) + np.arange(
            len(new_dropped))] = 1.0
        Z = sla.cho_solve(self.factor, right, check_finite=False)
        for column, v in enumerate(new_added + new_dropped, start=1):
            self.solved[v] = Z[:, column]
        z_F, z_1 = Z[:, 0], self.ones
        Z_A = np.column_stack([self.solved[v] for v in added.tolist()]) if a \
            else np.zeros((m, 0))
        Z_D = np.column_stack([self.solved[v] for v in dropped.tolist()]) if k \
            else np.zeros((m, 0))
        # x0 = z_F - Z_A xA - z_1 b - Z_D mu; the rows of A, the sum and D give (xA, b, mu)
        size = a + 1 + k
        G = np.zeros((size, size))
        h = np.zeros(size)
        if a:
            K_A0 = K_0A.T
            K_AA = self.columns.block(added)
            G[:a, :a] = K_AA - K_A0 @ Z_A
            G[:a, a] = 1.0 - K_A0 @ z_1
            G[:a, a + 1:] = -K_A0 @ Z_D
            h[:a] = F[added] - K_A0 @ z_F
        G[a, :a] = 1.0 - Z_A.sum(axis=0)
        G[a, a] = -z_1.sum()
        G[a, a + 1:] = -Z_D.sum(axis=0)
        h[a] = -excess - z_F.sum()
        if k:
            G[a + 1:, :a] = -Z_A[where_dropped]
            G[a + 1:, a] = -z_1[where_dropped]
            G[a + 1:, a + 1:] = -Z_D[where_dropped]
            h[a + 1:] = -z_F[where_dropped]
        try:
            u = np.linalg.solve(G, h)
        except np.linalg.LinAlgError:
            return None
        xA, b, mu = u[:a], u[a], u[a + 1:]
        x0 = z_F - Z_A @ xA - z_1 * b - Z_D @ mu
        if not (np.isfinite(x0).all() and np.isfinite(xA).all() and np.isfinite(b)):
            return None
        d = np.empty(len(free))
        kept = ~np.isin(base, dropped, assume_unique=True)
        d[np.searchsorted(free, base[kept])] = x0[kept]
        if a:
            d[np.searchsorted(free, added)] = xA
        # a factor of a nearly singular K_SS solves nothing: check rows of the face system
        rows = free[np.linspace(0, len(free) - 1, min(CHECKED, len(free))).astype(int)]
        residual = self.columns.rows(rows)[:, free] @ d + b - F[rows]
        if not np.abs(residual).max() <= 1e-9 * max(1.0, float(np.abs(F[free]).max())):
            self.base = None
            return None
        return d, float(b)

    def _near(self, free):
        changes = len(np.setdiff1d(self.base, free, assume_unique=True)) + \
            len(np.setdiff1d(free, self.base, assume_unique=True))
        return changes <= REFACTOR

    def _refactor(self, free):
        try:
            # in place: block() is a fresh array (72 MB on 3,000 free variables)
            self.factor = sla.cho_factor(self.columns.block(free), lower=True,
                                         overwrite_a=True, check_finite=False)
        except np.linalg.LinAlgError:
            self.base = None
            return False
        self.base = np.array(free)
        self.ones = sla.cho_solve(self.factor, np.ones(len(free)), check_finite=False)
        self.solved = {}           # variable -> K_00^-1 of its column (added) or unit (dropped)
        return True
