"""Pair steps on kernel rows in single precision (solver.qp.pair_rows), used where the
double rows do not all fit their cache; the finish and the certificate stay in double
precision.

Sources of the expected values, named beside each check:
- K written out here from the formula exp(-gamma |a - b|^2) (common practice,
  no source), and single precision's facts: a relative rounding of 2^-24 = 6e-8,
  smallest normal 2^-126 = 1.2e-38 (IEEE 754, common practice, no source);
- scikit-learn's SVC (libsvm) at tol=1e-10 on data scikit-learn generates
  (make_blobs), through test_kernel_fits._reference_check.
"""

import numpy as np

from solver import FitConfig, fit
from solver.qp import kernel_cache, pair_rows, smo, smo_core

from test_kernel_fits import _blobs, _gaussian, _reference_check


def test_a_single_row_is_the_kernel_rounded_and_zero_below_the_smallest_normal():
    X, _ = _blobs(500)
    gamma = 40.0               # wide enough apart that some values fall below 1e-38
    exact = _gaussian(X[[7]], X, gamma)[0]
    single = np.empty(len(X), dtype=np.float32)
    everyone = np.arange(len(X))
    smo_core._rbf_row(X, 7, gamma, np.inf, single, everyone, len(X))
    normal = exact >= 1e-37
    assert (~normal).any() and normal.sum() > 10
    # the double value rounded once: within 2^-24 of it, and a hair for the exp's 1.5 ulp
    np.testing.assert_allclose(single[normal], exact[normal], rtol=2.0**-24 + 1e-15, atol=0)
    assert not single[exact < np.exp(-87.0)].any()           # no subnormal single
    # the searched points only (shrinking): the same values there
    searched = everyone[::3]
    part = np.full(len(X), -1.0, dtype=np.float32)
    smo_core._rbf_row(X, 7, gamma, np.inf, part, searched, len(searched))
    np.testing.assert_array_equal(part[searched], single[searched])


def test_pair_steps_on_single_rows_hand_back_F_in_double_precision():
    X, y = _blobs(600)
    labels = y.astype(float)
    gamma, C = 2.0, 1.0
    columns = smo.rbf_columns(X, gamma)
    columns.pair_rows = pair_rows.PairRows(len(X))            # as on many points
    K = _gaussian(X, X, gamma)
    # to the end, and stopped by the step budget before any point is left out
    for budget in (10**6, 150):
        alpha = np.zeros(len(X))
        taken, _, F = smo._pair_steps(X, labels, np.full(len(X), C), gamma, alpha,
                                      labels.copy(), 1e-3, budget, columns)
        assert taken == 150 if budget == 150 else taken > 150
        assert 0 < columns.pair_rows.owner.max()              # the steps read single rows
        exact = labels - K @ (alpha * labels)                 # F = y - K (alpha y)
        np.testing.assert_allclose(F, exact, rtol=0, atol=1e-12)


def test_a_fit_whose_double_rows_do_not_all_fit_is_as_exact_as_any(monkeypatch):
    made = []

    class Counted(pair_rows.PairRows):
        def __init__(self, n):
            made.append(n)
            super().__init__(n)

    monkeypatch.setattr(pair_rows, "PairRows", Counted)
    monkeypatch.setattr(smo, "CACHE_BYTES", 2**21)     # 291 double rows of 900 (test-sized)
    kernel_cache.RECENT.clear()
    X, y = _blobs(900)
    for gamma, C in ((2.0, 1.0), (10.0, 100.0)):
        result = fit(X, y, FitConfig(C=C, kernel="rbf", gamma=gamma))
        assert result.converged
        _reference_check(X, y, result, C, gamma)               # SVC at tol 1e-10, gap 1e-8
    assert made == [900, 900]
