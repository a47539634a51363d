"""The C sweep: fit across a log-spaced range of C, on all points and per fold.

For each C on the grid the sweep fits all points (margin width, support
vectors by status, training error, the two objective terms) and every
training fold of a stratified, seeded k-fold split (held-out error).  Along
the grid each fit starts from the previous C's solution (``warm_start``).

The work is cut into jobs of one "lane" (all points, or one fold) and a
block of consecutive C values; lanes are independent, so each block runs as
k + 1 joblib jobs.  Between blocks the sweep reports progress and checks for
cancellation.  Because everything goes through joblib, a user can move the
fold fits onto a Dask cluster with ``joblib.parallel_config(backend="dask")``
and no change here.  A fit that fails at some C is recorded, not fatal.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass

import numpy as np
from joblib import Parallel, delayed

from solver.config import FitConfig
from solver.study.crossval import check_folds, held_out_error, make_folds, points_fingerprint
from solver.errors import InputError
from solver.result import STATUSES
from solver.study.sweep_result import FitFailure, SweepResult

DEFAULT_FROM, DEFAULT_TO, DEFAULT_STEPS = 1e-3, 1e4, 40
ALL_POINTS = -1          # lane number of the fits on every point (folds are 0 .. k-1)
_FIT_ERRORS = (ValueError, ArithmeticError, np.linalg.LinAlgError)  # SlacklineError is a ValueError


@dataclass(frozen=True)
class SweepSettings:
    """The grid and the validation scheme; checked once, at the door."""

    c_from: float = DEFAULT_FROM
    c_to: float = DEFAULT_TO
    steps: int = DEFAULT_STEPS
    folds: int | str = 5             # a whole number >= 2, or "loo" (leave-one-out)
    seed: int = 0

    def __post_init__(self):
        for name in ("c_from", "c_to"):
            value = getattr(self, name)
            if (isinstance(value, bool) or not isinstance(value, (int, float))
                    or not math.isfinite(value) or value <= 0):
                raise InputError(f"the C range needs positive numbers; got {name} = {value!r}")
        if self.c_from >= self.c_to:
            raise InputError(f"the C range must run upwards: 'from' ({self.c_from:g}) must be "
                             f"smaller than 'to' ({self.c_to:g}); swap them")
        if (isinstance(self.steps, bool) or not isinstance(self.steps, (int, float))
                or not float(self.steps).is_integer() or self.steps < 2):
            raise InputError(f"a sweep needs a whole number of at least 2 steps; "
                             f"got {self.steps!r}")
        object.__setattr__(self, "steps", int(self.steps))
        if isinstance(self.seed, bool) or not float(self.seed).is_integer():
            raise InputError(f"the seed must be a whole number; got {self.seed!r}")
        object.__setattr__(self, "seed", int(self.seed))

    def c_values(self) -> np.ndarray:
        """steps values of C spaced evenly in log C, both ends included."""
        return np.logspace(math.log10(self.c_from), math.log10(self.c_to), self.steps)


def run_sweep(X, y, config: FitConfig | None = None, settings: SweepSettings | None = None,
              *, progress=None, cancel=None, n_jobs=None, block: int | None = None,
              warm_start: bool = True, exact: bool = True) -> SweepResult:
    """Sweep C over ``settings``' grid; every other setting comes from ``config``.

    progress(done, total)  called after each block of fits (counts of fits)
    cancel                 a threading.Event (or any callable returning True)
                           checked between blocks; a cancelled sweep returns
                           the C values finished so far with ``cancelled`` set
    n_jobs                 handed to joblib.Parallel (None: joblib's default or
                           the surrounding ``joblib.parallel_config``)
    block                  C values per job (default: a tenth of the grid)
    warm_start             False solves every C cold (for the benchmark)
    exact                  also follow one exact C path per fold over the range: the CV
                           error at every C as a step function (``exact_cv``; None if
                           a path fails or the sweep was cancelled)

    ``config.hard_margin`` is ignored: a sweep varies a finite C.
    """
    from solver.fit import validate_points
    X, y = validate_points(X, y)
    config = (config or FitConfig()).with_changes(hard_margin=False)
    settings = settings or SweepSettings()
    folds = check_folds(settings.folds, y)
    splits = make_folds(y, folds, settings.seed)
    grid = settings.c_values()
    block = block or max(1, math.ceil(len(grid) / 10))
    lanes = [(ALL_POINTS, np.arange(len(y)), None)] + [
        (k, train, test) for k, (train, test) in enumerate(splits)]
    total = len(grid) * len(lanes)

    start = time.perf_counter()
    whole = _empty_whole(len(grid))
    fold_errors = np.full((len(grid), len(splits)), np.nan)
    failures: list[FitFailure] = []
    previous = {lane: None for lane, _, _ in lanes}
    finished, cancelled = 0, False
    with Parallel(n_jobs=n_jobs) as parallel:
        for first in range(0, len(grid), block):
            if _is_cancelled(cancel):
                cancelled = True
                break
            c_block = grid[first:first + block]
            jobs = [delayed(_sweep_lane)(X[train], y[train],
                                         None if test is None else X[test],
                                         None if test is None else y[test],
                                         config, c_block, previous[lane] if warm_start else None,
                                         warm_start, lane)
                    for lane, train, test in lanes]
            for (lane, _, _), (records, last) in zip(lanes, parallel(jobs)):
                previous[lane] = last if last is not None else previous[lane]
                for offset, record in enumerate(records):
                    row = first + offset
                    if isinstance(record, FitFailure):
                        failures.append(record)
                    elif lane == ALL_POINTS:
                        for name, value in record.items():
                            whole[name][row] = value
                    else:
                        fold_errors[row, lane] = record
            finished = min(first + block, len(grid))
            if progress is not None:
                progress(finished * len(lanes), total)
    kept = slice(0, finished)
    exact_cv = None
    if exact and not cancelled:
        from solver.study.exact_cv import exact_cross_validation
        try:
            exact_cv = exact_cross_validation(X, y, config, settings.c_from, settings.c_to,
                                              folds, settings.seed)
        except _FIT_ERRORS:
            exact_cv = None
    return SweepResult(
        config=config, C=grid[kept], folds=folds, seed=settings.seed,
        fingerprint=points_fingerprint(X, y), n_points=len(y),
        margin_width=whole["margin_width"][kept], n_support=whole["n_support"][kept],
        counts={status: whole[status][kept] for status in STATUSES},
        training_error=whole["training_error"][kept],
        half_norm_w2=whole["half_norm_w2"][kept], penalty_term=whole["penalty_term"][kept],
        fold_errors=fold_errors[kept], failures=tuple(failures), cancelled=cancelled,
        seconds=time.perf_counter() - start, planned_steps=len(grid), warm_start=warm_start,
        settings=settings, exact_cv=exact_cv)


def _empty_whole(steps: int) -> dict:
    names = ["margin_width", "n_support", "training_error", "half_norm_w2",
             "penalty_term", *STATUSES]
    return {name: np.full(steps, np.nan) for name in names}


def _is_cancelled(cancel) -> bool:
    if cancel is None:
        return False
    if hasattr(cancel, "is_set"):
        return bool(cancel.is_set())
    return bool(cancel())


def _sweep_lane(X_train, y_train, X_test, y_test, config, c_block, previous, warm_start, lane):
    """One job: fit one lane at consecutive C values, each from the last solution.

    Returns (records, last good result); a record is a dict of figures (all
    points), a held-out error (a fold) or a FitFailure.
    """
    from solver.fit import fit
    records = []
    for C in c_block:
        try:
            result = fit(X_train, y_train, config.with_changes(C=float(C)),
                         warm_start=previous if warm_start else None)
        except _FIT_ERRORS as exc:
            records.append(FitFailure(C=float(C), lane=lane, kind=type(exc).__name__,
                                      message=str(exc)))
            continue
        previous = result
        if X_test is None:
            records.append(_whole_figures(result))
        else:
            records.append(held_out_error(result, X_test, y_test))
    return records, previous


def _whole_figures(result) -> dict:
    figures = {
        "margin_width": result.margin_width,
        "n_support": result.n_support,
        "training_error": result.training_error,
        "half_norm_w2": result.half_norm_w2,
        "penalty_term": result.penalty_term,
    }
    figures.update({status: result.count(status) for status in STATUSES})
    return figures
