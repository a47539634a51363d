"""Compiled face steps for the RBF finish: the active-set method of ``smo._face_steps``.

Each step solves the face system on the working free set S,

    K_SS d + b 1 = F_S,   1'd = -e        (e = y'a, which should be 0),

from a Cholesky factor L of K_SS that is updated as S changes rather than
made afresh: a variable released into S appends a row to L (one triangular
solve), one that reaches a bound is deleted from it (its row goes, and the
block below is repaired by a rank-one update).  A step then costs
O(|S|^2 + n |S|) instead of |S|^3 / 3 plus Python's overhead per array
operation, which at n = 1,000 was most of a step (0.3 ms of 1-1.5 ms).

The steps follow ``smo._face_steps`` (same step to the box, same releases).
A wide kernel makes K_SS nearly singular: each solve is checked on rows
spread over S and, when one is off, refined on the whole residual; when that
fails, or a released variable's diagonal vanishes, the factor is given up
and each later step solves the bordered system [K_SS 1; 1' 0] afresh by LU
(up to ``wide`` free variables, as the Python steps' Bunch-Kaufman fallback).
Past that the steps hand back, and the Python steps go on from the same alpha
and F.  Kernel rows are read from (and, when missing, computed into) a
``KernelColumns`` with a row per member of S and some to spare (``face_kept.room``).
"""

from __future__ import annotations

import math

import numba as nb
import numpy as np

from solver.qp.smo_core import _slot

DONE, STOPPED, HAND_BACK = 1, 0, -1      # what face_steps returns first
FACTOR, DENSE, NEITHER = 0, 1, -1        # what _add returns
PIVOT = 1e-15                            # smallest squared diagonal of L (k_ii = 1): below,
                                         # dense solves
RESIDUAL = 1e-9                          # face-system residual accepted, relative to max |F_S|
CHECKED = 32                             # rows of the face system checked after each solve
REFINE = 2                               # steps of iterative refinement when a check fails


@nb.njit(cache=True, nogil=True)
def _row(i, X, gamma, rows, slot_of, owner, stamp, clock, partial, act, counts):
    if slot_of[i] < 0:
        counts[0] += 1
    return rows[_slot(i, X, gamma, rows, slot_of, owner, stamp, clock, partial, act, len(X))]


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
def _add(L, m, members, j, row_j, dense, wide):
    """Add j to the set: to the factor, or (dense: no factor is kept) to members only.
    Returns FACTOR or DENSE, what the set is afterwards (a factor that cannot take j is
    given up for dense solves, up to ``wide`` members), or NEITHER."""
    if not dense and _append(L, m, members, j, row_j):
        return FACTOR
    if m + 1 > wide:
        return NEITHER
    members[m] = j
    return DENSE


@nb.njit(cache=True, nogil=True)
def _remove(L, m, members, p, x, dense):
    if dense:
        for r in range(p + 1, m):
            members[r - 1] = members[r]
    else:
        _delete(L, m, members, p, x)


@nb.njit(cache=True, nogil=True)
def _dense_solve(X, gamma, F, members, m, excess, d, rows, slot_of, owner, stamp, clock,
                 partial, act, counts):
    """(solved, b) of the bordered face system by LU with partial pivoting, d[:m] = d:
    what a nearly singular K_SS (a wide kernel) leaves, as smo's Bunch-Kaufman fallback."""
    system = np.zeros((m + 1, m + 1))
    right = np.zeros(m + 1)
    for r in range(m):
        row = _row(members[r], X, gamma, rows, slot_of, owner, stamp, clock, partial, act,
                   counts)
        for c in range(m):
            system[r, c] = row[members[c]]
        system[r, m] = system[m, r] = 1.0
        right[r] = F[members[r]]
    right[m] = -excess
    if not _lu_solve(system, right):
        return False, 0.0
    for r in range(m):
        d[r] = right[r]
    return True, right[m]


@nb.njit(cache=True, nogil=True)
def _take_largest(values):
    """The index of the largest value (the first of equals), which is then set to 0."""
    best, j = values[0], 0
    for t in range(1, len(values)):
        if values[t] > best:
            best, j = values[t], t
    values[j] = 0.0
    return j


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
def _solved(X, gamma, F, members, m, d, b, tolerance, checked, residual, rows, slot_of,
            owner, stamp, clock, partial, act, counts):
    """Whether |K_SS d + b - F_S| <= tolerance on ``checked`` rows spread over S (all of
    them when checked >= m); residual[:m] = F_S - K_SS d - b where computed."""
    checked = min(checked, m)
    ok = True
    for k in range(checked):
        r = k * (m - 1) // (checked - 1) if checked > 1 else 0
        row = _row(members[r], X, gamma, rows, slot_of, owner, stamp, clock, partial, act,
                   counts)
        s = 0.0
        for c in range(m):
            s += row[members[c]] * d[c]
        residual[r] = F[members[r]] - b - s
        if not abs(residual[r]) <= tolerance:
            ok = False
    return ok


@nb.njit(cache=True, nogil=True)
def face_steps(X, gamma, y, upper, alpha, F, L, members, m, limit, patient, far, release,
               wide, near_bound, short_t, short_steps, rows, slot_of, owner, stamp):
    """Face steps from the free set of alpha (alpha, F in place) until no variable is on
    the wrong side of b, ``limit`` steps, or a reason to stop.  L: the lower Cholesky
    factor of K_SS = LL' on the set members[:m] (room for len(members) variables); it
    is first brought to the free set of alpha (members no longer free deleted, free
    variables not yet members appended), and is left on the set the steps end on.

    Returns (DONE, STOPPED or HAND_BACK; face steps taken; kernel rows computed; the
    members in L at the end, -1 when L is not to be used again).  STOPPED is the Python
    steps' False (the face is still far: pair steps first), HAND_BACK a factor not to be
    trusted or more free variables than L has room for.  ``far`` < 0: no limit on the
    wrong-side count.
    """
    n = len(y)
    capacity = len(members)
    clock = stamp.max() + 1
    partial = np.zeros(len(owner), dtype=nb.boolean)
    act = np.arange(n)
    counts = np.zeros(1, dtype=np.int64)
    in_S = np.zeros(n, dtype=nb.boolean)
    work = np.empty(capacity)
    u = np.empty(capacity)
    v = np.empty(capacity)
    change = np.empty(capacity)
    wrong = np.zeros(n)
    dense = False             # the factor was given up: each step solves afresh
    for r in range(m - 1, -1, -1):
        i = members[r]
        if 0.0 < alpha[i] < upper[i]:
            in_S[i] = True
        else:
            _delete(L, m, members, r, u)
            m -= 1
    for t in range(n):
        if 0.0 < alpha[t] < upper[t] and not in_S[t]:
            if m >= capacity:
                return HAND_BACK, 0, counts[0], -1
            added = _add(L, m, members, t, _row(t, X, gamma, rows, slot_of, owner, stamp,
                                                clock, partial, act, counts), dense, wide)
            if added == NEITHER:
                return HAND_BACK, 0, counts[0], -1
            dense = added == DENSE
            in_S[t] = True
            m += 1
    scale = 1.0
    for t in range(n):
        scale = max(scale, abs(F[t]))
    scale *= 1e-12
    steps, short = 0, 0
    for _ in range(limit):
        if m == 0:
            return HAND_BACK, steps, counts[0], -1
        steps += 1
        excess = 0.0
        for t in range(n):
            excess += alpha[t] * y[t]
        largest = 1.0
        for r in range(m):
            largest = max(largest, abs(F[members[r]]))
        if not dense:
            for r in range(m):
                work[r] = F[members[r]]
            _solve(L, m, work, u, v)
            b = (u[:m].sum() + excess) / v[:m].sum()
            for r in range(m):
                change[r] = u[r] - b * v[r]                 # d, the change of beta_S
            # a factor of a nearly singular K_SS (a wide kernel) solves poorly: check rows
            # spread over S, and when one is off, refine on the whole residual
            solved = _solved(X, gamma, F, members, m, change, b, RESIDUAL * largest,
                             min(CHECKED, m), work, rows, slot_of, owner, stamp, clock,
                             partial, act, counts)
            if not solved:              # the whole residual, which the refinement solves
                _solved(X, gamma, F, members, m, change, b, RESIDUAL * largest, m, work,
                        rows, slot_of, owner, stamp, clock, partial, act, counts)
            for _ in range(REFINE if not solved else 0):
                excess_d = excess
                for r in range(m):
                    excess_d += change[r]           # 1'd + e, zero when solved exactly
                _solve(L, m, work, u, v)            # u = K_SS^-1 (residual)
                shift = (u[:m].sum() + excess_d) / v[:m].sum()
                for r in range(m):
                    change[r] += u[r] - shift * v[r]
                b += shift
                solved = _solved(X, gamma, F, members, m, change, b, RESIDUAL * largest, m,
                                 work, rows, slot_of, owner, stamp, clock, partial, act,
                                 counts)
                if solved:
                    break
            if not solved:
                if m > wide:
                    return HAND_BACK, steps, counts[0], -1
                dense = True
        if dense:
            solved, b = _dense_solve(X, gamma, F, members, m, excess, change, rows, slot_of,
                                     owner, stamp, clock, partial, act, counts)
            if not solved:          # (its residual is not checked: the fit is judged
                return HAND_BACK, steps, counts[0], -1    # on F computed afresh at the end)
        # the step to the box, as smo._step_in_box
        t_max = 1.0
        for r in range(m):
            i = members[r]
            step = y[i] * change[r]
            target = alpha[i] + step
            if target < 0.0:
                t_max = min(t_max, alpha[i] / -step)
            elif target > upper[i]:
                t_max = min(t_max, (upper[i] - alpha[i]) / step)
        hits = 0
        for r in range(m):
            i = members[r]
            step = y[i] * change[r]
            target = alpha[i] + step
            new = min(max(alpha[i] + t_max * step, 0.0), upper[i])
            if target < 0.0 and (alpha[i] / -step <= t_max * (1 + 1e-12)
                                 or alpha[i] <= near_bound * upper[i]):
                new = 0.0
                work[r] = 1.0
                hits += 1
            elif target > upper[i] and ((upper[i] - alpha[i]) / step <= t_max * (1 + 1e-12)
                                        or alpha[i] >= (1 - near_bound) * upper[i]):
                new = upper[i]
                work[r] = 1.0
                hits += 1
            else:
                work[r] = 0.0
            change[r] = (new - alpha[i]) * y[i]
            alpha[i] = new
        for r in range(m):
            if change[r] != 0.0:
                row = _row(members[r], X, gamma, rows, slot_of, owner, stamp, clock,
                           partial, act, counts)
                w = change[r]
                for t in range(n):
                    F[t] -= w * row[t]
        if t_max < 1.0:
            for r in range(m - 1, -1, -1):
                if work[r] == 1.0:
                    in_S[members[r]] = False
                    _remove(L, m, members, r, u, dense)
                    m -= 1
            short = short + 1 if t_max < short_t else 0
            if not patient and short >= (short_steps if m + hits <= wide else 1):
                return STOPPED, steps, counts[0], -1 if dense else m
            continue
        # every free variable is where the face puts it: release the worst on the wrong side
        count = 0
        for t in range(n):
            up = alpha[t] < upper[t] if y[t] > 0 else alpha[t] > 0
            down = alpha[t] > 0 if y[t] > 0 else alpha[t] < upper[t]
            value = 0.0
            if up and not down:
                value = F[t] - b
            elif down and not up:
                value = b - F[t]
            if in_S[t] or value <= scale:
                value = 0.0
            else:
                count += 1
            wrong[t] = value
        if count == 0:
            return DONE, steps, counts[0], -1 if dense else m
        if far >= 0 and count > far:
            return STOPPED, steps, counts[0], -1 if dense else m
        for k in range(min(release, count)):
            j = _take_largest(wrong)
            if m >= capacity:
                return HAND_BACK, steps, counts[0], -1
            added = _add(L, m, members, j, _row(j, X, gamma, rows, slot_of, owner, stamp,
                                                clock, partial, act, counts), dense, wide)
            if added == NEITHER:
                return HAND_BACK, steps, counts[0], -1
            dense = added == DENSE
            in_S[j] = True
            m += 1
    return STOPPED, steps, counts[0], -1 if dense else m
