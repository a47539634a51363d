"""Alphas that the solver's accuracy cannot tell from 0 or C_i are exactly 0 or C_i.

Source: the KKT conditions of the soft-margin dual (written out here, common
practice, no source): a point strictly outside the band has alpha_i = 0, a
point strictly inside the band or across the boundary has alpha_i = C_i.
The data is the iris set shipped by scikit-learn (Fisher 1936, UCI
repository): versicolor against virginica on petal length and width, which
overlap, so every status occurs.
"""

import numpy as np
import pytest
from sklearn.datasets import load_iris

from solver import FitConfig, fit
from solver.result import INSIDE, MISCLASSIFIED, OUTSIDE


def _iris_overlapping():
    iris = load_iris()
    keep = iris.target > 0
    return iris.data[keep][:, 2:4], np.where(iris.target[keep] == 2, 1, -1)


CONFIGS = {"linear": FitConfig(C=1.0),
           "polynomial": FitConfig(C=1.0, kernel="polynomial", gamma=0.5, degree=2, offset=1.0),
           "rbf": FitConfig(C=1.0, kernel="rbf", gamma=0.7)}


@pytest.mark.parametrize("name", sorted(CONFIGS))
def test_points_outside_the_margin_have_alpha_exactly_zero(name):
    X, y = _iris_overlapping()
    result = fit(X, y, CONFIGS[name])
    outside = result.status == OUTSIDE
    assert outside.any()
    assert np.all(result.alpha[outside] == 0.0)


@pytest.mark.parametrize("name", sorted(CONFIGS))
def test_points_inside_the_margin_or_misclassified_have_alpha_exactly_C_i(name):
    X, y = _iris_overlapping()
    result = fit(X, y, CONFIGS[name])
    bound = np.isin(result.status, (INSIDE, MISCLASSIFIED)) & (result.alpha > 0)
    assert bound.any()
    assert np.all(result.alpha[bound] == result.penalties[bound])


@pytest.mark.parametrize("name", sorted(CONFIGS))
def test_support_vectors_are_exactly_the_points_with_nonzero_alpha(name):
    X, y = _iris_overlapping()
    result = fit(X, y, CONFIGS[name])
    assert np.array_equal(result.support, np.flatnonzero(result.alpha != 0.0))


def test_fit_json_and_the_points_export_write_the_same_exact_alphas(tmp_path, capsys):
    import csv
    import json

    from cli.main import main
    X, y = _iris_overlapping()
    table = tmp_path / "iris.csv"
    table.write_text("petal length,petal width,class\n"
                     + "".join(f"{a},{b},{'virginica' if s > 0 else 'versicolor'}\n"
                               for (a, b), s in zip(X, y)))
    experiment = tmp_path / "iris.experiment.json"
    assert main(["fit", str(table), "--positive", "virginica", "--json",
                 "--save", str(experiment)]) == 0
    figures = json.loads(capsys.readouterr().out)
    alpha, status = np.array(figures["alpha"]), np.array(figures["status"])
    assert np.all(alpha[status == OUTSIDE] == 0.0)
    points = tmp_path / "points.csv"
    assert main(["export", str(experiment), "--points", str(points)]) == 0
    rows = list(csv.DictReader(points.open()))
    exported = np.array([float(row["alpha"]) for row in rows])
    assert np.array_equal(exported, alpha)


def test_a_kernel_fits_small_free_alphas_stay_in_its_model_and_its_alphas():
    # C = 1e4, gamma 100 on standardised rings (scikit-learn's make_circles): many free
    # support vectors carry alphas near 2e-6 C.  The kernel dual puts alphas exactly on
    # their bounds, so these are free, not 0: f written out from the reported alphas,
    # f(x) = sum_j alpha_j y_j exp(-gamma |x - x_j|^2) + b, and from the model must both
    # be the fit's decision values (sqrt(gap) took them for 0: f off by 0.06)
    from sklearn.datasets import make_circles
    X, labels = make_circles(1000, noise=0.15, factor=0.5, random_state=0)
    X = (X - X.mean(axis=0)) / X.std(axis=0)
    y = np.where(labels == 1, 1, -1)
    result = fit(X, y, FitConfig(C=1e4, kernel="rbf", gamma=100.0))
    small = (result.alpha > 0) & (result.alpha < 1e-4 * 1e4)
    assert small.any()
    squared = ((X[:, None, :] - X[None, :, :]) ** 2).sum(axis=2)
    written_out = np.exp(-100.0 * squared) @ (result.alpha * y) + result.b
    np.testing.assert_allclose(written_out, result.decision, atol=1e-9)
    np.testing.assert_allclose(result.decision_function(X), result.decision, atol=1e-9)
    assert abs(float(result.alpha @ y)) <= 1e-9 * result.alpha.sum()
