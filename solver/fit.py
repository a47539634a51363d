"""``fit``: the one entry point.  Validates, scales, solves, and explains."""

from __future__ import annotations

import time
from dataclasses import dataclass, replace

import numpy as np

from solver import compiled_cache, limits, scaling
from solver.config import FitConfig
from solver.errors import ConvergenceError, InputError, SlacklineError
from solver.model import DecisionModel
from solver.qp.primal_solver import solve_primal
from solver.qp.dual_solver import solve_dual
from solver.result import (INSIDE, MISCLASSIFIED, ON_MARGIN, OUTSIDE, FitResult,
                     KKTResiduals)


def validate_points(X, y) -> tuple[np.ndarray, np.ndarray]:
    """Coordinates as an (n, 2) float array and labels as +1 / -1, or InputError."""
    try:
        X = np.asarray(X, dtype=float)
    except (TypeError, ValueError) as exc:
        raise InputError(f"point coordinates must be numbers ({exc})") from None
    if X.ndim != 2 or X.shape[1] != 2:
        raise InputError(f"points must be an n x 2 array of coordinates; got shape {X.shape}")
    y = np.asarray(y)
    if y.shape != (len(X),):
        raise InputError(f"there must be one label per point: {len(X)} points, "
                         f"{y.size} labels")
    if len(X) < 2:
        raise InputError(f"a fit needs at least two points, one of each class; got {len(X)}")
    bad = np.flatnonzero(~np.isfinite(X).all(axis=1))
    if len(bad):
        rows = ", ".join(str(i) for i in bad[:10]) + (" ..." if len(bad) > 10 else "")
        raise InputError(f"coordinates must be finite numbers; NaN or infinity in "
                         f"point(s) {rows} (counting from 0)")
    try:
        y = y.astype(float)
    except (TypeError, ValueError):
        raise InputError("labels must be +1 or -1") from None
    if not np.isin(y, (-1.0, 1.0)).all():
        odd = sorted(set(y[~np.isin(y, (-1.0, 1.0))].tolist()))[:5]
        raise InputError(f"labels must be +1 or -1; found {odd}")
    for sign, name in ((1, "+1"), (-1, "-1")):
        if not (y == sign).any():
            raise InputError(f"both classes are needed, but no point has label {name}; "
                             f"add at least one point of the other class")
    if (X == X[0]).all():
        raise InputError("all points sit at the same coordinates; no boundary can be "
                         "drawn between them — move or add points")
    limits.check_coordinates(X)
    return X, y.astype(int)


def fit(X, y, config: FitConfig | None = None, warm_start: FitResult | None = None) -> FitResult:
    """Fit a two-feature support vector machine.

    X (n x 2) in the user's units, y in {-1, +1}.  ``warm_start`` is a previous
    result; kernel fits use its decision function to guess the working set.
    Raises a SlacklineError subclass on anything it cannot fit.
    """
    try:
        return _fit(X, y, config, warm_start)
    except SlacklineError:
        raise
    except (ArithmeticError, ValueError, np.linalg.LinAlgError) as exc:
        # within solver.limits this is not expected; outside them a traceback helps nobody
        raise ConvergenceError(f"the solver could not work with these numbers "
                               f"({type(exc).__name__}: {exc}); scale the features "
                               f"(zscore) or choose C nearer 1") from None


def _fit(X, y, config, warm_start) -> FitResult:
    config = config or FitConfig()
    if not isinstance(config, FitConfig):
        raise InputError(f"config must be a FitConfig; got {type(config).__name__}")
    X, y = validate_points(X, y)
    start = time.perf_counter()
    shift, scale = scaling.scaling_parameters(X, config.scaling)
    Xs = scaling.apply(X, shift, scale)
    penalties = np.array([config.penalty(sign) for sign in (1, -1)])[(y < 0).astype(int)]
    limits.check_problem_scale(Xs, config, penalties)
    solve = _solve_primal if config.uses_feature_map else _solve_dual
    solved = solve(X, Xs, y, penalties, config, shift, scale, warm_start)
    try:
        return _result(X, y, penalties, config, solved, time.perf_counter() - start)
    except ConvergenceError:
        if not config.uses_feature_map:
            raise
    # once more with iterative refinement in every KKT solve: rounding in the reduced
    # KKT system can stall cvxopt near its tolerance (a 36-point fit: 50 iterations,
    # inexact multipliers; refined, 12 and optimal)
    again = _solve_primal(X, Xs, y, penalties, config, shift, scale, warm_start, refinement=1)
    again = replace(again, iterations=solved.iterations + again.iterations)   # both tries
    return _result(X, y, penalties, config, again, time.perf_counter() - start)


@dataclass(frozen=True)
class _Solved:
    """What either solver hands back, before the figures are derived from it."""

    alpha: np.ndarray
    decision: np.ndarray            # f(x_i) on the training points
    model: DecisionModel
    norm_w: float                   # |w| in the space the fit ran in
    dual_quadratic: float           # (alpha y)' K (alpha y) = |w|^2
    iterations: int
    status: str                     # cvxopt's
    rounds: int = 1
    working_set: int = 0


def _solve_primal(X, Xs, y, penalties, config, shift, scale, warm_start,
                  refinement=0) -> _Solved:
    """Linear and polynomial kernels: the primal over the exact feature map phi."""
    phi = config.kernel_spec.features(Xs, config)
    guess = None if warm_start is None else y * warm_start.decision_function(X)
    sol = solve_primal(phi, y, None if config.hard_margin else penalties, config.options,
                       guess_margin=guess, refinement=refinement)
    model = DecisionModel(config.kernel, config.gamma, config.degree, config.offset,
                          shift, scale, sol.b, feature_weights=sol.w)
    alpha = np.clip(sol.alpha, 0.0, penalties)
    dual_quadratic = float(np.sum((phi.T @ (alpha * y)) ** 2))   # |sum_i alpha_i y_i phi_i|^2
    return _Solved(alpha=alpha, decision=phi @ sol.w + sol.b, model=model,
                   norm_w=float(np.linalg.norm(sol.w)), dual_quadratic=dual_quadratic,
                   iterations=sol.iterations, status=sol.status, working_set=len(y))


def _solve_dual(X, Xs, y, penalties, config, shift, scale, warm_start) -> _Solved:
    """Kernels without a finite feature map: the dual by decomposition."""
    guess, alpha_start = _warm_start_guess(warm_start, X, y, config, penalties)
    kernel = config.kernel_spec
    kernel_matrix = lambda A, B: kernel.gram(A, B, config)  # noqa: E731
    compiled_gamma = (config.gamma if kernel.compiled == "rbf"
                      and not compiled_cache.wait_would_be_long(len(y)) else None)
    sol = solve_dual(Xs, y, penalties, kernel_matrix, config.options, guess_margin=guess,
                     alpha_start=alpha_start, rbf_gamma=compiled_gamma)
    support = np.flatnonzero(sol.alpha > 0)
    coefficients = sol.alpha[support] * y[support]                 # alpha_j y_j
    model = DecisionModel(config.kernel, config.gamma, config.degree, config.offset,
                          shift, scale, sol.b, support_vectors=Xs[support],
                          coefficients=coefficients)
    if sol.quadratic is not None:       # a'Qa from the solver's certified gradient
        dual_quadratic = sol.quadratic    # (no |S| x |S| kernel matrix: 400 MB at n = 10,000)
    else:
        K_ss = kernel_matrix(Xs[support], Xs[support])
        dual_quadratic = float(coefficients @ K_ss @ coefficients)
    return _Solved(alpha=sol.alpha, decision=sol.decision, model=model,
                   norm_w=float(np.sqrt(max(dual_quadratic, 0.0))),
                   dual_quadratic=dual_quadratic, iterations=sol.iterations, status=sol.status,
                   rounds=sol.rounds, working_set=sol.working_set)


def _result(X, y, penalties, config, solved: _Solved, seconds: float) -> FitResult:
    """Slack, objectives, statuses and KKT figures of a solution, as a FitResult."""
    alpha, decision = solved.alpha, solved.decision
    margin = y * decision                                    # y_i f(x_i)
    slack = np.maximum(0.0, 1.0 - margin)                    # xi_i = max(0, 1 - y_i f(x_i))
    finite = np.isfinite(penalties)
    primal = 0.5 * solved.norm_w ** 2 + float(np.dot(penalties[finite], slack[finite]))
    dual = float(alpha.sum()) - 0.5 * solved.dual_quadratic
    relative_gap = abs(primal - dual) / max(1.0, abs(primal))
    # the kernel dual's steps put alphas exactly on their bounds (its accuracy is the
    # gap's, not an interior point's sqrt of it)
    exact = not config.uses_feature_map
    status, support = _classify(alpha, penalties, slack, margin, relative_gap, exact)
    # alphas within the solver's accuracy of 0 or C_i are reported as exactly that,
    # so status and alpha agree everywhere (inspector, table, --json, exports);
    # the objectives above stay those of the iterate the solver reached
    alpha = _snap_to_bounds(alpha, penalties, relative_gap, exact)
    model = _without_zero_terms(solved.model, solved.alpha, alpha)
    kkt = _kkt_residuals(alpha, penalties, y, margin, slack, status)
    # cvxopt may stop on a singular KKT system a step short of its own test;
    # the optimum is still in hand when our own gap and KKT figures say so.
    # (the kernel dual certifies the whole problem's gap itself: its status is final)
    converged = solved.status == "optimal" or (config.uses_feature_map and relative_gap <= 1e-7
                                               and kkt.largest <= 1e-5)
    result = FitResult(config=config, X=X, y=y, alpha=alpha, penalties=penalties,
                       decision=decision, status=status, support=support, model=model,
                       norm_w=solved.norm_w, primal_objective=primal, dual_objective=dual,
                       kkt=kkt, iterations=solved.iterations, seconds=seconds,
                       converged=converged, solver_status=solved.status, rounds=solved.rounds,
                       working_set=solved.working_set)
    limits.check_figures(result.w, result.b, decision)
    if not converged:
        raise ConvergenceError(
            f"the solver stopped after {solved.iterations} iterations without reaching its "
            f"tolerance (relative duality gap {relative_gap:.1e}), so its last iterate is not "
            "an optimal fit. Try scaling the features or a smaller C.", best=result)
    return result


def _warm_start_guess(warm_start, X, y, config, penalties):
    """(margin guess, alpha start) from a previous result, or (None, None).

    Same points and kernel (gamma may differ): start from its alphas, those at
    their old bound moved to the new C_i; the solver repairs them to
    feasibility.  Otherwise: its decision function guesses margins.
    """
    if warm_start is None:
        return None, None
    same_points = warm_start.X.shape == X.shape and np.array_equal(warm_start.X, X) \
        and np.array_equal(warm_start.y, y)
    same_kernel = (warm_start.config.kernel == config.kernel
                   and warm_start.config.scaling == config.scaling)
    if same_points and same_kernel:
        at_bound = warm_start.status != OUTSIDE
        at_bound &= np.isfinite(warm_start.penalties)
        at_bound &= warm_start.alpha >= warm_start.penalties * (1 - 1e-6)
        alpha = np.where(at_bound, penalties, np.minimum(warm_start.alpha, penalties))
        return warm_start.functional_margin, alpha
    return y * warm_start.decision_function(X), None


def _alpha_tolerance(relative_gap: float, exact: bool = False) -> float:
    """Relative threshold for "alpha is 0" / "alpha is C", tied to the solver's accuracy.

    Interior-point complementarity alpha_i * s_i shrinks with the gap, so an
    inactive multiplier is about gap / s_i; sqrt(gap) splits the two regimes.
    ``exact``: the solver's steps put alphas exactly on their bounds (the kernel dual,
    the C path), so one off its bound by more than the gap is free: at C = 1e4, gamma
    100 (n = 1,000, rings) free support vectors with alpha = 2e-6 C were taken for 0
    under sqrt(gap), and the model without them moved f by 0.06.
    """
    if exact:
        return float(np.clip(relative_gap, 1e-12, 1e-8))
    return float(np.clip(np.sqrt(relative_gap), 1e-8, 1e-4))


def _bound_masks(alpha, penalties, tau):
    """(alpha is 0, alpha is C_i) to relative accuracy ``tau``; hard margin has no C_i."""
    finite = np.isfinite(penalties)
    scale = np.where(finite, penalties, max(float(alpha.max()), 1e-300))
    is_zero = alpha <= tau * scale
    at_bound = finite & (alpha >= (1.0 - tau) * np.where(finite, penalties, 0.0))
    return is_zero, at_bound


def _snap_to_bounds(alpha, penalties, relative_gap, exact=False):
    is_zero, at_bound = _bound_masks(alpha, penalties, _alpha_tolerance(relative_gap, exact))
    return np.where(is_zero, 0.0, np.where(at_bound, penalties, alpha))


def _without_zero_terms(model, solver_alpha, alpha):
    """A dual model without the terms whose alpha was reported as exactly 0.

    Its support vectors are then the fit's own support set; the dropped terms
    were below the solver's accuracy (about 1e-13 C_i), so f does not move.
    """
    if model.support_vectors is None:
        return model
    rows = np.flatnonzero(solver_alpha > 0)            # the points behind support_vectors
    keep = alpha[rows] > 0
    if keep.all():
        return model
    return replace(model, support_vectors=model.support_vectors[keep],
                               coefficients=model.coefficients[keep])


def _classify(alpha, penalties, slack, margin, relative_gap, exact=False):
    tau = _alpha_tolerance(relative_gap, exact)
    is_zero, at_bound = _bound_masks(alpha, penalties, tau)
    margin_tol = max(1e-7, tau)
    status = np.full(len(alpha), ON_MARGIN, dtype=object)
    status[is_zero] = OUTSIDE
    inside = at_bound & ~is_zero & (slack > margin_tol)
    status[inside] = INSIDE
    status[inside & (slack > 1.0)] = MISCLASSIFIED
    # a point across the boundary is misclassified whatever its alpha says
    status[margin < 0] = MISCLASSIFIED
    return status.astype(str), np.flatnonzero(~is_zero)


def _kkt_residuals(alpha, penalties, y, margin, slack, status) -> KKTResiduals:
    finite = np.isfinite(penalties)
    bounds = float(np.max(np.maximum(0.0, -alpha)))
    if finite.any():
        bounds = max(bounds, float(np.max(np.maximum(0.0, alpha[finite] - penalties[finite]))))
    equality = abs(float(alpha @ y)) / max(1.0, float(alpha.sum()))
    primal = float(np.max(np.maximum(0.0, 1.0 - slack - margin)))
    gaps = np.zeros(len(alpha))
    outside = status == OUTSIDE
    gaps[outside] = np.maximum(0.0, 1.0 - margin[outside])
    on = status == ON_MARGIN
    gaps[on] = np.abs(margin[on] - 1.0)
    bound = (status == INSIDE) | (status == MISCLASSIFIED)
    gaps[bound] = np.maximum(0.0, margin[bound] - 1.0)
    return KKTResiduals(primal=primal, bounds=bounds, equality=equality,
                        complementarity=float(gaps.max()))
