"""A FitResult from the path's alpha and b at one C: every view works unchanged.

The figures are computed from alpha and b alone, exactly as for a QP fit, so
the evaluated result carries its own duality gap and KKT residuals.
"""

from __future__ import annotations

import time

import numpy as np

from solver.model import DecisionModel
from solver.qp.path_gram import FeatureGram
from solver.result import FitResult


def result_from_alpha(path, C: float, alpha: np.ndarray, b: float, started: float) -> FitResult:
    from solver.fit import _classify, _kkt_residuals   # solver.fit imports solver.qp
    config = path.config.with_changes(C=float(C), hard_margin=False)
    gram, y = path.gram, path.y
    penalties = C * path.weights
    common = dict(kernel=config.kernel, gamma=config.gamma, degree=config.degree,
                  offset=config.offset, shift=path.shift, scale=path.scale, b=float(b))
    if isinstance(gram, FeatureGram):
        feature_weights = gram.weights(alpha)
        decision = gram.phi @ feature_weights + b
        model = DecisionModel(feature_weights=feature_weights, **common)
        quadratic = float(feature_weights @ feature_weights)          # |w|^2
    else:
        support = np.flatnonzero(alpha > 0)
        coefficients = alpha[support] * y[support]
        decision = gram.decision(alpha, b)
        model = DecisionModel(support_vectors=path.Xs[support], coefficients=coefficients,
                              **common)
        # |w|^2 = sum_ij c_i c_j k_ij = sum_i c_i (f_i - b) over the support vectors
        quadratic = float(coefficients @ (decision[support] - b))
    margin = y * decision
    slack = np.maximum(0.0, 1.0 - margin)
    primal = 0.5 * quadratic + float(penalties @ slack)
    dual = float(alpha.sum()) - 0.5 * quadratic
    gap = abs(primal - dual) / max(1.0, abs(primal))
    status, support = _classify(alpha, penalties, slack, margin, gap, exact=True)  # affine
    kkt = _kkt_residuals(alpha, penalties, y, margin, slack, status)
    return FitResult(config=config, X=path.X, y=path.y, alpha=alpha, penalties=penalties,
                     decision=decision, status=status, support=support, model=model,
                     norm_w=float(np.sqrt(max(quadratic, 0.0))), primal_objective=primal,
                     dual_objective=dual, kkt=kkt, iterations=0,
                     seconds=time.perf_counter() - started, converged=True,
                     solver_status="path", rounds=0, working_set=len(path.y))
