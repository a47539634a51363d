"""Kernel values computed compiled: exp (solver.kernels.rbf_core) and the Gaussian.

Sources of the expected values, named beside each check:
- numpy's exp (the C library's, correctly rounded to within 1 ulp);
- the Gaussian kernel exp(-gamma |a - b|^2), written out in test_kernel_fits.
"""

import numpy as np

from solver.kernels import rbf_core, rbf_matrix
from solver.qp import smo, smo_core

from test_kernel_fits import _blobs, _gaussian


def test_the_vectorised_exp_is_within_two_ulp_of_numpys_down_to_minus_700():
    rng = np.random.default_rng(0)
    x = np.concatenate([-rng.uniform(0, 1, 50_000), -rng.uniform(1, 40, 50_000),
                        -rng.uniform(40, 700, 50_000), [0.0, -0.0, -1e-300, -0.5, -700.0]])
    values = x.copy()
    rbf_core.exp_negative(values, np.empty(len(x), dtype=np.int64), rbf_core.UNDERFLOW)
    reference = np.exp(x)                                          # numpy's exp
    ulps = np.abs(values - reference) / np.spacing(reference)
    assert ulps.max() <= 2.0
    assert values[-5] == 1.0 and values[-4] == 1.0


def test_the_vectorised_exp_goes_to_zero_below_the_smallest_normal_double():
    x = np.array([-708.0, -709.0, -745.0, -746.0, -1e5, -1e308])
    values = x.copy()
    rbf_core.exp_negative(values, np.empty(len(x), dtype=np.int64), rbf_core.UNDERFLOW)
    assert values[0] == np.exp(-708.0) or abs(values[0] / np.exp(-708.0) - 1) < 1e-15
    assert (values[1:] <= 2.3e-308).all() and (values[1:] >= 0).all()   # 0 or subnormal
    assert (values[2:] == 0.0).all()


def test_compiled_kernel_blocks_and_rows_are_the_gaussian_written_out():
    X, _ = _blobs(400)
    reference = _gaussian(X, X, 10.0)
    block = rbf_core.rbf_block(np.ascontiguousarray(X[:50]), X, 10.0, rbf_core.UNDERFLOW)
    np.testing.assert_allclose(block, reference[:50], rtol=0, atol=1e-15)
    row = np.empty(400)
    smo_core._rbf_row(X, 7, 10.0, np.inf, row, np.arange(400), 400)
    np.testing.assert_allclose(row, reference[7], rtol=0, atol=1e-15)
    # three features go through the general loop
    rng = np.random.default_rng(1)
    Z = rng.normal(size=(60, 3))
    np.testing.assert_allclose(rbf_core.rbf_block(Z[:5].copy(), Z, 0.5, rbf_core.UNDERFLOW),
                               _gaussian(Z[:5], Z, 0.5), rtol=0, atol=1e-15)


def test_the_rbf_row_cache_computes_its_blocks_compiled():
    X, _ = _blobs(300)
    columns = smo.rbf_columns(X, 2.0)
    idx = np.arange(0, 300, 7)
    np.testing.assert_allclose(columns.block(idx), _gaussian(X[idx], X[idx], 2.0),
                               rtol=0, atol=1e-15)


def test_rbf_matrix_is_the_gaussian_written_out_and_says_nan_where_a_point_is_nan():
    X, _ = _blobs(200)
    np.testing.assert_allclose(rbf_matrix(X[:30], X, 2.0), _gaussian(X[:30], X, 2.0),
                               rtol=0, atol=1e-14)
    P = X[:3].copy()
    P[1, 0] = np.nan
    K = rbf_matrix(P, X, 2.0)
    assert np.isnan(K[1]).all() and np.isfinite(K[[0, 2]]).all()
    P[1, 0] = 1e200                     # its squared distances overflow: exp(-inf) = 0
    K = rbf_matrix(P, X, 2.0)
    assert (K[1] == 0.0).all()
    np.testing.assert_allclose(K[[0, 2]], _gaussian(X[[0, 2]], X, 2.0), rtol=0, atol=1e-14)
