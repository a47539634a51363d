"""Kernel rows in single precision for the RBF pair steps on many points (``smo``).

The pair steps (``smo_core.smo_rbf``) read the rows of the pair they move on every
searched point, and above a few thousand points that reading, not the arithmetic,
is most of a step.  Rows of singles are half the bytes.  They are kept with the
double-precision KernelColumns (``columns.pair_rows``), so the cache a C step
borrows (``kernel_cache.RECENT``) brings them along, and their memory goes from
fit to fit through a pool of its own (``PAIR_BUFFERS``).
"""

from __future__ import annotations

import weakref

import numpy as np

from solver.qp.kernel_cache import Buffers

PAIR_CACHE_BYTES = 200 * 2**20   # single rows kept in this much memory
PAIR_BUFFERS = Buffers()         # ... which goes from one fit to the next


class PairRows:
    """Kernel rows in single precision for the pair steps, least recently used first out.

    A pair step reads two rows on every searched point, and on thousands of points
    that reading is most of its time: in single precision it is half the bytes
    (n = 5,000, gamma 10, C 1, all rows cached: 13.8-14.5 us a step, 10.9 us so).
    The pair steps only approach the optimum (to a violation of 1e-3, 1e-4): their
    rows' rounding, 6e-8 of each value, moves F by far less, and the finish and the
    certificate read F computed afresh in double precision (``smo._fresh_F``, from the
    double rows of the KernelColumns).  Values below exp(``smo_core.SINGLE_FLOOR``) are 0: no
    subnormal single ever reaches the loops.
    """

    def __init__(self, n: int):
        self.capacity = int(min(n, max(64, PAIR_CACHE_BYTES // (4 * n))))
        size = self.capacity * n
        buffer = PAIR_BUFFERS.take((size + 1) // 2)          # float64 entries, two singles each
        weakref.finalize(self, PAIR_BUFFERS.give_back, buffer)
        self.store = buffer.view(np.float32)[:size].reshape(self.capacity, n)
        self.slot = np.full(n, -1, dtype=np.intp)
        self.owner = np.full(self.capacity, -1, dtype=np.intp)
        self.stamp = np.zeros(self.capacity, dtype=np.int64)
        self.clock = 0


def rows_for_pair_steps(columns):
    """The rows the pair steps read: single ones where the columns cannot hold a double
    row per point (above about 5,200 points at 200 MiB), kept with the columns so that
    the next fit of the same points and gamma has them too; else the columns' own.

    Where every double row fits, the finish and F afresh read the rows the pair steps
    left, and single rows of their own made fits no faster (n = 5,000, gamma 10, C 1)
    or slower (gamma 50, C 1: 728-745 -> 754-766 ms); where they do not, n = 10,000,
    C 1: gamma 2 0.54-0.56 -> 0.44-0.45 s, gamma 10 3.19-3.22 -> 2.92-2.99 s,
    gamma 50 9.7-9.8 -> 8.7-8.9 s (side by side, twice)."""
    n = len(columns.X)
    if columns.pair_rows is None:
        if columns.capacity >= n:
            return columns
        columns.pair_rows = PairRows(n)
    return columns.pair_rows
