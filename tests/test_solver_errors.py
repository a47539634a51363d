"""Bad input is refused with one exception family and a message a stranger can act on."""

import math

import numpy as np
import pytest

from solver import (ConvergenceError, FitConfig, InputError, NotSeparableError,
                    SlacklineError, SolverOptions, fit)

X4 = [[0, 0], [1, 0], [0, 3], [1, 3]]
Y4 = [-1, -1, 1, 1]


def test_one_point_is_refused():
    with pytest.raises(InputError, match="at least two points"):
        fit([[0, 0]], [1])


def test_one_class_only_says_which_is_missing():
    with pytest.raises(InputError, match="no point has label -1"):
        fit(X4, [1, 1, 1, 1])


def test_nan_coordinates_name_the_point():
    X = np.array(X4, dtype=float)
    X[2, 1] = math.nan
    with pytest.raises(InputError, match=r"NaN or infinity in point\(s\) 2"):
        fit(X, Y4)


def test_infinite_coordinates_are_refused():
    X = np.array(X4, dtype=float)
    X[0, 0] = math.inf
    with pytest.raises(InputError, match="finite"):
        fit(X, Y4)


@pytest.mark.parametrize("C", [0, -1, math.nan, math.inf, "big"])
def test_C_must_be_a_positive_number(C):
    with pytest.raises(InputError, match="C must be a positive number.* or 'hard'"):
        FitConfig(C=C)


@pytest.mark.parametrize("gamma", [0, -0.5, math.nan])
def test_gamma_must_be_positive(gamma):
    with pytest.raises(InputError, match="gamma must be a positive number"):
        FitConfig(kernel="rbf", gamma=gamma)


@pytest.mark.parametrize("degree", [0, 2.5, -1, "three"])
def test_degree_must_be_a_positive_whole_number(degree):
    with pytest.raises(InputError, match="degree must be a whole number"):
        FitConfig(kernel="polynomial", degree=degree)


def test_unknown_kernel_lists_the_known_ones():
    with pytest.raises(InputError, match="linear, polynomial, rbf"):
        FitConfig(kernel="sigmoid")


def test_class_weight_must_be_positive():
    with pytest.raises(InputError, match="weight_negative"):
        FitConfig(weight_negative=0)


def test_hard_margin_on_non_separable_points_says_so():
    X = [[0, 0], [1, 1], [2, 2], [3, 3]]
    with pytest.raises(NotSeparableError, match="not linearly separable; use a finite C"):
        fit(X, [-1, 1, -1, 1], FitConfig(hard_margin=True))


def test_hard_margin_rbf_with_one_spot_carrying_both_labels_says_so():
    X = [[0, 0], [0, 0], [2, 2], [3, 1]]
    with pytest.raises(NotSeparableError, match="same coordinates"):
        fit(X, [-1, 1, 1, -1], FitConfig(hard_margin=True, kernel="rbf"))


def test_all_points_identical_is_refused():
    with pytest.raises(InputError, match="same coordinates"):
        fit([[1, 2]] * 4, Y4)


def test_labels_other_than_plus_and_minus_one_are_refused():
    with pytest.raises(InputError, match="labels must be \\+1 or -1"):
        fit(X4, [0, 0, 1, 1])


def test_points_must_have_two_coordinates():
    with pytest.raises(InputError, match="n x 2"):
        fit([[0, 0, 0], [1, 1, 1]], [-1, 1])


def test_one_label_per_point():
    with pytest.raises(InputError, match="one label per point"):
        fit(X4, [-1, 1])


def test_a_solver_that_runs_out_of_iterations_says_so_and_keeps_its_figures():
    rng = np.random.default_rng(0)
    X = np.vstack([rng.normal(0, 1, (30, 2)), rng.normal(1, 1, (30, 2))])
    y = np.r_[-np.ones(30), np.ones(30)]
    config = FitConfig(C=1.0, options=SolverOptions(max_iterations=2))
    with pytest.raises(ConvergenceError, match="without reaching its tolerance") as caught:
        fit(X, y, config)
    assert caught.value.best is not None
    assert not caught.value.best.converged


def test_every_refusal_belongs_to_one_family():
    for error in (InputError, NotSeparableError, ConvergenceError):
        assert issubclass(error, SlacklineError)
