"""f of successive kernel fits on one fixed set of points, column by column.

The window shades and contours a kernel fit's f on a lattice after every step
of C.  Most support vectors sit at their bound, alpha_j = C_j, and C_j is C
times a weight of the point's class, so their coefficients c_j = alpha_j y_j
share two values (the largest and the smallest) and

    f(x) = c_max U_max(x) + c_min U_min(x) + sum_other c_j k(x, s_j) + b,

with U the sum of the kernel columns of the support vectors at that value.
U depends only on which vectors sit there, not on C: between two steps only
the columns of the vectors that joined or left a group are added or taken
away, and the others' (the free support vectors, few) are computed afresh.
At n = 1,000 on a 120 x 120 lattice that is a few dozen columns a step where
the whole expansion is one per support vector.

Exact to rounding: the same kernel values as ``DecisionModel.decision_function``,
summed in another order.  The sums are rebuilt from scratch every REFRESH
updates so rounding cannot pile up, and whenever the points, the kernel or the
scaling change.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from solver import kernels, scaling
from solver.model import BLOCK_ENTRIES

REFRESH = 64            # incremental updates between full rebuilds of the group sums
WORTHWHILE = 0.5        # ... and a full rebuild when a step would need more columns than
                        # this fraction of the support vectors (it costs one per vector)


@dataclasses.dataclass
class _Sums:
    points: np.ndarray
    model: object               # the model the sums were last brought up to date with
    keys: tuple                 # (largest group's row keys, smallest group's), sorted
    sums: tuple                 # (U_max, U_min) on the points
    updates: int = 0


class ExpansionField:
    """f of one model after another on the same points (``values``), reusing the
    kernel columns the previous model shares with it."""

    def __init__(self):
        self._kept: _Sums | None = None

    def values(self, model, points) -> np.ndarray:
        """f(points) of ``model`` (a DecisionModel), as its decision_function gives it."""
        points = np.asarray(points, dtype=float)
        if model.support_vectors is None or not len(model.coefficients):
            self._kept = None
            return model.decision_function(points)
        groups = _groups(model.coefficients)
        keys = tuple(np.sort(_row_keys(model.support_vectors[g])) for g in groups)
        kept = self._kept
        if kept is not None and kept.updates < REFRESH and _same_field(kept, model, points):
            changes = [_changes(old, new) for old, new in zip(kept.keys, keys)]
            others = len(model.coefficients) - sum(len(g) for g in groups)
            columns = sum(len(rows) for rows, _ in changes) + others
            if columns <= WORTHWHILE * len(model.coefficients):
                scaled = scaling.apply(points, model.shift, model.scale)
                sums = tuple(total + _expansion(model, scaled, _rows(changed, model), weight)
                             for total, (changed, weight) in zip(kept.sums, changes))
                self._kept = _Sums(points, model, keys, sums, kept.updates + 1)
                return self._combine(model, scaled, groups, sums)
        scaled = scaling.apply(points, model.shift, model.scale)
        sums = tuple(_expansion(model, scaled, model.support_vectors[g], np.ones(len(g)))
                     for g in groups)
        self._kept = _Sums(points.copy(), model, keys, sums)
        return self._combine(model, scaled, groups, sums)

    @staticmethod
    def _combine(model, scaled, groups, sums):
        c = model.coefficients
        others = np.ones(len(c), dtype=bool)
        for g in groups:
            others[g] = False
        out = _expansion(model, scaled, model.support_vectors[others], c[others])
        for g, total in zip(groups, sums):
            if len(g):
                out += c[g[0]] * total
        return out + model.b


def _groups(coefficients) -> tuple:
    """Indices at the largest positive and at the smallest negative coefficient."""
    top, bottom = coefficients.max(), coefficients.min()
    plus = np.flatnonzero(coefficients == top) if top > 0 else np.zeros(0, dtype=int)
    minus = np.flatnonzero(coefficients == bottom) if bottom < 0 else np.zeros(0, dtype=int)
    return plus, minus


def _row_keys(rows) -> np.ndarray:
    """Each row of coordinates as one opaque value (its bytes), to compare and sort."""
    rows = np.ascontiguousarray(rows, dtype=float)
    return rows.view(np.dtype((np.void, rows.dtype.itemsize * rows.shape[1]))).ravel()


def _changes(old, new):
    """(keys, net count) of the rows whose count differs between the multisets
    ``old`` and ``new`` (two points may share coordinates)."""
    both = np.concatenate([old, new])
    unique, inverse = np.unique(both, return_inverse=True)
    net = np.bincount(inverse.ravel(), weights=np.r_[-np.ones(len(old)), np.ones(len(new))],
                      minlength=len(unique))
    changed = np.flatnonzero(net)
    return unique[changed], net[changed]


def _rows(keys, model) -> np.ndarray:
    width = model.support_vectors.shape[1]
    return np.ascontiguousarray(keys).view(float).reshape(-1, width)


def _expansion(model, scaled, vectors, weights) -> np.ndarray:
    """sum_j weights_j k(scaled, vectors_j) on scaled points, a block of vectors at a time.

    One row of kernel values per vector, along all the points (k is symmetric): the
    compiled kernel vectorises along a row, and a lattice of 14,400 points against a few
    dozen vectors as rows of a few dozen took 3-4 ms where this takes about 1."""
    out = np.zeros(len(scaled))
    if not len(vectors):
        return out
    kernel = kernels.get(model.kernel)
    weights = np.asarray(weights, dtype=float)
    rows = max(1, BLOCK_ENTRIES // max(1, len(scaled)))
    for start in range(0, len(vectors), rows):
        out += weights[start:start + rows] @ kernel.gram(vectors[start:start + rows], scaled,
                                                         model)
    return out


def _same_field(kept: _Sums, model, points) -> bool:
    """Whether the kept sums hold for ``model`` on ``points``: same points, kernel and
    scaling (the coefficients and b may differ)."""
    old = kept.model
    return (kept.points.shape == points.shape and np.array_equal(kept.points, points)
            and (old.kernel, old.gamma, old.degree, old.offset)
            == (model.kernel, model.gamma, model.degree, model.offset)
            and np.array_equal(old.shift, model.shift) and np.array_equal(old.scale, model.scale)
            and old.support_vectors.shape[1] == model.support_vectors.shape[1])
