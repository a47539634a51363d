"""Compiled sums of kernel rows: F -= K[:, T] w, where the rows of T sit in a row cache.

Both the face steps' catch-up (``face_core``: the changes of beta that waited,
applied on every point at a release check) and ``KernelColumns.product`` (F
computed afresh) stream |T| rows of n entries each, and the rows come from main
memory.  Taken four at a time, each entry of the sum is read and written once per
four rows instead of once per row: n = 10,000, 1,700 rows, 11.7 ms -> 8.1 ms (two
rows at a time gave less, eight no more; measured).
"""

from __future__ import annotations

import numba as nb

from solver.qp.smo_core import _slot, window

GROUP = 4            # rows summed in one pass


@nb.njit(cache=True, nogil=True)
def _row(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act, counts):
    """The cache row of k(x_i, .), computed (and counted) when absent."""
    if slot_of[i] < 0:
        counts[0] += 1
    return rows[_slot(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act, len(X))]


@nb.njit(cache=True, nogil=True)
def _four(out, sign, w0, w1, w2, w3, r0, r1, r2, r3, lo, hi):
    """out[lo:hi] += sign (w0 r0 + w1 r1 + w2 r2 + w3 r3), in one pass."""
    a0, a1, a2, a3 = sign * w0, sign * w1, sign * w2, sign * w3
    # on slices (range(lo, hi) on the whole arrays ran 15% slower: 9.2 against 7.8 ms)
    o, q0, q1, q2, q3 = out[lo:hi], r0[lo:hi], r1[lo:hi], r2[lo:hi], r3[lo:hi]
    for t in range(hi - lo):
        o[t] += (a0 * q0[t] + a1 * q1[t]) + (a2 * q2[t] + a3 * q3[t])


@nb.njit(cache=True, nogil=True)
def _reach_of_four(X, points, k, reach):
    """(lo, hi): the points within reach of any of points[k:k + GROUP] (the union of
    their ``smo_core.window``s)."""
    lo, hi = len(X), 0
    for q in range(k, k + GROUP):
        a, z = window(X, points[q], reach)
        lo, hi = min(lo, a), max(hi, z)
    return lo, hi


@nb.njit(cache=True, nogil=True)
def add_rows(store, slots, weights, out, X, points, reach):
    """out += weights @ store[slots], the rows of ``points``, reading the rows where they
    are (numpy would first gather them into a copy: for a face step on 280 of 1,000
    points, 0.3 ms against 0.1), four at a time, each four within the union of their
    windows (``smo_core.window``: the rows are 0 beyond reach; all of a row when reach is
    inf).  With the points in order, four rows have nearly the same window: F afresh
    at n = 5,000, moons, gamma 50, C 1: 6 -> 3 ms a call (profiled)."""
    k = 0
    count = len(slots)
    while k + GROUP <= count:
        lo, hi = _reach_of_four(X, points, k, reach)
        _four(out, 1.0, weights[k], weights[k + 1], weights[k + 2], weights[k + 3],
              store[slots[k]], store[slots[k + 1]], store[slots[k + 2]], store[slots[k + 3]],
              lo, hi)
        k += GROUP
    for q in range(k, count):
        w = weights[q]
        if w != 0.0:
            row = store[slots[q]]
            lo, hi = window(X, points[q], reach)
            for t in range(lo, hi):
                out[t] += w * row[t]


@nb.njit(cache=True, nogil=True)
def catch_up(F, pending, touched, marked, waiting, X, gamma, reach, rows, slot_of, owner, stamp,
             clock, partial, act, counts):
    """F -= K[:, touched] pending[touched] on every point, and pending back to 0.

    Rows are fetched four at a time; when fetching one made room by giving up the slot
    of another of the four (a full cache), that group is summed one row at a time.
    They are taken in point order, so that with the points in the order of their first
    feature (a narrow kernel) the four rows summed together have nearly the same window:
    taken as the face steps touched them, the union of four windows was most of the
    points (n = 5,000 moons, gamma 50, C 1: catch-ups 90 -> 50 ms of 334)."""
    touched[:waiting].sort()
    k = 0
    while k + GROUP <= waiting:
        i0, i1, i2, i3 = touched[k], touched[k + 1], touched[k + 2], touched[k + 3]
        r0 = _row(i0, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act, counts)
        r1 = _row(i1, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act, counts)
        r2 = _row(i2, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act, counts)
        r3 = _row(i3, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act, counts)
        if slot_of[i0] < 0 or slot_of[i1] < 0 or slot_of[i2] < 0:
            break                            # one of the four gave its slot up: one by one
        lo, hi = _reach_of_four(X, touched, k, reach)
        _four(F, -1.0, pending[i0], pending[i1], pending[i2], pending[i3], r0, r1, r2, r3,
              lo, hi)
        for i in (i0, i1, i2, i3):
            pending[i] = 0.0
            marked[i] = False
        k += GROUP
    for q in range(k, waiting):
        i = touched[q]
        w = pending[i]
        pending[i] = 0.0
        marked[i] = False
        if w != 0.0:
            row = _row(i, X, gamma, reach, rows, slot_of, owner, stamp, clock, partial, act,
                       counts)
            lo, hi = window(X, i, reach)
            part, source = F[lo:hi], row[lo:hi]      # slices: bounds known, so it vectorises
            for t in range(hi - lo):
                part[t] -= w * source[t]
