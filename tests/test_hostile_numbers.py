"""Extreme but finite numbers: a correct answer or a refusal that says what to change,
never a traceback (issue 10, class 1).  Both sides of every limit in solver/limits.py
and solver/parameters.py."""

import numpy as np
import pytest
from sklearn.svm import SVC

from demo_data import pilot_batch
from hostile_cli import data_csv, refused, resealed, scaled_csv  # noqa: F401
from solver import FitConfig, InputError, fit


# -- settings: the declared ranges ---------------------------------------------------
@pytest.mark.parametrize("option, value, match", [
    ("--C", "1e300", r"C must be a positive number from 1e-09 to 1e\+12"),
    ("--C", "1.01e12", r"C must be a positive number from 1e-09 to 1e\+12"),
    ("--C", "9.9e-10", r"C must be a positive number from 1e-09"),
    ("--gamma", "1e300", r"gamma must be a positive number from 1e-09 to 1e\+09"),
    ("--gamma", "1e-300", r"gamma must be a positive number from 1e-09"),
    ("--offset", "1e300", r"offset must be a number from 0 to 1e\+09"),
    ("--offset", "1.01e9", r"offset must be a number from 0 to 1e\+09"),
    ("--degree", "11", r"degree must be a whole number from 1 to 10"),
    ("--weight", "pass=1e300", r"weight_positive must be a positive number from 1e-06 to 1e\+06"),
    ("--weight", "fail=9e-7", r"weight_negative must be a positive number from 1e-06"),
])
def test_a_setting_beyond_its_declared_range_is_refused_with_the_range(capsys, data_csv,
                                                                       option, value, match):
    kernel = "rbf" if option == "--gamma" else "polynomial"
    refused(capsys, ["fit", data_csv, "--positive", "pass", "--kernel", kernel,
                     option, value], [data_csv], match)


@pytest.mark.parametrize("settings", [
    dict(C=1e-9), dict(C=1e12), dict(kernel="rbf", gamma=1e-9), dict(kernel="rbf", gamma=1e9),
    dict(kernel="polynomial", offset=1e9), dict(kernel="polynomial", degree=10),
    dict(weight_positive=1e-6), dict(weight_negative=1e6)])
def test_a_setting_at_the_edge_of_its_range_is_accepted(settings):
    assert FitConfig(**settings)


# -- data: size, spread, and C times the kernel's size ------------------------------------
def test_coordinates_beyond_1e100_are_refused(capsys, tmp_path):
    path = scaled_csv(tmp_path, "big.csv", 1e300)
    refused(capsys, ["fit", path, "--positive", "pass", "--scale", "zscore"], [path],
            r"coordinates reach .*e\+300; Slackline fits coordinates up to 1e\+100")


def test_subnormal_coordinates_are_refused_as_rounding_noise(capsys, tmp_path):
    path = scaled_csv(tmp_path, "sub.csv", 1e-310)
    refused(capsys, ["fit", path, "--positive", "pass", "--scale", "zscore"], [path],
            r"varies by only .*e-310.*express it in smaller units")


def test_a_feature_that_varies_by_less_than_a_float_resolves_is_refused(capsys, tmp_path):
    path = scaled_csv(tmp_path, "flat.csv", 1e-3, shift=1e12)   # relative spread ~ 1e-15
    refused(capsys, ["fit", path, "--positive", "pass", "--scale", "zscore"], [path],
            r"varies by only .*subtract a common value first")


def test_large_coordinates_without_scaling_are_refused_with_the_fix(capsys, tmp_path):
    path = scaled_csv(tmp_path, "b12.csv", 1e12)
    refused(capsys, ["fit", path, "--positive", "pass"], [path],
            r"C times the largest kernel value .* 1e25, more than the solver resolves "
            r"\(1e\+12\); scale the features \(--scale zscore\) or choose C at most 1e-1\d")


def test_tiny_C_on_small_coordinates_is_refused_with_the_fix(capsys, tmp_path):
    path = scaled_csv(tmp_path, "small.csv", 1e-3)
    refused(capsys, ["fit", path, "--positive", "pass", "--C", "1e-6"], [path],
            r"less than the solver resolves \(1e-09\); .* choose C at least 1e-")


def test_degree_10_on_large_data_is_refused_as_too_large_a_kernel(capsys, tmp_path):
    path = scaled_csv(tmp_path, "b30.csv", 1e30)
    refused(capsys, ["fit", path, "--positive", "pass", "--kernel", "polynomial",
                     "--degree", "10"], [path],
            r"the polynomial kernel reaches about 1e6\d\d on these points")


def test_a_large_offset_that_makes_the_kernel_huge_is_refused(capsys, data_csv):
    refused(capsys, ["fit", data_csv, "--positive", "pass", "--kernel", "polynomial",
                     "--offset", "1e9"], [data_csv], r"C times the largest kernel value")


def _reference(X, y, C):
    """scikit-learn's SVC at tol=1e-10 on the same points (the outside reference)."""
    svc = SVC(kernel="linear", C=C, tol=1e-10).fit(X, y)
    return svc.coef_[0], svc.intercept_[0]


@pytest.mark.parametrize("size", [1e-90, 1e-40, 1e40, 1e99])
def test_extreme_but_allowed_coordinates_give_the_answer_of_unit_sized_ones(size):
    # zscore scaling makes the fit independent of the units: w scales by 1/size, b not
    data = pilot_batch()
    X = np.asarray(data.X)
    exact = fit(X, data.y, FitConfig(scaling="zscore"))
    scaled = fit(X * size, data.y, FitConfig(scaling="zscore"))
    np.testing.assert_allclose(scaled.w * size, exact.w, rtol=1e-7)
    assert scaled.b == pytest.approx(exact.b, rel=1e-7, abs=1e-9)
    Xs = (X - X.mean(0)) / X.std(0)
    w_ref, b_ref = _reference(Xs, data.y, 1.0)
    np.testing.assert_allclose(scaled.model.feature_weights, w_ref, rtol=1e-5, atol=1e-6)


def test_C_at_the_upper_effective_limit_still_solves_to_a_certified_optimum():
    # derivation: a feasible primal and a feasible dual whose objectives agree to a
    # relative 1e-9 bracket the optimum (weak duality), so the fit is optimal to that
    # accuracy; SVC itself does not finish at this C, so it cannot be the reference here
    data = pilot_batch()
    X = (np.asarray(data.X) - 2.6) / 5.0       # |x|^2 <= ~1 so C = 1e11 is within 1e12
    result = fit(X, data.y, FitConfig(C=1e11))
    assert result.converged
    assert abs(result.primal_objective - result.dual_objective) <= \
        1e-9 * abs(result.primal_objective)
    assert np.all(result.alpha >= 0) and np.all(result.alpha <= 1e11 * (1 + 1e-9))
    assert abs(result.alpha @ data.y) <= 1e-9 * result.alpha.sum()


def test_C_at_the_lower_limit_puts_every_alpha_at_its_bound():
    # derivation: for C -> 0 the slack of every point is positive, so alpha_i = C_i
    data = pilot_batch()
    result = fit(np.asarray(data.X) / 5.0, data.y, FitConfig(C=1e-8))
    np.testing.assert_allclose(result.alpha, 1e-8, rtol=1e-6)


# -- experiment files carrying extreme numbers -------------------------------------
@pytest.fixture
def sealed(tmp_path):
    from hostile_cli import write_experiment
    return write_experiment(tmp_path)


@pytest.mark.parametrize("command", ["check", "export", "render"])
def test_an_experiment_with_C_1e300_is_refused_by_every_command(capsys, sealed, tmp_path,
                                                               command):
    resealed(sealed, lambda d: d["config"].update(C=1e300))
    argv = {"check": ["check", sealed], "export": ["export", sealed, "--points",
                                                   tmp_path / "p.csv"],
            "render": ["render", sealed, "-o", tmp_path / "r.png"]}[command]
    refused(capsys, argv, [sealed], r"not a valid experiment file", problems=True)


@pytest.mark.parametrize("command", ["check", "export", "render"])
def test_an_experiment_with_points_at_1e300_is_refused_with_the_limit(capsys, sealed, tmp_path,
                                                                     command):
    def far(document):
        document["points"][0]["x"] = [1e300, -1e300]
    resealed(sealed, far)
    argv = {"check": ["check", sealed], "render": ["render", sealed, "-o", tmp_path / "r.png"],
            "export": ["export", sealed, "--points", tmp_path / "p.csv"]}
    refused(capsys, argv[command], [sealed], r"not a valid experiment file", problems=True)
    from cli.main import main
    main([str(a) for a in argv[command]])
    assert "/points/0/x: coordinates beyond 1e+100" in capsys.readouterr().err
    assert not (tmp_path / "p.csv").exists()


def test_a_non_finite_figure_becomes_null_with_a_field_that_says_why():
    from cli.outputs import strict
    clean, replaced = strict({"a": [1.0, float("inf")], "b": {"c": float("nan")}})
    assert clean == {"a": [1.0, None], "b": {"c": None}}
    assert replaced == {"/a/1": "infinity", "/b/c": "not a number"}


def test_config_refuses_an_integer_beyond_any_float_without_overflowing():
    with pytest.raises(InputError, match="C must be a positive number"):
        FitConfig(C=10 ** 400)


def test_rbf_points_far_from_the_origin_for_their_spread_are_refused(capsys, tmp_path):
    path = scaled_csv(tmp_path, "far.csv", 1.0, shift=1e12)
    refused(capsys, ["fit", path, "--positive", "pass", "--kernel", "rbf"], [path],
            r"the points lie about 1e\+12 from the origin but spread over only .* rounding "
            r"noise; scale the features")


def test_rbf_points_off_centre_by_less_than_the_limit_match_the_centred_fit():
    # the RBF kernel depends only on differences (translation invariance), so moving
    # every point by the same vector changes nothing; derivation, no reference needed
    data = pilot_batch()
    X = np.asarray(data.X)
    centred = fit(X, data.y, FitConfig(kernel="rbf", gamma=0.5))
    moved = fit(X + 1e3, data.y, FitConfig(kernel="rbf", gamma=0.5))   # 1e3 / ~4 < 1e4
    np.testing.assert_allclose(moved.decision, centred.decision, rtol=1e-5, atol=1e-5)
