"""Gaussian kernel values, compiled: exp(-gamma |a - b|^2) row by row.

The exponential is the kernel's one costly operation: libm's exp is a call per
entry (about 10 ns on our machines, numpy's alike); ``exp_negative``
vectorises (about 3 ns).  Rows are computed whole and in cache, distances and
exp together (numpy's way, one n x m array after another, is memory-bound:
a 14,400 x 300 shading grid took 120 ms).  Used by the compiled RBF steps
(``qp/smo_core.py``), the RBF row cache and ``rbf.rbf_matrix``, so fits,
predictions and the window's shading grid compute the same kernel values.
Compiled by numba with ``cache=True`` (see ``solver/compiled_cache.py``).
"""

from __future__ import annotations

import math

import numba as nb
import numpy as np

LOG2E = 1.4426950408889634
LN2_HIGH = 6.93147180369123816490e-01     # ln 2 in two parts (fdlibm's): k ln2_high is exact
LN2_LOW = 1.90821492927058770002e-10
UNDERFLOW = -745.0                         # a floor that leaves every double's exp as it is


# no "reassoc" among the flags: it would undo the two-part reduction (measured: 100 ulp at
# x = -700 with it, 1.43 ulp at most on [-700, 0] without)
@nb.njit(cache=True, nogil=True, fastmath={"contract", "nsz", "arcp", "nnan", "ninf"})
def exp_negative(values, bits, floor):
    """values[:] = exp(values) for values <= 0, in place, to 1.5 ulp; exp(x) for x below
    -708 (under 2.2e-308), or below ``floor``, is 0.  bits: int64 scratch as long as
    values.  (The solver's floor is -46: a kernel matrix of points in order, with entries
    of 1e-200, made LAPACK's Cholesky factor 3.4 times slower than with those entries 0,
    on products below the smallest normal double; ``qp/point_order.py``.)

    libm's exp is a call per entry (10 ns here); this one vectorises (3 ns): exp(x) =
    2^k exp(r) with k = round(x / ln 2), |r| <= ln2 / 2, exp(r) by its Taylor series to
    degree 12 (the remainder is below 2e-16), 2^k built from its exponent bits.
    """
    for t in range(len(values)):
        v = max(values[t], -745.0)
        kf = math.floor(v * LOG2E + 0.5)
        r = (v - kf * LN2_HIGH) - kf * LN2_LOW
        p = 1.0 / 479001600.0
        p = p * r + 1.0 / 39916800.0
        p = p * r + 1.0 / 3628800.0
        p = p * r + 1.0 / 362880.0
        p = p * r + 1.0 / 40320.0
        p = p * r + 1.0 / 5040.0
        p = p * r + 1.0 / 720.0
        p = p * r + 1.0 / 120.0
        p = p * r + 1.0 / 24.0
        p = p * r + 1.0 / 6.0
        p = p * r + 0.5
        p = p * r + 1.0
        p = p * r + 1.0
        k = np.int64(kf) + 1023               # the biased exponent of 2^k
        if k < 1 or values[t] < floor:
            k, p = 0, 0.0
        values[t] = p
        bits[t] = k << 52
    scale = bits.view(np.float64)
    for t in range(len(values)):
        values[t] *= scale[t]


@nb.njit(cache=True, nogil=True)
def scaled_distances(B, a, gamma, values):
    """values[t] = -gamma |b_t - a|^2 for every row b_t of B (two features: unrolled,
    which vectorises: a row of 10,000 points in 48 us against 83)."""
    n, d = B.shape
    if d == 2:
        u, v = a[0], a[1]
        for t in range(n):
            p, q = B[t, 0] - u, B[t, 1] - v
            values[t] = -gamma * (p * p + q * q)
        return
    for t in range(n):
        s = 0.0
        for c in range(d):
            diff = B[t, c] - a[c]
            s += diff * diff
        values[t] = -gamma * s


@nb.njit(cache=True, nogil=True)
def rbf_block(A, B, gamma, floor):
    """K_ij = exp(-gamma |a_i - b_j|^2) for finite A, B (C-contiguous), row by row; 0 where
    -gamma |a_i - b_j|^2 < floor."""
    out = np.empty((len(A), len(B)))
    bits = np.empty(len(B), dtype=np.int64)
    for i in range(len(A)):
        scaled_distances(B, A[i], gamma, out[i])
        exp_negative(out[i], bits, floor)
    return out
