"""Kernel rows in single precision for the RBF pair steps on many points (``smo``).

The pair steps (``smo_core.smo_rbf``) read the rows of the pair they move on every
searched point, and above a few thousand points that reading, not the arithmetic,
is most of a step.  Rows of singles are half the bytes.  Each is the double row
rounded once: a miss computes the whole double row into the KernelColumns first
(``smo_core._single_slot``), so the finish and F afresh, which must be exact, find
the rows the pair steps used, as before.  The singles are kept with the columns
(``columns.pair_rows``), so the cache a C step borrows (``kernel_cache.RECENT``)
brings them along, and their memory goes from fit to fit through a pool of its own
(``PAIR_BUFFERS``).

Side by side, twice, against the same steps on double rows: n = 5,000, C 1, gamma 10
0.54-0.55 -> 0.51 s, moons gamma 50 0.81 -> 0.78-0.79 s, blobs gamma 50 unchanged;
n = 10,000, C 1, gamma 2 0.52 -> 0.37-0.39 s, gamma 10 3.01 -> 2.76-2.78 s.  (Rows of
their own, computed apart from the double ones, made n = 5,000 gamma 50 slower: F
afresh then computed its double rows again.)
"""

from __future__ import annotations

import weakref

import numpy as np

from solver.qp.kernel_cache import Buffers

SINGLE_FROM = 2_000              # above this many points the pair steps read single rows
PAIR_CACHE_BYTES = 200 * 2**20   # ... kept in this much memory
PAIR_BUFFERS = Buffers()         # ... which goes from one fit to the next


class PairRows:
    """Kernel rows in single precision for the pair steps, least recently used first out.

    A pair step reads two rows on every searched point, and on thousands of points
    that reading is most of its time: in single precision it is half the bytes
    (n = 5,000, gamma 10, C 1, all rows cached: 13.8-14.5 us a step, 10.9 us so).
    The pair steps only approach the optimum (to a violation of 1e-3, 1e-4): their
    rows' rounding, 6e-8 of each value, moves F by far less, and the finish and the
    certificate read F computed afresh in double precision (``smo._fresh_F``, from the
    double rows of the KernelColumns).  Values below ``smo_core.SINGLE_LEAST``
    are 0: no subnormal single ever reaches the loops.
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
    """The rows the pair steps read: single ones above SINGLE_FROM points (at most that
    many, all of K is computed up front in doubles and read from fast memory), kept with
    the columns so that the next fit of the same points and gamma has them too, or
    whenever the columns already have them; else the columns' own."""
    n = len(columns.X)
    if columns.pair_rows is None:
        if n <= SINGLE_FROM:
            return columns
        columns.pair_rows = PairRows(n)
    return columns.pair_rows
