"""Feature scaling: x_scaled = (x - shift) / scale, and its inverse for w and b."""

from __future__ import annotations

import numpy as np

# the scaling methods and what each does (the window's tooltip, --help)
METHODS = {
    "none": "the features as they are",
    "zscore": "each feature shifted to mean 0 and divided by its standard deviation",
    "range": "each feature mapped onto [0, 1] by its smallest and largest value",
}
# ... and their names in the window and the report (the tokens above are the file's and
# the command line's)
TITLES = {"none": "none", "zscore": "z-score", "range": "range [0, 1]"}


def scaling_parameters(X: np.ndarray, method: str) -> tuple[np.ndarray, np.ndarray]:
    """(shift, scale) per feature for ``method``; a constant feature keeps scale 1."""
    if method == "none":
        return np.zeros(X.shape[1]), np.ones(X.shape[1])
    if method == "zscore":
        shift, scale = X.mean(axis=0), X.std(axis=0)
    else:  # "range"
        shift, scale = X.min(axis=0), X.max(axis=0) - X.min(axis=0)
    scale = np.where(scale > 0, scale, 1.0)
    return shift, scale


def apply(X: np.ndarray, shift: np.ndarray, scale: np.ndarray) -> np.ndarray:
    return (X - shift) / scale


def weights_in_original_units(w_scaled, b_scaled, shift, scale):
    """f(x) = w_s.((x - shift)/scale) + b_s = (w_s/scale).x + (b_s - w_s.(shift/scale))."""
    w = w_scaled / scale
    b = b_scaled - float(np.dot(w, shift))
    return w, b
