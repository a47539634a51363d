"""Cross-validated error as an exact step function of C, from one exact path per fold.

Each training fold's C path gives that fold's held-out error at every C of the
range (path_error.py); on the pieces between the union of all folds' knots
the mean and the standard error are constant, so the one-standard-error rule
can be applied to the function itself rather than to a sampled grid.  The
same stratified, seeded folds as the sweep's (crossval.make_folds).

A suggestion is not a validation: a C chosen this way still needs held-out
data it has never seen before the model decides anything about anyone.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver.config import FitConfig
from solver.study.crossval import check_folds, make_folds
from solver.study.path_error import held_out_steps, value_at
from solver.study.sweep_result import Suggestion


@dataclass(frozen=True, eq=False)
class ExactCrossValidation:
    """fold_errors[i, k]: fold k's held-out error on piece i, where piece 0 runs from
    c_from to knots[0], piece i from knots[i - 1] to knots[i], the last one to c_to."""

    c_from: float
    c_to: float
    knots: np.ndarray
    fold_errors: np.ndarray
    seconds: float

    @property
    def error(self) -> np.ndarray:
        """Mean held-out error on each piece."""
        return self.fold_errors.mean(axis=1)

    @property
    def standard_error(self) -> np.ndarray:
        """Sample standard deviation over the folds (ddof = 1) / sqrt(k), per piece."""
        k = self.fold_errors.shape[1]
        if k < 2:
            return np.full(len(self.fold_errors), math.nan)
        return self.fold_errors.std(axis=1, ddof=1) / math.sqrt(k)

    def pieces(self) -> list[tuple[float, float]]:
        """(from C, to C) of every piece."""
        edges = np.r_[self.c_from, self.knots, self.c_to]
        return list(zip(edges[:-1].tolist(), edges[1:].tolist()))

    def at(self, C) -> np.ndarray:
        """Each fold's held-out error at C (C inside the range)."""
        return self.fold_errors[np.searchsorted(self.knots, C, side="right")]

    @property
    def suggestion(self) -> Suggestion:
        """The one-standard-error rule on the step function: the lowest mean error (the
        piece of smallest C on a tie) plus its standard error is the threshold; C
        within it runs from the left end of the first piece under it to the right end
        of the last.  best_C is the lowest piece's middle in log C."""
        error, se = self.error, self.standard_error
        best = int(np.argmin(error))
        spread = float(se[best]) if np.isfinite(se[best]) else 0.0
        threshold = float(error[best] + spread)
        within = np.flatnonzero(error <= threshold + 1e-12)
        pieces = self.pieces()
        low, high = pieces[best]
        return Suggestion(best_C=math.sqrt(low * high), best_error=float(error[best]),
                          best_standard_error=float(se[best]), threshold=threshold,
                          largest_C_within_one_se=pieces[within[-1]][1],
                          smallest_C_within_one_se=pieces[within[0]][0])

    def to_dict(self) -> dict:
        se = self.standard_error
        return {"from": self.c_from, "to": self.c_to, "knots": self.knots.tolist(),
                "error": self.error.tolist(),
                "standard_error": [None if not math.isfinite(v) else float(v) for v in se],
                "suggestion": self.suggestion.to_dict(), "seconds": self.seconds}


def exact_cross_validation(X, y, config: FitConfig, c_from: float, c_to: float,
                           folds=5, seed: int = 0) -> ExactCrossValidation:
    """One exact path per training fold over [c_from, c_to]; their held-out errors."""
    import time

    from solver.fit import validate_points
    from solver.qp.path import compute_path
    X, y = validate_points(X, y)
    folds = check_folds(folds, y)
    started = time.perf_counter()
    steps = []
    for train, test in make_folds(y, folds, seed):
        path = compute_path(X[train], y[train], config, c_from=c_from, c_to=c_to)
        steps.append(held_out_steps(path, X[test], y[test]))
    knots = np.unique(np.concatenate([k for k, _ in steps])) if steps else np.zeros(0)
    # each piece of the union, by its left end: c_from, then every knot
    left = np.r_[c_from, knots]
    fold_errors = np.column_stack([value_at(k, values, left) for k, values in steps])
    return ExactCrossValidation(c_from=float(c_from), c_to=float(c_to), knots=knots,
                                fold_errors=fold_errors,
                                seconds=time.perf_counter() - started)
