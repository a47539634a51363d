"""Compiled face steps for the RBF finish: the active-set method of ``smo._face_steps``.

Each step solves the face system on the working free set S,

    K_SS d + b 1 = F_S,   1'd = -e        (e = y'a, which should be 0),

from a Cholesky factor L of K_SS that is updated as S changes rather than
made afresh (``factor_core``).  F on every point is needed only where bound
variables are checked, after a step that reached the face; a step stopped at a
bound only needs F on S, which the face system gives: K_SS (t d) = t (F_S - b).
So the changes of beta wait and F is brought up to date once per check, not
once per step (n = 5,000, gamma 50, C 1: 195 steps on 1,500-1,750 free took
1.9 s reading K[:, S] at each, 0.75 s so).  A step costs O(|S|^2) then,
instead of |S|^3 / 3 plus Python's overhead per array operation.

The steps follow ``smo._face_steps`` (same step to the box), with three changes
for long finishes: at a step of length 0 no variable is put on a bound it does
not reach, and when most of the variables just released go straight back to
their bound, fewer are released at the next check (half, down to one; back up
when none does).  Released together, variables at a nearly degenerate face
can push each other out again and again (n = 5,000 moons, gamma 50, C 100:
400 steps without an end from 11 on the wrong side; 42 steps so).  And a check
releases the worst of those that lie apart (``face_release``): neighbours are on
the wrong side for one reason, and the release of one mostly settles the others.
The factor is of K_SS + mu I (``factor_core.RIDGE``, which says why): F_S
follows K_SS (t d) = t (F_S - b - mu d), and so do L^-1 F_S and L^-1 1, which
make a step one pass over L (``factor_core._kept_solve``).  Each solve is
checked on rows spread over S and, when one is off, made afresh, then refined
on the whole residual; when that fails, or a released variable's diagonal
vanishes, the factor is given up and each later step solves the bordered
system [K_SS 1; 1' 0] by LU (up to ``wide`` free variables, as the Python
steps' Bunch-Kaufman fallback).  Past that the steps hand back, and the Python
steps go on from the same alpha and F.  Kernel rows come from a
``KernelColumns`` with a row per member of S and some to spare (``face_kept.room``).
"""

from __future__ import annotations

import numba as nb
import numpy as np

from solver.qp.face_release import pick_apart
from solver.qp.factor_core import (RIDGE, _append, _append_block, _block_row, _delete, _forward,
                                  _kept_solve, _kept_step, _lu_solve, _remove, _solve)
from solver.qp.row_sums import _row
from solver.qp.row_sums import catch_up as _catch_up

DONE, STOPPED, HAND_BACK = 1, 0, -1      # what face_steps returns first
FACTOR, DENSE, NEITHER = 0, 1, -1        # what _add returns
RESIDUAL = 1e-9                          # face-system residual accepted, relative to max |F_S|
CHECKED = 16                             # rows of the face system checked after each solve
REFINE = 2                               # steps of iterative refinement when a check fails
POLISH = 2                               # face steps more when F_S ends off b


@nb.njit(cache=True, nogil=True)
def _add(L, order, m, members, j, row_j, dense, wide):
    """Add j to the set: to the factor, or (dense: no factor is kept) to members only.
    Returns FACTOR or DENSE, what the set is afterwards (a factor that cannot take j is
    given up for dense solves, up to ``wide`` members), or NEITHER."""
    if not dense and _append(L, order, m, members, j, row_j):
        return FACTOR
    if m + 1 > wide:
        return NEITHER
    members[m] = j
    return DENSE


@nb.njit(cache=True, nogil=True)
def _dense_solve(X, gamma, reach, F, members, m, excess, d, rows, slot_of, owner, stamp, clock,
                 partial, act, counts):
    """(solved, b) of the bordered face system by LU with partial pivoting, d[:m] = d:
    what a nearly singular K_SS (a wide kernel) leaves, as smo's Bunch-Kaufman fallback."""
    system = np.zeros((m + 1, m + 1))
    right = np.zeros(m + 1)
    for r in range(m):
        row = _row(members[r], X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act,
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


@nb.njit(cache=True, nogil=True, fastmath=True)
def _solved(X, gamma, reach, F, members, m, d, b, ridge, tolerance, checked, residual, rows,
            slot_of, owner, stamp, clock, partial, act, counts):
    """Whether |(K_SS + ridge I) d + b - F_S| <= tolerance on ``checked`` rows spread over
    S (all of them when checked >= m); residual[:m] = F_S - (K_SS + ridge I) d - b where
    computed."""
    checked = min(checked, m)
    ok = True
    for k in range(checked):
        r = k * (m - 1) // (checked - 1) if checked > 1 else 0
        row = _row(members[r], X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act,
                   counts)
        s = 0.0
        for c in range(m):
            s += row[members[c]] * d[c]
        residual[r] = F[members[r]] - b - s - ridge * d[r]
        if not abs(residual[r]) <= tolerance:
            ok = False
    return ok


@nb.njit(cache=True, nogil=True)
def face_steps(X, gamma, reach, y, upper, alpha, F, L, order, members, m, limit, patient, far,
               release, wide, near_bound, short_t, short_steps, rows, slot_of, owner, stamp):
    """Face steps from the free set of alpha (alpha, F in place) until no variable is on
    the wrong side of b, ``limit`` steps, or a reason to stop.  L: the lower Cholesky
    factor of K_SS = LL' on the set members[:m] (room for len(members) variables), row
    r of it in row order[r] of the array (``factor_core``); it
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
    zF, z1, z_kept = np.zeros(capacity), np.zeros(capacity), False   # L^-1 F_S, L^-1 1
    wrong = np.zeros(n)
    picked = np.empty(release, dtype=np.int64)          # released at a check, worst first
    block = np.empty((release, capacity))               # their kernel values (_block_row)
    dense = False             # the factor was given up: each step solves afresh
    for r in range(m - 1, -1, -1):
        i = members[r]
        if 0.0 < alpha[i] < upper[i]:
            in_S[i] = True
        else:
            _delete(L, order, m, members, r, u, zF, z1)
            m -= 1
    for t in range(n):
        if 0.0 < alpha[t] < upper[t] and not in_S[t]:
            if m >= capacity:
                return HAND_BACK, 0, counts[0], -1
            added = _add(L, order, m, members, t,
                         _row(t, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial,
                              act, counts), dense, wide)
            if added == NEITHER:
                return HAND_BACK, 0, counts[0], -1
            dense = added == DENSE
            in_S[t] = True
            m += 1
    scale = 1.0
    for t in range(n):
        scale = max(scale, abs(F[t]))
    scale *= 1e-12
    # F is brought up to date only where every entry is read (the release check) and
    # before returning; between, the changes of beta wait in ``pending`` and F on S is
    # kept in FS by the face system itself (see _follow)
    FS = F.copy()
    pending = np.zeros(n)
    touched = np.empty(n, dtype=np.int64)         # the points with a pending change
    marked = np.zeros(n, dtype=nb.boolean)
    waiting = 0
    solution = np.empty(capacity)
    polish = POLISH
    releasing = release              # released at the next release check
    released = 0
    fresh = np.zeros(n, dtype=nb.boolean)   # released at the last one
    bounced = 0
    steps, short = 0, 0
    status = STOPPED                 # unless a break below says otherwise; returns after
    for _ in range(limit):           # the release check find F up to date already
        if m == 0:
            status = HAND_BACK
            break
        steps += 1
        excess = (alpha * y).sum()
        largest = 1.0
        for r in range(m):
            largest = max(largest, abs(FS[members[r]]))
        if not dense:
            for _ in range(2):
                afresh = not z_kept
                if afresh:
                    for r in range(m):
                        work[r] = FS[members[r]]
                    _forward(L, order, m, work, zF, z1)
                z_kept = True
                b = _kept_solve(L, order, m, excess, zF, z1, change)   # change: d of beta_S
                solved = _solved(X, gamma, reach, FS, members, m, change, b, RIDGE,
                                 RESIDUAL * largest, min(CHECKED, m), work, rows, slot_of,
                                 owner, stamp, clock, partial, act, counts)
                if solved or afresh:
                    break
                z_kept = False          # the kept z drifted from F_S: once more afresh
            if not solved:              # the whole residual, which the refinement solves
                _solved(X, gamma, reach, FS, members, m, change, b, RIDGE, RESIDUAL * largest, m,
                        work, rows, slot_of, owner, stamp, clock, partial, act, counts)
            for _ in range(REFINE if not solved else 0):
                excess_d = excess
                for r in range(m):
                    excess_d += change[r]           # 1'd + e, zero when solved exactly
                _solve(L, order, m, work, u, v)            # u = K_SS^-1 (residual)
                shift = (u[:m].sum() + excess_d) / v[:m].sum()
                for r in range(m):
                    change[r] += u[r] - shift * v[r]
                b += shift
                solved = _solved(X, gamma, reach, FS, members, m, change, b, RIDGE,
                                 RESIDUAL * largest, m, work, rows, slot_of, owner, stamp,
                                 clock, partial, act, counts)
                if solved:
                    break
            if not solved:
                if m > wide:
                    status = HAND_BACK
                    break
                dense = True
        if dense:
            solved, b = _dense_solve(X, gamma, reach, FS, members, m, excess, change, rows, slot_of,
                                     owner, stamp, clock, partial, act, counts)
            if not solved:          # (its residual is not checked: the fit is judged
                status = HAND_BACK  # on F computed afresh at the end)
                break
        # the step to the box, as face_system.step_in_box
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
            solution[r] = change[r]
            step = y[i] * change[r]
            target = alpha[i] + step
            new = min(max(alpha[i] + t_max * step, 0.0), upper[i])
            near = near_bound if t_max > 0.0 else -1.0      # none put on a bound at t = 0
            if target < 0.0 and (alpha[i] / -step <= t_max * (1 + 1e-12)
                                 or alpha[i] <= near * upper[i]):
                new = 0.0
                work[r] = 1.0
                hits += 1
                bounced += 1 if fresh[i] and t_max == 0.0 else 0
            elif target > upper[i] and ((upper[i] - alpha[i]) / step <= t_max * (1 + 1e-12)
                                        or alpha[i] >= (1 - near) * upper[i]):
                new = upper[i]
                work[r] = 1.0
                hits += 1
                bounced += 1 if fresh[i] and t_max == 0.0 else 0
            else:
                work[r] = 0.0
            change[r] = (new - alpha[i]) * y[i]
            alpha[i] = new
        for r in range(m):
            if change[r] != 0.0:
                i = members[r]
                if not marked[i]:
                    marked[i] = True
                    touched[waiting] = i
                    waiting += 1
                pending[i] += change[r]
        if t_max < 1.0:
            _follow(FS, members, m, work, change, solution, t_max, b, 0.0 if dense else RIDGE,
                    X, gamma, reach, rows,
                    slot_of, owner, stamp, clock, partial, act, counts)
            if not dense:
                _kept_step(L, order, m, zF, z1, t_max, b, work, change, solution)
            for r in range(m - 1, -1, -1):
                if work[r] == 1.0:
                    in_S[members[r]] = False
                    _remove(L, order, m, members, r, u, zF, z1, dense)
                    m -= 1
            short = short + 1 if t_max < short_t else 0
            if not patient and short >= (short_steps if m + hits <= wide else 1):
                break
            continue
        # every free variable is where the face puts it: F on every point, then release
        # the worst on the wrong side
        _catch_up(F, pending, touched, marked, waiting, X, gamma, reach, rows, slot_of, owner,
                  stamp, clock, partial, act, counts)
        waiting = 0
        drift = 0.0
        z_kept = False
        for r in range(m):
            i = members[r]
            FS[i] = F[i]
            drift = max(drift, abs(F[i] - b))
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
            if drift > RESIDUAL * largest and polish > 0:
                polish -= 1         # F_S off b by what FS did not follow: once more on S
                continue
            return DONE, steps, counts[0], -1 if dense else m
        if far >= 0 and count > far:
            return STOPPED, steps, counts[0], -1 if dense else m
        # released variables that go straight back to their bound (a step of 0) come up
        # again at the next check: release fewer at a time while most do
        if 2 * bounced > released:
            releasing = max(1, releasing // 2)
        elif not bounced:
            releasing = min(release, 2 * releasing)
        for t in range(n):
            fresh[t] = False
        bounced = 0
        released = min(releasing, count, capacity - m)    # as many as there is room for
        if released == 0:
            return HAND_BACK, steps, counts[0], -1
        released = pick_apart(wrong, count, released, picked, X, gamma)
        for k in range(released):
            fresh[picked[k]] = True
        joined = 0            # to the factor together, one pass over L (_append_block)
        if not dense:
            for k in range(released):
                _block_row(block, k, _row(picked[k], X, gamma, reach, rows, slot_of, owner,
                                          stamp, clock, partial, act, counts),
                           members, m, picked, released)
            joined = _append_block(L, order, m, members, picked, block, released)
        for k in range(released):
            j = picked[k]
            if k >= joined:   # one the factor refused, and those after it: as before
                added = _add(L, order, m, members, j,
                             _row(j, X, gamma, reach, rows, slot_of, owner, stamp, clock,
                                  partial, act, counts), dense, wide)
                if added == NEITHER:
                    return HAND_BACK, steps, counts[0], -1
                dense = added == DENSE
            in_S[j] = True
            FS[j] = F[j]
            m += 1
    _catch_up(F, pending, touched, marked, waiting, X, gamma, reach, rows, slot_of, owner, stamp,
              clock, partial, act, counts)
    return status, steps, counts[0], -1 if dense or status == HAND_BACK else m


@nb.njit(cache=True, nogil=True, fastmath=True)
def _follow(FS, members, m, hit, change, solution, t, b, ridge, X, gamma, reach, rows, slot_of,
            owner, stamp, clock, partial, act, counts):
    """F on the members that stay in S after a step of t along the face system's
    solution ((K_SS + ridge I) d + b 1 = F_S): K_SS (t d) = t (F_S - b - ridge d), so
    F_S -= t (F_S - b - ridge d),
    corrected by the rows of the members put on a bound off that line (``hit``)."""
    for r in range(m):
        if hit[r] == 0.0:
            i = members[r]
            FS[i] -= t * (FS[i] - b - ridge * solution[r])
    for r in range(m):
        if hit[r] == 1.0:
            off = change[r] - t * solution[r]
            if off != 0.0:
                row = _row(members[r], X, gamma, reach, rows, slot_of, owner, stamp, clock,
                           partial, act, counts)
                for q in range(m):
                    if hit[q] == 0.0:
                        FS[members[q]] -= off * row[members[q]]
