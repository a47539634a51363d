"""f on a lattice (DecisionModel.grid_values): a Gaussian expansion factored along the axes.

Every value is checked against the expansion written out with scikit-learn's
own kernel (``sklearn.metrics.pairwise.rbf_kernel``) on the model's support
vectors and coefficients, point by point: f(x) = sum_j c_j exp(-gamma |s - s_j|^2) + b,
s the scaled point.  Data: the Wisconsin diagnostic breast-cancer set that
scikit-learn ships (``load_breast_cancer``; Street, Wolberg & Mangasarian 1993,
UCI repository), features "mean radius" and "mean texture", on the exact C path
as the window's slider evaluates it.
"""

from __future__ import annotations

import numpy as np
import pytest
from sklearn.datasets import load_breast_cancer
from sklearn.metrics.pairwise import rbf_kernel

from app.canvas import geometry
from solver import FitConfig, compute_path, fit
from solver import model as model_module


def _written_out(model, xs, ys):
    gx, gy = np.meshgrid(xs, ys)
    points = np.column_stack([gx.ravel(), gy.ravel()])
    scaled = (points - model.shift) / model.scale
    values = rbf_kernel(scaled, model.support_vectors, gamma=model.gamma) @ model.coefficients
    return (values + model.b).reshape(len(ys), len(xs))


@pytest.fixture(scope="module")
def cancer():
    data = load_breast_cancer()
    X = data.data[:, :2]                     # mean radius, mean texture
    return X, np.where(data.target == 1, 1, -1)


@pytest.mark.parametrize("scaling", ["zscore", "none"])
def test_the_factored_lattice_is_the_expansion_point_by_point(cancer, scaling):
    X, y = cancer
    gamma = 0.5 if scaling == "zscore" else 0.05
    path = compute_path(X, y, FitConfig(kernel="rbf", gamma=gamma, scaling=scaling),
                        c_from=0.05, c_to=20.0)
    lo, hi = X.min(axis=0), X.max(axis=0)
    xs, ys = np.linspace(lo[0], hi[0], 37), np.linspace(lo[1], hi[1], 23)   # not square
    for C in (0.06, 0.3, 1.0, 4.0, 19.0):
        model = path.evaluate(C).model
        reference = _written_out(model, xs, ys)
        np.testing.assert_allclose(model.grid_values(xs, ys), reference, rtol=0,
                                   atol=1e-12 * max(1.0, np.abs(reference).max()))


def test_blocks_of_support_vectors_add_up(cancer, monkeypatch):
    X, y = cancer
    result = fit(X, y, FitConfig(kernel="rbf", gamma=2.0, C=10.0, scaling="zscore"))
    xs, ys = np.linspace(8, 26, 30), np.linspace(10, 38, 31)
    whole = result.decision_grid(xs, ys)
    monkeypatch.setattr(model_module, "BLOCK_ENTRIES", 7 * (len(xs) + len(ys)))  # 7 a block
    np.testing.assert_allclose(result.decision_grid(xs, ys), whole, rtol=0, atol=1e-12)
    np.testing.assert_allclose(whole, _written_out(result.model, xs, ys), rtol=0, atol=1e-11)


def test_a_far_lattice_reads_b_with_no_warning(cancer):
    import warnings
    X, y = cancer
    result = fit(X, y, FitConfig(kernel="rbf", gamma=1.0, C=1.0, scaling="zscore"))
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        values = result.decision_grid(np.linspace(1e200, 1e201, 5), np.linspace(-1e300, 0, 4))
    np.testing.assert_array_equal(values, np.full((4, 5), result.b))


def test_other_models_go_point_by_point():
    rng = np.random.default_rng(8)
    X = rng.normal(size=(60, 2))
    y = np.where(X[:, 0] + X[:, 1] ** 2 > 0.5, 1, -1)
    xs, ys = np.linspace(-2, 2, 9), np.linspace(-1, 3, 7)
    gx, gy = np.meshgrid(xs, ys)
    points = np.column_stack([gx.ravel(), gy.ravel()])
    for config in (FitConfig(kernel="linear"), FitConfig(kernel="polynomial", degree=3)):
        result = fit(X, y, config)
        np.testing.assert_allclose(result.decision_grid(xs, ys),
                                   result.decision_function(points).reshape(7, 9),
                                   rtol=0, atol=1e-12)


def test_the_window_lattice_comes_from_the_fit(cancer):
    X, y = cancer
    result = fit(X, y, FitConfig(kernel="rbf", gamma=0.5, C=1.0, scaling="zscore"))
    rect = geometry.padded_bounds(X)
    xs, ys, values = geometry.lattice_of(result, rect)
    assert values.shape == (geometry.KERNEL_GRID, geometry.KERNEL_GRID)
    np.testing.assert_allclose(values, _written_out(result.model, xs, ys), rtol=0, atol=1e-11)
