"""The C sweep: grid, figures per C, fold errors, cancellation and failures."""

import json
import math
import threading

import numpy as np
import pytest

import sys

import solver.fit  # noqa: F401  (the module, looked up in sys.modules below)
from solver.config import FitConfig
from solver.study.crossval import make_folds
from solver.errors import ConvergenceError, InputError
from solver.study.sweep import SweepSettings, run_sweep

FIT_MODULE = sys.modules["solver.fit"]  # the package re-exports fit, shadowing the module
SMALL = SweepSettings(c_from=1e-2, c_to=1e2, steps=5, folds=3, seed=7)


def pilot_batch(n=30, seed=3):
    """Invented demo data: two gauge readings on a pilot batch of parts, pass (+1) / fail (-1)."""
    rng = np.random.default_rng(seed)
    half = n // 2
    X = np.r_[rng.normal([2.0, 1.0], 0.6, (half, 2)), rng.normal([3.2, 2.0], 0.6, (n - half, 2))]
    y = np.r_[np.ones(half, int), -np.ones(n - half, int)]
    return X, y


def test_grid_is_log_spaced_with_both_ends_included():
    # derivation: 10**-3, 10**-1.5, 10**0 are evenly spaced in log10 C from 1e-3 to 1
    grid = SweepSettings(c_from=1e-3, c_to=1.0, steps=3).c_values()
    np.testing.assert_allclose(grid, [1e-3, 10 ** -1.5, 1.0], rtol=1e-12)


def test_default_grid_runs_from_1e_minus_3_to_1e4_in_40_steps():
    grid = SweepSettings().c_values()  # the defaults asked for in the issue
    assert (len(grid), grid[0], grid[-1]) == (40, pytest.approx(1e-3), pytest.approx(1e4))


def test_a_range_running_downwards_says_to_swap_the_ends():
    with pytest.raises(InputError, match="swap"):
        SweepSettings(c_from=10, c_to=1)


def test_fewer_than_two_steps_is_refused_naming_the_value():
    with pytest.raises(InputError, match="got 1"):
        SweepSettings(steps=1)


def test_more_folds_than_the_smaller_class_names_the_limit():
    X, y = pilot_batch(12)
    with pytest.raises(InputError, match=r"folds \(7\) is more than the smaller class"):
        run_sweep(X, y, FitConfig(), SweepSettings(steps=2, folds=7))


def test_one_fold_is_refused():
    X, y = pilot_batch(12)
    with pytest.raises(InputError, match="at least 2"):
        run_sweep(X, y, FitConfig(), SweepSettings(steps=2, folds=1))


def test_figures_at_each_C_are_those_of_a_single_fit_at_that_C():
    X, y = pilot_batch()
    sweep = run_sweep(X, y, FitConfig(), SMALL)
    for i, C in enumerate(sweep.C):
        # reference: solver.fit run directly at the same C (the sweep must add nothing)
        single = FIT_MODULE.fit(X, y, FitConfig(C=float(C)))
        assert sweep.margin_width[i] == pytest.approx(single.margin_width, rel=1e-6)
        assert sweep.half_norm_w2[i] == pytest.approx(single.half_norm_w2, rel=1e-6, abs=1e-9)
        assert sweep.penalty_term[i] == pytest.approx(single.penalty_term, rel=1e-6, abs=1e-9)
        assert sweep.training_error[i] == single.training_error
        assert sweep.n_support[i] == single.n_support


def test_fold_errors_match_scikit_learn_svc_on_the_same_folds():
    from sklearn.svm import SVC
    X, y = pilot_batch()
    # C from 1 up: below that every alpha sits at C on these points, b is then only
    # fixed to an interval and two correct solvers may pick different ends of it
    sweep = run_sweep(X, y, FitConfig(), SweepSettings(c_from=1, c_to=100, steps=3, folds=3,
                                                       seed=7))
    folds = make_folds(y, 3, seed=7)
    for i, C in enumerate(sweep.C):
        for k, (train, test) in enumerate(folds):
            # reference library: scikit-learn SVC, linear kernel, tol=1e-10, same split
            reference = SVC(kernel="linear", C=float(C), tol=1e-10).fit(X[train], y[train])
            expected = np.mean(reference.predict(X[test]) != y[test])
            assert sweep.fold_errors[i, k] == pytest.approx(expected)


def test_cv_spread_is_the_sample_std_and_its_standard_error_over_root_k():
    X, y = pilot_batch()
    sweep = run_sweep(X, y, FitConfig(), SMALL)
    row = sweep.fold_errors[2]
    # derivation: std with ddof=1 over the k fold errors; SE = std / sqrt(k)
    assert sweep.cv_std[2] == pytest.approx(np.std(row, ddof=1))
    assert sweep.cv_standard_error[2] == pytest.approx(np.std(row, ddof=1) / math.sqrt(3))
    assert sweep.cv_error[2] == pytest.approx(np.mean(row))


def test_leave_one_out_holds_out_every_point_once():
    X, y = pilot_batch(10)
    sweep = run_sweep(X, y, FitConfig(), SweepSettings(steps=2, folds="loo"))
    assert sweep.fold_errors.shape == (2, 10)
    assert set(np.unique(sweep.fold_errors)) <= {0.0, 1.0}  # one held-out point per fold


def test_progress_counts_every_fit_up_to_the_total():
    X, y = pilot_batch()
    seen = []
    run_sweep(X, y, FitConfig(), SMALL, progress=lambda done, total: seen.append((done, total)),
              block=2)
    # 5 values of C times (all points + 3 folds) = 20 fits, reported after blocks of 2 C values
    assert seen == [(8, 20), (16, 20), (20, 20)]


def test_a_cancel_before_the_start_returns_no_values_and_says_cancelled():
    X, y = pilot_batch()
    stop = threading.Event()
    stop.set()
    sweep = run_sweep(X, y, FitConfig(), SMALL, cancel=stop)
    assert sweep.cancelled and len(sweep.C) == 0 and sweep.suggestion is None


def test_a_cancel_midway_keeps_the_values_already_finished():
    X, y = pilot_batch()
    calls = []
    sweep = run_sweep(X, y, FitConfig(), SMALL, block=2,
                      progress=lambda done, total: calls.append(done),
                      cancel=lambda: len(calls) >= 1)
    assert sweep.cancelled and len(sweep.C) == 2 and sweep.planned_steps == 5


def test_a_failed_fit_is_recorded_and_the_sweep_goes_on(monkeypatch):
    X, y = pilot_batch()
    real_fit = FIT_MODULE.fit

    def flaky(X, y, config, warm_start=None):
        if config.C == pytest.approx(1.0):
            raise ConvergenceError("the solver stopped early (test)")
        return real_fit(X, y, config, warm_start=warm_start)

    monkeypatch.setattr(FIT_MODULE, "fit", flaky)
    sweep = run_sweep(X, y, FitConfig(), SMALL, n_jobs=1)
    assert len(sweep.failures) == 4  # all points + 3 folds at C = 1
    assert {f.kind for f in sweep.failures} == {"ConvergenceError"}
    assert math.isnan(sweep.margin_width[2]) and np.isfinite(sweep.margin_width[3])
    assert sweep.suggestion is not None and sweep.suggestion.best_C != pytest.approx(1.0)


def test_warm_started_and_cold_rbf_sweeps_agree():
    X, y = pilot_batch(20)
    config = FitConfig(kernel="rbf", gamma=0.5)
    settings = SweepSettings(c_from=0.1, c_to=10, steps=3, folds=2)
    warm = run_sweep(X, y, config, settings)
    cold = run_sweep(X, y, config, settings, warm_start=False)
    # common practice, no source: both solve the same convex QP to a 1e-10 relative gap
    np.testing.assert_allclose(warm.half_norm_w2, cold.half_norm_w2, rtol=1e-5)
    np.testing.assert_array_equal(warm.fold_errors, cold.fold_errors)


def test_two_parallel_jobs_give_the_numbers_of_one_job():
    X, y = pilot_batch()
    one = run_sweep(X, y, FitConfig(), SMALL, n_jobs=1)
    two = run_sweep(X, y, FitConfig(), SMALL, n_jobs=2)
    np.testing.assert_array_equal(one.fold_errors, two.fold_errors)
    np.testing.assert_allclose(one.margin_width, two.margin_width, rtol=1e-12)


def test_the_sweep_result_is_frozen():
    X, y = pilot_batch()
    sweep = run_sweep(X, y, FitConfig(), SweepSettings(steps=2, folds=2))
    with pytest.raises(ValueError):
        sweep.fold_errors[0, 0] = 1.0


def test_the_export_is_strict_json_with_one_row_per_C():
    X, y = pilot_batch()
    sweep = run_sweep(X, y, FitConfig(), SMALL)
    data = json.loads(json.dumps(sweep.to_dict(), allow_nan=False))
    assert len(data["steps"]) == 5 and data["suggestion"]["best_C"] in sweep.C


def test_hard_margin_in_the_base_settings_is_ignored_by_the_sweep():
    X, y = pilot_batch()
    sweep = run_sweep(X, y, FitConfig(hard_margin=True), SweepSettings(steps=2, folds=2))
    assert not sweep.config.hard_margin and np.isfinite(sweep.margin_width).all()
