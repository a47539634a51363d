"""The compiled face steps (solver.qp.face_core), their factor updates (factor_core) and
the kept factor (face_kept).

Sources of the expected values, named beside each check:
- the Cholesky factor's defining identity K_SS = LL', with K written out here
  from the formula exp(-gamma |a - b|^2) (common practice, no source);
- scikit-learn's SVC (libsvm) at tol=1e-10 on data scikit-learn generates
  (make_blobs, make_moons), through test_kernel_fits._reference_check.
"""

from types import SimpleNamespace

import numpy as np
import pytest

from solver import FitConfig, fit
from solver.qp import face_core, face_kept, factor_core, kernel_cache, smo

from test_kernel_fits import _blobs, _gaussian, _moons, _reference_check


def _factor(K, room):
    L = np.zeros((room, room))
    L[:len(K), :len(K)] = np.linalg.cholesky(K)
    return L


def _logical(L, order, m):
    """Row r of the factor is row order[r] of the array (factor_core)."""
    return np.tril(L[order[:m], :m])


@pytest.mark.parametrize("position", [0, 2, 7, 15, 18, 19])
def test_a_deleted_variable_leaves_the_factor_of_the_others(position):
    rng = np.random.default_rng(4)
    X = rng.normal(size=(20, 2))
    K = _gaussian(X, X, 2.0)
    L, order, members = _factor(K, 24), np.arange(24), np.arange(24)
    f = rng.normal(size=20)
    za, zb = np.zeros(24), np.zeros(24)
    za[:20], zb[:20] = np.linalg.solve(np.linalg.cholesky(K), np.c_[f, np.ones(20)]).T
    factor_core._delete(L, order, 20, members, position, np.empty(24), za, zb)
    kept = np.delete(np.arange(20), position)
    assert list(members[:19]) == list(kept)
    low = _logical(L, order, 19)
    np.testing.assert_allclose(low @ low.T, K[np.ix_(kept, kept)], atol=1e-13)
    # the forward solutions carried along are those of the smaller factor: L~ z~ = f~
    np.testing.assert_allclose(low @ za[:19], f[kept], atol=1e-10)
    np.testing.assert_allclose(low @ zb[:19], np.ones(19), atol=1e-10)
    # a second deletion, then an append into the row the first gave up
    factor_core._delete(L, order, 19, members, 3, np.empty(24), np.zeros(24), np.zeros(24))
    kept = np.delete(kept, 3)
    assert factor_core._append(L, order, 18, members, position, K[position])
    kept = np.r_[kept, position]
    assert list(members[:19]) == list(kept) and sorted(order) == list(range(24))
    low = _logical(L, order, 19)
    np.testing.assert_allclose(low @ low.T, K[np.ix_(kept, kept)], atol=1e-13)


@pytest.mark.parametrize("size", [12, 11])     # the backward pass takes rows two at a time
def test_the_kept_solve_and_step_match_the_face_system_written_out(size):
    # the bordered system [K 1; 1' 0][d; b] = [f; -e] solved by numpy, against
    # _kept_solve from z = L^-1 f and L^-1 1; then a step of t = 0.3 with member 4 hit
    # (moved by 0.05 instead of t d_4): L^-1 of f - K (change of beta), written out
    rng = np.random.default_rng(6)
    X = rng.normal(size=(size, 2))
    K = _gaussian(X, X, 2.0) + 0.5 * np.eye(size)   # a diagonal of L other than 1 (L[0, 0])
    L, order = _factor(K, 16), np.arange(16)
    f, e = rng.normal(size=size), 0.02
    za, zb = np.zeros(16), np.zeros(16)
    factor_core._forward(L, order, size, f, za, zb)
    d = np.zeros(16)
    b = factor_core._kept_solve(L, order, size, e, za, zb, d)
    bordered = np.block([[K, np.ones((size, 1))], [np.ones((1, size)), np.zeros((1, 1))]])
    expected = np.linalg.solve(bordered, np.r_[f, -e])
    np.testing.assert_allclose(np.r_[d[:size], b], expected, atol=1e-9)
    hit, change = np.zeros(16), 0.3 * d
    hit[4], change[4] = 1.0, 0.05
    factor_core._kept_step(L, order, size, za, zb, 0.3, b, hit, change, d)
    np.testing.assert_allclose(np.tril(L[:size, :size]) @ za[:size], f - K @ change[:size],
                               atol=1e-10)


def test_an_appended_variable_extends_the_factor_of_the_ridged_kernel():
    rng = np.random.default_rng(5)
    X = rng.normal(size=(13, 2))
    K = _gaussian(X, X, 2.0) + factor_core.RIDGE * np.eye(13)     # the factor is of K + mu I
    L, order, members = _factor(K[:12, :12], 16), np.arange(16), np.arange(16)
    assert factor_core._append(L, order, 12, members, 12, K[12] - factor_core.RIDGE * np.eye(13)[12])
    low = _logical(L, order, 13)
    np.testing.assert_allclose(low @ low.T, K, atol=1e-13)


def test_a_copy_of_a_member_is_taken_with_a_pivot_of_twice_the_ridge():
    # K_SS with two equal rows is singular; K_SS + mu I is not.  Derivation: the new row
    # of L is w = L^-1 K_S3 = L^-1 ((K + mu I)_S3 - mu e_3) = L[3]' - mu L^-1 e_3, and
    # L[3] L^-1 e_3 = 1, so |w|^2 = 1 + mu - 2 mu + O(mu^2) and the new diagonal entry
    # of L squared is 1 + mu - |w|^2 = 2 mu
    rng = np.random.default_rng(5)
    X = rng.normal(size=(13, 2))
    X[12] = X[3]
    K = _gaussian(X, X, 2.0)
    ridged = K + factor_core.RIDGE * np.eye(13)
    L, order, members = _factor(ridged[:12, :12], 16), np.arange(16), np.arange(16)
    assert factor_core._append(L, order, 12, members, 12, K[12])
    low = _logical(L, order, 13)
    assert low[12, 12] ** 2 == pytest.approx(2 * factor_core.RIDGE, rel=1e-3)
    np.testing.assert_allclose(low @ low.T, ridged, atol=1e-13)


def test_without_a_factor_members_are_added_up_to_the_dense_limit():
    members = np.arange(16)
    L, order = np.zeros((16, 16)), np.arange(16)
    row = np.ones(16)
    assert face_core._add(L, order, 12, members, 12, row, True, 16) == face_core.DENSE
    assert members[12] == 12
    assert face_core._add(L, order, 12, members, 12, row, True, 12) == face_core.NEITHER


def _spy(monkeypatch):
    """Record (status, steps, members kept) of every compiled face-steps call."""
    calls, compiled = [], face_core.face_steps

    def spy(*args):
        out = compiled(*args)
        calls.append((int(out[0]), int(out[1]), int(out[3])))
        return out
    monkeypatch.setattr(face_kept.face_core, "face_steps", spy)
    return calls


def test_a_C_step_ends_in_the_compiled_steps_from_the_kept_factor(monkeypatch):
    X, y = _blobs(300)
    base = FitConfig(C=1.0, kernel="rbf", gamma=10.0)
    first = fit(X, y, base)
    calls = _spy(monkeypatch)
    fresh = []
    refactor = face_kept._refactor
    monkeypatch.setattr(face_kept, "_refactor", lambda *a: fresh.append(1) or refactor(*a))
    step = fit(X, y, base.with_changes(C=1.1), warm_start=first)
    assert calls and calls[0][0] == face_core.DONE       # no pair step, no Python step
    assert step.iterations == calls[0][1]
    assert fresh == []                    # the factor the last fit left served: K_SS is C-free
    _reference_check(X, y, step, 1.1, 10.0)


def test_compiled_and_python_face_steps_reach_the_reference_optimum(monkeypatch):
    X, y = _blobs(300)
    base = FitConfig(C=1.0, kernel="rbf", gamma=2.0)
    first = fit(X, y, base)
    compiled = fit(X, y, base.with_changes(C=3.0), warm_start=first)
    monkeypatch.setattr(face_kept, "available", lambda *args: False)
    kernel_cache.RECENT.clear()
    python = fit(X, y, base.with_changes(C=3.0), warm_start=first)
    _reference_check(X, y, compiled, 3.0, 2.0)
    _reference_check(X, y, python, 3.0, 2.0)
    np.testing.assert_allclose(compiled.decision, python.decision, atol=1e-6)


def test_a_wide_kernels_gamma_step_solves_densely_where_the_factor_fails(monkeypatch):
    # gamma 0.5, C 1000: K_SS on the free set is too near singular to extend its factor
    # (found by trial on this data: the compiled steps end with the factor given up)
    X, y = _blobs(300)
    base = FitConfig(C=1000.0, kernel="rbf", gamma=0.5)
    first = fit(X, y, base)
    calls = _spy(monkeypatch)
    step = fit(X, y, base.with_changes(gamma=0.55), warm_start=first)
    assert calls[0][0] == face_core.DONE and calls[0][2] == -1    # dense solves, no factor
    assert step.iterations == calls[0][1]                         # nothing else ran
    _reference_check(X, y, step, 1000.0, 0.55)


def test_no_factor_is_kept_when_the_cache_cannot_hold_the_free_sets_rows(monkeypatch):
    # 100 rows of 300 points: room for 100 - SPARE = 36 members, fewer than are free
    monkeypatch.setattr(smo, "CACHE_BYTES", 8 * 300 * 100)
    kernel_cache.RECENT.clear()                # not the last test's cache of these points
    X, y = _blobs(300)
    calls = _spy(monkeypatch)
    result = fit(X, y, FitConfig(C=1.0, kernel="rbf", gamma=2.0))
    assert calls == []                                         # the Python steps only
    _reference_check(X, y, result, 1.0, 2.0)


def test_a_cache_smaller_than_the_points_serves_when_it_holds_the_free_sets_rows(monkeypatch):
    # 240 rows of 300 points: no row for every point, but room for 240 - SPARE = 176
    # members, more than the free set at gamma 2, C 1 (a C step of n = 10,000 points,
    # where 2,600 rows of 10,000 fit, scaled down)
    monkeypatch.setattr(smo, "CACHE_BYTES", 8 * 300 * 240)
    kernel_cache.RECENT.clear()
    X, y = _blobs(300)
    base = FitConfig(C=1.0, kernel="rbf", gamma=2.0)
    first = fit(X, y, base)
    free = np.count_nonzero((first.alpha > 1e-12) & (first.alpha < 1.0 - 1e-12))
    assert 0 < free <= 240 - face_kept.SPARE
    calls = _spy(monkeypatch)
    step = fit(X, y, base.with_changes(C=1.2), warm_start=first)
    assert calls and calls[-1][0] == face_core.DONE
    _reference_check(X, y, step, 1.2, 2.0)


def test_a_finish_that_leaves_a_worse_point_is_undone(monkeypatch):
    # a finish that gives up where it stands can be far worse than the pair steps' point
    # (n = 5,000, gamma 10, C 1: relative gap 7e-5 before it, 2e-2 after, measured);
    # here a finish that throws the alphas away stands in for it
    X, y = _blobs(300)
    y = y.astype(float)

    def thrown_away(columns, y, upper, alpha, F, *args, **kwargs):
        alpha[:] = 0.0
        F[:] = y
        return False
    monkeypatch.setattr(smo, "_finish", thrown_away)
    found = smo.solve_rbf(X, y, np.ones(300), 2.0, 5e-9, stages=1)
    assert found.alpha.any() and found.gap < 1e-2      # the pair steps' point, kept
    monkeypatch.undo()
    result = fit(X, y, FitConfig(C=1.0, kernel="rbf", gamma=2.0))
    _reference_check(X, y, result, 1.0, 2.0)


def test_many_points_hand_over_to_the_rounds_once_their_free_set_fits_a_sub_qp(monkeypatch):
    X, y = _blobs(2_200)                 # above smo's all-stages limit of 2,000 points
    stages, solve = [], smo.solve_rbf

    def spy(*args, **kwargs):
        found = solve(*args, **kwargs)
        stages.append((found.stages, int(((found.alpha > 0) & (found.alpha < 1.0)).sum())))
        return found
    monkeypatch.setattr(smo, "solve_rbf", spy)
    result = fit(X, y, FitConfig(C=1.0, kernel="rbf", gamma=10.0))
    (count, free), = stages
    assert count == 1 and free <= 1_000      # one stage, then the decomposition's rounds
    _reference_check(X, y, result, 1.0, 10.0)


def test_a_stage_skips_its_finish_when_many_are_on_the_wrong_side(monkeypatch):
    # WIDE_FACE 0 and FAR -1: every free set is "large" and every count "many", so,
    # without the compiled steps (no room for them), the stage does not finish; the
    # decomposition then ends the fit at the reference's optimum
    monkeypatch.setattr(face_kept, "room", lambda *args: 0)
    X, y = _blobs(300)
    y = y.astype(float)
    calls = []
    finish = smo._finish
    monkeypatch.setattr(smo, "_finish", lambda *a, **k: calls.append(1) or finish(*a, **k))
    smo.solve_rbf(X, y, np.ones(300), 10.0, 5e-9, stages=1)
    assert calls == [1]                           # by default the stage's finish runs
    monkeypatch.setattr(smo, "WIDE_FACE", 0)
    monkeypatch.setattr(smo, "FAR", -1)
    calls.clear()
    found = smo.solve_rbf(X, y, np.ones(300), 10.0, 5e-9, stages=1)
    assert calls == [] and not found.optimal and found.face_steps == 0
    kernel_cache.RECENT.clear()
    result = fit(X, y, FitConfig(C=1.0, kernel="rbf", gamma=10.0))
    _reference_check(X, y, result, 1.0, 10.0)


@pytest.mark.parametrize("make, gamma, C", [(_blobs, 10.0, 1.0), (_moons, 50.0, 100.0)])
def test_long_compiled_steps_from_a_rough_start_end_at_the_optimum_with_F_exact(make, gamma,
                                                                                  C):
    # from pair steps stopped at a violation of 1e-2 hundreds of variables change side:
    # most steps stop at a bound, where F waits for the next release check (only F on
    # the free set is followed); what the steps hand back must still be y - K beta.  On
    # the moons at C 100, released variables push each other out again: releasing 16
    # every time (and putting near-bound ones on their bound at steps of 0) did not end
    # within 800 steps, the stage finish's limit then (mutation-checked)
    X, y = make(1_200)
    y, upper = y.astype(float), np.full(1_200, C)
    columns = smo.rbf_columns(X, gamma)
    alpha = np.zeros(1_200)
    _, _, F = smo._pair_steps(X, y, upper, gamma, alpha, y.copy(), 1e-2, 10**7, columns)
    F = smo._fresh_F(columns, y, alpha)
    status, steps = face_kept.face_steps(
        columns, y, upper, alpha, F, 800, True, None,
        (smo.RELEASE, smo.WIDE_FACE, smo.NEAR_BOUND, smo.SHORT, smo.SHORT_STEPS),
        face_kept.room(columns, 1_200, smo.FACE_LIMIT))
    assert status == face_core.DONE and steps >= 5
    beta = alpha * y
    assert np.abs(F - (y - _gaussian(X, X, gamma) @ beta)).max() <= 1e-9   # written out
    b = smo.certify.intercept(F, y, upper, alpha)
    _reference_check(X, y, SimpleNamespace(alpha=alpha, b=b), C, gamma)


def test_a_stage_finishes_with_long_compiled_steps_alone(monkeypatch):
    # with room for the compiled steps the stage's finish is the long patient one, with
    # no Python steps after it, and ends the fit
    X, y = _blobs(400)
    y = y.astype(float)
    calls = []
    finish = smo._finish
    monkeypatch.setattr(smo, "_finish",
                        lambda *a, **k: calls.append((a[5], k.get("python"))) or finish(*a, **k))
    found = smo.solve_rbf(X, y, np.ones(400), 10.0, 5e-9, stages=1)
    assert calls == [(smo.LONG_STEPS, False)] and found.optimal
    _reference_check(X, y, SimpleNamespace(alpha=found.alpha, b=found.b), 1.0, 10.0)


def test_the_decompositions_finish_on_the_face_takes_its_own_step_limit(monkeypatch):
    # the stage finish is long (LONG_STEPS); the one the decomposition asks for at large C
    # stops sooner (ON_FACE_STEPS), where its rounds do better, and still ends a fit
    # whose free set is the optimum's
    X, y = _moons(400)
    y, upper = y.astype(float), np.full(400, 10.0)
    columns = smo.rbf_columns(X, 10.0)
    alpha = np.zeros(400)
    smo._pair_steps(X, y, upper, 10.0, alpha, y.copy(), 1e-3, 10**7, columns)
    F = smo._fresh_F(columns, y, alpha)
    calls = []
    finish = smo._finish
    monkeypatch.setattr(smo, "_finish",
                        lambda *a, **k: calls.append(a[5]) or finish(*a, **k))
    found = smo.finish_on_face(columns, y, upper, alpha, -y * F, 5e-9)
    assert calls == [smo.ON_FACE_STEPS] and smo.ON_FACE_STEPS < smo.LONG_STEPS
    assert found is not None
    alpha_found, _, b, gap = found
    assert gap <= 5e-9
    _reference_check(X, y, SimpleNamespace(alpha=alpha_found, b=b), 10.0, 10.0)


@pytest.mark.parametrize("gamma, C", [(2.0, 10.0), (0.5, 100.0)])
def test_rounded_readings_end_in_the_ridged_finish_at_the_reference_optimum(monkeypatch,
                                                                            gamma, C):
    # readings rounded to 0.1: 600 points, 141 of them copies of another, so K_SS on the
    # free set is singular; the ridged factor takes it, and the copies' weight is gathered
    # at the bounds (without that, both cells report alphas whose y'a is off by 5e-7)
    X, y = _blobs(600)
    X = np.round(X, 1)
    assert len(np.unique(X, axis=0)) < 500
    kernel_cache.RECENT.clear()
    calls = _spy(monkeypatch)
    result = fit(X, y, FitConfig(C=C, kernel="rbf", gamma=gamma))
    assert calls and calls[-1][0] == face_core.DONE and result.rounds == 1
    assert abs(float(result.alpha @ y)) <= 1e-9 * C
    _reference_check(X, y, result, C, gamma)


def test_gathered_copies_keep_f_and_the_objective_with_one_free_per_group():
    # derivation: copies share their row of Q, so only the group's sum enters f and D;
    # 0.7 + 0.9 of C = 1 becomes 1 + 0.6, and a lone free variable stays as it is
    from solver.qp.copies import gathered
    X = np.array([[0.0, 0.0], [0.0, 0.0], [1.0, 0.0], [0.0, 0.0], [2.0, 2.0]])
    y = np.array([1.0, 1.0, -1.0, -1.0, 1.0])
    upper = np.ones(5)
    alpha = np.array([0.7, 0.9, 0.5, 0.3, 0.4])
    out = gathered(X, y, alpha, upper)
    np.testing.assert_allclose(out, [1.0, 0.6, 0.5, 0.3, 0.4], atol=1e-15)  # 3: other label
    K = _gaussian(X, X, 1.0)
    np.testing.assert_allclose(K @ (out * y), K @ (alpha * y), atol=1e-15)
    assert out @ y == pytest.approx(alpha @ y, abs=1e-15)


def test_a_fresh_factor_takes_the_free_set_farthest_from_a_bound_first():
    # alpha / C = 0.5, 0.05, 0.9, 0.3 -> distances to a bound 0.5, 0.05, 0.1, 0.3
    alpha = np.array([0.0, 1.0, 0.1, 1.8, 0.6])
    upper = np.full(5, 2.0)
    order = face_kept._settled_first(np.array([1, 2, 3, 4]), alpha, upper)
    assert list(order) == [1, 4, 3, 2]
