"""Pair steps on kernel rows in single precision (solver.qp.pair_rows), used above
pair_rows.SINGLE_FROM points and filled from the double rows, which the finish and the
certificate read.

Sources of the expected values, named beside each check:
- K written out here from the formula exp(-gamma |a - b|^2) (common practice,
  no source), and single precision's facts: a relative rounding of 2^-24 = 6e-8,
  smallest normal 2^-126 = 1.2e-38 (IEEE 754, common practice, no source);
- scikit-learn's SVC (libsvm) at tol=1e-10 on data scikit-learn generates
  (make_blobs), through test_kernel_fits._reference_check.
"""

import numpy as np
import pytest

from solver import FitConfig, fit
from solver.qp import kernel_cache, pair_rows, smo, smo_core

from test_kernel_fits import _blobs, _gaussian, _reference_check


def test_a_single_row_is_the_kernel_rounded_and_zero_below_the_smallest_normal():
    X, _ = _blobs(500)
    gamma = 40.0               # wide enough apart that some values fall below 1e-38
    exact = _gaussian(X[[7]], X, gamma)[0]
    columns = smo.rbf_columns(X, gamma)                       # the double rows
    singles = pair_rows.PairRows(len(X))
    partial = np.zeros(columns.capacity, dtype=bool)
    s = smo_core._single_slot(7, X, gamma, columns.reach, singles.store, singles.slot,
                              singles.owner, singles.stamp, 1, columns.store, columns.slot,
                              columns.owner, columns.stamp, partial, np.arange(len(X)))
    single = singles.store[s]
    normal = exact >= 2.0**-126                               # the smallest normal single
    assert (~normal & (exact > 0)).any() and normal.sum() > 10
    # the double value rounded once: within 2^-24 of it, and a hair for the exp's 1.5 ulp
    np.testing.assert_allclose(single[normal], exact[normal], rtol=2.0**-24 + 1e-15, atol=0)
    assert not single[~normal].any()                          # no subnormal single
    # the whole double row is in the double rows, for the finish
    np.testing.assert_allclose(columns.store[columns.slot[7]], exact, rtol=1e-14, atol=1e-300)


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
    # every single row is its double row rounded, and the double rows they came from
    # are whole, for the finish to read
    singles = columns.pair_rows
    assert columns.capacity == len(X)                         # no double row was given up
    for s in np.flatnonzero(singles.owner >= 0):
        i = singles.owner[s]
        double = columns.store[columns.slot[i]]
        np.testing.assert_array_equal(singles.store[s], double.astype(np.float32))
        np.testing.assert_allclose(double, K[i], rtol=1e-14, atol=1e-300)


def test_a_fit_of_more_points_than_single_from_is_as_exact_as_any(monkeypatch):
    made = []

    class Counted(pair_rows.PairRows):
        def __init__(self, n):
            made.append(n)
            super().__init__(n)

    monkeypatch.setattr(pair_rows, "PairRows", Counted)
    monkeypatch.setattr(pair_rows, "SINGLE_FROM", 800)         # a test-sized threshold
    kernel_cache.RECENT.clear()
    X, y = _blobs(900)
    for gamma, C in ((2.0, 1.0), (10.0, 100.0)):
        result = fit(X, y, FitConfig(C=C, kernel="rbf", gamma=gamma))
        assert result.converged
        _reference_check(X, y, result, C, gamma)               # SVC at tol 1e-10, gap 1e-8
    assert made == [900, 900]


def test_on_single_rows_pair_steps_update_f_only_where_k_reaches_1e_7(monkeypatch):
    # a narrow kernel on more points than SINGLE_FROM: the pair steps' F updates stop
    # where k < exp(-NEAR_REACH), the rows they compute still reach exp(-REACH); the fit
    # is as exact as any (SVC at tol 1e-10, relative gap 1e-8)
    from solver.qp import smo, smo_core
    seen = []
    real = smo_core.smo_rbf

    def watched(X, y, C, gamma, reach, near, *rest):
        seen.append((reach, near))
        return real(X, y, C, gamma, reach, near, *rest)

    monkeypatch.setattr(smo_core, "smo_rbf", watched)
    monkeypatch.setattr(pair_rows, "SINGLE_FROM", 800)
    kernel_cache.RECENT.clear()
    X, y = _blobs(900)
    gamma, C = 50.0, 1.0
    result = fit(X, y, FitConfig(C=C, kernel="rbf", gamma=gamma))
    assert result.converged
    _reference_check(X, y, result, C, gamma)
    short = np.sqrt(smo.NEAR_REACH / gamma)
    assert seen and all(near == pytest.approx(short) and short < reach < np.inf
                        for reach, near in seen)
