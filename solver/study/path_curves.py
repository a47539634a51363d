"""The figures the C-path view draws against log C, from the exact path.

At every breakpoint (and both ends of the range) when there are at most
``most`` of them, else at ``most`` C values spaced evenly in log C: margin
width, support vectors by status, training error and both objective terms,
each from the path's exact solution there (no QP).
"""

from __future__ import annotations

import numpy as np

from solver.result import STATUSES


def sample_c(path, most: int = 800) -> np.ndarray:
    edges = np.r_[path.c_from, path.breakpoints, path.c_to]
    if len(edges) <= most:
        return edges
    return np.geomspace(path.c_from, path.c_to, most)


def path_curves(path, most: int = 800) -> dict:
    """{"C": ..., "margin_width", "n_support", "training_error", "half_norm_w2",
    "penalty_term", and one count per status}: arrays over the sampled C."""
    C = sample_c(path, most)
    names = ["margin_width", "n_support", "training_error", "half_norm_w2", "penalty_term",
             *STATUSES]
    curves = {name: np.empty(len(C)) for name in names}
    for i, c in enumerate(C):
        result = path.evaluate(float(c))
        curves["margin_width"][i] = result.margin_width
        curves["n_support"][i] = result.n_support
        curves["training_error"][i] = result.training_error
        curves["half_norm_w2"][i] = result.half_norm_w2
        curves["penalty_term"][i] = result.penalty_term
        for status in STATUSES:
            curves[status][i] = result.count(status)
    curves["C"] = C
    return curves
