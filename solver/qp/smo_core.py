"""Compiled pair steps for the RBF dual: sequential minimal optimisation.

    maximise  D(a) = 1'a - 1/2 a'Qa,   Q_ij = y_i y_j k(x_i, x_j)
    subject to 0 <= a_i <= C_i,  y'a = 0

The state is alpha and F_i = y_i - (K beta)_i with beta = alpha * y, which is
G_i = -y_i (Qa - 1)_i of ``dual_certify``: at the optimum every F_i of a
variable whose a_i y_i can grow ("up") is at most every F_j of one whose
a_j y_j can shrink ("low"), and b lies between.  Each step moves one pair
along a_i += y_i t, a_j -= y_j t, which keeps y'a = 0; D along it is a
parabola with curvature k_ii + k_jj - 2 k_ij, so the step is exact, clipped
to the box.  i is the largest F among "up"; j is chosen with second-order
information, the largest gain (F_i - F_t)^2 / (k_ii + k_tt - 2 k_it) among
"low" (Fan, Chen & Lin, "Working Set Selection Using Second Order
Information for Training SVM", JMLR 6, 2005).  Variables at a bound that are
far from violating are left out of the search for a while (shrinking,
Joachims 1999); when the searched ones meet the violation, the caller
computes F afresh on every point and checks them all again.  Kernel rows live in the arrays of a ``KernelColumns`` (least
recently used first out); a row computed while variables are left out holds
only the searched entries and is forgotten before the others come back.

This is a first-order method: it stops at a violation ``eps`` and
``smo.py`` finishes exactly on the face it found.  numba compiles it once
per machine (cached beside the module, or in the user's cache folder).
"""

from __future__ import annotations


import numba as nb
import numpy as np
from numba.core import types
from numba.extending import overload

from solver.kernels.rbf_core import UNDERFLOW, exp_negative, scaled_distances
from solver.qp.pair_extremes import (best_beyond, blocks, combine, summarise, update_blocks,
                                    update_whole)
from solver.qp.point_order import REACH

TAU = 1e-12          # curvature floor for a pair of (nearly) coincident points
FLOOR = -REACH       # kernel values below exp(FLOOR) are computed as 0 (point_order) ...
SINGLE_LEAST = 1.2e-38   # rows of singles (pair_rows) hold 0 below the smallest normal
                         # single, 2^-126 = 1.18e-38: no subnormal reaches the loops


@nb.njit(cache=True, nogil=True)
def _bisect(values, count, key):
    """The first k < count with values[k] >= key (values[:count] ascending), else count."""
    low, high = 0, count
    while low < high:
        middle = (low + high) // 2
        if values[middle] < key:
            low = middle + 1
        else:
            high = middle
    return low


@nb.njit(cache=True, nogil=True)
def window(X, i, reach):
    """(lo, hi): the points t in lo <= t < hi are those within ``reach`` of x_i along
    the first feature, when the points are in its order (``reach`` inf: all of them).
    Beyond reach k(x_i, x_t) <= exp(-gamma reach^2), which ``smo.rbf_columns`` makes
    negligible, and the steps leave those entries out (``smo`` says how)."""
    n = len(X)
    if not reach < np.inf:
        return 0, n
    x = X[i, 0]
    low, high = 0, n            # first t with X[t, 0] > x - reach, then >= x + reach
    while low < high:
        middle = (low + high) // 2
        if X[middle, 0] <= x - reach:
            low = middle + 1
        else:
            high = middle
    lo = low
    high = n
    while low < high:
        middle = (low + high) // 2
        if X[middle, 0] < x + reach:
            low = middle + 1
        else:
            high = middle
    return lo, low


@nb.njit(cache=True, nogil=True)
def floor(reach):
    """... when rows are read within a finite reach; otherwise only values that underflow
    are 0 (the points in the caller's order, as before the order existed: the same fits)."""
    return FLOOR if reach < np.inf else UNDERFLOW


@nb.njit(cache=True, nogil=True)
def _rbf_row(X, i, gamma, reach, out, act, m):
    """out[t] = k(x_i, x_t) for t in act[:m] (every t when m is len(X)); 0 beyond reach."""
    n, d = X.shape
    lo, hi = window(X, i, reach)
    if m == n:
        out[:lo] = 0.0
        out[hi:] = 0.0
        part = out[lo:hi]
        scaled_distances(X[lo:hi], X[i], gamma, part)
        exp_negative(part, np.empty(hi - lo, dtype=np.int64), floor(reach))
        return
    first, last = _bisect(act, m, lo), _bisect(act, m, hi)
    for k in range(first):
        out[act[k]] = 0.0
    for k in range(last, m):
        out[act[k]] = 0.0
    values = np.empty(last - first)
    for k in range(last - first):
        t = act[first + k]
        s = 0.0
        for c in range(d):
            diff = X[t, c] - X[i, c]
            s += diff * diff
        values[k] = -gamma * s
    exp_negative(values, np.empty(last - first, dtype=np.int64), floor(reach))
    for k in range(first, last):
        out[act[k]] = values[k - first]


@nb.njit(cache=True, nogil=True)
def _slot(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act, m):
    """The cache row holding k(x_i, .), computed into the least recently used slot on a
    miss; while variables are left out (m < n) only the searched entries are computed
    and the row is marked partial."""
    s = slot_of[i]
    if s < 0:
        s = _oldest_to(i, slot_of, owner, stamp)
        _rbf_row(X, i, gamma, reach, rows[s], act, m)
        partial[s] = m < len(X)
    stamp[s] = clock
    return s


@nb.njit(cache=True, nogil=True)
def _oldest_to(i, slot_of, owner, stamp):
    """The least recently used slot, given to i (its last owner forgets it)."""
    s = int(np.argmin(stamp))
    if owner[s] >= 0:
        slot_of[owner[s]] = -1
    owner[s] = i
    slot_of[i] = s
    return s


@nb.njit(cache=True, nogil=True)
def _single_slot(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, doubles, d_slot,
                 d_owner, d_stamp, partial, act):
    """The row of singles holding k(x_i, .) (``pair_rows``): on a miss, the double row
    rounded (0 below SINGLE_LEAST), which is first computed whole into the double rows
    when absent there, so that the finish and F afresh find it."""
    s = slot_of[i]
    if s < 0:
        s = _oldest_to(i, slot_of, owner, stamp)
        d = _slot(i, X, gamma, reach, doubles, d_slot, d_owner, d_stamp, clock, partial, act,
                  len(X))
        target, source = rows[s], doubles[d]
        for t in range(len(source)):
            value = source[t]
            target[t] = value if value >= SINGLE_LEAST else 0.0
    stamp[s] = clock
    return s


def _fetch(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, doubles, d_slot, d_owner,
           d_stamp, partial, act, m):
    """The pair steps' slot of k(x_i, .): _single_slot for rows of singles, else _slot,
    chosen by the rows' type when numba compiles (``_fetch_for``): the double-row steps,
    where every fit on a fresh machine starts, then do not compile the single-row fetch
    (which made their first compilation 2.5 s longer, first_fit_bench)."""
    raise NotImplementedError("compiled code only")


@overload(_fetch)
def _fetch_for(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, doubles, d_slot,
               d_owner, d_stamp, partial, act, m):
    if rows.dtype == types.float32:
        def single(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, doubles, d_slot,
                   d_owner, d_stamp, partial, act, m):
            return _single_slot(i, X, gamma, reach, rows, slot_of, owner, stamp, clock,
                                doubles, d_slot, d_owner, d_stamp, partial, act)
        return single

    def double(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, doubles, d_slot, d_owner,
               d_stamp, partial, act, m):
        return _slot(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act, m)
    return double


@nb.njit(cache=True, nogil=True)
def _drop_partial(slot_of, owner, stamp, partial):
    """Forget rows computed on part of the points before the rows are handed back to
    KernelColumns, which expects whole rows."""
    for s in range(len(owner)):
        if partial[s]:
            if owner[s] >= 0:
                slot_of[owner[s]] = -1
            owner[s] = -1
            stamp[s] = 0
            partial[s] = False


@nb.njit(cache=True, nogil=True)
def _sides(y, C, alpha, t, up, low):
    """Whether a_t y_t can grow (up) and shrink (low)."""
    if y[t] > 0:
        up[t] = alpha[t] < C[t]
        low[t] = alpha[t] > 0
    else:
        up[t] = alpha[t] > 0
        low[t] = alpha[t] < C[t]


@nb.njit(cache=True, nogil=True)
def _best_pair(F, act, first, last, low, f_up, row_i, k_ii, best, j):
    """The best j so far (largest gain^2 / curvature) and its score, over act[first:last]."""
    for t in act[first:last]:
        if low[t]:
            gain = f_up - F[t]
            if gain > 0.0:
                curvature = k_ii + 1.0 - 2.0 * row_i[t]   # k_tt = 1 for the RBF kernel
                if curvature <= 0.0:
                    curvature = TAU
                score = gain * gain / curvature
                if score > best:
                    best, j = score, t
    return best, j


@nb.njit(cache=True, nogil=True)
def smo_rbf(X, y, C, gamma, reach, near, alpha, F, eps, max_steps, rows, slot_of, owner,
            stamp, doubles, d_slot, d_owner, d_stamp):
    """Pair steps until max(F over up) - min(F over low) <= eps over the variables still
    searched, or max_steps.

    alpha and F are updated in place; F of variables left out by shrinking is
    not kept up to date (the caller computes F afresh when ``left_out``).
    Returns (steps, violation over the searched ones, left_out).  Rows are computed
    within ``reach``; F is updated and pairs are chosen within ``near`` <= reach (a
    shorter one leaves F off by the kernel values between them: the caller then computes
    F afresh).  The rows read are
    singles (``pair_rows``) filled from the double rows ``doubles``
    (a KernelColumns' arrays, whole rows only) when ``rows`` holds singles; else
    ``rows`` are those, and the d_ arrays the same ones.
    """
    n = len(y)
    up = np.zeros(n, dtype=nb.boolean)
    low = np.zeros(n, dtype=nb.boolean)
    for t in range(n):
        _sides(y, C, alpha, t, up, low)
    act = np.arange(n)                 # the variables searched and updated: act[:m]
    m = n
    shrink_every = min(n, 200)
    countdown = shrink_every
    clock = max(stamp.max(), d_stamp.max()) + 1
    partial = np.zeros(len(d_owner), dtype=nb.boolean)
    steps = 0
    top, top_at, bottom, bottom_at = blocks(n)          # the extremes per block (pair_extremes)
    summarise(F, act, m, up, low, top, top_at, bottom, bottom_at)
    f_up, i, f_low, lowest = combine(m, top, top_at, bottom, bottom_at)
    while True:
        violation = f_up - f_low
        if i < 0 or violation <= eps or steps >= max_steps:
            break
        si = _fetch(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, doubles, d_slot,
                    d_owner, d_stamp, partial, act, m)
        clock += 1
        row_i = rows[si]
        k_ii = row_i[i]
        lo_i, hi_i, first, last = 0, n, 0, m
        if near < np.inf:
            lo_i, hi_i = window(X, i, near)
            first, last = _bisect(act, m, lo_i), _bisect(act, m, hi_i)
        best, j = 0.0, -1
        if near < np.inf:              # beyond reach k_it = 0: one curvature, k_ii + 1
            if lo_i <= lowest < hi_i:
                best, j = best_beyond(F, act, m, first, last, low, f_up,
                                      max(k_ii + 1.0, TAU), bottom)
            elif f_up - f_low > 0.0:   # the smallest F over low lies beyond: the best there
                best, j = (f_up - f_low) ** 2 / max(k_ii + 1.0, TAU), lowest
        best, j = _best_pair(F, act, first, last, low, f_up, row_i, k_ii, best, j)
        if j < 0:
            break
        sj = _fetch(j, X, gamma, reach, rows, slot_of, owner, stamp, clock, doubles, d_slot,
                    d_owner, d_stamp, partial, act, m)
        clock += 1
        row_i = rows[si]
        row_j = rows[sj]
        curvature = k_ii + row_j[j] - 2.0 * row_i[j]
        if curvature <= 0.0:
            curvature = TAU
        step = (f_up - F[j]) / curvature
        room = C[i] - alpha[i] if y[i] > 0 else alpha[i]
        if step > room:
            step = room
        room = alpha[j] if y[j] > 0 else C[j] - alpha[j]
        if step > room:
            step = room
        if y[i] > 0:
            alpha[i] = C[i] if step == C[i] - alpha[i] else min(alpha[i] + step, C[i])
        else:
            alpha[i] = 0.0 if step == alpha[i] else max(alpha[i] - step, 0.0)
        if y[j] > 0:
            alpha[j] = 0.0 if step == alpha[j] else max(alpha[j] - step, 0.0)
        else:
            alpha[j] = C[j] if step == C[j] - alpha[j] else min(alpha[j] + step, C[j])
        _sides(y, C, alpha, i, up, low)
        _sides(y, C, alpha, j, up, low)
        # update F within reach of i or j and find the next extremes, in one pass
        if near < np.inf:
            lo_j, hi_j = window(X, j, near)
            first = _bisect(act, m, min(lo_i, lo_j))
            last = _bisect(act, m, max(hi_i, hi_j))
            update_blocks(F, act, m, first, last, up, low, step, row_i, row_j, top, top_at,
                          bottom, bottom_at)
            f_up, i, f_low, lowest = combine(m, top, top_at, bottom, bottom_at)
        else:           # every row read whole: no need of where the smallest F is
            f_up, i, f_low = update_whole(F, act, m, up, low, step, row_i, row_j)
        steps += 1
        countdown -= 1
        if countdown <= 0:
            countdown = shrink_every
            m = _shrink(F, act, m, up, low, f_up, f_low)
            if near < np.inf:
                summarise(F, act, m, up, low, top, top_at, bottom, bottom_at)
    _drop_partial(d_slot, d_owner, d_stamp, partial)
    return steps, violation, m < n


@nb.njit(cache=True, nogil=True)
def _shrink(F, act, m, up, low, f_up, f_low):
    """Leave out bound variables that cannot be chosen soon: an "up"-only one whose F is
    below every "low" F, a "low"-only one whose F is above every "up" F.  act[:m] is
    compacted in place and the new m returned."""
    kept = 0
    for k in range(m):
        t = act[k]
        if (up[t] and not low[t] and F[t] < f_low) or (low[t] and not up[t] and F[t] > f_up):
            continue
        act[kept] = t
        kept += 1
    return kept
