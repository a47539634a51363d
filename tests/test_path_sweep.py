"""The sweep's exact cross-validated error: one exact C path per fold.

References: the sweep's own fits on its sampled grid (fresh cvxopt solves, the
numbers the sweep has always shown), held-out predictions of fits evaluated
from the path, and a one-standard-error example worked by hand.  Data: iris
(Fisher 1936, UCI repository, shipped by scikit-learn).
"""

import json

import numpy as np
import pytest
from sklearn.datasets import load_iris

from solver import FitConfig, compute_path, fit
from solver.study.crossval import held_out_error, make_folds
from solver.study.exact_cv import ExactCrossValidation
from solver.study.path_error import held_out_steps, value_at
from solver.study.sweep import SweepSettings, run_sweep


def _iris():
    iris = load_iris()
    keep = iris.target > 0
    return iris.data[keep][:, 2:4], np.where(iris.target[keep] == 2, 1, -1)


@pytest.mark.parametrize("config", [FitConfig(), FitConfig(kernel="rbf", gamma=1.0)],
                         ids=["linear", "rbf"])
def test_exact_cv_error_agrees_with_the_sweeps_fits_at_its_grid(config):
    X, y = _iris()
    settings = SweepSettings(c_from=1e-2, c_to=1e3, steps=12, folds=5, seed=1)
    sweep = run_sweep(X, y, config, settings, n_jobs=1)
    exact = sweep.exact_cv
    assert exact is not None and len(exact.knots) > 0
    folds = make_folds(y, 5, 1)
    compared = tied = 0
    for row, C in enumerate(sweep.C):
        if len(exact.knots) and np.min(np.abs(np.log(exact.knots / C))) < 1e-6:
            continue              # a grid C on a knot: either side's error is right
        finite = np.isfinite(sweep.fold_errors[row])      # NaN: the grid's fit failed there
        for k in np.flatnonzero(finite & (exact.at(C) != sweep.fold_errors[row])):
            # rounded readings can put a held-out point exactly on the boundary (f = 0
            # in exact arithmetic), where either side's rounding decides its sign
            train, test = folds[k]
            fresh = fit(X[train], y[train], config.with_changes(C=float(C)))
            assert np.min(np.abs(fresh.decision_function(X[test]))) < 1e-8, (C, k)
            tied += 1
        compared += 1
    assert compared >= 10 and tied <= 2


def test_held_out_steps_match_the_evaluated_fits_inside_every_piece():
    X, y = _iris()
    train, test = np.arange(0, 100, 2), np.arange(1, 100, 2)
    path = compute_path(X[train], y[train], FitConfig(kernel="rbf", gamma=0.8), c_to=1e3)
    knots, errors = held_out_steps(path, X[test], y[test])
    edges = np.r_[path.c_from, knots, path.c_to]
    for low, high in zip(edges[:-1], edges[1:]):
        C = np.sqrt(low * high)
        expected = held_out_error(path.evaluate(C), X[test], y[test])
        assert value_at(knots, errors, C) == pytest.approx(expected)


def test_one_standard_error_rule_on_a_step_function_worked_by_hand():
    # Pieces [0.01, 0.1), [0.1, 1), [1, 10), [10, 100] with two folds each:
    # means 0.30, 0.12, 0.10, 0.25; the lowest is piece 2 (0.10) with standard error
    # std([0.08, 0.12], ddof=1) / sqrt(2) = 0.02828 / 1.41421 = 0.02, so the threshold
    # is 0.12: pieces 1 and 2 are within it, C from 0.1 to 10.
    exact = ExactCrossValidation(
        c_from=0.01, c_to=100.0, knots=np.array([0.1, 1.0, 10.0]),
        fold_errors=np.array([[0.3, 0.3], [0.12, 0.12], [0.08, 0.12], [0.2, 0.3]]),
        seconds=0.0)
    suggestion = exact.suggestion
    assert suggestion.best_error == pytest.approx(0.10)
    assert suggestion.threshold == pytest.approx(0.12)
    assert suggestion.best_C == pytest.approx(np.sqrt(10.0))
    assert suggestion.smallest_C_within_one_se == pytest.approx(0.1)
    assert suggestion.largest_C_within_one_se == pytest.approx(10.0)


def test_sweep_json_carries_the_exact_error_as_strict_json():
    X, y = _iris()
    sweep = run_sweep(X, y, FitConfig(), SweepSettings(steps=4, folds=3), n_jobs=1)
    data = json.loads(json.dumps(sweep.to_dict(), allow_nan=False))["exact_cv"]
    assert len(data["error"]) == len(data["knots"]) + 1
    assert data["suggestion"]["one_se_threshold"] >= data["suggestion"]["best_cv_error"]


def test_the_grid_alone_is_still_available():
    X, y = _iris()
    sweep = run_sweep(X, y, FitConfig(), SweepSettings(steps=4, folds=3), n_jobs=1,
                      exact=False)
    assert sweep.exact_cv is None and sweep.suggestion is not None
