"""Which bound variables the compiled face steps release at a check (face_release.pick_apart).

Sources of the expected values, named beside each check:
- the rule written out here in plain Python: worst first, none whose Gaussian
  kernel value exp(-gamma |a - b|^2) with one already picked exceeds face_release.APART,
  and when too few lie apart, the worst of the others after them (the kernel's
  formula: common practice, no source);
- scikit-learn's SVC (libsvm) at tol=1e-10 on data scikit-learn generates (make_moons),
  through test_kernel_fits._reference_check.
"""

from types import SimpleNamespace

import numpy as np
import pytest

from solver.qp import face_core, face_kept, face_release, smo

from test_kernel_fits import _moons, _reference_check


def _written_out(wrong, wanted, X, gamma):
    picked = []
    for j in sorted(np.flatnonzero(wrong > 0), key=lambda t: (-wrong[t], t)):
        near = [np.exp(-gamma * np.sum((X[j] - X[p]) ** 2)) > face_release.APART for p in picked]
        if not any(near):
            picked.append(j)
        if len(picked) == wanted:
            return picked
    for j in sorted(np.flatnonzero(wrong > 0), key=lambda t: (-wrong[t], t)):
        if j not in picked and len(picked) < wanted:
            picked.append(j)
    return picked


@pytest.mark.parametrize("gamma, wanted", [(50.0, 16), (2.0, 16), (50.0, 3), (0.1, 16)])
def test_released_variables_are_the_worst_that_lie_apart(gamma, wanted):
    rng = np.random.default_rng(7)
    X = rng.normal(size=(400, 2))
    wrong = np.where(rng.random(400) < 0.3, rng.random(400), 0.0)
    count = int(np.count_nonzero(wrong))
    picked = np.empty(wanted, dtype=np.int64)
    k = face_release.pick_apart(wrong.copy(), count, wanted, picked, X, gamma)
    expected = _written_out(wrong, wanted, X, gamma)
    assert list(picked[:k]) == expected
    assert picked[0] == np.argmax(wrong) and k == min(wanted, count)  # the worst goes
    X_picked = X[picked[:k]]
    similar = np.exp(-gamma * ((X_picked[:, None] - X_picked[None]) ** 2).sum(-1))
    apart = np.all(similar[np.triu_indices(k, 1)] <= face_release.APART)
    # a narrow kernel: plenty lie apart; a wide one: nearly all are near the worst
    assert apart == (gamma == 50.0)


def test_equal_violations_go_in_point_order():
    X = np.array([[0.0, 0.0], [5.0, 0.0], [10.0, 0.0], [0.01, 0.0]])
    wrong = np.array([1.0, 1.0, 2.0, 1.0])
    picked = np.empty(4, dtype=np.int64)
    k = face_release.pick_apart(wrong, 4, 4, picked, X, 10.0)
    # 2 is the worst; 0, 1 tie and go in point order; 3 is 0.01 from 0 (k = 0.999), so
    # it comes after them
    assert list(picked[:k]) == [2, 0, 1, 3]
    picked = np.empty(2, dtype=np.int64)
    k = face_release.pick_apart(np.array([1.0, 0.0, 0.0, 2.0]), 2, 2, picked, X, 10.0)
    assert list(picked[:k]) == [3, 0]          # both wrong ones, though near each other


def test_a_rough_start_ends_at_the_reference_optimum_releasing_apart():
    # from pair steps stopped at a violation of 1e-2 on a narrow kernel, hundreds of
    # bound variables are on the wrong side at the first checks, most of them next to
    # one another; released apart, the finish still ends at the optimum
    X, y = _moons(1_500)
    y, upper, gamma = y.astype(float), np.ones(1_500), 50.0
    columns = smo.rbf_columns(X, gamma)
    alpha = np.zeros(1_500)
    _, _, F = smo._pair_steps(X, y, upper, gamma, alpha, y.copy(), 1e-2, 10**7, columns)
    F = smo._fresh_F(columns, y, alpha)
    status, steps = face_kept.face_steps(
        columns, y, upper, alpha, F, smo.LONG_STEPS, True, None,
        (smo.RELEASE, smo.WIDE_FACE, smo.NEAR_BOUND, smo.SHORT, smo.SHORT_STEPS),
        face_kept.room(columns, 1_500, smo.FACE_LIMIT))
    assert status == face_core.DONE
    b = smo.certify.intercept(F, y, upper, alpha)
    _reference_check(X, y, SimpleNamespace(alpha=alpha, b=b), 1.0, gamma)
