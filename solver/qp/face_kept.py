"""The compiled face steps (``face_core``) with their Cholesky factor kept from call to call.

The RBF finish runs face steps after every stage of pair steps, and a C step
in the window starts them from the last fit's alphas, whose free set is the
one the last face steps ended on.  K_SS depends only on the points, the kernel
and the free set S, not on C: so the factor those steps left is kept with the
kernel rows (``KernelColumns.kept_factor``, which ``kernel_cache.RECENT`` lends
to the next fit of the same points and gamma) and brought to the new free set
by a few deletions and appends instead of made afresh (|S|^3 / 3, and the
gather of K_SS: 2.6 ms of a 12 ms C step at n = 1,000, gamma 10, measured).
When the sets differ by more than REFACTOR variables, or the kept factor does
not solve its face system well enough, a fresh factor is made.
"""

from __future__ import annotations

import ctypes
import os
import weakref

import numpy as np
from numba.extending import get_cython_function_address
from threadpoolctl import ThreadpoolController

from solver.qp import face_core
from solver.qp.dual_start import feasible
from solver.qp.factor_core import PIVOT, gather_lower
from solver.qp.kernel_cache import Buffers

REFACTOR = 48          # variables in one set and not the other, above which a fresh factor
SPARE = 64             # cache rows beyond the factor's members, for the rows a step reads
                       # besides theirs (released variables, the dense fallback's)
OVER_ROOM = 1.25       # free sets up to this many times the room are fitted to it
ROOM_LEFT = 1 / 16     # ... with this share of it left for those released (onto_room)


THREADED = 1_000       # free variables from which a fresh factor takes several threads
_BLAS = ThreadpoolController()

FACTORS = Buffers()    # the factor's memory, from one fit to the next: at 1,899 free, writing
                       # a fresh factor into new memory took 108 ms, into used memory 9 ms

_INT = ctypes.POINTER(ctypes.c_int)
# LAPACK's Cholesky factorisation, as scipy ships it for compiled callers: it factors the
# kept array in place, rows of any stride (scipy.linalg.cholesky copies into fresh memory)
_DPOTRF = ctypes.CFUNCTYPE(None, ctypes.c_char_p, _INT, ctypes.c_void_p, _INT, _INT)(
    get_cython_function_address("scipy.linalg.cython_lapack", "dpotrf"))


class KeptFactor:
    """L with K_SS = LL' on members[:m] (m = -1: nothing kept), row r of L in row
    order[r] of the array, room for ``room`` members."""

    def __init__(self, room: int):
        buffer = FACTORS.take(room * room)
        weakref.finalize(self, FACTORS.give_back, buffer)
        self.L = buffer[:room * room].reshape(room, room)
        self.order = np.arange(room)            # row r of L in row order[r] of the array
        self.members = np.zeros(room, dtype=np.int64)
        self.m = -1


def room(columns, n, limit) -> int:
    """The most free variables the compiled steps take (0: they do not serve): at most
    ``limit``, and, when the cache cannot hold a row per point, SPARE fewer than it holds.

    Every step reads the kernel row of every member of S (F -= K[:, S] d), so the
    rows of S must stay in the cache; with more members than rows, each step would
    compute them all again.  (n = 10,000, gamma 50, C 1: the decomposition's face
    finish on 2,200 free took 0.3-0.5 s per step in Python.)
    """
    if columns.rbf_gamma is None:
        return 0
    if columns.capacity >= n:
        return min(n, limit)
    return max(0, min(limit, columns.capacity - SPARE))


def available(columns, n, free, limit) -> bool:
    """Whether the compiled steps serve ``free`` free variables of an RBF kernel."""
    return 0 < free <= room(columns, n, limit)


def onto_room(columns, y, upper, alpha, F, room, over=OVER_ROOM, left=ROOM_LEFT):
    """F after putting the free variables nearest a bound on it (alpha in place), so that
    ``room`` less a share ``left`` of it stay free, when more than ``room`` and at most
    ``over`` times it are free; y'a = 0 is kept (``dual_start.feasible``, which may cut
    one of them short of its bound).  F unchanged otherwise.

    Most of those are at that bound at the optimum (n = 10,000 blobs, gamma 50, C 1:
    69% of the free variables below 0.03 C after the first stage), and those that are
    not come back at the face steps' release checks.  The face steps then serve a free
    set that outgrew the cache's room by a little, where the decomposition's rounds
    took over (n = 10,000 moons, gamma 100, C 1: 4,191 free after the first stage, room
    for 3,868; 4.8 s with a second stage and 11 rounds, 3.5 s so).
    """
    free = np.flatnonzero((alpha > 0) & (alpha < upper))
    if not room < len(free) <= over * room:
        return F
    nearness = np.minimum(alpha[free], upper[free] - alpha[free])
    put = free[np.argsort(nearness, kind="stable")[:len(free) - int(room * (1 - left))]]
    bound = np.where(alpha[put] < upper[put] / 2, 0.0, upper[put])
    F = F - columns.product(put, (bound - alpha[put]) * y[put])
    alpha[put] = bound
    balance(columns, y, alpha, F)
    return F


def balance(columns, y, alpha, F):
    """y'a = 0 made exact again (alpha and F in place): ``dual_start.feasible`` lowers
    the heavier class, least needed first, and F follows the alphas it changed."""
    balanced = feasible(alpha, y, -y * F)
    changed = np.flatnonzero(balanced != alpha)
    F -= columns.product(changed, (balanced[changed] - alpha[changed]) * y[changed])
    alpha[changed] = balanced[changed]


def face_steps(columns, y, upper, alpha, F, limit, patient, far, settings, room):
    """(face_core status, face steps taken) of the compiled face steps from alpha.

    ``settings``: (release, wide, near_bound, short, short_steps) as in ``smo``; ``room``:
    the most free variables the factor may hold.  HAND_BACK with 0 steps when there is
    no free variable, too many, or no Cholesky factor of K_SS.
    """
    free = np.flatnonzero((alpha > 0) & (alpha < upper))
    if not 0 < len(free) <= room:
        return face_core.HAND_BACK, 0
    kept = columns.kept_factor
    if kept is None or len(kept.members) != room:
        kept = columns.kept_factor = KeptFactor(room)
    fresh = kept.m < 0 or _changes(kept, free) > REFACTOR
    taken = 0
    while True:
        if fresh and not _refactor(kept, columns, _settled_first(free, alpha, upper)):
            return face_core.HAND_BACK, taken
        status, steps, rows, kept.m = face_core.face_steps(
            columns.X, columns.rbf_gamma, columns.reach, y, upper, alpha, F, kept.L, kept.order,
            kept.members, kept.m, int(limit) - taken, bool(patient),
            -1 if far is None else int(far), *settings, columns.store, columns.slot, columns.owner, columns.stamp)
        columns.clock = max(columns.clock, int(columns.stamp.max()))
        columns.computed += int(rows) * len(y)
        taken += int(steps)
        if status != face_core.HAND_BACK or fresh:
            return status, taken
        # the kept factor did not serve: once more from a fresh one
        fresh = True
        free = np.flatnonzero((alpha > 0) & (alpha < upper))
        if not 0 < len(free) <= room:
            return face_core.HAND_BACK, taken


def _settled_first(free, alpha, upper):
    """The free set in the order a fresh factor takes it: farthest from a bound first.
    Deleting row p of the factor costs about (m - p)^2 (the block below it is
    repaired), and the variables the steps put on a bound are mostly those near one,
    so these go last (n = 5,000, gamma 50, C 1, four shapes: 13-25% faster fits; moons
    1.49 -> 1.11 s, measured side by side)."""
    room = np.minimum(alpha[free], upper[free] - alpha[free]) / upper[free]
    return free[np.argsort(-room, kind="stable")]


def _changes(kept, free):
    members = np.sort(kept.members[:kept.m])
    return len(np.setdiff1d(members, free, assume_unique=True)) + \
        len(np.setdiff1d(free, members, assume_unique=True))


def _refactor(kept, columns, free) -> bool:
    """A fresh factor of K_SS + RIDGE I (the matrix the kept factor is of, ``face_core``)
    on the set ``free``, in the order given, made in kept.L itself."""
    k = len(free)
    kept.order[:] = np.arange(len(kept.order))
    gather_lower(columns.store, columns.slots(free), free, kept.L)
    if not _factored(kept.L, k) or not np.diagonal(kept.L)[:k].min() ** 2 > PIVOT:
        kept.m = -1
        return False
    kept.members[:k] = free
    kept.m = k
    return True


def _factored(L, k) -> bool:
    """_cholesky_in_place, on up to four threads from THREADED variables on (the fits
    run BLAS on one thread, ``dual_solver.solve_dual`` says why; no cvxopt call runs
    meanwhile here).  n = 5,000, gamma 50, C 1: 1,911 free, 45 -> 29 ms on two cores."""
    if k < THREADED:
        return _cholesky_in_place(L, k)
    with _BLAS.limit(limits=min(4, os.cpu_count() or 1), user_api="blas"):
        return _cholesky_in_place(L, k)


def _cholesky_in_place(L, k) -> bool:
    """L[:k, :k] = the lower Cholesky factor of the symmetric matrix whose lower triangle
    it holds (L C-ordered: LAPACK, by columns, sees the upper triangle of the same
    matrix, and its upper factor U, U'U = A, is our L' read by rows); False when the
    matrix is not positive definite."""
    assert L.flags.c_contiguous and L.dtype == np.float64 and k <= len(L)
    info = ctypes.c_int(0)
    _DPOTRF(b"U", ctypes.byref(ctypes.c_int(k)), L.ctypes.data,
            ctypes.byref(ctypes.c_int(L.shape[1])), ctypes.byref(info))
    return info.value == 0
