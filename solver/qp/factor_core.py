"""Compiled updates of a lower Cholesky factor K_SS = LL' kept for a changing set S.

A variable joining S appends a row to L (one triangular solve; the variables a
face step releases together share one pass over L, ``_append_block``); one leaving it is
deleted (its row goes, and the block below is repaired by a rank-one update); a
solve reads L by order, forward then backward.  Each costs O(|S|^2), where a fresh
factor costs |S|^3 / 3.  Rows stay where they are: ``order[r]`` is the row of the
array holding row r of L (order[m:] the free ones), so a deletion moves row numbers,
not the order themselves (moving them was two thirds of its cost: at 1,600 members,
deleting the 900th copied 700 x 900 entries to repair a 700 x 700 / 2 block).  The face steps (``face_core``) use them, and the dense LU
solve below when K_SS is too near singular for a factor.

The factor is of K_SS + mu I (mu = RIDGE, 1e-11 of k_ii): a wide kernel makes
K_SS singular to rounding on many free variables (n = 5,000 blobs, gamma 10,
C 1: 71 of the first stage's 935 eigenvalues below 1e-12), and no factor of
K_SS itself exists there.  The ridge direction d = (K_SS + mu I)^-1 r (r the
face's residual F_S - b) still raises the dual D: its slope is
r'd = d'(K_SS + mu I)d > 0 and its best length along the exact D,
r'd / d'K_SS d, is >= 1, so no step of t <= 1 loses.  On a singular face it
points along the null directions to a bound, as an active-set method must
there; at the end F_S - b = mu d of the last step, far below the gap a fit
promises.  (That cell: 400 steps without an end, then the decomposition's
rounds, 0.68 s; 536 ridge steps end it, 0.54 s.)  A copy of a member now
appends with a pivot of 2 mu instead of being refused.
"""

from __future__ import annotations

import math

import numba as nb
import numpy as np

PIVOT = 1e-15                            # smallest squared diagonal of L (k_ii = 1): below,
                                         # the factor is refused
RIDGE = 1e-11                            # the factor is of K_SS + RIDGE I (above)


@nb.njit(cache=True, nogil=True, fastmath=True)
def _append(L, order, m, members, j, row_j):
    """Add variable j (its kernel row row_j) to the factor K_SS = LL'; False when K_SS
    and j are too near singular for one."""
    new = L[order[m]]
    for r in range(m):                      # L w = K_Sj: w is the new row of L
        row = L[order[r]]
        s = 0.0
        for c in range(r):
            s += row[c] * new[c]
        new[r] = (row_j[members[r]] - s) / row[r]
    diagonal = 1.0 + RIDGE                  # k_jj = 1 for the RBF kernel
    for c in range(m):
        diagonal -= new[c] * new[c]
    if diagonal <= PIVOT:
        return False
    new[m] = math.sqrt(diagonal)
    members[m] = j
    return True


@nb.njit(cache=True, nogil=True, fastmath=True)
def _append_block(L, order, m, members, js, B, k):
    """Add the k variables js[:k] to the factor at once, B[q, r] = k(js[q], members[r])
    for r < m and B[q, m + p] = k(js[q], js[p]): one pass over L serves them all, where
    _append reads it once per variable (a face step's release adds up to 16).  Returns
    how many were added, in order: those from the first whose pivot is too small on
    are not (k when all are)."""
    for r in range(m):
        row = L[order[r]]
        inverse = 1.0 / row[r]
        q = 0
        while q + 4 <= k:               # four new rows per read of row r
            n0, n1, n2, n3 = L[order[m + q]], L[order[m + q + 1]], L[order[m + q + 2]], \
                L[order[m + q + 3]]
            s0, s1, s2, s3 = 0.0, 0.0, 0.0, 0.0
            for c in range(r):
                value = row[c]
                s0 += value * n0[c]
                s1 += value * n1[c]
                s2 += value * n2[c]
                s3 += value * n3[c]
            n0[r] = (B[q, r] - s0) * inverse
            n1[r] = (B[q + 1, r] - s1) * inverse
            n2[r] = (B[q + 2, r] - s2) * inverse
            n3[r] = (B[q + 3, r] - s3) * inverse
            q += 4
        for q in range(q, k):
            new = L[order[m + q]]
            s = 0.0
            for c in range(r):
                s += row[c] * new[c]
            new[r] = (B[q, r] - s) * inverse
    for q in range(k):                  # the new rows among themselves
        new = L[order[m + q]]
        for p in range(q):
            earlier = L[order[m + p]]
            s = 0.0
            for c in range(m + p):
                s += earlier[c] * new[c]
            new[m + p] = (B[q, m + p] - s) / earlier[m + p]
        diagonal = 1.0 + RIDGE          # k_jj = 1 for the RBF kernel
        for c in range(m + q):
            diagonal -= new[c] * new[c]
        if diagonal <= PIVOT:
            return q
        new[m + q] = math.sqrt(diagonal)
        members[m + q] = js[q]
    return k


@nb.njit(cache=True, nogil=True)
def _block_row(B, q, row, members, m, js, k):
    """B[q] for _append_block from the kernel row of js[q]."""
    target = B[q]
    for r in range(m):
        target[r] = row[members[r]]
    for p in range(k):
        target[m + p] = row[js[p]]


@nb.njit(cache=True, nogil=True)
def gather_lower(store, slots, members, L):
    """L[r, c] = K[members[r], members[c]] + RIDGE [r == c] for c <= r < len(members),
    read from the kernel rows store[slots[r]]: the lower triangle of K_SS + mu I, in
    place for LAPACK to factor (``face_kept``; numpy's K[ix_(S, S)] made a fresh array
    of |S|^2 entries, 91 ms at 1,899 free, most of it page faults)."""
    for r in range(len(members)):
        source = store[slots[r]]
        target = L[r]
        for c in range(r):
            target[c] = source[members[c]]
        target[r] = source[members[r]] + RIDGE


@nb.njit(cache=True, nogil=True, fastmath=True)
def _delete(L, order, m, members, p, x, za, zb):
    """Remove the variable at position p from the factor K_SS = LL' (m members): its row
    is given up, the order below take the row numbers above them, and the block they
    leave is repaired by a rank-one update with the column of L it loses (each row's
    columns from p on move left a place as they are rotated).  x: scratch.

    za and zb, forward solutions z = L^-1 f kept by the caller, become those of the
    smaller factor (f without its entry p).  The update is a sequence of Givens
    rotations on the column pairs (B[:, k], x), [B x] G = [B~ 0]; since
    B z_tail + x z_p = [B x] [z_tail; z_p] = [B~ 0] G' [z_tail; z_p], the same
    rotations turn (z_tail, z_p) into the new z_tail.

    The rotations are applied row by row, four rows together (``_rotate_four``): row k of
    the block takes the rotations of the rows above it, then gives its own (from its
    diagonal and what is left of its x).  Column by column, as before, each entry was a
    read from another row of the array: at 1,300 rows below p that took 2.4 ms, 0.75
    row by row (n = 5,000 moons, gamma 50, C 1: 1,000 deletions, face steps 374-392 ->
    312 ms)."""
    tail = m - 1 - p
    turns = np.empty((2, tail))          # cos and sin of each rotation
    carried_a, carried_b = za[p], zb[p]        # the coefficients of x, rotated out
    given_up = order[p]
    for r in range(p + 1, m):
        order[r - 1] = order[r]
        members[r - 1] = members[r]
    order[m - 1] = given_up
    # B B' + x x' = B~ B~' for the block B at (p + 1, p + 1), B~ written at (p, p)
    k = 0
    while k + 4 <= tail:
        _rotate_four(L, order, p, k, turns, x)
        for j in range(k, k + 4):
            _own_turn(L[order[p + j]], p, k, j, turns, x)
        k += 4
    for j in range(k, tail):
        x[j] = L[order[p + j], p]
        _own_turn(L[order[p + j]], p, 0, j, turns, x)
    for k in range(tail):
        cos, sin = turns[0, k], turns[1, k]
        a, b = za[p + 1 + k], zb[p + 1 + k]
        za[p + k] = cos * a + sin * carried_a
        zb[p + k] = cos * b + sin * carried_b
        carried_a = cos * carried_a - sin * a
        carried_b = cos * carried_b - sin * b


@nb.njit(cache=True, nogil=True, fastmath=True)
def _rotate_four(L, order, p, k, turns, x):
    """Rows k..k+3 of the block below p through the rotations 0..k-1, each entry moved
    left a place; what is left of each row's x in x[k..k+3].  Four independent chains,
    where one row alone waits on its x at every entry."""
    r0, r1, r2, r3 = L[order[p + k]], L[order[p + k + 1]], L[order[p + k + 2]], \
        L[order[p + k + 3]]
    x0, x1, x2, x3 = r0[p], r1[p], r2[p], r3[p]
    for q in range(k):
        cos, sin = turns[0, q], turns[1, q]
        c = p + 1 + q
        a0, a1, a2, a3 = r0[c], r1[c], r2[c], r3[c]
        r0[c - 1] = cos * a0 + sin * x0
        r1[c - 1] = cos * a1 + sin * x1
        r2[c - 1] = cos * a2 + sin * x2
        r3[c - 1] = cos * a3 + sin * x3
        x0 = cos * x0 - sin * a0
        x1 = cos * x1 - sin * a1
        x2 = cos * x2 - sin * a2
        x3 = cos * x3 - sin * a3
    x[k], x[k + 1], x[k + 2], x[k + 3] = x0, x1, x2, x3


@nb.njit(cache=True, nogil=True, fastmath=True)
def _own_turn(row, p, start, j, turns, x):
    """Row j of the block below p (its x in x[j], rotations before ``start`` applied)
    through the rotations start..j-1, then its own: the one that zeroes its x against
    its diagonal, which becomes the new diagonal."""
    rest = x[j]
    for q in range(start, j):
        cos, sin = turns[0, q], turns[1, q]
        c = p + 1 + q
        a = row[c]
        row[c - 1] = cos * a + sin * rest
        rest = cos * rest - sin * a
    diagonal = row[p + 1 + j]
    radius = math.sqrt(diagonal * diagonal + rest * rest)
    row[p + j] = radius
    turns[0, j] = diagonal / radius
    turns[1, j] = rest / radius


@nb.njit(cache=True, nogil=True)
def _remove(L, order, m, members, p, x, za, zb, dense):
    """_delete, or, dense (no factor is kept), the member at p taken out of members."""
    if dense:
        for r in range(p + 1, m):
            members[r - 1] = members[r]
    else:
        _delete(L, order, m, members, p, x, za, zb)


@nb.njit(cache=True, nogil=True, fastmath=True)
def _forward(L, order, m, rhs, za, zb):
    """za = L^-1 rhs and zb = L^-1 1 (one pass over L, by order)."""
    for r in range(m):
        row = L[order[r]]
        s, t = 0.0, 0.0
        for c in range(r):
            s += row[c] * za[c]
            t += row[c] * zb[c]
        za[r] = (rhs[r] - s) / row[r]
        zb[r] = (1.0 - t) / row[r]


@nb.njit(cache=True, nogil=True, fastmath=True)
def _backward(L, order, m, w):
    """w <- L'^-1 w (one pass over L, by order, last row first; two rows to a pass over w:
    m = 1,400-1,650, 7-10% faster)."""
    r = m - 1
    while r >= 1:
        row, above = L[order[r]], L[order[r - 1]]
        w[r] /= row[r]
        a = w[r]
        w[r - 1] = (w[r - 1] - row[r - 1] * a) / above[r - 1]
        b = w[r - 1]
        for c in range(r - 1):
            w[c] -= row[c] * a + above[c] * b
        r -= 2
    if r == 0:
        w[0] /= L[order[0], 0]


@nb.njit(cache=True, nogil=True, fastmath=True)
def _solve(L, order, m, rhs, u, v):
    """u = K_SS^-1 rhs and v = K_SS^-1 1 by the factor K_SS = LL' (forward, then
    backward; both read L by order)."""
    _forward(L, order, m, rhs, u, v)
    for r in range(m - 1, -1, -1):
        row = L[order[r]]
        u[r] /= row[r]
        v[r] /= row[r]
        a, b = u[r], v[r]
        for c in range(r):
            u[c] -= row[c] * a
            v[c] -= row[c] * b


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


@nb.njit(cache=True, nogil=True, fastmath=True)
def _kept_solve(L, order, m, excess, za, zb, d):
    """b of the bordered face system, and d[:m], from forward solutions kept by the caller,
    za = L^-1 F_S and zb = L^-1 1: with u = K_SS^-1 F_S = L'^-1 za and v = K_SS^-1 1 =
    L'^-1 zb, 1'u = zb'za and 1'v = zb'zb, so b = (1'u + e) / 1'v needs no pass over
    L, and d = u - b v = L'^-1 (za - b zb) one (where _solve takes two)."""
    s, t = 0.0, 0.0
    for r in range(m):
        s += zb[r] * za[r]
        t += zb[r] * zb[r]
    b = (s + excess) / t
    for r in range(m):
        d[r] = za[r] - b * zb[r]
    _backward(L, order, m, d)
    return b


@nb.njit(cache=True, nogil=True, fastmath=True)
def _kept_step(L, order, m, za, zb, t, b, hit, change, solution):
    """za = L^-1 F_S after a step of t along d, the members hit (hit[r] == 1) moved by
    change[r] instead of t d_r: F_S -= t K_SS d + sum_h off_h K_Sh with off_h =
    change_h - t d_h.  K_SS d = F_S - b 1 - mu d and L^-1 K_Sh = L[h]' - mu L^-1 e_h
    (LL' = K_SS + mu I); the mu terms, at most mu |change of beta|, are left to the
    caller's residual check, which makes za afresh when they add up."""
    for r in range(m):
        za[r] += t * (b * zb[r] - za[r])
    for r in range(m):
        if hit[r] == 1.0:
            off = change[r] - t * solution[r]
            if off != 0.0:
                row = L[order[r]]
                for c in range(r + 1):
                    za[c] -= off * row[c]
