"""A free set a little larger than the compiled face steps' room (face_kept.onto_room).

Sources of the expected values, named beside each check:
- F = y - K (alpha * y), with K written out from the Gaussian kernel's formula
  exp(-gamma |a - b|^2) (common practice, no source);
- scikit-learn's SVC (libsvm) at tol=1e-10 on data scikit-learn generates (make_moons),
  through test_kernel_fits._reference_check.
"""

from types import SimpleNamespace

import numpy as np
import pytest

from solver.qp import face_kept, smo

from test_kernel_fits import _gaussian, _moons, _reference_check


def _after_pair_steps(n, gamma):
    X, y = _moons(n)
    y, upper = y.astype(float), np.ones(n)
    columns = smo.rbf_columns(X, gamma)
    alpha = np.zeros(n)
    _, _, F = smo._pair_steps(X, y, upper, gamma, alpha, y.copy(), 1e-3, 10**7, columns)
    return X, y, upper, columns, alpha, F


def test_the_free_variables_nearest_a_bound_are_put_on_it():
    X, y, upper, columns, alpha, F = _after_pair_steps(1_000, 50.0)
    free = np.flatnonzero((alpha > 0) & (alpha < upper))
    room = len(free) - 40
    before = alpha.copy()
    F = face_kept.onto_room(columns, y, upper, alpha, F, room, left=10 / room)
    moved = np.flatnonzero(alpha != before)
    nearness = np.minimum(before[free], upper[free] - before[free])
    nearest = set(free[np.argsort(nearness)[:50]])
    # the 50 nearest a bound are on it, but for one that y'a = 0 may cut short of it
    # (dual_start.feasible lowers whole alphas, then part of one); it may move others
    assert nearest <= set(moved) and len(moved) <= 60
    assert sum(alpha[i] not in (0.0, upper[i]) for i in nearest) <= 1
    assert abs(alpha @ y) <= 1e-12 * alpha.sum()
    assert np.count_nonzero((alpha > 0) & (alpha < upper)) <= room - 10 + 1
    K = _gaussian(X, X, 50.0)                                       # written out
    assert np.abs(F - (y - K @ (alpha * y))).max() <= 1e-9


@pytest.mark.parametrize("share", [0.9, 1.3])
def test_a_free_set_within_the_room_or_far_over_it_is_left_alone(share):
    _, y, upper, columns, alpha, F = _after_pair_steps(600, 50.0)
    free = np.count_nonzero((alpha > 0) & (alpha < upper))
    before, F_before = alpha.copy(), F.copy()
    F = face_kept.onto_room(columns, y, upper, alpha, F, int(free / share))
    assert np.array_equal(alpha, before) and np.array_equal(F, F_before)


def test_a_stage_whose_free_set_outgrew_the_room_ends_in_the_compiled_finish(monkeypatch):
    # a cache sized so that the first stage leaves a few more free than the face steps'
    # room, and the optimum fewer: they serve after onto_room (releasing, near the end,
    # only as many as there is room for), and the first stage ends the fit
    X, y, upper, _, alpha, _ = _after_pair_steps(1_500, 50.0)
    free = np.count_nonzero((alpha > 0) & (alpha < upper))
    optimum = smo.solve_rbf(X, y, upper, 50.0, 5e-9).alpha
    assert np.count_nonzero((optimum > 1e-12) & (optimum < 1 - 1e-12)) < free - 10
    rows = free - 10 + face_kept.SPARE           # room: 10 fewer than are free
    monkeypatch.setattr(smo, "CACHE_BYTES", rows * 1_500 * 8)
    calls = []
    steps = face_kept.face_steps
    monkeypatch.setattr(face_kept, "face_steps",
                        lambda *a: calls.append(a[-1]) or steps(*a))
    found = smo.solve_rbf(X, y, upper, 50.0, 5e-9)
    assert calls == [free - 10] and found.optimal and found.stages == 1
    _reference_check(X, y, SimpleNamespace(alpha=found.alpha, b=found.b), 1.0, 50.0)
