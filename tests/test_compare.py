"""Comparing a pinned fit with the current one: what moved and by how much."""

import math

import numpy as np
import pytest

from demo_data import pilot_batch_points
from solver.study.compare import compare
from solver.config import FitConfig
from solver.study.crossval import cross_validate, make_folds
from solver.fit import fit


@pytest.fixture(scope="module")
def two_fits():
    X, y = pilot_batch_points()
    return fit(X, y, FitConfig(C=10.0)), fit(X, y, FitConfig(C=0.05))


def test_same_points_are_matched_by_index(two_fits):
    before, after = two_fits
    comparison = compare(before, after)
    assert comparison.same_points and comparison.matched[4] == (4, 4)
    assert comparison.added == () and comparison.removed == ()


def test_joined_and_left_are_the_differences_of_the_support_sets(two_fits):
    before, after = two_fits
    comparison = compare(before, after)
    # derivation: joined = S_after - S_before, left = S_before - S_after (same indices)
    assert set(comparison.joined) == set(after.support) - set(before.support)
    assert set(comparison.left) == set(before.support) - set(after.support)


def test_every_status_change_is_listed_with_its_slack_before_and_after(two_fits):
    before, after = two_fits
    comparison = compare(before, after)
    expected = np.flatnonzero(before.status != after.status)
    assert [c.after_index for c in comparison.changes] == expected.tolist()
    change = comparison.changes[0]
    i = change.after_index
    assert (change.slack_before, change.slack_after) == (before.slack[i], after.slack[i])


def test_a_status_change_reads_as_a_move_between_named_places(two_fits):
    comparison = compare(*two_fits)
    texts = {c.text for c in comparison.changes}
    assert "moved from outside the margin to inside the margin" in texts


def test_the_turn_of_w_is_the_signed_angle_between_the_two_weight_vectors(two_fits):
    before, after = two_fits
    # derivation: angle = atan2(w_b x w_a, w_b . w_a), counter-clockwise positive
    expected = math.degrees(math.atan2(before.w[0] * after.w[1] - before.w[1] * after.w[0],
                                       before.w @ after.w))
    assert compare(before, after).angle_degrees == pytest.approx(expected)


def test_a_weight_vector_turned_a_quarter_turn_reads_90_degrees():
    # derivation by hand: swapping the features of these mirror-image points turns w by 90
    X = np.array([[0.0, 1.0], [0.0, -1.0], [0.2, 2.0], [-0.2, -2.0]])
    y = np.array([1, -1, 1, -1])
    first = fit(X, y, FitConfig(hard_margin=True))
    turned = fit(np.c_[-X[:, 1], X[:, 0]], y, FitConfig(hard_margin=True))
    assert compare(first, turned).angle_degrees == pytest.approx(90.0, abs=1e-5)


def test_the_table_holds_margin_width_b_and_training_error_of_both(two_fits):
    before, after = two_fits
    rows = {q.name: q for q in compare(before, after).quantities}
    assert rows["margin width"].change == pytest.approx(after.margin_width - before.margin_width)
    assert (rows["b"].before, rows["b"].after) == (before.b, after.b)
    assert rows["training error"].after == after.training_error
    assert "cross-validated error" not in rows


def test_the_table_shows_cv_error_once_both_estimates_are_given(two_fits):
    before, after = two_fits
    X, y = pilot_batch_points()
    cv_before = cross_validate(X, y, before.config, folds=3)
    cv_after = cross_validate(X, y, after.config, folds=3)
    rows = {q.name: q for q in compare(before, after, cv_before, cv_after).quantities}
    assert rows["cross-validated error"].before == cv_before.error


def test_points_that_differ_are_matched_by_coordinates_and_label():
    X, y = pilot_batch_points()
    before = fit(X, y, FitConfig(C=1.0))
    keep = np.r_[0:10, 11:len(y)]                       # drop point 10
    X_new = np.r_[X[keep][::-1], [[2.5, 1.5]]]         # reverse the order, add one point
    y_new = np.r_[y[keep][::-1], [1]]
    after = fit(X_new, y_new, FitConfig(C=1.0))
    comparison = compare(before, after)
    assert not comparison.same_points
    assert comparison.removed == (10,) and comparison.added == (len(y_new) - 1,)
    for i, j in comparison.matched:
        assert tuple(before.X[i]) == tuple(after.X[j]) and before.y[i] == after.y[j]


def test_a_relabelled_point_counts_as_removed_and_added():
    X, y = pilot_batch_points()
    flipped = y.copy()
    flipped[0] = -flipped[0]
    comparison = compare(fit(X, y, FitConfig()), fit(X, flipped, FitConfig()))
    assert comparison.removed == (0,) and comparison.added == (0,)


def test_the_quick_cv_estimate_matches_scikit_learn_svc_on_the_same_folds():
    from sklearn.svm import SVC
    X, y = pilot_batch_points()
    estimate = cross_validate(X, y, FitConfig(C=10.0), folds=3, seed=1)
    errors = []
    for train, test in make_folds(y, 3, seed=1):
        # reference library: scikit-learn SVC, linear kernel, tol=1e-10, same stratified split
        svc = SVC(kernel="linear", C=10.0, tol=1e-10).fit(X[train], y[train])
        errors.append(np.mean(svc.predict(X[test]) != y[test]))
    assert estimate.error == pytest.approx(np.mean(errors))
    assert estimate.standard_error == pytest.approx(np.std(errors, ddof=1) / math.sqrt(3))


def test_settings_changed_lists_only_the_settings_that_differ(two_fits):
    assert compare(*two_fits).settings_changed == {"C": (10.0, 0.05)}
