"""The exact C path against outside references at many C.

References: scikit-learn's SVC (libsvm) at tol=1e-10, and a fresh cvxopt solve
(solver.fit).  Data that scikit-learn ships or generates: iris (Fisher 1936,
UCI repository; its readings are rounded to 0.1 cm, so it brings duplicates
and collinear edge points of its own), make_blobs.
"""

import numpy as np
import pytest
from sklearn.datasets import load_iris, make_blobs
from sklearn.svm import SVC
from test_solver_reference import _reference   # SVC at tol=1e-10 and its dual objective

from solver import CPath, FitConfig, compute_path, fit

C_VALUES = np.logspace(-3, 2, 9)


def _iris_versicolor_virginica():
    iris = load_iris()
    keep = iris.target > 0
    return iris.data[keep][:, 2:4], np.where(iris.target[keep] == 2, 1, -1)


def _blobs(n=150, seed=5):
    X, labels = make_blobs(n_samples=n, centers=[[0, 0], [1.5, 1.5]], cluster_std=1.0,
                           random_state=seed)
    return X, np.where(labels == 1, 1, -1)


def _svc_dual(X, y, C, params, class_weight=None):
    """SVC's dual objective sum(alpha) - 1/2 alpha'Q alpha from its dual coefficients."""
    return _reference(X, y, C, params, class_weight)[2]


def _has_free_alpha(result):
    share = result.alpha / result.penalties
    return bool(((share > 1e-9) & (share < 1 - 1e-9)).any())


def _relative(a, b):
    return abs(a - b) / max(1.0, abs(b))


CASES = {
    "linear": (FitConfig(kernel="linear"), dict(kernel="linear")),
    "polynomial": (FitConfig(kernel="polynomial", gamma=0.5, degree=2, offset=1.0),
                   dict(kernel="poly", gamma=0.5, degree=2, coef0=1.0)),
    "rbf": (FitConfig(kernel="rbf", gamma=0.7), dict(kernel="rbf", gamma=0.7)),
}


@pytest.fixture(scope="module")
def iris_paths():
    X, y = _iris_versicolor_virginica()
    return X, y, {name: compute_path(X, y, config) for name, (config, _) in CASES.items()}


@pytest.mark.parametrize("kernel", sorted(CASES))
def test_path_objective_matches_svc_at_many_c_on_iris(iris_paths, kernel):
    X, y, paths = iris_paths
    for C in C_VALUES:
        ours = paths[kernel].evaluate(C)
        reference = _svc_dual(X, y, C, CASES[kernel][1])     # source: SVC at tol=1e-10
        assert _relative(ours.dual_objective, reference) <= 1e-7, C
        assert _relative(ours.primal_objective, reference) <= 1e-7, C


def test_linear_path_w_and_b_match_svc_on_blobs():
    X, y = _blobs()
    path = compute_path(X, y, FitConfig(kernel="linear"))
    for C in C_VALUES:
        ours = path.evaluate(C)
        svc = SVC(C=C, kernel="linear", tol=1e-10).fit(X, y)    # source: SVC at tol=1e-10
        # libsvm's w carries its stopping rule (measured 5e-5 relative at C = 100);
        # the fresh cvxopt solve pins it much tighter
        np.testing.assert_allclose(ours.w, svc.coef_[0], rtol=1e-4)
        np.testing.assert_allclose(ours.w, fit(X, y, FitConfig(C=C)).w, rtol=1e-8, atol=1e-9)
        # b is pinned only by a free alpha (0 < alpha < C_i, y f = 1); with none, any
        # b in an interval is optimal (KKT conditions, derivation) and the two may differ
        if _has_free_alpha(ours):
            assert ours.b == pytest.approx(svc.intercept_[0], rel=1e-4, abs=1e-5)


def test_path_matches_a_fresh_cvxopt_solve_at_random_c():
    X, y = _blobs(seed=11)
    config = FitConfig(kernel="rbf", gamma=0.5, scaling="zscore")
    path = compute_path(X, y, config)
    for C in 10 ** np.random.default_rng(0).uniform(-3, 2, 6):
        ours = path.evaluate(C)
        fresh = fit(X, y, config.with_changes(C=C))          # source: cvxopt via solver.fit
        assert _relative(ours.primal_objective, fresh.primal_objective) <= 1e-7
        if _has_free_alpha(ours):     # otherwise b is free in an interval (see above)
            np.testing.assert_allclose(ours.decision, fresh.decision, atol=1e-4)


def test_every_evaluation_carries_its_own_small_duality_gap(iris_paths):
    _, _, paths = iris_paths
    for path in paths.values():
        for C in 10 ** np.random.default_rng(1).uniform(-3, 4, 10):
            result = path.evaluate(C)
            assert result.relative_gap <= 1e-8
            assert result.solver_status == "path" and result.iterations == 0


def test_evaluated_result_is_a_fit_result_with_statuses_like_a_fresh_fit():
    X, y = _blobs(seed=2)
    path = compute_path(X, y, FitConfig())
    for C in (0.01, 0.3, 7.0):
        ours, fresh = path.evaluate(C), fit(X, y, FitConfig(C=C))
        assert isinstance(path, CPath)
        assert list(ours.status) == list(fresh.status)
        assert ours.margin_width == pytest.approx(fresh.margin_width, rel=1e-6)
        assert ours.training_error == fresh.training_error


def test_class_weights_scale_the_bounds_like_svc_class_weight():
    X, y = _blobs(seed=7)
    path = compute_path(X, y, FitConfig(weight_positive=3.0, weight_negative=1.0))
    for C in (0.01, 0.5, 20.0):
        # source: SVC at tol=1e-10 with class_weight: C_i = weight(y_i) * C
        reference = _svc_dual(X, y, C, dict(kernel="linear"), class_weight={1: 3.0, -1: 1.0})
        assert _relative(path.evaluate(C).dual_objective, reference) <= 1e-7


def test_unbalanced_classes_follow_svc():
    X, labels = make_blobs(n_samples=[90, 12], centers=[[0, 0], [2, 2]], cluster_std=1.0,
                           random_state=3)
    y = np.where(labels == 1, 1, -1)
    path = compute_path(X, y, FitConfig())
    for C in C_VALUES:
        reference = _svc_dual(X, y, C, dict(kernel="linear"))   # source: SVC at tol=1e-10
        assert _relative(path.evaluate(C).dual_objective, reference) <= 1e-7
