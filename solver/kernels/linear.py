"""The linear kernel k(x, z) = x.z; its feature map is the points themselves."""

from __future__ import annotations

import numpy as np

from solver.kernels.base import Kernel


def _gram(A: np.ndarray, B: np.ndarray, settings) -> np.ndarray:
    return A @ B.T


def _features(X: np.ndarray, settings) -> np.ndarray:
    return X


def _terms(model: dict) -> dict:
    return {}   # w and b in original units are written for every linear fit


KERNEL = Kernel(
    name="linear", title="linear", parameters=(),
    help="f(x) = w.x + b: a straight boundary",
    gram=_gram, feature_map=_features, export_terms=_terms,
    formula="linear: f(x) = w . x + b   (w and b in the features' original units)")
