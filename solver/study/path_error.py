"""Held-out error along an exact C path, as an exact step function of C.

Between two breakpoints alpha and b are affine in C, so the decision function
at any held-out point, f(x; C) = sum_j alpha_j(C) y_j k(x, x_j) + b(C), is
affine in C too: its sign changes at most once per segment, where the line
through its values at the segment's two ends crosses zero.  Collecting those
crossings gives the held-out error at every C in the range, exactly.
"""

from __future__ import annotations

import numpy as np

from solver import scaling
from solver.qp.path_gram import FeatureGram
from solver.qp.path_trace import HELD


class _HeldOutSide:
    """f at the held-out points from a segment's partition, through w (feature maps)
    or the test-by-train kernel matrix."""

    def __init__(self, path, X_test):
        Xs = scaling.apply(np.asarray(X_test, dtype=float), path.shift, path.scale)
        kernel = path.config.kernel_spec
        self.y = path.gram.y
        self.weights = path.weights
        if isinstance(path.gram, FeatureGram):
            self.train = path.gram.phi                     # n x m
            self.test = kernel.features(Xs, path.config)   # t x m
            self.held = np.zeros(self.train.shape[1])      # sum_L w_j y_j phi_j
        else:
            self.train = None
            self.test = kernel.gram(Xs, path.Xs, path.config)   # t x n
            self.held = np.zeros(len(Xs))                  # sum_L w_j y_j k(x_t, x_j)

    def _column(self, j):
        return self.train[j] if self.train is not None else self.test[:, j]

    def set_held(self, codes) -> None:
        coefficients = np.where(codes == HELD, self.weights * self.y, 0.0)
        if self.train is not None:
            self.held = self.train.T @ coefficients
        else:
            self.held = self.test @ coefficients

    def change(self, j, old, new) -> None:
        if old == HELD:
            self.held = self.held - self.weights[j] * self.y[j] * self._column(j)
        if new == HELD:
            self.held = self.held + self.weights[j] * self.y[j] * self._column(j)

    def decision(self, C, edge, alpha_edge, b) -> np.ndarray:
        """f(x_t; C) = C * held + sum_E alpha_j y_j k(x_t, x_j) + b."""
        coefficients = alpha_edge * self.y[edge]
        if self.train is not None:
            weights = C * self.held + (self.train[edge].T @ coefficients if len(edge) else 0.0)
            return self.test @ weights + b
        part = self.test[:, edge] @ coefficients if len(edge) else 0.0
        return C * self.held + part + b


def held_out_steps(path, X_test, y_test) -> tuple[np.ndarray, np.ndarray]:
    """(knots, errors): the held-out error is errors[0] from c_from up to knots[0],
    errors[i] from knots[i - 1] up to knots[i], and errors[-1] up to c_to.

    A prediction is sign(f) with f = 0 counted as +1, as FitResult.predict does.
    """
    y_test = np.asarray(y_test)
    side = _HeldOutSide(path, X_test)
    ends = np.r_[path.starts[1:], path.c_to]
    codes = path.codes(0)
    side.set_held(codes)
    crossings: list[tuple[float, int]] = []
    first = previous_end = None
    for k, (start, stop) in enumerate(zip(path.starts, ends)):
        if k:
            points, new = path._changes[k]
            for j, code in zip(points, new):
                side.change(j, codes[j], code)
                codes[j] = code
        edge, alpha_edge, slope_edge, b, slope_b = path._segments[k]
        at_start = side.decision(start, edge, alpha_edge, b)
        step = stop - start
        at_stop = side.decision(stop, edge, alpha_edge + step * slope_edge, b + step * slope_b)
        if first is None:
            first = at_start
        elif previous_end is not None:          # a re-anchor may move f a little
            for t in np.flatnonzero((previous_end >= 0) != (at_start >= 0)):
                crossings.append((float(start), int(t)))
        for t in np.flatnonzero((at_start >= 0) != (at_stop >= 0)):
            # f is affine on the segment: zero where the line through both ends is
            share = at_start[t] / (at_start[t] - at_stop[t])
            crossings.append((float(start + step * share), int(t)))
        previous_end = at_stop
    wrong = np.where(first >= 0, 1, -1) != y_test
    count = int(wrong.sum())
    knots, errors = [], [count]
    for C, t in sorted(crossings):
        count += -1 if wrong[t] else 1
        wrong[t] = not wrong[t]
        if knots and C == knots[-1]:
            errors[-1] = count
        else:
            knots.append(C)
            errors.append(count)
    return np.array(knots, dtype=float), np.array(errors, dtype=float) / max(1, len(y_test))


def value_at(knots: np.ndarray, values: np.ndarray, C) -> np.ndarray:
    """The step function (knots, values) at C (a number or an array)."""
    return values[np.searchsorted(knots, C, side="right")]
