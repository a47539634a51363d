"""The RBF dual in the order of the first feature, rows read within reach
(solver.qp.point_order, smo_core.window).

Sources of the expected values, named beside each check:
- K written out here from the formula exp(-gamma |a - b|^2) (common practice,
  no source);
- scikit-learn's SVC (libsvm) at tol=1e-10 on data scikit-learn generates
  (make_moons), through test_kernel_fits._reference_check.
"""

import numpy as np
import pytest
from sklearn.svm import SVC

from solver import FitConfig, fit
from solver.qp import kernel_cache, point_order, smo, smo_core

from test_kernel_fits import _gaussian, _moons, _reference_check


def test_reach_is_finite_only_for_points_in_order_and_a_narrow_kernel():
    X, _ = _moons(400)
    ordered = X[np.argsort(X[:, 0], kind="stable")]
    assert point_order.reach(X, 50.0) == np.inf                  # not in order
    assert point_order.reach(ordered, 0.5) == np.inf             # the reach spans them all
    assert point_order.reach(ordered, 50.0) == pytest.approx(np.sqrt(46.0 / 50.0))


def test_a_window_holds_exactly_the_points_within_reach_along_the_first_feature():
    X, _ = _moons(400)
    X = X[np.argsort(X[:, 0], kind="stable")]
    reach = 0.3
    for i in (0, 17, 200, 399):
        lo, hi = smo_core.window(X, i, reach)
        inside = np.flatnonzero(np.abs(X[:, 0] - X[i, 0]) < reach)      # by brute force
        assert (lo, hi) == (inside[0], inside[-1] + 1)
        assert len(inside) == hi - lo                                    # one run


def test_a_row_beyond_reach_is_zero_and_within_it_the_kernel():
    X, _ = _moons(400)
    X = X[np.argsort(X[:, 0], kind="stable")]
    gamma = 50.0
    reach = point_order.reach(X, gamma)
    row = np.full(400, np.nan)
    smo_core._rbf_row(X, 123, gamma, reach, row, np.arange(400), 400)
    exact = _gaussian(X[123:124], X, gamma)[0]                   # written out
    lo, hi = smo_core.window(X, 123, reach)
    assert 0 < lo and hi < 400                                    # some left out
    assert not row[:lo].any() and not row[hi:].any()
    assert exact[:lo].max() < 1e-20 and exact[hi:].max() < 1e-20  # what was left out
    kept = exact[lo:hi] >= np.exp(smo_core.FLOOR)                 # the rest is 0 too
    np.testing.assert_allclose(row[lo:hi][kept], exact[lo:hi][kept], rtol=4e-16, atol=0)
    assert not row[lo:hi][~kept].any() and exact[lo:hi][~kept].max() < 1e-20


@pytest.mark.parametrize("C", [1.0, 100.0, 1e4])
def test_a_narrow_kernel_fit_within_reach_reaches_the_reference_optimum(C, monkeypatch):
    X, y = _moons(600)                    # not in order: the solver orders them itself
    seen = []
    make = smo.rbf_columns
    monkeypatch.setattr(smo, "rbf_columns", lambda *a: seen.append(make(*a)) or seen[-1])
    monkeypatch.setattr(smo, "PREFILL", 0)       # every row computed by the steps, in part
    kernel_cache.RECENT.clear()
    result = fit(X, y, FitConfig(C=C, kernel="rbf", gamma=50.0))
    assert seen and seen[0].reach < np.inf                        # rows were read in part
    _reference_check(X, y, result, C, 50.0)
    # in the caller's order: each point's alpha is libsvm's for the same point
    svc = SVC(C=C, kernel="rbf", gamma=50.0, tol=1e-10).fit(X, y)
    alpha_svc = np.zeros(len(y))
    alpha_svc[svc.support_] = np.abs(svc.dual_coef_[0])
    np.testing.assert_allclose(result.alpha, alpha_svc, rtol=0, atol=1e-5 * C)


def test_the_solvers_kernel_blocks_are_0_below_the_floor_and_exact_above_it():
    from solver.kernels import rbf_core
    X, _ = _moons(300)
    block = rbf_core.rbf_block(np.ascontiguousarray(X[:40]), X, 50.0, smo_core.FLOOR)
    exact = _gaussian(X[:40], X, 50.0)                            # written out
    small = exact < np.exp(smo_core.FLOOR)                        # below 1e-20
    assert small.any() and not block[small].any()
    np.testing.assert_allclose(block[~small], exact[~small], rtol=4e-16, atol=0)
