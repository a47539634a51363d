"""Sums of kernel rows four at a time (solver.qp.row_sums).

Expected values: K written out here from the formula exp(-gamma |a - b|^2)
(common practice, no source) and multiplied by numpy.
"""

import numpy as np
import pytest

from solver.qp import row_sums

from test_kernel_fits import _gaussian


def _cache(X, gamma, capacity):
    """An empty row cache of ``capacity`` rows, as KernelColumns keeps it."""
    return (np.zeros((capacity, len(X))), np.full(len(X), -1, dtype=np.intp),
            np.full(capacity, -1, dtype=np.intp), np.zeros(capacity, dtype=np.int64))


@pytest.mark.parametrize("count", [0, 3, 4, 9, 40])
@pytest.mark.parametrize("capacity", [50, 5])        # 5: fetching a group gives slots up
@pytest.mark.parametrize("reach", [np.inf, 5.6])
def test_catching_up_subtracts_the_waiting_changes_on_every_point(count, capacity, reach):
    # a finite reach: the points in the order of their first feature, each row summed
    # only within reach of its point (smo_core.window) and the rows taken in point order,
    # four whose windows are unioned; beyond reach exp(-1.5 * 5.6^2) < 1e-20
    rng = np.random.default_rng(count + capacity)
    X = rng.normal(size=(50, 2)) * [3.0, 1.0]
    X = X[np.argsort(X[:, 0])]
    gamma = 1.5
    rows, slot_of, owner, stamp = _cache(X, gamma, capacity)
    touched = rng.choice(50, size=count, replace=False)
    pending = np.zeros(50)
    pending[touched] = rng.normal(size=count)
    marked = np.zeros(50, dtype=bool)
    marked[touched] = True
    F = rng.normal(size=50)
    expected = F - _gaussian(X, X[touched], gamma) @ pending[touched]
    counts = np.zeros(1, dtype=np.int64)
    row_sums.catch_up(F, pending, touched.astype(np.int64), marked, count, X, gamma, reach, rows,
                      slot_of, owner, stamp, 1, np.zeros(capacity, dtype=bool), np.arange(50),
                      counts)
    np.testing.assert_allclose(F, expected, rtol=0, atol=1e-13)
    assert not pending.any() and not marked.any()


@pytest.mark.parametrize("count", [1, 4, 7])
def test_adding_rows_is_the_weighted_sum_of_the_rows(count):
    rng = np.random.default_rng(count)
    store = rng.normal(size=(10, 30))
    slots = rng.choice(10, size=count, replace=False).astype(np.intp)
    weights = rng.normal(size=count)
    out = rng.normal(size=30)
    expected = out + weights @ store[slots]
    row_sums.add_rows(store, slots, weights, out, rng.normal(size=(30, 2)),
                      rng.choice(30, size=count).astype(np.intp), np.inf)
    np.testing.assert_allclose(out, expected, rtol=0, atol=1e-13)


@pytest.mark.parametrize("count", [1, 4, 7, 30])
def test_adding_rows_within_reach_is_the_whole_product(count):
    # the points in the order of their first feature, K written out with the values
    # below exp(-46) as 0 (as the solver's rows keep them, smo_core.FLOOR): summed only
    # within reach of each group of four rows, the product is still that of whole rows
    rng = np.random.default_rng(40 + count)
    X = rng.normal(size=(60, 2)) * [4.0, 1.0]
    X = X[np.argsort(X[:, 0])]
    gamma = 2.0
    K = _gaussian(X, X, gamma)
    K[K < np.exp(-46.0)] = 0.0
    points = np.sort(rng.choice(60, size=count, replace=False)).astype(np.intp)
    slots = rng.permutation(60)[:count].astype(np.intp)
    store = np.zeros((60, 60))
    store[slots] = K[points]
    weights = rng.normal(size=count)
    out = rng.normal(size=60)
    expected = out + weights @ K[points]
    row_sums.add_rows(store, slots, weights, out, X, points, float(np.sqrt(46.0 / gamma)))
    np.testing.assert_allclose(out, expected, rtol=0, atol=1e-13)
