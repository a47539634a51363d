"""A fresh face factor made in the kept array itself (solver.qp.face_kept._refactor):
the lower triangle of K_SS + mu I gathered from the kernel rows, then factored in
place by LAPACK.

Sources of the expected values, named beside each check:
- the Cholesky factor's defining identity K_SS + mu I = LL', and K written out
  here from the formula exp(-gamma |a - b|^2) (common practice, no source);
- numpy.linalg.cholesky on the same matrix (LAPACK through numpy), as a reference.
"""

import numpy as np

from solver.qp import face_kept, factor_core
from solver.qp.kernel_cache import KernelColumns
from solver.kernels.rbf import rbf_matrix

from test_kernel_fits import _gaussian


def test_a_factor_made_in_place_is_the_cholesky_factor_of_the_ridged_block():
    rng = np.random.default_rng(11)
    X = rng.normal(size=(60, 2))
    gamma = 3.0
    columns = KernelColumns(X, lambda A, B: rbf_matrix(A, B, gamma))
    columns.rbf_gamma = gamma
    free = np.array([5, 41, 2, 17, 33, 8, 59, 20])          # any order, as _settled_first's
    kept = face_kept.KeptFactor(24)                          # rows of stride 24, not 8
    kept.L[:] = np.nan                                       # the upper triangle is not read
    assert face_kept._refactor(kept, columns, free)
    k = len(free)
    block = _gaussian(X[free], X[free], gamma) + factor_core.RIDGE * np.eye(k)
    L = np.tril(kept.L[kept.order[:k], :k])
    np.testing.assert_allclose(L @ L.T, block, rtol=0, atol=1e-13)      # LL' = K_SS + mu I
    np.testing.assert_allclose(L, np.linalg.cholesky(block), rtol=0, atol=1e-12)  # numpy's
    assert list(kept.members[:k]) == list(free) and kept.m == k


def test_a_block_that_is_not_positive_definite_is_refused():
    # 2 x 2 blocks in the corner of a wider array, worked by hand: 4 = 2^2, 2 = 2 * 1,
    # 5 = 1^2 + 2^2; [[1, 2], [2, 1]] has eigenvalues 3 and -1
    L = np.zeros((5, 5))
    L[0, 0], L[1, 0], L[1, 1] = 1.0, 2.0, 1.0                # [[1, 2], [2, 1]]: eigenvalue -1
    assert not face_kept._cholesky_in_place(L, 2)
    L = np.zeros((5, 5))
    L[0, 0], L[1, 0], L[1, 1] = 4.0, 2.0, 5.0                # [[4, 2], [2, 5]] = LL'
    assert face_kept._cholesky_in_place(L, 2)
    np.testing.assert_allclose(np.tril(L[:2, :2]), [[2.0, 0.0], [1.0, 2.0]], atol=1e-15)
