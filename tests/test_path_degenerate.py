"""The exact C path on the data that makes paths hard, and its piecewise-linear shape.

Sources: scikit-learn's SVC at tol=1e-10; iris (Fisher 1936, UCI repository),
whose setosa class is linearly separable from versicolor (a fact of the data
set, common practice, no source); derivations written out beside each check.
"""

import numpy as np
import pytest
from sklearn.datasets import load_iris, make_blobs
from sklearn.svm import SVC

import solver.qp.path as path_module
from solver import STATUSES, FitConfig, InputError, compute_path, fit
from solver.qp.path_trace import Tracer


def _svc_linear_dual(X, y, C):
    """Source: SVC (libsvm) at tol=1e-10; dual = sum(alpha) - 1/2 |sum alpha_i y_i x_i|^2."""
    svc = SVC(C=C, kernel="linear", tol=1e-10).fit(X, y)
    alpha = np.zeros(len(y))
    alpha[svc.support_] = np.abs(svc.dual_coef_[0])
    w = X.T @ (alpha * y)
    return alpha.sum() - 0.5 * w @ w


def _assert_matches_svc(path, X, y, c_values):
    for C in c_values:
        result = path.evaluate(C)
        reference = _svc_linear_dual(X, y, C)
        assert abs(result.dual_objective - reference) <= 1e-7 * max(1.0, abs(reference)), C
        assert result.relative_gap <= 1e-8, C


def _grid_readings():
    """Readings rounded to whole units: whole rows and diagonals of collinear points,
    so many points sit on a band edge at once and the edge system is singular."""
    rng = np.random.default_rng(4)
    X = np.array([(a, b) for a in range(8) for b in range(8)], dtype=float)
    y = np.where(X[:, 0] + X[:, 1] > 7, 1, -1)
    flip = rng.choice(len(y), 6, replace=False)
    y[flip] *= -1
    return X, y


def test_collinear_rounded_readings_follow_svc_along_the_path():
    X, y = _grid_readings()
    path = compute_path(X, y, FitConfig())
    _assert_matches_svc(path, X, y, np.logspace(-3, 3, 13))


def test_duplicating_every_point_gives_the_path_at_twice_c():
    # Derivation: with every point twice, sum_i C xi_i counts each slack twice, so the
    # primal is that of the single points at 2C: the same w and b at C as at 2C.
    iris = load_iris()
    X, y = iris.data[50:, 2:4], np.where(iris.target[50:] == 2, 1, -1)
    single = compute_path(X, y, FitConfig(), c_from=2e-3, c_to=2e3)
    doubled = compute_path(np.vstack([X, X]), np.r_[y, y], FitConfig(), c_to=1e3)
    for C in (1e-3, 0.05, 1.0, 40.0, 900.0):
        np.testing.assert_allclose(doubled.evaluate(C).w, single.evaluate(2 * C).w,
                                   rtol=1e-7, atol=1e-9)
        assert doubled.evaluate(C).primal_objective == pytest.approx(
            single.evaluate(2 * C).primal_objective, rel=1e-7)


def test_mirror_image_points_tie_their_events_and_keep_the_symmetry():
    # Derivation: with (x, y) and (-x, -y) both in the data the problem is symmetric
    # under the reflection, f(-x) = -f(x), so a point and its mirror image have the
    # same y f at every C and reach the band edge together: events tie.
    X, labels = make_blobs(n_samples=40, centers=[[0.5, 0.5], [-0.5, -0.5]], random_state=2)
    y = np.where(labels == 0, 1, -1)
    X2, y2 = np.vstack([X, -X]), np.r_[y, -y]
    path = compute_path(X2, y2, FitConfig())
    _assert_matches_svc(path, X2, y2, np.logspace(-3, 2, 8))
    tied = {}
    for event in path.events:
        tied.setdefault(round(np.log(event.C), 7), set()).add(event.point)
    assert any(len(points) >= 2 for points in tied.values())
    for C in np.logspace(-2, 3, 11):
        result = path.evaluate(C)
        # y f is unique wherever a free alpha pins b
        share = result.alpha / result.penalties
        if ((share > 1e-9) & (share < 1 - 1e-9)).any():
            np.testing.assert_allclose(result.functional_margin[:40],
                                       result.functional_margin[40:], atol=1e-7)


def test_separable_data_ends_at_the_hard_margin():
    iris = load_iris()
    X, y = iris.data[:100, :2], np.where(iris.target[:100] == 0, 1, -1)
    path = compute_path(X, y, FitConfig())
    assert path.hard_margin_from is not None and path.hard_margin_from < path.c_to
    hard = fit(X, y, FitConfig(hard_margin=True))      # source: cvxopt, C = infinity
    for C in (path.hard_margin_from * 1.01, path.c_to):
        result = path.evaluate(C)
        np.testing.assert_allclose(result.w, hard.w, rtol=1e-7)
        assert result.b == pytest.approx(hard.b, rel=1e-7)
        assert result.penalty_term <= 1e-9 * result.primal_objective * C   # rounding only


def test_alpha_over_c_is_affine_in_one_over_c_between_breakpoints():
    # Hastie, Rosset, Tibshirani & Zhu (JMLR 5, 2004): with lambda = 1/C, their
    # alpha_i (ours divided by C) is affine in lambda between breakpoints; check the
    # midpoint in lambda of two points inside each of several segments.
    X, labels = make_blobs(n_samples=60, centers=[[0, 0], [1.5, 1.0]], random_state=8)
    y = np.where(labels == 1, 1, -1)
    path = compute_path(X, y, FitConfig(kernel="rbf", gamma=0.5))
    edges = np.r_[path.starts, path.c_to]
    checked = 0
    for start, stop in zip(edges[:-1], edges[1:]):
        if stop / start < 1.01:
            continue
        lam1, lam2 = 1 / (start * 1.001), 1 / (stop * 0.999)
        mid = 0.5 * (lam1 + lam2)
        a1, a2, am = (path.alpha_b(1 / lam)[0] * lam for lam in (lam1, lam2, mid))
        np.testing.assert_allclose(am, 0.5 * (a1 + a2), rtol=1e-7, atol=1e-10)
        checked += 1
    assert checked >= 10


def test_events_use_the_statuses_and_row_numbers_of_fit():
    X, y = _grid_readings()
    path = compute_path(X, y, FitConfig())
    assert path.events and list(path.breakpoints) == sorted(path.breakpoints)
    for event in path.events:
        assert event.before in STATUSES and event.after in STATUSES
        assert event.before != event.after
        assert 0 <= event.point < len(y)
        assert path.c_from < event.C < path.c_to


def test_failed_checks_repair_the_partition_and_say_so(monkeypatch):
    X, y = _grid_readings()
    monkeypatch.setattr(path_module, "KKT_LIMIT", -1.0)          # every check "fails"
    path = compute_path(X, y, FitConfig(), c_from=0.01, c_to=100.0)
    assert path.reanchors and all("repaired" in r.reason for r in path.reanchors)
    _assert_matches_svc(path, X, y, np.logspace(-2, 2, 7))


def test_a_breakpoint_that_cannot_be_continued_reanchors_with_a_qp_solve(monkeypatch):
    X, y = _grid_readings()
    settle, calls = Tracer.settle, []

    def failing_now_and_then(self, candidates):
        calls.append(1)
        if len(calls) % 15 == 0:
            raise path_module.PathTrouble("made to fail by the test")
        return settle(self, candidates)

    monkeypatch.setattr(Tracer, "settle", failing_now_and_then)
    path = compute_path(X, y, FitConfig(), c_from=0.01, c_to=100.0)
    assert any("made to fail" in r.reason for r in path.reanchors)
    _assert_matches_svc(path, X, y, np.logspace(-2, 2, 7))


def test_c_outside_the_computed_range_is_refused_with_a_message():
    X, y = _grid_readings()
    path = compute_path(X, y, FitConfig(), c_from=0.1, c_to=10.0)
    with pytest.raises(InputError, match=r"C = 20 is outside the path's range 0\.1 \.\. 10"):
        path.evaluate(20.0)
    with pytest.raises(InputError, match="must run upwards"):
        compute_path(X, y, FitConfig(), c_from=10.0, c_to=1.0)


def test_events_near_are_the_nearest_in_log_c_as_sorting_them_all_would_give():
    # the definition written out: every event's |log(C_e / C)|, the count smallest
    # (first of equals first), listed in ascending C
    import math
    X, y = _grid_readings()
    path = compute_path(X, y, FitConfig())
    events = path.events
    assert len(events) > 20
    Cs = [event.C for event in events]
    probes = Cs[:3] + Cs[-3:] + [math.sqrt(a * b) for a, b in zip(Cs, Cs[1:])][::3] \
        + [path.c_from, path.c_to]
    for C in probes:
        for count in (0, 1, 5, 12, len(events) + 3):
            distance = [abs(math.log(event.C / C)) for event in events]
            nearest = sorted(range(len(events)), key=distance.__getitem__)[:count]
            assert path.events_near(C, count) == [events[i] for i in sorted(nearest)], (C, count)
