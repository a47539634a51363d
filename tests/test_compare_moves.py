"""A point dragged to a new place is described as a move, not as an addition and a removal.

A drag keeps the point's row and class (the document's move edit), so an unmatched
point in the same row and class on both sides is one point moved."""

import numpy as np

from solver.config import FitConfig
from solver.fit import fit
from solver.study.compare import compare
from solver.study.narrative import summary

from demo_data import pilot_batch_points


def _fits(move=(), add=None):
    X, y = pilot_batch_points()
    before = fit(X, y, FitConfig())
    X2, y2 = X.copy(), y.copy()
    for index in move:
        X2[index] += [0.3, -0.2]
    if add is not None:
        X2, y2 = np.vstack([X2, add[0]]), np.r_[y2, add[1]]
    return before, fit(X2, y2, FitConfig())


def test_moving_one_point_is_one_move_and_nothing_added_or_removed():
    comparison = compare(*_fits(move=(4,)))
    assert comparison.moved == ((4, 4),)
    assert comparison.added == () and comparison.removed == ()
    text = summary(comparison).lower()
    assert "moving 1 point" in text and "adding" not in text and "removing" not in text


def test_a_move_and_an_added_point_read_as_one_of_each():
    X, y = pilot_batch_points()
    comparison = compare(*_fits(move=(2,), add=([[0.0, 0.0]], [int(y[0])])))
    assert len(comparison.moved) == 1 and len(comparison.added) == 1
    assert comparison.removed == ()
    text = summary(comparison).lower()
    assert "moving 1 point" in text and "adding 1 point" in text


def test_a_point_moved_across_the_boundary_is_listed_with_its_new_status():
    X, y = pilot_batch_points()
    before = fit(X, y, FitConfig())
    X2 = X.copy()
    X2[0] = [3.6, 2.4]           # a pass (+1) dropped among the fails: misclassified now
    after = fit(X2, y, FitConfig())
    comparison = compare(before, after)
    assert comparison.moved == ((0, 0),)
    change = next(c for c in comparison.changes if c.after_index == 0)
    assert change.status_after == "misclassified" != change.status_before
