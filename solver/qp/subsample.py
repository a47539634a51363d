"""The seeded, stratified subsample both working-set solvers fit first, to guess
which points end up near the band edges."""

from __future__ import annotations

import numpy as np


def stratified_subsample(y: np.ndarray, size: int, seed: int = 0) -> np.ndarray:
    """Sorted indices of about ``size`` points, each class in its share (at least 2)."""
    rng = np.random.default_rng(seed)
    picks = []
    for sign in (-1, 1):
        members = np.flatnonzero(y == sign)
        share = max(2, int(round(size * len(members) / len(y))))
        picks.append(rng.choice(members, size=min(share, len(members)), replace=False))
    return np.sort(np.concatenate(picks))
