"""Compare two fits: what moved between a pinned reference and the current fit.

Point identity: when both fits saw the same points (same coordinates and
signs, in the same order) a point is its index.  Otherwise points are matched
by coordinates and label, and the unmatched ones are reported as added or
removed.
"""

from __future__ import annotations

import math
from collections import defaultdict
from dataclasses import dataclass

import numpy as np

from solver.study.crossval import CVEstimate
from solver.result import STATUS_TEXT, FitResult

SETTINGS_COMPARED = ("C", "hard_margin", "kernel", "gamma", "degree", "offset",
                     "weight_positive", "weight_negative", "scaling")


@dataclass(frozen=True)
class PointChange:
    """One point whose status differs between the two fits."""

    before_index: int
    after_index: int
    x: tuple[float, float]
    sign: int
    status_before: str
    status_after: str
    slack_before: float
    slack_after: float

    @property
    def text(self) -> str:
        return (f"moved from {STATUS_TEXT[self.status_before]} to "
                f"{STATUS_TEXT[self.status_after]}")


@dataclass(frozen=True)
class Quantity:
    """A figure of both fits; ``change`` is after - before."""

    name: str
    before: float
    after: float

    @property
    def change(self) -> float:
        return self.after - self.before


@dataclass(frozen=True, eq=False)
class Comparison:
    before: FitResult                # the pinned reference
    after: FitResult                 # the current fit
    same_points: bool
    matched: tuple                   # (before index, after index) pairs
    added: tuple                     # after indices with no partner in ``before``
    removed: tuple                   # before indices with no partner in ``after``
    joined: tuple                    # after indices: support vectors now, not before
    left: tuple                      # before indices: support vectors before, not now
    changes: tuple                   # PointChange, in after order
    angle_degrees: float | None      # signed turn of w from before to after (linear only)
    cv_before: CVEstimate | None = None
    cv_after: CVEstimate | None = None
    moved: tuple = ()                # (before index, after index): same class, new place

    @property
    def settings_changed(self) -> dict:
        """name -> (before, after) for every fit setting that differs."""
        return {name: (getattr(self.before.config, name), getattr(self.after.config, name))
                for name in SETTINGS_COMPARED
                if getattr(self.before.config, name) != getattr(self.after.config, name)}

    @property
    def quantities(self) -> list[Quantity]:
        """The table rows: margin width, b, training and (when known) CV error."""
        rows = [Quantity("margin width", self.before.margin_width, self.after.margin_width)]
        if self.angle_degrees is not None:
            rows.append(Quantity("angle of w (degrees)", _angle_of(self.before.w),
                                 _angle_of(self.after.w)))
        rows += [Quantity("b", self.before.b, self.after.b),
                 Quantity("training error", self.before.training_error,
                          self.after.training_error),
                 Quantity("support vectors", self.before.n_support, self.after.n_support)]
        if self.cv_before is not None and self.cv_after is not None:
            rows.append(Quantity("cross-validated error", self.cv_before.error,
                                 self.cv_after.error))
        return rows

    def with_cv(self, cv_before: CVEstimate | None, cv_after: CVEstimate | None) -> "Comparison":
        from dataclasses import replace
        return replace(self, cv_before=cv_before, cv_after=cv_after)


def compare(before: FitResult, after: FitResult, cv_before: CVEstimate | None = None,
            cv_after: CVEstimate | None = None) -> Comparison:
    """What changed from ``before`` (the reference) to ``after``."""
    same = (before.X.shape == after.X.shape and np.array_equal(before.X, after.X)
            and np.array_equal(before.y, after.y))
    if same:
        matched = tuple((i, i) for i in range(len(after.y)))
        added, removed = (), ()
        moved = ()
    else:
        matched, added, removed = _match_by_coordinates(before, after)
        moved, added, removed = _pair_moves(before, after, added, removed)
    support_before = set(before.support.tolist())
    support_after = set(after.support.tolist())
    paired = matched + moved
    joined = tuple(j for i, j in paired if j in support_after and i not in support_before)
    joined += tuple(j for j in added if j in support_after)
    left = tuple(i for i, j in paired if i in support_before and j not in support_after)
    left += tuple(i for i in removed if i in support_before)
    changes = tuple(
        PointChange(before_index=i, after_index=j, x=(float(after.X[j, 0]), float(after.X[j, 1])),
                    sign=int(after.y[j]), status_before=str(before.status[i]),
                    status_after=str(after.status[j]), slack_before=float(before.slack[i]),
                    slack_after=float(after.slack[j]))
        for i, j in sorted(paired, key=lambda pair: pair[1])
        if before.status[i] != after.status[j])
    angle = None
    if before.w is not None and after.w is not None:
        angle = _signed_angle(before.w, after.w)
    return Comparison(before=before, after=after, same_points=same, matched=matched,
                      added=tuple(sorted(added)), removed=tuple(sorted(removed)),
                      joined=tuple(sorted(joined)), left=tuple(sorted(left)), changes=changes,
                      angle_degrees=angle, cv_before=cv_before, cv_after=cv_after,
                      moved=tuple(moved))


def _match_by_coordinates(before: FitResult, after: FitResult):
    """Pair points with equal coordinates and sign; duplicates pair in row order."""
    waiting = defaultdict(list)
    for i, (point, sign) in enumerate(zip(before.X.tolist(), before.y.tolist())):
        waiting[(point[0], point[1], sign)].append(i)
    matched, added = [], []
    for j, (point, sign) in enumerate(zip(after.X.tolist(), after.y.tolist())):
        queue = waiting.get((point[0], point[1], sign))
        if queue:
            matched.append((queue.pop(0), j))
        else:
            added.append(j)
    removed = sorted(i for queue in waiting.values() for i in queue)
    return tuple(matched), tuple(added), tuple(removed)


def _pair_moves(before: FitResult, after: FitResult, added, removed):
    """A point dragged to a new place keeps its row and its class: an unmatched point
    of ``before`` and one of ``after`` in the same row, of the same class, are a move."""
    appeared = {j for j in added}
    moved = tuple((i, i) for i in removed if i in appeared and before.y[i] == after.y[i])
    rows = {i for i, _ in moved}
    return (moved, tuple(j for j in added if j not in rows),
            tuple(i for i in removed if i not in rows))


def _signed_angle(w_before, w_after) -> float:
    """Turn from w_before to w_after in degrees, in (-180, 180]; counter-clockwise positive."""
    cross = w_before[0] * w_after[1] - w_before[1] * w_after[0]
    dot = float(np.dot(w_before, w_after))
    return math.degrees(math.atan2(cross, dot))


def _angle_of(w) -> float:
    """Direction of w in degrees from the first feature's axis."""
    return math.degrees(math.atan2(w[1], w[0]))
