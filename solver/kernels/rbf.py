"""The Gaussian (RBF) kernel k(x, z) = exp(-gamma |x - z|^2); no finite feature map."""

from __future__ import annotations

import numpy as np

from solver.kernels.base import Kernel
from solver.kernels.rbf_core import UNDERFLOW, rbf_block
from solver.limits import COORDINATE
from solver.parameters import PARAMETERS

# up to these, -gamma |a - b|^2 is finite, as the compiled exp assumes (fits never exceed them)
GAMMA = PARAMETERS["gamma"].high


def _compiled_safe(points) -> bool:
    return bool(np.isfinite(points).all() and np.abs(points).max(initial=0.0) <= COORDINATE)


def rbf_matrix(A: np.ndarray, B: np.ndarray, gamma: float) -> np.ndarray:
    """K_ij = exp(-gamma |a_i - b_j|^2), compiled (``rbf_core``) for finite points.

    A NaN, infinite or huge coordinate goes through numpy instead, so that its row
    says NaN or 0 as numpy's exp would (the compiled exp assumes finite arguments):
    |a|^2 + |b|^2 - 2 a.b as one matrix product with inner dimension 4.
    """
    A = np.ascontiguousarray(A, dtype=float)
    B = np.ascontiguousarray(B, dtype=float)
    if _compiled_safe(A) and _compiled_safe(B) and 0.0 <= gamma <= GAMMA:
        return rbf_block(A, B, float(gamma), UNDERFLOW)
    with np.errstate(over="ignore"):      # a huge point: its squares are inf, its k 0
        A_ext = np.column_stack([A, (A * A).sum(1), np.ones(len(A))])
        B_ext = np.column_stack([-2.0 * B, np.ones(len(B)), (B * B).sum(1)])
        sq = A_ext @ B_ext.T
        np.maximum(sq, 0.0, out=sq)           # rounding can dip just below zero
        sq *= -gamma
        return np.exp(sq, out=sq)


def _gram(A, B, settings):
    return rbf_matrix(A, B, settings.gamma)


def _terms(model: dict) -> dict:
    return {"gamma": model["gamma"], "support_vectors": model["support_vectors"],
            "coefficients": model["coefficients"]}


KERNEL = Kernel(
    name="rbf", title="Gaussian (RBF)", parameters=("gamma",),
    help="k(x, z) = exp(-gamma |x - z|^2): a boundary that can curve around groups of "
         "points; gamma sets how far one point's influence reaches",
    gram=_gram, export_terms=_terms, compiled="rbf",
    formula="rbf: f(x) = b + sum_j coefficients[j] * exp(-gamma * |u - support_vectors[j]|^2)")
