"""Which wrong-side bound variables the compiled face steps release at a check.

Worst first, as the Python steps (``smo._face_steps``), but apart: near a narrow
kernel's boundary the variables on the wrong side come in runs of neighbours, there for
one reason, and the release of one mostly settles the others.  Released together they
overshot, and the next steps dropped most of them again, one deletion from the factor
each.
"""

from __future__ import annotations

import numba as nb
import numpy as np

APART = 0.1                              # released at one check: none whose kernel value
                                         # with one picked before exceeds this, while
                                         # enough lie apart.  n = 10,000 blobs, gamma 50,
                                         # C 1, from the first stage: 1,460 on the wrong
                                         # side at the first check, and worst first, 87%
                                         # of the released were dropped again (1,426 steps,
                                         # 201 checks, 3.4 s); apart, 1,006 steps, 109
                                         # checks, 2.3 s.  0.01 alike


@nb.njit(cache=True, nogil=True)
def pick_apart(wrong, count, wanted, picked, X, gamma):
    """How many of the ``count`` variables on the wrong side (wrong > 0) were picked into
    ``picked`` (at most ``wanted``): worst first those whose kernel value with every one
    picked before is at most APART, then, when too few lie apart, the worst of the others
    (at C 100 a few near ones are often all that is left: picked one by one, n = 10,000
    blobs, gamma 50, took 643 checks without an end, where worst first ended in 51).
    ``wrong`` is written over."""
    candidates = np.empty(count, dtype=np.int64)
    c = 0
    for t in range(len(wrong)):
        if wrong[t] > 0.0:
            candidates[c] = t
            c += 1
    worst_first = np.argsort(-wrong[candidates[:c]], kind="mergesort")
    near = -np.log(APART) / gamma          # squared distance within which k > APART
    k = 0
    for q in worst_first:
        j = candidates[q]
        apart = True
        for p in range(k):
            d2 = 0.0
            for f in range(X.shape[1]):
                d2 += (X[j, f] - X[picked[p], f]) ** 2
            if d2 < near:
                apart = False
                break
        if apart:
            picked[k] = j
            wrong[j] = 0.0
            k += 1
            if k == wanted:
                return k
    for q in worst_first:                  # too few apart: the worst of the others
        j = candidates[q]
        if wrong[j] > 0.0:
            picked[k] = j
            k += 1
            if k == wanted:
                break
    return k
