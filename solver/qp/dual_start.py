"""First guesses for the kernel dual: a feasible alpha close to the optimum.

Cold fits guess every point's margin y f(x) from a fit on a seeded,
stratified subsample; warm fits start from the previous alphas (also when
gamma changed), those at their old bound moved to the new C_i, and are
repaired to feasibility (0 <= a <= C, y'a = 0).
"""

from __future__ import annotations

import numpy as np

from solver.qp.subsample import stratified_subsample

SUBSAMPLE = 250
SUBSAMPLE_SHARE = 0.5


def alpha_from_margins(margin: np.ndarray, upper: np.ndarray, hard: bool) -> np.ndarray:
    """alpha_i = C_i where the guessed margin is below 1 (inside the band), else 0."""
    if hard:
        return np.zeros(len(margin))
    return np.where(margin < 1.0, upper, 0.0)


def feasible(alpha: np.ndarray, y: np.ndarray, margin: np.ndarray) -> np.ndarray:
    """Make y'a = 0 by lowering the heavier class's alphas, those with the
    largest margin (nearest to leaving the band) first, so most stay on a bound."""
    excess = float(alpha @ y)
    if excess == 0.0:
        return alpha
    heavy = np.flatnonzero((np.sign(excess) == y) & (alpha > 0))
    if alpha[heavy].sum() < abs(excess):
        return np.zeros_like(alpha)
    alpha = alpha.copy()
    order = heavy[np.argsort(-margin[heavy], kind="stable")]
    # cut whole alphas in that order until the excess is used up: a cumulative sum
    before = np.concatenate([[0.0], np.cumsum(alpha[order])[:-1]])
    cut = np.clip(abs(excess) - before, 0.0, alpha[order])
    alpha[order] -= cut
    return alpha


def subsample(y: np.ndarray, rng_seed: int = 0) -> np.ndarray:
    """Seeded, stratified indices: a share SUBSAMPLE_SHARE (at least SUBSAMPLE)."""
    return stratified_subsample(y, max(SUBSAMPLE, int(SUBSAMPLE_SHARE * len(y))), rng_seed)
