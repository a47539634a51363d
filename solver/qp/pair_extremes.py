"""The pair steps' extremes: the largest F over "up" and the smallest over "low".

Each pair step (``smo_core``) needs both over every searched variable, but changes F
only within reach of its pair.  A scan of the rest read, at n = 5,000 and gamma 50,
about 3,400 entries a step through the index of the searched ones (5 us of a 13-15 us
step).  So the searched variables (``act[:m]``) are cut into blocks of BLOCK, each
keeping its own extremes: a step rescans only the blocks its window touches, while
it updates F there (``update_blocks``), and the extremes are those of the blocks'
(``combine``: m / BLOCK entries).  Ties go, as in one scan in the order of act, to
the first: in a block to its first, among blocks to the first block.  So the steps
choose exactly the pairs one scan would.
"""

from __future__ import annotations

import numba as nb
import numpy as np

BLOCK = 64                  # searched variables per block (about sqrt(n / 2) at n = 10,000)


@nb.njit(cache=True, nogil=True)
def extremes_from(F, act, first, last, up, low, f_up, i, f_low, j):
    """(largest F over up, its index, smallest F over low, its index) over
    act[first:last], carried on from (f_up, i, f_low, j)."""
    for t in act[first:last]:
        if up[t] and F[t] > f_up:
            f_up, i = F[t], t
        if low[t] and F[t] < f_low:
            f_low, j = F[t], t
    return f_up, i, f_low, j


@nb.njit(cache=True, nogil=True)
def update_from(F, act, first, last, up, low, step, row_i, row_j, f_up, i, f_low, j):
    """F -= step (k_i - k_j) over act[first:last], and extremes_from there."""
    for t in act[first:last]:
        value = F[t] - step * (row_i[t] - row_j[t])
        F[t] = value
        if up[t] and value > f_up:
            f_up, i = value, t
        if low[t] and value < f_low:
            f_low, j = value, t
    return f_up, i, f_low, j


@nb.njit(cache=True, nogil=True)
def update_whole(F, act, m, up, low, step, row_i, row_j):
    """F -= step (k_i - k_j) over act[:m], and (largest F over up, its index, smallest F
    over low) there."""
    f_up, i, f_low = -np.inf, -1, np.inf
    for k in range(m):
        t = act[k]
        value = F[t] - step * (row_i[t] - row_j[t])
        F[t] = value
        if up[t] and value > f_up:
            f_up, i = value, t
        if low[t] and value < f_low:
            f_low = value
    return f_up, i, f_low


@nb.njit(cache=True, nogil=True)
def blocks(n):
    """Empty block extremes for up to n searched variables: (largest F over up, its
    index, smallest F over low, its index), one entry per block."""
    count = (n + BLOCK - 1) // BLOCK
    return (np.empty(count), np.empty(count, dtype=np.int64), np.empty(count),
            np.empty(count, dtype=np.int64))


@nb.njit(cache=True, nogil=True)
def summarise(F, act, m, up, low, top, top_at, bottom, bottom_at):
    """Every block's extremes over act[:m]."""
    for k in range((m + BLOCK - 1) // BLOCK):
        a = k * BLOCK
        top[k], top_at[k], bottom[k], bottom_at[k] = extremes_from(
            F, act, a, min(a + BLOCK, m), up, low, -np.inf, -1, np.inf, -1)


@nb.njit(cache=True, nogil=True)
def update_blocks(F, act, m, first, last, up, low, step, row_i, row_j, top, top_at, bottom,
                  bottom_at):
    """F -= step (k_i - k_j) over act[first:last], and the extremes of the blocks that
    range touches made afresh (the rest of each edge block read as it is)."""
    for k in range(first // BLOCK, (last - 1) // BLOCK + 1):
        a = k * BLOCK
        z = min(a + BLOCK, m)
        lo, hi = max(a, first), min(z, last)
        f_up, i, f_low, j = extremes_from(F, act, a, lo, up, low, -np.inf, -1, np.inf, -1)
        f_up, i, f_low, j = update_from(F, act, lo, hi, up, low, step, row_i, row_j, f_up, i,
                                        f_low, j)
        top[k], top_at[k], bottom[k], bottom_at[k] = extremes_from(F, act, hi, z, up, low, f_up,
                                                                   i, f_low, j)


@nb.njit(cache=True, nogil=True)
def combine(m, top, top_at, bottom, bottom_at):
    """(largest F over up, its index, smallest F over low, its index) over act[:m], from
    the blocks' extremes (the first block of equals)."""
    f_up, i, f_low, j = -np.inf, -1, np.inf, -1
    for k in range((m + BLOCK - 1) // BLOCK):
        if top[k] > f_up:
            f_up, i = top[k], top_at[k]
        if bottom[k] < f_low:
            f_low, j = bottom[k], bottom_at[k]
    return f_up, i, f_low, j


@nb.njit(cache=True, nogil=True)
def _scores(value, f_up, curvature, score):
    """Whether F = value gives (f_up - F)^2 / curvature = score, with f_up - F > 0."""
    gain = f_up - value
    return gain > 0.0 and gain * gain / curvature == score


@nb.njit(cache=True, nogil=True)
def _first_scoring(F, act, first, last, low, f_up, curvature, score):
    """The first t of act[first:last] in "low" whose (f_up - F_t)^2 / curvature is
    ``score``, else -1."""
    for t in act[first:last]:
        if low[t] and _scores(F[t], f_up, curvature, score):
            return t
    return -1


@nb.njit(cache=True, nogil=True)
def best_beyond(F, act, m, first, last, low, f_up, curvature, bottom):
    """(score, j): the largest (f_up - F_t)^2 / curvature over "low" outside
    act[first:last] (beyond reach of i: one curvature for all) and the first t of act
    with it, or (0, -1), as one scan of act[:first] then act[last:] finds them; from
    the blocks' smallest F over low (``summarise``), reading only the edge blocks'
    parts outside the range and the one block where the first best lies."""
    head = first // BLOCK                  # blocks [0, head) lie wholly before first
    tail = (last + BLOCK - 1) // BLOCK     # blocks [tail, ...) wholly from last on
    count = (m + BLOCK - 1) // BLOCK
    edge_end = min(tail * BLOCK, m)
    smallest = np.inf                     # the score falls as F grows: the smallest F
    for k in range(head):
        smallest = min(smallest, bottom[k])
    for k in range(tail, count):
        smallest = min(smallest, bottom[k])
    for t in act[head * BLOCK:first]:
        if low[t]:
            smallest = min(smallest, F[t])
    for t in act[last:edge_end]:
        if low[t]:
            smallest = min(smallest, F[t])
    gain = f_up - smallest
    if not gain > 0.0:
        return 0.0, -1
    score = gain * gain / curvature
    if not score > 0.0:
        return 0.0, -1
    # the first in act's order with that score (equal scores from unequal F: rounding)
    for k in range(head):
        if _scores(bottom[k], f_up, curvature, score):
            return score, _first_scoring(F, act, k * BLOCK, (k + 1) * BLOCK, low, f_up,
                                         curvature, score)
    j = _first_scoring(F, act, head * BLOCK, first, low, f_up, curvature, score)
    if j < 0:
        j = _first_scoring(F, act, last, edge_end, low, f_up, curvature, score)
    if j >= 0:
        return score, j
    for k in range(tail, count):
        if _scores(bottom[k], f_up, curvature, score):
            return score, _first_scoring(F, act, k * BLOCK, min((k + 1) * BLOCK, m), low,
                                         f_up, curvature, score)
    return 0.0, -1
