"""Copies of a point share one kernel column: gather their weight at the bounds.

Two training points with the same coordinates and label (rounded readings give
many) have the same row and column of Q, so only the sum of their alphas
enters f and the dual objective; any split of it within the box is optimal.
The face steps solve a ridged system (``factor_core.RIDGE``), whose solution
splits such a sum evenly: two copies may then sit a hair below C each, where
the reported alphas (``fit``) would snap both to C and leave y'a off by the
two hairs.  Gathered, one copy is at C and the other holds the rest, as an
active-set method without the ridge would leave them.
"""

from __future__ import annotations

import numpy as np


def gathered(X, y, alpha, upper) -> np.ndarray:
    """alpha with the free variables of each group of copies (same x, same y) filled to
    their bound one after another: the same f, y'a and dual objective, at most one
    variable of a group strictly between its bounds."""
    free = np.flatnonzero((alpha > 0) & (alpha < upper))
    if len(free) < 2:
        return alpha
    keys = np.column_stack([X[free], y[free], upper[free]])
    _, group, counts = np.unique(keys, axis=0, return_inverse=True, return_counts=True)
    if counts.max() < 2:
        return alpha
    alpha = alpha.copy()
    group = group.ravel()
    for g in np.flatnonzero(counts > 1):
        members = free[group == g]
        cap = upper[members[0]]
        total = alpha[members].sum()
        full = min(len(members), int(total // cap))
        alpha[members] = 0.0
        alpha[members[:full]] = cap
        if full < len(members):
            alpha[members[full]] = max(0.0, total - full * cap)
    return alpha
