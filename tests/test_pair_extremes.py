"""The pair steps' extremes kept per block (solver.qp.pair_extremes) choose what one
scan over every searched variable chooses: the same values and, among equals, the
first in the order of act.

Sources of the expected values: the scans written out here from their definitions
(the largest F over "up", the smallest over "low"; beyond reach of i, the largest
(f_up - F_t)^2 / (k_ii + 1) over "low", the first of equals), and scikit-learn's
SVC (libsvm) at tol=1e-10 through test_kernel_fits._reference_check.
"""

import numpy as np
import pytest

from solver import FitConfig, fit
from solver.qp import pair_extremes as pe
from solver.qp import point_order

from test_kernel_fits import _reference_check


def _scan(F, act, m, up, low):
    """One scan in act's order: (largest F over up, its index, smallest over low, its index)."""
    f_up, i, f_low, j = -np.inf, -1, np.inf, -1
    for t in act[:m]:
        if up[t] and F[t] > f_up:
            f_up, i = F[t], t
        if low[t] and F[t] < f_low:
            f_low, j = F[t], t
    return f_up, i, f_low, j


def _scan_beyond(F, act, m, first, last, low, f_up, curvature):
    """The largest (f_up - F_t)^2 / curvature over low in act[:first], then act[last:m]."""
    best, j = 0.0, -1
    for t in list(act[:first]) + list(act[last:m]):
        if low[t]:
            gain = f_up - F[t]
            if gain > 0.0:
                score = gain * gain / curvature
                if score > best:
                    best, j = score, t
    return best, j


def _case(seed, n=700, shrunk=True, levels=None):
    rng = np.random.default_rng(seed)
    F = rng.standard_normal(n) if levels is None else rng.choice(levels, n)
    up, low = rng.random(n) < 0.6, rng.random(n) < 0.6
    act = np.sort(rng.choice(n, rng.integers(n // 2, n), replace=False)) if shrunk \
        else np.arange(n)
    return rng, F, act, len(act), up, low


@pytest.mark.parametrize("seed", range(12))
def test_blocks_updated_within_a_window_give_the_extremes_of_one_scan(seed):
    # few distinct values (seeds 6-11): many equals, so the first of equals is tested too
    rng, F, act, m, up, low = _case(seed, levels=None if seed < 6 else np.arange(5.0))
    top, top_at, bottom, bottom_at = pe.blocks(len(F))
    pe.summarise(F, act, m, up, low, top, top_at, bottom, bottom_at)
    assert pe.combine(m, top, top_at, bottom, bottom_at) == _scan(F, act, m, up, low)
    for _ in range(30):
        first = int(rng.integers(0, m))
        last = int(rng.integers(first + 1, m + 1))
        row_i = rng.random(len(F)).astype(np.float32)
        row_j = rng.random(len(F)).astype(np.float32)
        step = 0.0 if seed >= 6 else float(rng.standard_normal())
        for t in act[first:last][:3]:            # flags change inside the window only
            up[t], low[t] = not up[t], not low[t]
        expected = F.copy()
        for t in act[first:last]:
            # as compiled: the singles differenced in single precision, then widened
            expected[t] = F[t] - step * np.float64(row_i[t] - row_j[t])
        pe.update_blocks(F, act, m, first, last, up, low, step, row_i, row_j, top, top_at,
                         bottom, bottom_at)
        np.testing.assert_array_equal(F, expected)
        assert pe.combine(m, top, top_at, bottom, bottom_at) == _scan(F, act, m, up, low)


@pytest.mark.parametrize("seed", range(12))
def test_the_best_beyond_reach_is_the_one_scan_finds(seed):
    rng, F, act, m, up, low = _case(seed, levels=None if seed < 6 else np.arange(5.0))
    top, top_at, bottom, bottom_at = pe.blocks(len(F))
    pe.summarise(F, act, m, up, low, top, top_at, bottom, bottom_at)
    for _ in range(40):
        first = int(rng.integers(0, m))
        last = int(rng.integers(first, m + 1))
        f_up = float(rng.choice([F.max(), 0.5, 3.0, -10.0]))
        curvature = float(rng.choice([2.0, 1.5, 1e-12]))
        assert pe.best_beyond(F, act, m, first, last, low, f_up, curvature, bottom) == \
            _scan_beyond(F, act, m, first, last, low, f_up, curvature)


def test_equal_scores_from_unequal_values_go_to_the_first_in_order():
    # gain^2 rounds: two F a few ulps apart can score the same; one scan keeps the first
    # in act's order, which here is not the smallest F
    n = 300
    F = np.full(n, 5.0)
    low = np.zeros(n, dtype=bool)
    f_up, curvature = 1.0, 2.0
    base = -0.3
    later = np.nextafter(base, -1.0)                      # the smaller F, later in order
    assert later < base and (f_up - base) ** 2 / curvature == (f_up - later) ** 2 / curvature
    F[[70, 250]], low[[70, 250]] = base, True
    F[260], low[260] = later, True
    act = np.arange(n)
    top, top_at, bottom, bottom_at = pe.blocks(n)
    pe.summarise(F, act, n, low, low, top, top_at, bottom, bottom_at)
    for first, last, j in ((100, 120, 70), (0, 0, 70), (65, 200, 250), (251, 300, 70),
                           (0, 255, 260), (0, 300, -1)):
        expected = _scan_beyond(F, act, n, first, last, low, f_up, curvature)
        assert expected[1] == j
        assert pe.best_beyond(F, act, n, first, last, low, f_up, curvature, bottom) == expected


@pytest.mark.parametrize("gamma, C", [(50.0, 1.0), (30.0, 100.0)])
def test_narrow_kernel_fits_on_blocks_pass_the_reference(gamma, C):
    # narrow kernels (finite reach) are where the blocks serve; SVC at tol=1e-10
    rng = np.random.default_rng(3)
    X = np.vstack([rng.normal(-0.4, 1.0, (300, 2)), rng.normal(0.4, 1.0, (300, 2))])
    y = np.r_[-np.ones(300), np.ones(300)]
    X = (X - X.mean(0)) / X.std(0)
    assert point_order.reach(X[np.argsort(X[:, 0])], gamma) < np.inf
    result = fit(X, y, FitConfig(C=C, kernel="rbf", gamma=gamma))
    _reference_check(X, y, result, C, gamma)
