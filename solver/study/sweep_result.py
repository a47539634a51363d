"""What a C sweep found: per-C curves, fold errors, failures, and a suggestion."""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from solver.config import FitConfig
from solver.study.crossval import CVEstimate
from solver.result import STATUSES

_SAME_C = 1e-9   # relative tolerance when looking a C up on the grid


@dataclass(frozen=True)
class FitFailure:
    """A fit that did not succeed during a sweep; lane -1 is the all-points fit."""

    C: float
    lane: int
    kind: str          # exception class, e.g. ConvergenceError
    message: str

    @property
    def where(self) -> str:
        return "all points" if self.lane < 0 else f"fold {self.lane + 1}"

    def to_dict(self) -> dict:
        return {"C": self.C, "where": self.where, "kind": self.kind, "message": self.message}


@dataclass(frozen=True)
class Suggestion:
    """A suggested C from the cross-validated error — a suggestion, not a validation.

    best_C        the C with the lowest mean cross-validated error (ties: the smallest C)
    threshold     best error + its standard error (the one-standard-error rule,
                  Hastie, Tibshirani & Friedman, The Elements of Statistical
                  Learning, 2nd ed., sec. 7.10)
    largest_C_within_one_se
                  the largest C whose CV error is at most ``threshold``.  In an
                  SVM a LARGER C is LESS regularised (a narrower margin, fewer
                  points allowed inside it): this is the most flexible model
                  the data cannot tell apart from the best.
    smallest_C_within_one_se
                  the smallest such C: the MORE regularised, simpler model —
                  the choice the rule's "most parsimonious model" reading makes.
    """

    best_C: float
    best_error: float
    best_standard_error: float
    threshold: float
    largest_C_within_one_se: float
    smallest_C_within_one_se: float

    def to_dict(self) -> dict:
        return {"best_C": self.best_C, "best_cv_error": self.best_error,
                "best_cv_standard_error": self.best_standard_error,
                "one_se_threshold": self.threshold,
                "largest_C_within_one_se": self.largest_C_within_one_se,
                "smallest_C_within_one_se": self.smallest_C_within_one_se}


@dataclass(frozen=True, eq=False)
class SweepResult:
    """Curves against C (arrays in grid order); NaN where the fit at that C failed.

    ``margin_width`` is 2/|w| in original units for the linear kernel and in
    the kernel's feature space otherwise.  A cancelled sweep holds the C
    values finished before the cancel (``len(C) < planned_steps``).
    """

    config: FitConfig            # every setting but C
    C: np.ndarray
    folds: int | str             # k, or "loo"
    seed: int
    fingerprint: str             # of the points and signs swept (crossval.points_fingerprint)
    n_points: int
    margin_width: np.ndarray
    n_support: np.ndarray
    counts: dict                 # status -> array of point counts
    training_error: np.ndarray
    half_norm_w2: np.ndarray
    penalty_term: np.ndarray
    fold_errors: np.ndarray      # len(C) x k held-out errors, NaN for a failed fold fit
    failures: tuple
    cancelled: bool
    seconds: float
    planned_steps: int
    warm_start: bool = True
    settings: object = None      # the SweepSettings it ran with
    exact_cv: object = None      # ExactCrossValidation: the CV error at every C (exact paths)

    def __post_init__(self):
        for name in ("C", "margin_width", "n_support", "training_error", "half_norm_w2",
                     "penalty_term", "fold_errors"):
            array = np.array(getattr(self, name), dtype=float, copy=True)
            array.setflags(write=False)
            object.__setattr__(self, name, array)
        counts = {}
        for status in STATUSES:
            counts[status] = np.array(self.counts[status], dtype=float, copy=True)
            counts[status].setflags(write=False)
        object.__setattr__(self, "counts", counts)

    # -- cross-validated error per C ---------------------------------------
    @cached_property
    def cv(self) -> tuple[CVEstimate, ...]:
        return tuple(CVEstimate.from_fold_errors(row) for row in self.fold_errors)

    @property
    def cv_error(self) -> np.ndarray:
        return np.array([estimate.error for estimate in self.cv])

    @property
    def cv_std(self) -> np.ndarray:
        return np.array([estimate.std for estimate in self.cv])

    @property
    def cv_standard_error(self) -> np.ndarray:
        return np.array([estimate.standard_error for estimate in self.cv])

    @property
    def fold_count(self) -> int:
        return int(self.fold_errors.shape[1])

    def index_of(self, C: float) -> int | None:
        """Position of ``C`` on the grid (to a relative 1e-9), or None."""
        if len(self.C) == 0:
            return None
        i = int(np.argmin(np.abs(np.log(self.C) - math.log(C))))
        return i if abs(self.C[i] - C) <= _SAME_C * C else None

    def nearest_C(self, C: float) -> float:
        """The swept C closest to ``C`` in log C."""
        return float(self.C[int(np.argmin(np.abs(np.log(self.C) - math.log(C))))])

    def cv_at(self, C: float) -> CVEstimate | None:
        i = self.index_of(C)
        return None if i is None else self.cv[i]

    def matches(self, X, y, config: FitConfig) -> bool:
        """Do these points and settings (any C) match what was swept?"""
        from solver.study.crossval import points_fingerprint
        same_settings = (config.with_changes(C=1.0, hard_margin=False)
                         == self.config.with_changes(C=1.0))
        return same_settings and points_fingerprint(X, y) == self.fingerprint

    # -- the suggestion -----------------------------------------------------
    @cached_property
    def suggestion(self) -> Suggestion | None:
        """Lowest CV error and the one-standard-error range; None without any complete C.

        Only C values whose every fold fit succeeded take part.
        """
        complete = np.isfinite(self.fold_errors).all(axis=1) if len(self.C) else np.zeros(0, bool)
        if not complete.any():
            return None
        error = np.where(complete, self.cv_error, np.inf)
        best = int(np.argmin(error))           # argmin takes the first: the smallest C of a tie
        se = self.cv_standard_error[best]
        threshold = float(error[best] + (se if np.isfinite(se) else 0.0))
        within = np.flatnonzero(error <= threshold + 1e-12)
        return Suggestion(best_C=float(self.C[best]), best_error=float(error[best]),
                          best_standard_error=float(se), threshold=threshold,
                          largest_C_within_one_se=float(self.C[within[-1]]),
                          smallest_C_within_one_se=float(self.C[within[0]]))

    # -- export -------------------------------------------------------------
    def rows(self) -> list[dict]:
        """One flat record per C (the CSV export)."""
        rows = []
        for i, C in enumerate(self.C):
            row = {"C": float(C), "margin_width": self.margin_width[i],
                   "n_support": self.n_support[i]}
            row.update({f"n_{status}": float(self.counts[status][i]) for status in STATUSES})
            row.update({"training_error": self.training_error[i],
                        "half_norm_w2": self.half_norm_w2[i],
                        "penalty_term": self.penalty_term[i],
                        "cv_error": self.cv[i].error, "cv_std": self.cv[i].std,
                        "cv_standard_error": self.cv[i].standard_error,
                        "cv_failed_folds": self.cv[i].failed_folds})
            rows.append(row)
        return rows

    def to_dict(self) -> dict:
        suggestion = self.suggestion
        return {
            "config": self.config.to_dict(),
            "folds": self.folds, "seed": self.seed, "n_points": self.n_points,
            "points_fingerprint": self.fingerprint,
            "steps": [_json_ready(row) for row in self.rows()],
            "fold_errors": [[_none_if_nan(v) for v in row] for row in self.fold_errors],
            "suggestion": None if suggestion is None else suggestion.to_dict(),
            "failures": [failure.to_dict() for failure in self.failures],
            "cancelled": self.cancelled, "planned_steps": self.planned_steps,
            "warm_start": self.warm_start, "seconds": self.seconds,
            "exact_cv": None if self.exact_cv is None else self.exact_cv.to_dict(),
        }


def _none_if_nan(value):
    value = float(value)
    return None if math.isnan(value) else value


def _json_ready(row: dict) -> dict:
    return {key: _none_if_nan(value) for key, value in row.items()}
