"""Columns of the kernel matrix on demand, kept in one fixed buffer.

The decomposition touches K only through K[:, W] (gradient updates) and
K[W, W] (the sub-QP) for working sets W that overlap from round to round.
Column j is computed once, as a contiguous row of ``store``, and kept until
the buffer is full; then the columns used longest ago make room.  The
buffer holds at most BUDGET bytes, so at n = 10,000 no n x n matrix exists.

Kernel values are computed in blocks of about BLOCK entries: a block's
temporaries stay in cache, and the exponential of a cached block runs at
vector speed where one large fresh array spends most of its time on page
faults.

The buffer itself outlives the cache: when a KernelColumns is gone its memory
goes back to a pool (``BUFFERS``) for the next one: the window fits the same
points again at every step.  The pool keeps one buffer, the largest handed
back, and never gives one to two caches at a time.  Fresh buffers are mapped
in small pages (``_fresh``): numpy asks for huge pages on large arrays, and
the first touch of those cost up to five times as much (measured below).
"""

from __future__ import annotations

import mmap
import threading
import weakref

import numpy as np

from solver.qp import row_sums

BUDGET = 200 * 2**20        # bytes of kernel columns kept
BLOCK = 2**17               # kernel entries computed at a time
MIN_CAPACITY = 64
SMALL = 2**17               # entries (1 MiB) below which a buffer is not taken from the pool


class Buffers:
    """Flat float64 buffers kept from one fit to the next (kernel rows here, the face
    steps' factor in ``face_kept``)."""

    def __init__(self):
        self._lock = threading.Lock()
        self._kept = None            # a buffer no cache is using, or None

    def take(self, size: int) -> np.ndarray:
        """A buffer of at least ``size`` entries that no other cache holds."""
        if size < SMALL:
            return np.empty(size)            # few page faults: the kept one stays for big fits
        with self._lock:
            kept = self._kept
            if kept is not None and kept.size >= size:
                self._kept = None
                return kept
        return _fresh(size)

    def give_back(self, buffer: np.ndarray) -> None:
        if buffer.size < SMALL:
            return
        with self._lock:
            if self._kept is None or self._kept.size < buffer.size:
                self._kept = buffer

    def clear(self) -> None:
        with self._lock:
            self._kept = None


BUFFERS = Buffers()


def _fresh(size: int) -> np.ndarray:
    """``size`` float64 entries of fresh, zeroed memory in small pages.

    numpy asks the kernel for huge pages on any large array (madvise), and
    where the kernel then compacts memory to find them, their first touch is
    slow: 200 MiB touched once, 0.31 s from np.empty against 0.06 s from a
    plain anonymous map; n = 10,000, gamma 0.1, C 1, the first fit of a run,
    839 -> 420 ms (measured on the 2-core machines we use).  A cache writes
    only the rows it computes, so pages are paid for as rows arrive.
    """
    nbytes = max(8 * size, 1)
    if hasattr(mmap, "MAP_ANONYMOUS"):       # private, not shared memory (POSIX)
        region = mmap.mmap(-1, nbytes, flags=mmap.MAP_PRIVATE | mmap.MAP_ANONYMOUS)
    else:                                    # Windows: the page file, small pages
        region = mmap.mmap(-1, nbytes)
    MAPPED.add(nbytes)
    weakref.finalize(region, MAPPED.remove, nbytes)
    return np.frombuffer(region, dtype=np.float64, count=size)


class _Mapped:
    """Bytes of the buffers ``_fresh`` mapped that are still alive, now and at most since
    ``reset_peak``: tracemalloc sees numpy's arrays but not these maps, so a measure
    of a fit's memory adds them (``bench/kernel_bench.py``)."""

    def __init__(self):
        self._lock = threading.Lock()
        self.now = self.peak = 0

    def add(self, nbytes: int) -> None:
        with self._lock:
            self.now += nbytes
            self.peak = max(self.peak, self.now)

    def remove(self, nbytes: int) -> None:
        with self._lock:
            self.now -= nbytes

    def reset_peak(self) -> None:
        with self._lock:
            self.peak = self.now


MAPPED = _Mapped()


class _Recent:
    """The last fit's cache, lent to the next fit of the same points and kernel.

    A C step in the window fits the same points with the same kernel again: its
    rows are the ones the last fit computed (n = 1,000, gamma 0.5 and 2: a warm C
    step took twice as long when it computed them again).  One fit at a
    time holds the cache; a fit of other points or another kernel drops it, and
    its buffer goes back to BUFFERS first.
    """

    def __init__(self):
        self._lock = threading.Lock()
        self._kept = None            # (key, columns), columns.X a private copy

    def take(self, X: np.ndarray, key) -> KernelColumns | None:
        """The kept cache if it holds kernel ``key`` on exactly these points, else None."""
        with self._lock:
            kept, self._kept = self._kept, None
        if kept is None:
            return None
        kept_key, columns = kept
        if kept_key == key and np.array_equal(columns.X, X):
            return columns
        return None          # dropped here: its buffer is back in the pool for the next

    def keep(self, key, columns: KernelColumns) -> None:
        with self._lock:
            self._kept = (key, columns)

    def clear(self) -> None:
        with self._lock:
            self._kept = None


RECENT = _Recent()


class KernelColumns:
    """K[:, j] = k(X, x_j) for the columns a solver asks for."""

    def __init__(self, X: np.ndarray, kernel_matrix, budget: int = BUDGET):
        self.X = X
        self.kernel_matrix = kernel_matrix
        n = len(X)
        self.capacity = int(min(n, max(MIN_CAPACITY, budget // (8 * n))))
        buffer = BUFFERS.take(self.capacity * n)
        self.store = buffer[:self.capacity * n].reshape(self.capacity, n)
        weakref.finalize(self, BUFFERS.give_back, buffer)
        self.slot = np.full(n, -1, dtype=np.intp)       # where column j lives, -1: absent
        self.owner = np.full(self.capacity, -1, dtype=np.intp)
        self.stamp = np.zeros(self.capacity, dtype=np.int64)
        self.clock = 0
        self.computed = 0                                # kernel entries evaluated
        self.rbf_gamma = None           # set for an RBF kernel: compiled code computes rows
        self.reach = np.inf             # ... and reads them within this reach (point_order)
        self.kept_factor = None         # the face steps' last Cholesky factor (face_kept)
        self.pair_rows = None           # the pair steps' rows in single precision (pair_rows)

    @property
    def nbytes(self) -> int:
        return self.store.nbytes

    def rows(self, idx: np.ndarray) -> np.ndarray:
        """K[idx, :] (= K[:, idx]' by symmetry) as a |idx| x n array (a copy)."""
        return self.store[self._ensure(idx)]

    def slots(self, idx: np.ndarray) -> np.ndarray:
        """The rows of ``store`` holding K[idx, :] (at most ``capacity`` of them), computing
        the missing ones."""
        return self._ensure(idx)

    def fill(self, idx: np.ndarray) -> None:
        """Compute and keep columns idx (at most ``capacity`` of them)."""
        self._ensure(idx)

    def block(self, idx: np.ndarray) -> np.ndarray:
        """K[idx, idx]; computed afresh, not kept, when more columns than fit are asked for
        (an exact solve on 2,900 free variables at n = 10,000, where 2,600 fit)."""
        idx = np.asarray(idx, dtype=np.intp)
        if len(idx) <= self.capacity:
            return self.store[np.ix_(self._ensure(idx), idx)]  # gathers |idx|^2 entries only
        out = np.empty((len(idx), len(idx)))
        points = self.X[idx]
        step = max(1, BLOCK // len(idx))
        for start in range(0, len(idx), step):
            out[start:start + step] = self.kernel_matrix(points[start:start + step], points)
        self.computed += len(idx) ** 2
        return out

    def product(self, idx: np.ndarray, weights: np.ndarray) -> np.ndarray:
        """K[:, idx] @ weights, without keeping columns that do not fit."""
        idx = np.asarray(idx, dtype=np.intp)
        if len(idx) <= self.capacity:
            return self._combine(self._ensure(idx), idx, weights, np.zeros(len(self.X)))
        out = np.zeros(len(self.X))
        cached = self.slot[idx] >= 0
        if cached.any():
            self._combine(self.slot[idx[cached]], idx[cached], weights[cached], out)
        rest = np.flatnonzero(~cached)
        step = max(1, BLOCK // len(self.X))
        for start in range(0, len(rest), step):
            part = rest[start:start + step]
            out += weights[part] @ self.kernel_matrix(self.X[idx[part]], self.X)
        self.computed += len(rest) * len(self.X)
        return out

    def _combine(self, slots, points, weights, out):
        """out += weights @ store[slots] (the rows of ``points``), read in place and within
        reach (compiled)."""
        row_sums.add_rows(self.store, np.ascontiguousarray(slots, dtype=np.intp),
                          np.ascontiguousarray(weights, dtype=float), out,
                          np.ascontiguousarray(self.X, dtype=float),
                          np.ascontiguousarray(points, dtype=np.intp), float(self.reach))
        return out

    def _ensure(self, idx: np.ndarray) -> np.ndarray:
        """Slots of columns idx (|idx| <= capacity), computing the missing ones."""
        idx = np.asarray(idx, dtype=np.intp)
        self.clock += 1
        missing = idx[self.slot[idx] < 0]
        if len(missing):
            free = np.flatnonzero(self.owner < 0)
            if len(free) < len(missing):
                # evict the least recently used columns not wanted now
                self.stamp[self.slot[idx[self.slot[idx] >= 0]]] = self.clock
                used = np.flatnonzero((self.owner >= 0) & (self.stamp < self.clock))
                victims = used[np.argsort(self.stamp[used], kind="stable")]
                victims = victims[:len(missing) - len(free)]
                self.slot[self.owner[victims]] = -1
                self.owner[victims] = -1
                free = np.concatenate([free, victims])
            targets = free[:len(missing)]
            step = max(1, BLOCK // len(self.X))
            for start in range(0, len(missing), step):
                part = missing[start:start + step]
                self.store[targets[start:start + step]] = self.kernel_matrix(self.X[part],
                                                                             self.X)
            self.slot[missing] = targets
            self.owner[targets] = missing
            self.computed += len(missing) * len(self.X)
        slots = self.slot[idx]
        self.stamp[slots] = self.clock
        return slots
