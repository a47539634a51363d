"""The polynomial kernel k(x, z) = (gamma x.z + offset)^degree and its exact feature map."""

from __future__ import annotations

from math import factorial, sqrt

import numpy as np

from solver.kernels.base import Kernel


def exponents(degree: int) -> list[tuple[int, int, int]]:
    """All (i, j, k) with i + j + k = degree: (p+1)(p+2)/2 of them."""
    return [(i, j, degree - i - j) for i in range(degree + 1) for j in range(degree + 1 - i)]


def _multinomial(degree: int, i: int, j: int, k: int, offset: float) -> float:
    return sqrt(factorial(degree) / (factorial(i) * factorial(j) * factorial(k)) * offset ** k)


def feature_map(X: np.ndarray, gamma: float, degree: int, offset: float) -> np.ndarray:
    """phi(x) with phi(x).phi(z) = (gamma x.z + offset) ** degree exactly.

    Multinomial expansion with u = sqrt(gamma) x:
      (u1 v1 + u2 v2 + c)^p = sum_{i+j+k=p} p!/(i! j! k!) (u1 v1)^i (u2 v2)^j c^k,
    so phi_ijk(u) = sqrt(p!/(i! j! k!) c^k) u1^i u2^j.
    """
    U = np.sqrt(gamma) * X
    columns = []
    for i, j, k in exponents(degree):
        coefficient = _multinomial(degree, i, j, k, offset)
        if coefficient == 0.0:
            continue  # offset = 0 drops every term with k > 0
        columns.append(coefficient * U[:, 0] ** i * U[:, 1] ** j)
    return np.column_stack(columns)


def monomials(model: dict) -> tuple[list[list[int]], list[float]]:
    """The polynomial f - b as coefficients of u1^i u2^j.

    The primal ran on phi_ijk(u) = sqrt(p!/(i! j! k!) c^k) (sqrt(gamma) u1)^i
    (sqrt(gamma) u2)^j over i + j + k = p, so the weight w_ijk contributes
    w_ijk sqrt(p!/(i! j! k!) c^k) gamma^((i+j)/2) to u1^i u2^j.
    """
    p, c, gamma = model["degree"], model["offset"], model["gamma"]
    weights = iter(model["feature_weights"])
    powers, coefficients = [], []
    for i, j, k in exponents(p):
        multinomial = _multinomial(p, i, j, k, c)
        if multinomial == 0.0:
            continue  # feature_map drops these columns (offset = 0)
        powers.append([i, j])
        coefficients.append(float(next(weights) * multinomial * gamma ** ((i + j) / 2)))
    return powers, coefficients


def _gram(A, B, settings):
    return (settings.gamma * (A @ B.T) + settings.offset) ** settings.degree


def _features(X, settings):
    return feature_map(X, settings.gamma, int(settings.degree), settings.offset)


def _terms(model: dict) -> dict:
    powers, coefficients = monomials(model)
    return {"gamma": model["gamma"], "degree": model["degree"], "offset": model["offset"],
            "powers": powers, "coefficients": coefficients}


KERNEL = Kernel(
    name="polynomial", title="polynomial", parameters=("gamma", "degree", "offset"),
    help="k(x, z) = (gamma x.z + offset)^degree: a boundary that is a polynomial curve "
         "of the given degree",
    gram=_gram, feature_map=_features, export_terms=_terms,
    formula="polynomial: f(x) = b + sum_t coefficients[t] * u1**powers[t][0] * "
            "u2**powers[t][1]")
