"""The lattice field of kernel fits (solver/field.py), kept up to date column by column.

Every value is checked against the Gaussian expansion written out with
scikit-learn's own kernel (``sklearn.metrics.pairwise.rbf_kernel``) on the
model's support vectors and coefficients: f(x) = sum_j c_j exp(-gamma |s - s_j|^2) + b,
s the scaled point.  Data: the Wisconsin diagnostic breast-cancer set that
scikit-learn ships (``load_breast_cancer``; Street, Wolberg & Mangasarian 1993,
UCI repository), features "mean radius" and "mean texture".
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from sklearn.datasets import load_breast_cancer
from sklearn.metrics.pairwise import rbf_kernel

from solver import FitConfig, compute_path, fit
from solver import field as field_module
from solver.field import ExpansionField
from solver.model import DecisionModel


def _expansion(model, points):
    scaled = (np.asarray(points, dtype=float) - model.shift) / model.scale
    return rbf_kernel(scaled, model.support_vectors, gamma=model.gamma) @ model.coefficients \
        + model.b


def _lattice(X, size=40):
    lo, hi = X.min(axis=0), X.max(axis=0)
    gx, gy = np.meshgrid(np.linspace(lo[0], hi[0], size), np.linspace(lo[1], hi[1], size))
    return np.column_stack([gx.ravel(), gy.ravel()])


@pytest.fixture(scope="module")
def cancer_path():
    data = load_breast_cancer()
    X = data.data[:, :2]                     # mean radius, mean texture
    y = np.where(data.target == 1, 1, -1)
    return X, compute_path(X, y, FitConfig(kernel="rbf", gamma=0.5, scaling="zscore"),
                           c_from=0.05, c_to=20.0)


def _counting(monkeypatch):
    """The number of kernel columns each call to ExpansionField.values computes."""
    counts = []
    original = field_module._expansion

    def counted(model, scaled, vectors, weights):
        counts[-1] += len(vectors)
        return original(model, scaled, vectors, weights)

    monkeypatch.setattr(field_module, "_expansion", counted)
    return counts


def test_steps_along_the_c_path_match_the_written_out_expansion(cancer_path, monkeypatch):
    X, path = cancer_path
    points = _lattice(X)
    counts = _counting(monkeypatch)
    field = ExpansionField()
    # down the slider, back up, and a jump: every value as the expansion gives it
    Cs = list(np.geomspace(2.0, 0.2, 30)) + list(np.geomspace(0.2, 2.0, 12)) + [15.0, 0.06]
    for C in Cs:
        model = path.evaluate(C).model
        counts.append(0)
        values = field.values(model, points)
        reference = _expansion(model, points)
        np.testing.assert_allclose(values, reference, rtol=0,
                                   atol=1e-12 * max(1.0, np.abs(reference).max()))
    support = [len(path.evaluate(C).model.coefficients) for C in Cs]
    # the small steps reuse the kept sums: a few columns each where a whole evaluation
    # takes one per support vector (the first step, and the jumps, take them all)
    small = counts[1:30]
    assert counts[0] >= support[0]
    assert max(small) < 0.5 * min(support[1:30])
    assert np.median(small) < 0.2 * np.median(support[1:30])


def test_points_sharing_coordinates_count_once_each():
    # two support vectors on the same spot, both at the bound; then one of them leaves
    # the bound: the kept sum must lose one column, not both (a multiset, not a set)
    rng = np.random.default_rng(3)
    S = rng.normal(size=(12, 2))
    S[5] = S[4]
    c = np.r_[np.full(6, 0.8), np.full(6, -0.8)]
    base = DecisionModel("rbf", 1.5, 3, 1.0, np.zeros(2), np.ones(2), 0.1,
                         support_vectors=S, coefficients=c)
    later = dataclasses.replace(base, coefficients=np.r_[0.8, 0.8, 0.8, 0.8, 0.8, 0.3,
                                                         np.full(6, -0.8)])
    gone = dataclasses.replace(base, support_vectors=np.delete(S, 4, axis=0),
                               coefficients=np.delete(c, 4))
    points = rng.normal(size=(200, 2))
    field = ExpansionField()
    for model in (base, later, base, gone, later):
        np.testing.assert_allclose(field.values(model, points), _expansion(model, points),
                                   rtol=0, atol=1e-13)


def test_new_points_kernel_or_scaling_start_afresh(cancer_path, monkeypatch):
    X, path = cancer_path
    model = path.evaluate(1.0).model
    points = _lattice(X)
    counts = _counting(monkeypatch)
    field = ExpansionField()
    # one thing changes at a time: the points, gamma, the shift, the scale
    wider = dataclasses.replace(model, gamma=0.6)
    shifted = dataclasses.replace(wider, shift=model.shift + 0.1)
    scaled = dataclasses.replace(shifted, scale=model.scale * 1.1)
    changed = [(model, points), (model, points + 0.01), (wider, points + 0.01),
               (shifted, points + 0.01), (scaled, points + 0.01)]
    for m, p in changed:
        counts.append(0)
        np.testing.assert_allclose(field.values(m, p), _expansion(m, p), rtol=0, atol=1e-11)
    assert all(count >= len(model.coefficients) for count in counts)


def test_the_kept_sums_are_rebuilt_every_refresh_updates(cancer_path, monkeypatch):
    X, path = cancer_path
    points = _lattice(X, 10)
    counts = _counting(monkeypatch)
    field = ExpansionField()
    Cs = np.geomspace(1.0, 0.9, field_module.REFRESH + 2)
    for C in Cs:
        counts.append(0)
        field.values(path.evaluate(C).model, points)
    full = len(path.evaluate(Cs[-1]).model.coefficients)
    rebuilt = [k for k, count in enumerate(counts) if count >= 0.5 * full]
    assert rebuilt[0] == 0 and field_module.REFRESH + 1 in rebuilt


def test_linear_fits_go_straight_to_their_weights():
    rng = np.random.default_rng(8)
    X = rng.normal(size=(60, 2))
    y = np.where(X[:, 0] > 0, 1, -1)
    result = fit(X, y, FitConfig(kernel="linear", C=1.0))
    points = rng.normal(size=(30, 2))
    np.testing.assert_allclose(ExpansionField().values(result.model, points),
                               points @ result.w + result.b, rtol=0, atol=1e-12)
