"""Kernels and the exact polynomial feature map in two variables."""

from __future__ import annotations

from math import factorial, sqrt

import numpy as np


def rbf_matrix(A: np.ndarray, B: np.ndarray, gamma: float) -> np.ndarray:
    """K_ij = exp(-gamma |a_i - b_j|^2).

    |a - b|^2 = [a, |a|^2, 1] . [-2b, 1, |b|^2]: one matrix product with
    inner dimension 4 builds all squared distances (faster here than
    coordinate differences, which make two n x m temporaries).
    """
    A_ext = np.column_stack([A, (A * A).sum(1), np.ones(len(A))])
    B_ext = np.column_stack([-2.0 * B, np.ones(len(B)), (B * B).sum(1)])
    sq = A_ext @ B_ext.T
    np.maximum(sq, 0.0, out=sq)           # rounding can dip just below zero
    sq *= -gamma
    return np.exp(sq, out=sq)


def poly_exponents(degree: int) -> list[tuple[int, int, int]]:
    """All (i, j, k) with i + j + k = degree: (p+1)(p+2)/2 of them."""
    return [(i, j, degree - i - j) for i in range(degree + 1) for j in range(degree + 1 - i)]


def poly_feature_map(X: np.ndarray, gamma: float, degree: int, offset: float) -> np.ndarray:
    """phi(x) with phi(x).phi(z) = (gamma x.z + offset) ** degree exactly.

    Multinomial expansion with u = sqrt(gamma) x:
      (u1 v1 + u2 v2 + c)^p = sum_{i+j+k=p} p!/(i! j! k!) (u1 v1)^i (u2 v2)^j c^k,
    so phi_ijk(u) = sqrt(p!/(i! j! k!) c^k) u1^i u2^j.
    """
    U = np.sqrt(gamma) * X
    columns = []
    for i, j, k in poly_exponents(degree):
        coefficient = sqrt(factorial(degree) / (factorial(i) * factorial(j) * factorial(k))
                           * offset ** k)
        if coefficient == 0.0:
            continue  # offset = 0 drops every term with k > 0
        columns.append(coefficient * U[:, 0] ** i * U[:, 1] ** j)
    return np.column_stack(columns)


def feature_map(X: np.ndarray, kernel: str, gamma: float, degree: int, offset: float):
    """Explicit features for the primal solver (linear: the points themselves)."""
    if kernel == "linear":
        return X
    return poly_feature_map(X, gamma, degree, offset)
