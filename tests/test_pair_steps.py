"""The RBF fast path: compiled pair steps, then an exact finish on their face.

Sources of the expected values, named beside each check:
- scikit-learn's SVC (libsvm) at tol=1e-10 on data scikit-learn generates
  (make_blobs, make_moons): its dual objective is a lower bound ours must meet;
- our decomposition (cvxopt sub-QPs), forced by switching the fast path off:
  two independent methods reaching the same certified optimum;
- the KKT conditions of the soft-margin dual, written out in the tests
  (common practice, no source): alpha_i = 0 where y_i f(x_i) > 1, alpha_i = C
  where y_i f(x_i) < 1, sum_i alpha_i y_i = 0.
"""

import numpy as np
import pytest
from sklearn.datasets import make_blobs, make_moons
from sklearn.svm import SVC

from solver import FitConfig, fit
from solver.qp import dual_solver, smo


def _standardised(X):
    return (X - X.mean(axis=0)) / X.std(axis=0)


def _set(monkeypatch, module, **values):
    for name, value in values.items():
        monkeypatch.setattr(module, name, value)


def _decomposition_only(X, y, upper, gamma, guess_margin, alpha_start, columns=None):
    """Stands in for dual_solver._pair_steps: no pair steps, the decomposition from the start
    (its own cold start when there is no alpha_start)."""
    return None, smo.FastSolution(alpha_start, 0.0, None, np.inf, 0, 0, False)


def _moons(n, seed=0):
    X, labels = make_moons(n_samples=n, noise=0.25, random_state=seed)
    return _standardised(X), np.where(labels == 1, 1.0, -1.0)


def _blobs(n, seed=3):
    X, labels = make_blobs(n_samples=n, centers=[[0, 0], [2, 1.5]], cluster_std=1.0,
                           random_state=seed)
    return _standardised(X), np.where(labels == 1, 1.0, -1.0)


def _gaussian(A, B, gamma):
    """exp(-gamma |a - b|^2), written out here rather than taken from the solver."""
    return np.exp(-gamma * ((A[:, None, :] - B[None, :, :]) ** 2).sum(axis=2))


def _dual(alpha, X, y, gamma):
    beta = alpha * y
    return float(alpha.sum() - 0.5 * beta @ _gaussian(X, X, gamma) @ beta)


def _fit(X, y, C, gamma, **kw):
    return fit(X, y, FitConfig(C=C, kernel="rbf", gamma=gamma), **kw)


@pytest.mark.parametrize("gamma", [0.5, 2.0, 10.0, 50.0])
@pytest.mark.parametrize("C", [1.0, 100.0])
def test_fast_path_certifies_and_meets_the_reference(gamma, C):
    X, y = _moons(300)
    result = _fit(X, y, C, gamma)
    assert result.converged and result.solver_status == "optimal"
    assert result.relative_gap <= 1e-8
    svc = SVC(C=C, gamma=gamma, tol=1e-10).fit(X, y)           # reference, tol 1e-10
    alpha_svc = np.zeros(len(y))
    alpha_svc[svc.support_] = np.abs(svc.dual_coef_[0])
    ours, theirs = _dual(result.alpha, X, y, gamma), _dual(alpha_svc, X, y, gamma)
    assert ours >= theirs - 1e-9 * abs(theirs)                 # never worse than the reference
    # KKT written out: 0 < alpha < C only on the edge, C inside the band, 0 outside
    margin = y * result.decision
    assert abs(float(result.alpha @ y)) <= 1e-9 * C
    assert (margin[result.alpha == 0] >= 1 - 1e-7).all()
    assert (margin[result.alpha == C] <= 1 + 1e-7).all()


@pytest.mark.parametrize("gamma, C", [(0.5, 100.0), (10.0, 1.0), (50.0, 1.0)])
def test_fast_path_and_decomposition_reach_the_same_optimum(gamma, C, monkeypatch):
    X, y = _blobs(400)
    fast = _fit(X, y, C, gamma)
    with monkeypatch.context() as patch:
        patch.setattr(dual_solver, "_pair_steps",
                      _decomposition_only)
        slow = _fit(X, y, C, gamma)
    assert slow.rounds >= 1 and fast.converged and slow.converged
    assert fast.dual_objective == pytest.approx(slow.dual_objective, rel=1e-9)
    np.testing.assert_allclose(fast.decision, slow.decision, atol=1e-6)


def test_the_decomposition_finishes_what_the_pair_steps_leave(monkeypatch):
    """Stopped after 50 pair steps and no face steps, the fit is still exact."""
    _set(monkeypatch, smo, STEP_LIMIT=50, FACE_STEPS=0, FEW_STEPS=0)
    X, y = _moons(400)
    result = _fit(X, y, 10.0, 5.0)
    assert result.converged and result.relative_gap <= 1e-8
    reference = SVC(C=10.0, gamma=5.0, tol=1e-10).fit(X, y)   # reference, tol 1e-10
    np.testing.assert_allclose(result.decision, reference.decision_function(X), atol=1e-5)


def test_a_decomposition_cut_short_ends_on_an_exact_solve_of_its_free_set(monkeypatch):
    """Ten rounds on working sets of 100 are far from enough here (their gap is still
    0.5 at the end, measured); the exact solve on the whole free set that the
    decomposition tries before giving up certifies the optimum."""
    _set(monkeypatch, dual_solver, _pair_steps=_decomposition_only, MAX_ROUNDS=10,
         MAX_WORK=100, LARGEST_WORK=100)
    X, y = _moons(500)
    result = _fit(X, y, 1000.0, 30.0)
    assert result.converged and result.relative_gap <= 1e-8
    reference = SVC(C=1000.0, gamma=30.0, tol=1e-10).fit(X, y)   # reference, tol 1e-10
    alpha = np.zeros(len(y))
    alpha[reference.support_] = np.abs(reference.dual_coef_.ravel())
    theirs = _dual(alpha, X, y, 30.0)
    assert result.rounds == 10                    # the loop ran out; the exact solve ended it
    assert result.dual_objective >= theirs - 1e-9 * abs(theirs)


def test_a_two_row_cache_gives_the_same_fit(monkeypatch):
    X, y = _blobs(300)
    roomy = _fit(X, y, 10.0, 2.0)
    monkeypatch.setattr(smo, "CACHE_BYTES", 1)                # two rows: evicted every step
    tight = _fit(X, y, 10.0, 2.0)
    assert tight.converged
    assert tight.dual_objective == pytest.approx(roomy.dual_objective, rel=1e-10)
    np.testing.assert_allclose(tight.decision, roomy.decision, atol=1e-8)


def test_shrinking_on_more_than_a_thousand_points_keeps_the_optimum(monkeypatch):
    X, y = _moons(1500, seed=4)
    calls = []
    solve = smo.solve_rbf
    monkeypatch.setattr(smo, "solve_rbf",
                        lambda *a, **kw: calls.append(solve(*a, **kw)) or calls[-1])
    fast = _fit(X, y, 10.0, 2.0)
    assert calls and calls[-1].optimal                        # the fast path certified it
    monkeypatch.setattr(dual_solver, "_pair_steps",
                        _decomposition_only)
    slow = _fit(X, y, 10.0, 2.0)
    assert fast.dual_objective == pytest.approx(slow.dual_objective, rel=1e-9)
    np.testing.assert_allclose(fast.decision, slow.decision, atol=1e-6)


def test_duplicated_points_and_a_conflicting_pair_are_handled():
    X, y = _moons(200)
    X = np.vstack([X, X[:30], X[:1]])                         # 30 repeats, one twice
    y = np.concatenate([y, y[:30], -y[:1]])                   # ... and one with the other label
    result = _fit(X, y, 1.0, 2.0)
    assert result.converged and result.relative_gap <= 1e-8
    reference = SVC(C=1.0, gamma=2.0, tol=1e-10).fit(X, y)    # reference, tol 1e-10
    alpha_svc = np.zeros(len(y))
    alpha_svc[reference.support_] = np.abs(reference.dual_coef_[0])
    assert _dual(result.alpha, X, y, 2.0) >= _dual(alpha_svc, X, y, 2.0) - 1e-9


def test_warm_starts_from_a_neighbouring_fit_reach_the_cold_optimum():
    X, y = _moons(500, seed=2)
    previous = _fit(X, y, 3.0, 4.0)
    for C, gamma in [(3.3, 4.0), (3.0, 4.4), (30.0, 0.5)]:
        warm = _fit(X, y, C, gamma, warm_start=previous)
        cold = _fit(X, y, C, gamma)
        assert warm.converged and warm.relative_gap <= 1e-8
        assert warm.dual_objective == pytest.approx(cold.dual_objective, rel=1e-9)
        np.testing.assert_allclose(warm.decision, cold.decision, atol=1e-6)


def test_class_weights_match_the_reference_with_the_same_weights():
    X, y = _blobs(400, seed=5)
    result = fit(X, y, FitConfig(C=2.0, kernel="rbf", gamma=3.0, weight_positive=4.0,
                                 weight_negative=0.5))
    assert result.converged and result.relative_gap <= 1e-8
    reference = SVC(C=2.0, gamma=3.0, tol=1e-10,                 # reference, tol 1e-10
                    class_weight={1.0: 4.0, -1.0: 0.5}).fit(X, y)
    np.testing.assert_allclose(result.decision, reference.decision_function(X), atol=1e-5)
    assert result.alpha[y > 0].max() <= 8.0 and result.alpha[y < 0].max() <= 1.0


@pytest.mark.parametrize("long_steps", [None, 0])
def test_a_huge_C_stops_the_pair_steps_early_and_stays_exact(monkeypatch, long_steps):
    """C = 1e6 is nearly a hard margin: pair steps would need millions of steps; they
    stop at STEPS_PER_POINT per point, and the long compiled face finish ends the fit
    from there (it did not before it took 400 steps: the decomposition did, as it
    still does without that finish, LONG_STEPS 0)."""
    if long_steps is not None:
        monkeypatch.setattr(smo, "LONG_STEPS", long_steps)
    calls = []
    solve = smo.solve_rbf
    monkeypatch.setattr(smo, "solve_rbf",
                        lambda *a, **kw: calls.append(solve(*a, **kw)) or calls[-1])
    X, y = _moons(300)
    result = _fit(X, y, 1e6, 1.0)
    assert calls and calls[-1].steps <= smo.STEPS_PER_POINT * 300
    assert calls[-1].optimal == (long_steps is None)     # else: handed over
    assert result.converged and result.relative_gap <= 1e-8
    margin = y * result.decision                              # KKT written out
    assert (margin[result.alpha == 0] >= 1 - 1e-6).all()
    assert abs(float(result.alpha @ y)) <= 1e-6


def test_points_on_the_margin_report_no_slack_from_rounding():
    # an exact face solve leaves y f = 1 - 2e-16 on free support vectors; the KKT
    # conditions (0 < alpha < C  =>  y f = 1, xi = 0) say their slack is 0
    X, y = _moons(300)
    result = fit(X, y, FitConfig(C=1.0, kernel="rbf", gamma=2.0))
    on = result.status == "on_margin"
    assert on.any()
    assert (result.slack[on] == 0.0).all()
    np.testing.assert_allclose(result.functional_margin[on], 1.0, atol=1e-9)
    off = ~on
    np.testing.assert_array_equal(result.slack[off],
                                  np.maximum(0.0, 1.0 - result.functional_margin[off]))

