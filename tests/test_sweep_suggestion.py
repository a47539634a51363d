"""The suggested C: lowest CV error and the one-standard-error rule."""

import math

import numpy as np
import pytest

from solver.config import FitConfig
from solver.result import STATUSES
from solver.study.sweep_result import SweepResult


def sweep_with_fold_errors(C, fold_errors):
    """A SweepResult holding only hand-made fold errors (the other curves are NaN)."""
    nan = np.full(len(C), np.nan)
    return SweepResult(config=FitConfig(), C=np.array(C, float), folds=len(fold_errors[0]),
                       seed=0, fingerprint="test", n_points=10, margin_width=nan,
                       n_support=nan, counts={s: nan for s in STATUSES}, training_error=nan,
                       half_norm_w2=nan, penalty_term=nan, fold_errors=np.array(fold_errors),
                       failures=(), cancelled=False, seconds=0.0, planned_steps=len(C))


def test_one_standard_error_range_runs_both_ways_from_the_best_C():
    # derivation by hand, 4 folds each:
    #   C=1:   [.2, .3, .2, .3]  mean .25, std (ddof 1) = sqrt(4 * .05**2 / 3) = .057735,
    #          SE = .057735 / sqrt(4) = .028868, threshold .25 + .028868 = .278868
    #   C=0.1: [.4, .4, .4, .4]  mean .40  (outside the threshold)
    #   C=10:  [.25, .25, .3, .25] mean .2625 (within)
    #   C=100: [.3, .3, .3, .3]  mean .30  (outside)
    sweep = sweep_with_fold_errors([0.1, 1, 10, 100], [[.4, .4, .4, .4], [.2, .3, .2, .3],
                                                       [.25, .25, .3, .25], [.3, .3, .3, .3]])
    s = sweep.suggestion
    assert s.best_C == 1 and s.best_error == pytest.approx(0.25)
    assert s.threshold == pytest.approx(0.278868, abs=1e-6)
    # the one-standard-error rule: Hastie, Tibshirani & Friedman, The Elements of
    # Statistical Learning, 2nd ed., sec. 7.10 (the range runs to larger C as well)
    assert s.largest_C_within_one_se == 10
    assert s.smallest_C_within_one_se == 1   # nothing smaller is within: 0.40 > 0.2789


def test_a_tie_for_the_lowest_error_goes_to_the_smaller_C():
    # derivation: C=1 and C=10 both average 0.25; the more regularised (smaller C) is named
    sweep = sweep_with_fold_errors([1, 10], [[.2, .3], [.3, .2]])
    assert sweep.suggestion.best_C == 1


def test_a_C_with_a_failed_fold_takes_no_part_in_the_suggestion():
    sweep = sweep_with_fold_errors([1, 10], [[0.0, math.nan], [.3, .2]])
    assert sweep.suggestion.best_C == 10


def test_a_sweep_where_every_fit_failed_has_no_suggestion():
    sweep = sweep_with_fold_errors([1, 10], [[math.nan, math.nan], [math.nan, math.nan]])
    assert sweep.suggestion is None


def test_cv_at_finds_a_swept_C_and_nothing_off_the_grid():
    sweep = sweep_with_fold_errors([0.1, 1.0], [[.1, .3], [.2, .2]])
    assert sweep.cv_at(1.0).error == pytest.approx(0.2)
    assert sweep.cv_at(0.5) is None and sweep.nearest_C(0.5) == 1.0
