"""The linear system of the points on the band edge, kept factored as E changes.

For the set E of points on the edge (y_i f(x_i) = 1) the C path solves

    [ Q_EE  y_E ] [ alpha_E ]   [ r_E ]
    [ y_E'   0  ] [    b    ] = [ r_0 ]          Q_ij = y_i y_j k(x_i, x_j)

for two right-hand sides per segment (the constant and the slope in C).  We
keep the inverse of this bordered matrix M and update it as points join or
leave E (block inverse / Schur complement formulas), O(|E|^2) per change,
and rebuild it from scratch every ``_REBUILD`` changes so rounding cannot pile
up.

M is singular exactly when the vectors (z_j, y_j), z_j = y_j phi(x_j), of E
are linearly dependent (collinear edge points from rounded readings, two
points at the same coordinates): multiply the null vector through and
|sum a_j z_j|^2 = 0 follows.  A point whose vector is a combination of E's
then needs no equation of its own, because its slope of y f is the same
combination of E's slopes, all zero.  ``add`` declines such a point (it
returns False); the path keeps it at its bound, still exactly on the edge.
"""

from __future__ import annotations

import numpy as np

_REBUILD = 40           # changes between rebuilds of the inverse from scratch
_DIRECT = 12            # up to this many points: invert M afresh after every change
_DEPENDENT = 1e-9       # Schur complement / diagonal below this: a dependent point


class PathTrouble(Exception):
    """The exact continuation failed at this C; re-anchor with a QP solve."""


class EdgeSystem:
    """Indices of E and the inverse of their bordered matrix (b's row last)."""

    def __init__(self, gram):
        self.gram = gram            # supplies q_block(I, J) = Q_IJ and y
        self.index: list[int] = []
        self._indices = np.zeros(0, dtype=int)
        self._position: dict[int, int] = {}
        self._inverse = np.zeros((0, 0))
        self._matrix = np.zeros((0, 0))     # M itself, for refinement
        self._changes = 0
        diagonal = gram.q_diagonal()
        self._scale = float(max(np.mean(diagonal), 1e-300))

    def __len__(self) -> int:
        return len(self.index)

    def __contains__(self, j) -> bool:
        return j in self._position

    def indices(self) -> np.ndarray:
        return self._indices

    # -- changes -----------------------------------------------------------
    def add(self, j: int) -> bool:
        """Put point j into E; False (and no change) when its row is dependent."""
        j = int(j)
        y = self.gram.y
        if not self.index:
            q = float(self.gram.q_block([j], [j])[0, 0])
            # inverse of [[q, y_j], [y_j, 0]] (determinant -1)
            self._inverse = np.array([[0.0, y[j]], [y[j], -q]])
            self._matrix = np.array([[q, y[j]], [y[j], 0.0]])
            self._set_index([j])
            return True
        E = self.index
        u = np.append(self.gram.q_block(E, [j])[:, 0], y[j])       # new column of M
        q = float(self.gram.q_block([j], [j])[0, 0])
        Minv_u = self._inverse @ u
        schur = q - float(u @ Minv_u)                                # q - u' M^-1 u
        if abs(schur) <= _DEPENDENT * max(abs(q), self._scale):
            return False
        m = len(E)
        if m < _DIRECT:                      # small: a fresh inverse is cheaper than updates
            self._set_index(E + [j])
            self.rebuild()
            return True
        # [[M, u], [u', q]]^-1, with the new row placed before b's row
        grown = np.empty((m + 2, m + 2))
        core = self._inverse + np.outer(Minv_u, Minv_u) / schur
        order = list(range(m)) + [m + 1, m]        # old E, new j, then b
        full = np.empty((m + 2, m + 2))
        full[:m + 1, :m + 1] = core
        full[:m + 1, m + 1] = -Minv_u / schur
        full[m + 1, :m + 1] = -Minv_u / schur
        full[m + 1, m + 1] = 1.0 / schur
        grown[:, :] = full[np.ix_(order, order)]
        self._inverse = grown
        matrix = np.empty((m + 2, m + 2))
        matrix[:m, :m] = self._matrix[:m, :m]
        matrix[m + 1, :m] = matrix[:m, m + 1] = y[E]
        matrix[m, :m] = matrix[:m, m] = u[:m]
        matrix[m, m], matrix[m, m + 1] = q, y[j]
        matrix[m + 1, m], matrix[m + 1, m + 1] = y[j], 0.0
        self._matrix = matrix
        self._set_index(E + [j])
        self._count_change()
        return True

    def remove(self, j: int) -> None:
        """Take point j out of E (downdate: B' = B_rest - B_rest,k B_k,rest / B_kk)."""
        k = self._position[int(j)]
        rest = [i for i in range(len(self.index) + 1) if i != k]
        B = self._inverse
        pivot = B[k, k]
        if len(self.index) <= _DIRECT or abs(pivot) < 1e-14 * np.abs(B).max():
            self._set_index([i for i in self.index if i != j])
            self.rebuild()
            return
        self._inverse = B[np.ix_(rest, rest)] - np.outer(B[rest, k], B[k, rest]) / pivot
        self._matrix = self._matrix[np.ix_(rest, rest)]
        self._set_index([i for i in self.index if i != j])
        self._count_change()

    def rebuild(self) -> None:
        """Recompute the inverse of M from Q (after many updates)."""
        E = self.index
        self._changes = 0
        if not E:
            self._inverse = self._matrix = np.zeros((0, 0))
            return
        m = len(E)
        M = np.zeros((m + 1, m + 1))
        M[:m, :m] = self.gram.q_block(E, E)
        M[:m, m] = M[m, :m] = self.gram.y[E]
        self._matrix = M
        try:
            self._inverse = np.linalg.inv(M)
        except np.linalg.LinAlgError:
            raise PathTrouble(f"the edge system of {m} points became singular") from None

    # -- solving -----------------------------------------------------------
    def solve(self, rhs_edge: np.ndarray, rhs_sum: float) -> tuple[np.ndarray, float | None]:
        """(alpha_E, b) with M [alpha_E; b] = [rhs_edge; rhs_sum]; b None when E is empty."""
        if not self.index:
            return np.zeros(0), None
        rhs = np.append(rhs_edge, rhs_sum)
        x = self._inverse @ rhs
        # one step of refinement against M itself (the inverse carries the rounding)
        x += self._inverse @ (rhs - self._matrix @ x)
        return x[:-1], float(x[-1])

    # -- internals ---------------------------------------------------------
    def _set_index(self, index: list[int]) -> None:
        self.index = [int(i) for i in index]
        self._indices = np.array(self.index, dtype=int)
        self._indices.setflags(write=False)
        self._position = {j: k for k, j in enumerate(self.index)}

    def _count_change(self) -> None:
        self._changes += 1
        if self._changes >= _REBUILD or len(self.index) <= _DIRECT:
            self.rebuild()            # small systems: a fresh inverse costs next to nothing
