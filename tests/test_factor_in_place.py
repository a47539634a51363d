"""A fresh face factor made in the kept array itself (solver.qp.face_kept._refactor):
the lower triangle of K_SS + mu I gathered from the kernel rows, then factored in
place by LAPACK.

Sources of the expected values, named beside each check:
- the Cholesky factor's defining identity K_SS + mu I = LL', and K written out
  here from the formula exp(-gamma |a - b|^2) (common practice, no source);
- numpy.linalg.cholesky on the same matrix (LAPACK through numpy), as a reference.
"""

import numpy as np
from threadpoolctl import ThreadpoolController

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


def test_a_large_factor_on_several_threads_is_numpys_and_leaves_blas_on_one(monkeypatch):
    # from THREADED members on, LAPACK may use several threads for the factor; the fits'
    # one-thread limit (dual_solver.solve_dual) holds again afterwards
    monkeypatch.setattr(face_kept, "THREADED", 100)
    rng = np.random.default_rng(12)
    X = rng.normal(size=(400, 2)) * 3.0         # a narrow kernel: a well conditioned K_SS
    gamma = 5.0
    columns = KernelColumns(X, lambda A, B: rbf_matrix(A, B, gamma))
    columns.rbf_gamma = gamma
    free = rng.permutation(400)[:300]
    kept = face_kept.KeptFactor(320)
    controller = ThreadpoolController()
    with controller.limit(limits=1, user_api="blas"):
        assert face_kept._refactor(kept, columns, free)
        assert all(lib.num_threads == 1 for lib in controller.select(user_api="blas").lib_controllers)
    block = _gaussian(X[free], X[free], gamma) + factor_core.RIDGE * np.eye(300)
    L = np.tril(kept.L[kept.order[:300], :300])
    np.testing.assert_allclose(L, np.linalg.cholesky(block), rtol=0, atol=1e-11)  # numpy's


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


def _kept_on(X, gamma, members, room, rng):
    """A factor of K_SS + mu I on ``members`` in a kept array whose rows are in a shuffled
    order (as after deletions), the unused rows NaN."""
    kept = face_kept.KeptFactor(room)
    kept.L[:] = np.nan
    k = len(members)
    block = _gaussian(X[members], X[members], gamma) + factor_core.RIDGE * np.eye(k)
    kept.order[:] = rng.permutation(room)
    kept.L[kept.order[:k], :k] = np.linalg.cholesky(block)          # numpy's, the reference
    kept.members[:k] = members
    return kept


def _block_for(X, gamma, members, new):
    B = np.empty((len(new), len(members) + len(new)))
    K = _gaussian(X, X, gamma)
    for q, j in enumerate(new):
        factor_core._block_row(B, q, K[j], members, len(members), new, len(new))
    return B


def test_many_variables_added_in_one_pass_give_the_factor_of_the_larger_block():
    # 13 new variables: three groups of four (the blocked loop) and one more
    rng = np.random.default_rng(5)
    X = rng.normal(size=(80, 2))
    gamma = 2.0
    members = rng.permutation(80)[:30]
    new = np.setdiff1d(np.arange(80), members)[rng.permutation(50)[:13]]
    kept = _kept_on(X, gamma, members, 64, rng)
    B = _block_for(X, gamma, members, new)
    m = len(members)
    added = factor_core._append_block(kept.L, kept.order, m, kept.members, new, B, len(new))
    assert added == len(new)
    S = np.r_[members, new]
    block = _gaussian(X[S], X[S], gamma) + factor_core.RIDGE * np.eye(len(S))
    L = np.tril(kept.L[kept.order[:len(S)], :len(S)])
    np.testing.assert_allclose(L, np.linalg.cholesky(block), rtol=0, atol=1e-12)  # numpy's
    assert list(kept.members[:len(S)]) == list(S)


def test_adding_many_stops_at_the_first_the_factor_refuses():
    # the third new row is three times a kernel row against the members: no positive
    # definite matrix with unit diagonal has it (its pivot^2 = 1 - 9 |L^-1 k|^2 < 0 here),
    # so it and the two after it stay out, and the two before it are in
    rng = np.random.default_rng(6)
    X = rng.normal(size=(40, 2))
    gamma = 1.0
    members = np.arange(10)
    new = np.array([20, 21, 22, 23, 24])
    kept = _kept_on(X, gamma, members, 24, rng)
    B = _block_for(X, gamma, members, new)
    B[2, :len(members)] *= 3.0
    added = factor_core._append_block(kept.L, kept.order, 10, kept.members, new, B, 5)
    assert added == 2
    S = np.r_[members, new[:2]]
    block = _gaussian(X[S], X[S], gamma) + factor_core.RIDGE * np.eye(len(S))
    L = np.tril(kept.L[kept.order[:len(S)], :len(S)])
    np.testing.assert_allclose(L, np.linalg.cholesky(block), rtol=0, atol=1e-12)
