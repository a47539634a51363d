"""The immutable result of one fit: global figures and every point's story."""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from solver.config import FitConfig
from solver.model import DecisionModel

# Per-point status codes (stable: they appear in files) and their wording.
OUTSIDE = "outside"
ON_MARGIN = "on_margin"
INSIDE = "inside"
MISCLASSIFIED = "misclassified"
STATUSES = (OUTSIDE, ON_MARGIN, INSIDE, MISCLASSIFIED)
MARGIN_SLACK = 1e-7        # slack of a point on the margin within the solver's accuracy
STATUS_TEXT = {
    OUTSIDE: "outside the margin",
    ON_MARGIN: "on the margin",
    INSIDE: "inside the margin",
    MISCLASSIFIED: "misclassified",
}


@dataclass(frozen=True)
class KKTResiduals:
    """Largest violation of each optimality condition (0 at an exact optimum).

    primal:          max_i max(0, 1 - xi_i - y_i f(x_i))    (margin constraints)
    bounds:          max_i max(0, -alpha_i, alpha_i - C_i)   (box of the dual)
    equality:        |sum_i alpha_i y_i| / max(1, sum_i alpha_i)
    complementarity: max_i of |y_i f_i - 1| over free alphas, of
                     max(0, 1 - y_i f_i) where alpha_i = 0 and of
                     max(0, y_i f_i - 1) where alpha_i = C_i
    """

    primal: float
    bounds: float
    equality: float
    complementarity: float

    @property
    def largest(self) -> float:
        return max(self.primal, self.bounds, self.equality, self.complementarity)

    def to_dict(self) -> dict:
        return {"primal": self.primal, "bounds": self.bounds,
                "equality": self.equality, "complementarity": self.complementarity}


def _frozen(array) -> np.ndarray:
    array = np.array(array, copy=True)
    array.setflags(write=False)
    return array


ZERO_W = 1e-9      # |sum alpha_i y_i x_i| below this share of sum alpha_i |x_i|: w is 0
# what the read-outs say then (summary, report, command line)
NO_LINE = "no line separates these classes at this C, so f(x) = b at every point"


@dataclass(frozen=True, eq=False)
class FitResult:
    """Everything a fit found.  Arrays are read-only and in input row order."""

    config: FitConfig
    X: np.ndarray                 # points, original units (n x 2)
    y: np.ndarray                 # signs, +1 / -1
    alpha: np.ndarray             # dual variables, 0 <= alpha_i <= C_i
    penalties: np.ndarray         # C_i (inf for hard margin)
    decision: np.ndarray          # f(x_i)
    status: np.ndarray            # one of STATUSES per point
    support: np.ndarray           # indices with alpha_i > 0 (relative threshold)
    model: DecisionModel
    norm_w: float                 # |w| in the space the fit ran in (after scaling)
    primal_objective: float       # 1/2 |w|^2 + sum C_i xi_i
    dual_objective: float         # sum alpha_i - 1/2 |w|^2
    kkt: KKTResiduals
    iterations: int               # interior-point iterations, all rounds
    seconds: float                # solve wall time
    converged: bool = True
    solver_status: str = "optimal"
    rounds: int = 1               # working-set rounds (kernel dual), 1 otherwise
    working_set: int = 0          # variables in the last QP

    def __post_init__(self):
        for name in ("X", "y", "alpha", "penalties", "decision", "status", "support"):
            object.__setattr__(self, name, _frozen(getattr(self, name)))

    # -- per point ---------------------------------------------------------
    @cached_property
    def functional_margin(self) -> np.ndarray:
        """y_i f(x_i): at least 1 outside the band, below 0 when misclassified."""
        return _frozen(self.y * self.decision)

    @cached_property
    def slack(self) -> np.ndarray:
        """xi_i = max(0, 1 - y_i f(x_i)); exactly 0 on a point on the margin whose
        y_i f(x_i) misses 1 by no more than the accuracy its status was judged with
        (MARGIN_SLACK, the smallest tolerance of ``fit._classify``): an exact solve
        leaves 1 - 2e-16 there, an interior-point one 1 - 1e-9, which read as slack.
        The objectives keep the solver's own figures."""
        slack = np.maximum(0.0, 1.0 - self.functional_margin)
        slack[(self.status == ON_MARGIN) & (slack <= MARGIN_SLACK)] = 0.0
        return _frozen(slack)

    @cached_property
    def distance(self) -> np.ndarray:
        """Signed distance y_i f(x_i) / |w| to the boundary (original units for linear);
        NaN when w is 0 (``w_is_zero``): there is no boundary to be at a distance from."""
        if self.w_is_zero:
            return _frozen(np.full(len(self.y), np.nan))
        return _frozen(self.functional_margin / self.weight_norm)

    @cached_property
    def projection(self) -> np.ndarray | None:
        """p_i = w.x_i / |w|, the point's projection onto the direction of w (linear;
        NaN when w is 0, which has no direction)."""
        if self.w is None:
            return None
        if self.w_is_zero:
            return _frozen(np.full(len(self.y), np.nan))
        return _frozen(self.X @ self.w / self.weight_norm)

    # -- global ------------------------------------------------------------
    @cached_property
    def w(self) -> np.ndarray | None:
        """Weight vector in the user's original units (linear kernel only)."""
        if self.config.kernel != "linear":
            return None
        from solver.scaling import weights_in_original_units
        w, _ = weights_in_original_units(self.model.feature_weights, self.model.b,
                                         self.model.shift, self.model.scale)
        return _frozen(w)

    @cached_property
    def b(self) -> float:
        """Intercept of f in the user's original units."""
        if self.config.kernel != "linear":
            return self.model.b
        from solver.scaling import weights_in_original_units
        _, b = weights_in_original_units(self.model.feature_weights, self.model.b,
                                         self.model.shift, self.model.scale)
        return b

    @property
    def weight_norm(self) -> float:
        """|w| in original units (linear) or in the kernel's feature space."""
        return float(np.linalg.norm(self.w)) if self.w is not None else self.norm_w

    @cached_property
    def w_is_zero(self) -> bool:
        """Whether w = sum_i alpha_i y_i x_i is 0 to rounding (linear kernel): its terms
        cancel to within ZERO_W of their sizes, so f(x) = b at every point and no line
        separates the classes at this C.  That is the exact optimum for classes no line
        splits better than a constant (heavily overlapping ones at small C); the computed
        |w| is then rounding, about 1e-14, and 2/|w| would read 1e14."""
        if self.w is None:
            return False
        return weights_cancel(self.model.feature_weights, self.alpha, self.X,
                              self.model.shift, self.model.scale)

    @property
    def margin_width(self) -> float:
        """2 / |w|: width of the band between f = -1 and f = +1 (infinite for w = 0)."""
        norm = self.weight_norm
        return 2.0 / norm if norm > 0 else float("inf")

    @property
    def half_norm_w2(self) -> float:
        """The regularisation term 1/2 |w|^2 of the objective."""
        return 0.5 * self.norm_w ** 2

    @property
    def penalty_term(self) -> float:
        """The loss term sum_i C_i xi_i (0 for a hard margin)."""
        finite = np.isfinite(self.penalties)
        return float(np.dot(self.penalties[finite], self.slack[finite]))

    @property
    def duality_gap(self) -> float:
        return self.primal_objective - self.dual_objective

    @property
    def relative_gap(self) -> float:
        return abs(self.duality_gap) / max(1.0, abs(self.primal_objective))

    @property
    def training_error(self) -> float:
        """Fraction of points on the wrong side of the boundary (y f < 0), the share of
        those whose status is misclassified.  A point exactly on it (f = 0, which only
        exactly symmetric data gives) is not counted, though predict calls it +1."""
        return float(np.mean(self.functional_margin < 0))

    def count(self, status: str) -> int:
        return int(np.count_nonzero(self.status == status))

    @property
    def n_support(self) -> int:
        return int(len(self.support))

    def decision_function(self, points) -> np.ndarray:
        """f evaluated anywhere (original units)."""
        return self.model.decision_function(points)

    def decision_grid(self, xs, ys) -> np.ndarray:
        """f on the lattice xs x ys as values[iy, ix] (``DecisionModel.grid_values``)."""
        return self.model.grid_values(xs, ys)

    @property
    def has_gradient(self) -> bool:
        """Whether ``decision_gradient`` is exact (Gaussian kernel fits)."""
        return self.model.has_gradient

    def decision_gradient(self, points) -> np.ndarray:
        """grad f evaluated anywhere (original units); Gaussian kernel fits only."""
        return self.model.gradient(points)

    def decision_value_and_gradient(self, points) -> tuple[np.ndarray, np.ndarray]:
        """(f, grad f) anywhere from one kernel block; Gaussian kernel fits only."""
        return self.model.value_and_gradient(points)

    def predict(self, points) -> np.ndarray:
        """Sign of f: +1 or -1 (0 maps to +1)."""
        return np.where(self.decision_function(points) >= 0, 1, -1)

    # -- the one serialiser ----------------------------------------------------
    def to_dict(self) -> dict:
        """Every figure of the fit as plain JSON values (non-finite numbers as None).

        Experiment files store exactly this (their "results"), ``slackline fit
        --json`` prints it, and the exports read it.  Per-point arrays are in
        input row order.
        """
        return {
            "w": None if self.w is None else [float(v) for v in self.w],
            "b": float(self.b),
            "weight_norm": float(self.weight_norm),
            "margin_width": _finite(self.margin_width),
            "objective": {"primal": float(self.primal_objective),
                          "dual": float(self.dual_objective),
                          "gap": _finite(self.duality_gap),
                          "regularisation": _finite(self.half_norm_w2),
                          "penalty": _finite(self.penalty_term)},
            "support": [int(i) for i in self.support],
            "alpha": self.alpha.astype(float).tolist(),
            "slack": self.slack.astype(float).tolist(),
            "decision": self.decision.astype(float).tolist(),
            "status": [str(s) for s in self.status],
            "counts": {status: self.count(status) for status in STATUSES},
            "training_error": _finite(self.training_error),
            "kkt_residuals": {k: _finite(v) for k, v in self.kkt.to_dict().items()},
            "solver": {"iterations": int(self.iterations), "rounds": int(self.rounds),
                       "seconds": float(self.seconds), "converged": bool(self.converged),
                       "status": str(self.solver_status)},
            "model": self.model.to_dict(),
        }


def _finite(value):
    value = float(value)
    return value if np.isfinite(value) else None


def weights_cancel(feature_weights, alpha, X, shift, scale) -> bool:
    """Whether w = sum_i alpha_i y_i u_i (u: the scaled points) is 0 to rounding: at most
    ZERO_W of sum_i alpha_i |u_i| (``FitResult.w_is_zero``; also for stored figures,
    whose weight_norm keeps the rounding)."""
    alpha = np.asarray(alpha, dtype=float)
    if feature_weights is None or not alpha.any():
        return False
    X = np.asarray(X, dtype=float)
    shift = np.zeros(X.shape[1]) if shift is None else np.asarray(shift, dtype=float)
    scale = np.ones(X.shape[1]) if scale is None else np.asarray(scale, dtype=float)
    sizes = float(np.dot(alpha, np.linalg.norm((X - shift) / scale, axis=1)))
    return float(np.linalg.norm(feature_weights)) <= ZERO_W * sizes
