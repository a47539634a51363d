"""A fixed validation set along the C grid: the held-out error of the fit at each C.

Beside cross-validation (solver.study.sweep), which re-splits the training
points, a fixed set of labelled points kept out of the fit gives one more
curve: for each C, the fit on all training points (warm-started from the
previous C, as the sweep does) applied to the held-out points.
"""

from __future__ import annotations

import numpy as np

from solver.config import FitConfig
from solver.errors import SlacklineError
from solver.fit import fit


def heldout_errors(X, y, config: FitConfig, C_values, heldout_X, heldout_signs) -> np.ndarray:
    """Fraction of held-out points misclassified by the fit at each C (NaN where it fails)."""
    heldout_X = np.asarray(heldout_X, dtype=float).reshape(-1, 2)
    heldout_signs = np.asarray(heldout_signs).reshape(-1)
    errors = np.full(len(C_values), np.nan)
    previous = None
    for k, C in enumerate(C_values):
        try:
            previous = fit(X, y, config.with_changes(C=float(C), hard_margin=False),
                           warm_start=previous)
        except SlacklineError:
            previous = None
            continue
        errors[k] = float(np.mean(previous.predict(heldout_X) != heldout_signs))
    return errors
