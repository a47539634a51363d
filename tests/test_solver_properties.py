"""Properties every optimum must have, on random data (hypothesis).

The KKT conditions and strong duality are facts of convex quadratic
programming (common practice, no source); row-order and scaling invariance
follow from the problem's definition.
"""

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from solver import FitConfig, fit
from solver.scaling import apply, scaling_parameters

SETTINGS = settings(max_examples=25, deadline=None,
                    suppress_health_check=[HealthCheck.too_slow])


@st.composite
def problems(draw):
    n = draw(st.integers(6, 40))
    seed = draw(st.integers(0, 2**31 - 1))
    separation = draw(st.floats(0.0, 4.0))
    rng = np.random.default_rng(seed)
    half = n // 2
    X = np.vstack([rng.normal(0, 1, (half, 2)),
                   rng.normal(separation, 1, (n - half, 2))]) * draw(st.sampled_from([0.1, 1, 30]))
    y = np.r_[-np.ones(half), np.ones(n - half)]
    kernel = draw(st.sampled_from(["linear", "polynomial", "rbf"]))
    config = FitConfig(C=draw(st.floats(0.01, 100.0)), kernel=kernel, gamma=0.5, degree=2,
                       scaling="zscore")
    return X, y, config


@SETTINGS
@given(problems())
def test_primal_and_dual_objectives_agree(problem):
    X, y, config = problem
    result = fit(X, y, config)
    assert abs(result.primal_objective - result.dual_objective) <= \
        1e-6 * max(1.0, abs(result.primal_objective))


@SETTINGS
@given(problems())
def test_kkt_conditions_hold(problem):
    X, y, config = problem
    result = fit(X, y, config)
    assert result.kkt.bounds <= 1e-9 * max(1.0, config.C)
    assert result.kkt.equality <= 1e-6
    assert result.kkt.complementarity <= 1e-4


@SETTINGS
@given(problems(), st.integers(0, 2**31 - 1))
def test_results_do_not_depend_on_row_order(problem, seed):
    X, y, config = problem
    order = np.random.default_rng(seed).permutation(len(y))
    first = fit(X, y, config)
    shuffled = fit(X[order], y[order], config)
    np.testing.assert_allclose(shuffled.decision, first.decision[order], atol=1e-5)
    assert abs(shuffled.dual_objective - first.dual_objective) <= \
        1e-7 * max(1.0, abs(first.dual_objective))


@SETTINGS
@given(problems(), st.sampled_from(["zscore", "range"]))
def test_scaling_inside_the_fit_equals_a_fit_on_prescaled_points(problem, method):
    X, y, config = problem
    shift, scale = scaling_parameters(X, method)
    inside = fit(X, y, config.with_changes(scaling=method))
    outside = fit(apply(X, shift, scale), y, config.with_changes(scaling="none"))
    np.testing.assert_allclose(inside.decision, outside.decision, atol=1e-5)
    assert abs(inside.dual_objective - outside.dual_objective) <= \
        1e-7 * max(1.0, abs(outside.dual_objective))
    if config.kernel == "linear":
        # back-transform: w_original = w_scaled / scale, b = b_s - w_s.(shift/scale)
        np.testing.assert_allclose(inside.w, outside.w / scale, rtol=1e-6, atol=1e-9)
