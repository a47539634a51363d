"""Which points hold the boundary: for each support vector, the fit without it.

A point with alpha = 0 (not a support vector) has no influence by
construction: the solution stays optimal when it is removed, since it enters
neither w = sum_i alpha_i y_i phi(x_i) nor any active constraint.  So only
support vectors are left out, one at a time; each leave-out fit walks the
point's alpha down to zero from the full solution (solver.study.leave_out)
and, where that walk cannot be continued exactly, re-fits without the point
(solver.fit, warm-started when the coordinates allow it).

Feature scaling is held at the full data's parameters: the question is what
the point does to the fit, not to the scaling.  (With scaling "none" the
leave-out fit is exactly the fit of the other points.)

Per support vector:
    angle_change   linear kernel: the turn of w, in degrees in the plane of the
                   two features (original units), positive counter-clockwise
                   with the first feature across and the second up; None for
                   other kernels, whose boundary is not a line
    b_change       change of b (original units for linear)
    margin_change  change of the margin width 2/|w| (data units for linear,
                   the kernel's feature space otherwise)
    flips          training points (the left-out one included) whose predicted
                   class changes; heldout_flips the same for held-out points
Ranked largest first: by |angle_change| (linear), else by the largest change
of the decision value on the training points.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver import scaling
from solver.errors import ConvergenceError
from solver.fit import fit
from solver.model import DecisionModel
from solver.study.leave_out import FeatureSpace, GramSpace, LeaveOut, PathBroken


@dataclass(frozen=True)
class PointInfluence:
    point: int                      # index of the support vector in the training points
    angle_change: float | None      # degrees (linear), else None
    b_change: float
    margin_change: float
    flips: tuple                    # training indices whose predicted class changes
    heldout_flips: tuple            # held-out indices whose predicted class changes
    largest_decision_change: float  # max_j |f_without(x_j) - f(x_j)| on the training points
    method: str                     # "path" (exact walk) or "refit"
    model: DecisionModel            # the decision function without the point

    @property
    def w(self) -> np.ndarray | None:
        """w of the fit without the point, original units (linear kernel), else None."""
        if self.angle_change is None:
            return None
        m = self.model
        return scaling.weights_in_original_units(m.feature_weights, m.b, m.shift, m.scale)[0]

    @property
    def b(self) -> float:
        """b of the fit without the point (original units for linear)."""
        m = self.model
        if self.angle_change is None:
            return float(m.b)
        return float(scaling.weights_in_original_units(m.feature_weights, m.b, m.shift,
                                                       m.scale)[1])

    def decision_function(self, points) -> np.ndarray:
        """f of the fit without the point, anywhere (original units)."""
        return self.model.decision_function(points)

    def decision_grid(self, xs, ys) -> np.ndarray:
        """f without the point on the lattice xs x ys, as values[iy, ix]."""
        return self.model.grid_values(xs, ys)

    @property
    def size(self) -> float:
        return abs(self.angle_change) if self.angle_change is not None \
            else self.largest_decision_change

    def to_json(self) -> dict:
        return {"point": self.point, "angle_change": self.angle_change,
                "b_change": self.b_change, "margin_change": self.margin_change,
                "flips": list(self.flips), "heldout_flips": list(self.heldout_flips),
                "largest_decision_change": self.largest_decision_change,
                "method": self.method}

    def sentence(self) -> str:
        """'leaving this point out rotates the boundary by 14 degrees and flips 3 predictions'."""
        flips = len(self.flips) + len(self.heldout_flips)
        flipped = f"flips {flips} prediction{'s' if flips != 1 else ''}" if flips \
            else "flips no prediction"
        if self.angle_change is not None:
            return (f"leaving this point out rotates the boundary by "
                    f"{abs(self.angle_change):.3g} degrees and {flipped}")
        return (f"leaving this point out moves the decision value by up to "
                f"{self.largest_decision_change:.3g} and {flipped}")


@dataclass(frozen=True)
class Influence:
    entries: tuple                  # PointInfluence, largest first
    n_points: int
    kernel: str

    @property
    def non_support(self) -> int:
        return self.n_points - len(self.entries)

    def of(self, point: int) -> PointInfluence | None:
        return next((e for e in self.entries if e.point == point), None)

    def to_json(self) -> list:
        return [entry.to_json() for entry in self.entries]

    def note(self) -> str:
        return (f"the other {self.non_support} points are not support vectors (alpha = 0): "
                "leaving any of them out changes nothing, by construction")

    def lines(self, top: int = 10, source_lines=()) -> list[str]:
        """The summary's lines; ``source_lines``: each point's line in its file, if known."""
        out = [f"  influence of the {len(self.entries)} support vectors (each left out in "
               "turn; feature scaling held), largest first:"]
        for entry in self.entries[:top]:
            angle = "" if entry.angle_change is None else \
                f"angle {entry.angle_change:+.3g} deg, "
            where = (f" (line {source_lines[entry.point]})"
                     if len(source_lines) == self.n_points else "")
            out.append(f"    point {entry.point}{where}: {angle}b {entry.b_change:+.3g}, margin "
                       f"{entry.margin_change:+.3g}, {len(entry.flips)} training and "
                       f"{len(entry.heldout_flips)} held-out flips")
        if len(self.entries) > top:
            out.append(f"    ... and {len(self.entries) - top} more (all in --json)")
        out.append("  " + self.note())
        return out


def influence_of_support_vectors(result, heldout=None, should_stop=None) -> Influence | None:
    """The effect of leaving out each support vector of ``result`` (a FitResult).

    ``heldout``: optional n_h x 2 points (original units) whose flips to report.
    ``should_stop``: optional callable checked between support vectors; when it
    returns True the work stops and None is returned (a newer fit replaced it).
    """
    config, model = result.config, result.model
    shift, scale = model.shift, model.scale
    Xs = scaling.apply(np.asarray(result.X, dtype=float), shift, scale)
    heldout = np.zeros((0, 2)) if heldout is None else np.asarray(heldout, float).reshape(-1, 2)
    Hs = scaling.apply(heldout, shift, scale)
    kernel = config.kernel_spec
    phi = kernel.features(Xs, config) if kernel.has_feature_map else None
    phi_h = kernel.features(Hs, config) if kernel.has_feature_map and len(Hs) else None
    y = np.asarray(result.y, dtype=float)
    if phi is not None:
        space = FeatureSpace(phi, y)
    else:
        def kernel_block(rows, cols):
            return kernel.gram(Xs[rows], Xs if cols is None else Xs[cols], config)
        space = GramSpace(kernel_block, len(y), y)
    walk = LeaveOut(result, space)
    f0 = np.asarray(result.decision, dtype=float)
    f0_h = result.decision_function(heldout) if len(heldout) else np.zeros(0)
    base = _Geometry.of(result, f0, walk)
    entries = []
    for c in result.support.tolist():
        if should_stop is not None and should_stop():
            return None
        try:
            S, alpha_S, b_new, g_new = walk.without(c)
            method = "path"
        except PathBroken:
            S, alpha_S, b_new = _refit_without(result, Xs, c)
            g_new, method = None, "refit"
        delta = (alpha_S - walk.alpha[S]) * walk.y[S]          # change of alpha_j y_j on S
        if phi is not None:
            w_new = model.feature_weights + phi[S].T @ delta
            f_new = phi @ w_new + b_new if g_new is None else y * (g_new + 1.0)
            f_new_h = phi_h @ w_new + b_new if phi_h is not None else np.zeros(0)
            new_model = DecisionModel(model.kernel, model.gamma, model.degree, model.offset,
                                      shift, scale, b_new, feature_weights=w_new)
            norm_new = float(np.linalg.norm(w_new))
        else:
            K_S = (space.rows(S) * (walk.y[S, None] * walk.y[None, :])).T   # K[:, S]
            f_new = (f0 + K_S @ delta + (b_new - walk.b0)) if g_new is None \
                else y * (g_new + 1.0)
            f_new_h = (f0_h + kernel.gram(Hs, Xs[S], config) @ delta + (b_new - walk.b0)
                       if len(Hs) else np.zeros(0))
            # |w_new|^2 = |w|^2 + 2 delta'(K a y)_S + delta' K_SS delta, (K a y)_S = f_S - b
            norm2 = base.norm ** 2 + 2 * delta @ (f0[S] - walk.b0) + delta @ K_S[S] @ delta
            norm_new = math.sqrt(max(norm2, 0.0))
            a_new = walk.alpha.copy()
            a_new[S] = alpha_S
            keep = a_new > 0
            new_model = DecisionModel(model.kernel, model.gamma, model.degree, model.offset,
                                      shift, scale, b_new, support_vectors=Xs[keep],
                                      coefficients=a_new[keep] * walk.y[keep])
        entries.append(base.compare(c, new_model, norm_new, f_new, f_new_h, f0_h, method))
    entries.sort(key=lambda e: (-e.size, -len(e.flips), e.point))
    return Influence(entries=tuple(entries), n_points=len(result.y), kernel=config.kernel)


@dataclass(frozen=True)
class _Geometry:
    """The full fit's boundary figures, to compare each leave-out fit with."""

    linear: bool
    w: np.ndarray | None            # original units (linear)
    b: float                        # original units (linear) or the model's
    norm: float                     # |w| in the fit's space
    margin: float                   # 2/|w|: data units (linear) or feature space
    f0: np.ndarray
    positive0: np.ndarray           # f0 >= 0: the full fit's predicted class

    @classmethod
    def of(cls, result, f0, walk):
        linear = result.config.kernel == "linear"
        return cls(linear=linear, w=None if not linear else np.asarray(result.w, float),
                   b=float(result.b), norm=float(result.norm_w),
                   margin=float(result.margin_width), f0=f0, positive0=f0 >= 0)

    def compare(self, c, model, norm_new, f_new, f_new_h, f0_h, method) -> PointInfluence:
        if self.linear:
            w_new, b_new = scaling.weights_in_original_units(model.feature_weights, model.b,
                                                             model.shift, model.scale)
            cross = self.w[0] * w_new[1] - self.w[1] * w_new[0]
            angle = math.degrees(math.atan2(cross, float(self.w @ w_new)))
            margin = 2.0 / float(np.linalg.norm(w_new))
        else:
            angle, b_new = None, model.b
            margin = 2.0 / norm_new if norm_new > 0 else math.inf
        flips = np.flatnonzero((f_new >= 0) != self.positive0).tolist()
        heldout_flips = (np.flatnonzero((f_new_h >= 0) != (f0_h >= 0)).tolist()
                         if len(f0_h) else [])
        change = f_new - self.f0
        return PointInfluence(point=int(c), angle_change=angle, b_change=float(b_new - self.b),
                              margin_change=float(margin - self.margin),
                              flips=tuple(flips), heldout_flips=tuple(heldout_flips),
                              largest_decision_change=float(max(change.max(), -change.min())),
                              method=method, model=model)


def _refit_without(result, Xs, c):
    """(S = all indices, alpha on S, b) from a re-fit without point c, scaling held."""
    keep = np.ones(len(result.y), dtype=bool)
    keep[c] = False
    config = result.config.with_changes(scaling="none")
    warm = result if result.config.scaling == "none" else None
    try:
        refit = fit(Xs[keep], result.y[keep], config, warm_start=warm)
    except ConvergenceError as exc:      # its last iterate is the best there is; say so
        if exc.best is None:
            raise
        refit = exc.best
    alpha = np.zeros(len(result.y))
    alpha[keep] = refit.alpha
    return np.arange(len(result.y)), alpha, float(refit.model.b)
