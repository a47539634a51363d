"""Compiled updates of a lower Cholesky factor K_SS = LL' kept for a changing set S.

A variable joining S appends a row to L (one triangular solve); one leaving it is
deleted (its row goes, and the block below is repaired by a rank-one update); a
solve reads L by rows, forward then backward.  Each costs O(|S|^2), where a fresh
factor costs |S|^3 / 3.  The face steps (``face_core``) use them, and the dense LU
solve below when K_SS is too near singular for a factor.
"""

from __future__ import annotations

import math

import numba as nb
import numpy as np

PIVOT = 1e-15                            # smallest squared diagonal of L (k_ii = 1): below,
                                         # the factor is refused


@nb.njit(cache=True, nogil=True, fastmath=True)
def _append(L, m, members, j, row_j):
    """Add variable j (its kernel row row_j) to the factor K_SS = LL'; False when K_SS
    and j are too near singular for one."""
    for r in range(m):                      # L w = K_Sj: w is the new row of L
        s = 0.0
        for c in range(r):
            s += L[r, c] * L[m, c]
        L[m, r] = (row_j[members[r]] - s) / L[r, r]
    diagonal = 1.0                          # k_jj = 1 for the RBF kernel
    for c in range(m):
        diagonal -= L[m, c] * L[m, c]
    if diagonal <= PIVOT:
        return False
    L[m, m] = math.sqrt(diagonal)
    members[m] = j
    return True


@nb.njit(cache=True, nogil=True, fastmath=True)
def _delete(L, m, members, p, x):
    """Remove the variable at position p from the factor K_SS = LL' (m members): its row
    goes, the rows below move up a place, and the block they leave is repaired by a
    rank-one update with the column of L it loses (moved and updated in one pass, by
    columns: each column is read before the one left of it is written).  x: scratch."""
    tail = m - 1 - p
    for k in range(tail):
        x[k] = L[p + 1 + k, p]
    for r in range(p + 1, m):
        for c in range(p):
            L[r - 1, c] = L[r, c]
        members[r - 1] = members[r]
    # B B' + x x' = B~ B~' for the block B at (p + 1, p + 1), B~ written at (p, p)
    for k in range(tail):
        diag = L[p + 1 + k, p + 1 + k]
        radius = math.sqrt(diag * diag + x[k] * x[k])
        c, s = radius / diag, x[k] / diag
        inverse = 1.0 / c
        L[p + k, p + k] = radius
        for i in range(k + 1, tail):
            value = (L[p + 1 + i, p + 1 + k] + s * x[i]) * inverse
            L[p + i, p + k] = value
            x[i] = c * x[i] - s * value


@nb.njit(cache=True, nogil=True, fastmath=True)
def _solve(L, m, rhs, u, v):
    """u = K_SS^-1 rhs and v = K_SS^-1 1 by the factor K_SS = LL' (forward, then
    backward; both read L by rows)."""
    for r in range(m):
        s, t = 0.0, 0.0
        for c in range(r):
            s += L[r, c] * u[c]
            t += L[r, c] * v[c]
        u[r] = (rhs[r] - s) / L[r, r]
        v[r] = (1.0 - t) / L[r, r]
    for r in range(m - 1, -1, -1):
        u[r] /= L[r, r]
        v[r] /= L[r, r]
        a, b = u[r], v[r]
        for c in range(r):
            u[c] -= L[r, c] * a
            v[c] -= L[r, c] * b


@nb.njit(cache=True, nogil=True)
def _lu_solve(A, x):
    """x <- A^-1 x by Gaussian elimination with partial pivoting (A overwritten); False
    when a pivot is zero or the solution not finite.  Written out: numba's binding of
    numpy.linalg.solve (with numpy.argsort) made the first compilation 12 s longer."""
    size = len(x)
    for k in range(size):
        pivot = k
        for r in range(k + 1, size):
            if abs(A[r, k]) > abs(A[pivot, k]):
                pivot = r
        if A[pivot, k] == 0.0:
            return False
        if pivot != k:
            for c in range(size):
                A[k, c], A[pivot, c] = A[pivot, c], A[k, c]
            x[k], x[pivot] = x[pivot], x[k]
        for r in range(k + 1, size):
            factor = A[r, k] / A[k, k]
            if factor != 0.0:
                for c in range(k + 1, size):
                    A[r, c] -= factor * A[k, c]
                x[r] -= factor * x[k]
    for r in range(size - 1, -1, -1):
        s = x[r]
        for c in range(r + 1, size):
            s -= A[r, c] * x[c]
        x[r] = s / A[r, r]
    for r in range(size):
        if not np.isfinite(x[r]):
            return False
    return True
