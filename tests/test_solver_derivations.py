"""Small problems solved by hand; each derivation is written out beside its check."""

import numpy as np
import pytest
from sklearn.datasets import load_iris

from solver import FitConfig, NotSeparableError, fit
from solver.result import INSIDE, ON_MARGIN, OUTSIDE

HARD = FitConfig(hard_margin=True)


def test_two_point_hard_margin_is_the_perpendicular_bisector():
    # x1 = (1, 1), y = +1; x2 = (-1, -1), y = -1.  Both constraints active:
    #   w1 + w2 + b = 1   and   -(-w1 - w2 + b) = 1   =>   b = 0, w1 + w2 = 1;
    # minimising |w|^2 on w1 + w2 = 1 gives w = (1/2, 1/2), |w| = 1/sqrt(2),
    # so the margin width 2/|w| = 2 sqrt(2) = the distance between the points.
    result = fit([[1, 1], [-1, -1]], [1, -1], HARD)
    np.testing.assert_allclose(result.w, [0.5, 0.5], atol=1e-8)
    assert result.b == pytest.approx(0.0, abs=1e-8)
    assert result.margin_width == pytest.approx(2 * np.sqrt(2), rel=1e-8)


def test_three_point_hard_margin_touches_all_three():
    # (0,0) -> -1; (2,0), (0,2) -> +1.  By symmetry w = (a, a).  Constraints:
    #   -(b) >= 1  (origin)  and  2a + b >= 1  (both positives).
    # Minimising 2a^2 wants a small, so b = -1 and a = 1: w = (1, 1), b = -1.
    # Width 2/|w| = sqrt(2) = distance from the origin to x1 + x2 = 2 (2/sqrt 2).
    result = fit([[0, 0], [2, 0], [0, 2]], [-1, 1, 1], HARD)
    np.testing.assert_allclose(result.w, [1.0, 1.0], atol=1e-8)
    assert result.b == pytest.approx(-1.0, abs=1e-8)
    assert result.margin_width == pytest.approx(np.sqrt(2), rel=1e-8)
    assert list(result.status) == [ON_MARGIN] * 3


def test_soft_margin_below_one_half_puts_both_points_on_the_bound():
    # (1, 0) -> +1, (-1, 0) -> -1.  Q_ij = y_i y_j x_i.x_j is all ones, and
    # y'a = 0 forces a1 = a2 = a, so the dual is 2a - 2a^2, maximised at
    # a = 1/2 unless C < 1/2 caps it: a = C.  With C = 0.1: w = sum a y x =
    # (0.2, 0), b = 0, slack = 1 - 0.2 = 0.8 each, and both objectives
    # equal 1/2 (0.04) + 0.1 (0.8 + 0.8) = 2 (0.1) - 2 (0.01) = 0.18.
    result = fit([[1, 0], [-1, 0]], [1, -1], FitConfig(C=0.1))
    np.testing.assert_allclose(result.alpha, [0.1, 0.1], atol=1e-8)
    np.testing.assert_allclose(result.w, [0.2, 0.0], atol=1e-8)
    np.testing.assert_allclose(result.slack, [0.8, 0.8], atol=1e-8)
    assert result.primal_objective == pytest.approx(0.18, abs=1e-8)
    assert result.dual_objective == pytest.approx(0.18, abs=1e-8)
    assert list(result.status) == [INSIDE, INSIDE]


def test_a_far_point_is_outside_the_margin_with_zero_alpha():
    # Adding (5, 5) -> +1 to the two-point problem leaves the optimum alone:
    # its functional margin (5 + 5)/2 = 5 > 1, so its constraint is inactive.
    result = fit([[1, 1], [-1, -1], [5, 5]], [1, -1, 1], HARD)
    assert result.status[2] == OUTSIDE
    assert result.alpha[2] == pytest.approx(0.0, abs=1e-8)
    np.testing.assert_allclose(result.w, [0.5, 0.5], atol=1e-8)


@pytest.fixture
def overlapping():
    rng = np.random.default_rng(5)
    X = np.vstack([rng.normal([0, 0], 1, (40, 2)), rng.normal([2, 1], 1, (40, 2))])
    return X, np.r_[-np.ones(40), np.ones(40)]


def test_w_dot_x_is_the_norm_of_w_times_the_signed_length_of_x_along_w(overlapping):
    # w.x = |w| |x| cos(theta), and |x| cos(theta) is the signed length of x along
    # the direction w/|w|, which the result reports as its projection.
    result = fit(*overlapping, FitConfig(C=1.0))
    X = overlapping[0]
    np.testing.assert_allclose(X @ result.w, result.projection * np.linalg.norm(result.w),
                               rtol=1e-12)


def test_band_edges_sit_at_f_equal_plus_and_minus_one(overlapping):
    # Moving from the boundary (f = 0) along w/|w| by half the margin width
    # changes f by |w| * (1/|w|) = 1.
    result = fit(*overlapping, FitConfig(C=1.0))
    w = result.w
    on_boundary = -result.b * w / (w @ w)          # the point of f = 0 nearest the origin
    unit = w / np.linalg.norm(w)
    half = result.margin_width / 2
    f = result.decision_function(np.array([on_boundary, on_boundary + half * unit,
                                           on_boundary - half * unit]))
    np.testing.assert_allclose(f, [0.0, 1.0, -1.0], atol=1e-12)


def test_w_is_perpendicular_to_the_boundary(overlapping):
    # Two points on f = 0 differ by a vector d with w.d = 0.
    result = fit(*overlapping, FitConfig(C=1.0))
    w, b = result.w, result.b
    p1 = np.array([0.0, -b / w[1]])
    p2 = np.array([1.0, -(b + w[0]) / w[1]])
    np.testing.assert_allclose(result.decision_function(np.array([p1, p2])), 0, atol=1e-12)
    assert abs(w @ (p2 - p1)) < 1e-12


def _iris_pair(first, second):
    # Iris data shipped with scikit-learn (Fisher 1936; UCI repository):
    # petal length and petal width only.
    iris = load_iris()
    keep = np.isin(iris.target, (first, second))
    return iris.data[keep][:, 2:4], np.where(iris.target[keep] == second, 1, -1)


# UCI Machine Learning Repository, Iris data set description (iris.names, after
# Fisher 1936): "One class is linearly separable from the other 2; the latter
# are NOT linearly separable from each other" (quoted from memory).  Setosa is
# the separable class; on the petal measures alone the same holds.

def test_iris_setosa_and_versicolor_are_separable_on_petal_measures():
    result = fit(*_iris_pair(0, 1), HARD)
    assert result.training_error == 0.0
    assert result.slack.max() == pytest.approx(0.0, abs=1e-7)


def test_iris_versicolor_and_virginica_refuse_a_hard_margin():
    with pytest.raises(NotSeparableError, match="not linearly separable; use a finite C"):
        fit(*_iris_pair(1, 2), HARD)


def test_iris_versicolor_and_virginica_fit_with_a_finite_C():
    result = fit(*_iris_pair(1, 2), FitConfig(C=1.0))
    assert 0 < result.training_error < 0.1



def test_the_soft_margin_kkt_scalings_stay_finite_where_their_product_overflows():
    # E1 E2 / (E1 + E2) = 1 / (1/E1 + 1/E2) and E1 / (E1 + E2) = 1 / (1 + E2/E1) (divide
    # numerator and denominator by E1 E2, resp. E1).  At E1 = E2 = 1e160 the product
    # overflows, the ratios are 5e159 and 1/2; elsewhere the plain formula, to the bit.
    import warnings

    from solver.qp.primal_qp import _combined_scalings
    e1 = np.array([2.0, 1e-3, 1e160, 1e200, 3.0])
    e2 = np.array([5.0, 7e4, 1e160, 1e120, 1e300])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        joint, share = _combined_scalings(e1, e2)
    assert np.isfinite(joint).all() and np.isfinite(share).all()
    np.testing.assert_array_equal(joint[:2], e1[:2] * e2[:2] / (e1[:2] + e2[:2]))
    np.testing.assert_array_equal(share[:2], e1[:2] / (e1[:2] + e2[:2]))
    np.testing.assert_allclose(joint[2:], 1 / (1 / e1[2:] + 1 / e2[2:]), rtol=1e-15)
    np.testing.assert_allclose(share[2:], [0.5, 1.0, 3e-300], rtol=1e-15)
