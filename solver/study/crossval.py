"""Cross-validation splits and the k-fold error estimate of one configuration.

Splits are stratified and seeded (scikit-learn's StratifiedKFold with
shuffling), so the same points, fold count and seed give the same folds on
any machine.  ``folds="loo"`` is leave-one-out, for small sets.
"""

from __future__ import annotations

import hashlib
import math
from dataclasses import dataclass

import numpy as np

from solver.config import FitConfig
from solver.errors import InputError, SlacklineError

LEAVE_ONE_OUT = "loo"


@dataclass(frozen=True)
class CVEstimate:
    """Held-out error of one configuration across k folds.

    error           mean of the fold errors (fraction of held-out points misclassified)
    std             sample standard deviation of the fold errors (ddof = 1)
    standard_error  std / sqrt(k), the spread used by the one-standard-error rule
    """

    error: float
    std: float
    standard_error: float
    folds: int
    failed_folds: int = 0

    @classmethod
    def from_fold_errors(cls, fold_errors) -> "CVEstimate":
        errors = np.asarray(fold_errors, dtype=float)
        ok = errors[np.isfinite(errors)]
        if len(ok) == 0:
            return cls(math.nan, math.nan, math.nan, len(errors), len(errors))
        std = float(np.std(ok, ddof=1)) if len(ok) > 1 else math.nan
        return cls(error=float(np.mean(ok)), std=std,
                   standard_error=std / math.sqrt(len(ok)),
                   folds=len(errors), failed_folds=int(len(errors) - len(ok)))

    def to_dict(self) -> dict:
        return {"error": self.error, "std": self.std, "standard_error": self.standard_error,
                "folds": self.folds, "failed_folds": self.failed_folds}


def check_folds(folds, y) -> int | str:
    """The fold count as given, or InputError naming the bad value and the limit."""
    y = np.asarray(y)
    if isinstance(folds, str):
        if folds.strip().lower() in (LEAVE_ONE_OUT, "leave-one-out"):
            return LEAVE_ONE_OUT
        try:
            folds = float(folds)
        except ValueError:
            raise InputError(f"folds must be a whole number of at least 2, or 'loo' for "
                             f"leave-one-out; got {folds!r}") from None
    if (isinstance(folds, bool) or not isinstance(folds, (int, float, np.integer))
            or not float(folds).is_integer() or folds < 2):
        raise InputError(f"folds must be a whole number of at least 2, or 'loo' for "
                         f"leave-one-out; got {folds!r}")
    folds = int(folds)
    smaller = int(min(np.count_nonzero(y > 0), np.count_nonzero(y < 0)))
    if folds > smaller:
        raise InputError(f"folds ({folds}) is more than the smaller class has points "
                         f"({smaller}); every fold needs a point of each class — use "
                         f"{smaller} folds or fewer, or 'loo' for leave-one-out")
    return folds


def make_folds(y, folds, seed: int = 0) -> list[tuple[np.ndarray, np.ndarray]]:
    """(train indices, test indices) per fold; ``folds`` already checked."""
    y = np.asarray(y)
    if folds == LEAVE_ONE_OUT:
        everyone = np.arange(len(y))
        return [(np.delete(everyone, i), np.array([i])) for i in everyone]
    from sklearn.model_selection import StratifiedKFold
    splitter = StratifiedKFold(n_splits=int(folds), shuffle=True, random_state=int(seed))
    return [(train, test) for train, test in splitter.split(np.zeros((len(y), 1)), y)]


def held_out_error(result, X_test, y_test) -> float:
    """Fraction of held-out points on the wrong side of the boundary (f = 0 counts as +1)."""
    return float(np.mean(result.predict(X_test) != np.asarray(y_test)))


def cross_validate(X, y, config: FitConfig, folds=5, seed: int = 0) -> CVEstimate:
    """k-fold error of one configuration (a quick estimate for comparisons).

    A fold whose fit fails (for example a hard margin on a non-separable
    training fold) is counted in ``failed_folds`` and left out of the mean.
    """
    from solver.fit import fit, validate_points
    X, y = validate_points(X, y)
    folds = check_folds(folds, y)
    errors = []
    for train, test in make_folds(y, folds, seed):
        try:
            result = fit(X[train], y[train], config)
        except SlacklineError:
            errors.append(math.nan)
            continue
        errors.append(held_out_error(result, X[test], y[test]))
    return CVEstimate.from_fold_errors(errors)


def points_fingerprint(X, y) -> str:
    """A short checksum of the points and signs, to tell whether figures still apply."""
    digest = hashlib.sha256()
    digest.update(np.ascontiguousarray(np.asarray(X, dtype=float)).tobytes())
    digest.update(np.ascontiguousarray(np.asarray(y, dtype=np.int64)).tobytes())
    return digest.hexdigest()[:16]
