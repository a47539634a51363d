"""Figure geometry as data: boundary, band and slack segments lie on their level sets.

Checked on the three bundled samples (solver.files.bundled.samples(), our own
invented demo data) with their stored settings, and on the kernel fits of
issue 11's report.  The tolerances are the issue's: |f| below 1e-6 for linear
fits (exact lines) and 2e-2 for kernels (contours on a lattice, projected).
The expected values are definitions: the boundary is f = 0, the margin
edges f = +1 and f = -1, and a slack segment ends on its point's own edge,
f = y_i.
"""

import json

import numpy as np
import pytest

from app.canvas import geometry
from app.canvas.figure_data import figure_geometry
from cli import render
from solver import FitConfig, fit
from solver.files.bundled import samples
from solver.files.experiment import load_experiment

SAMPLES = sorted(entry.name for entry in samples().iterdir()
                 if entry.name.endswith(".experiment.json"))
KERNEL_FITS = {"rbf": dict(kernel="rbf", scaling="zscore", gamma=1.0, C=1.0, hard_margin=False),
               "polynomial": dict(kernel="polynomial", scaling="zscore", gamma=0.5, degree=3,
                                  C=1.0, hard_margin=False)}


def _sample(name, **changes):
    experiment = load_experiment(samples() / name)
    config = experiment.config.with_changes(**changes) if changes else experiment.config
    data = experiment.dataset
    return data, fit(data.X, data.y, config)


def _tolerance(result):
    return 1e-6 if result.config.kernel == "linear" else 2e-2


def _all_fits():
    cases = [(name, {}) for name in SAMPLES]
    cases += [(name, KERNEL_FITS[kernel]) for name in SAMPLES for kernel in sorted(KERNEL_FITS)]
    return cases


FITS = _all_fits()
IDS = [f"{name.split('.')[0]}-{changes.get('kernel', 'stored')}" for name, changes in FITS]


def test_there_are_three_bundled_samples():
    assert len(SAMPLES) == 3


@pytest.mark.parametrize("name,changes", FITS, ids=IDS)
def test_every_boundary_vertex_lies_on_f_equals_zero(name, changes):
    data, result = _sample(name, **changes)
    figure = figure_geometry(result, data.feature_names)
    vertices = np.array([v for line in figure["boundary"] for v in line])
    assert len(vertices) >= 2
    assert np.max(np.abs(result.decision_function(vertices))) < _tolerance(result)


@pytest.mark.parametrize("name,changes", FITS, ids=IDS)
def test_every_band_vertex_lies_on_its_margin_edge(name, changes):
    data, result = _sample(name, **changes)
    figure = figure_geometry(result, data.feature_names)
    for side, level in (("positive", 1.0), ("negative", -1.0)):
        vertices = np.array([v for line in figure["band"][side] for v in line]).reshape(-1, 2)
        if len(vertices):
            error = np.abs(result.decision_function(vertices) - level)
            assert np.max(error) < _tolerance(result)


@pytest.mark.parametrize("name,changes", FITS, ids=IDS)
def test_every_slack_segment_runs_from_its_point_to_its_own_margin_edge(name, changes):
    data, result = _sample(name, **changes)
    figure = figure_geometry(result, data.feature_names)
    for segment in figure["slack"]:
        i = segment["point"]
        assert result.slack[i] > 0
        assert segment["from"] == pytest.approx(list(data.X[i]))
        f_end = result.decision_function(np.array([segment["to"]]))[0]
        assert abs(f_end - data.y[i]) < _tolerance(result)


@pytest.mark.parametrize("name,changes", FITS, ids=IDS)
def test_support_lists_the_fits_support_vectors(name, changes):
    data, result = _sample(name, **changes)
    assert figure_geometry(result, data.feature_names)["support"] == result.support.tolist()


def test_the_reported_rbf_case_gets_a_short_segment_ending_on_the_positive_edge():
    # issue 11: sample 1, rbf, zscore, gamma 1, C 1; point 19 (slack 0.14) had a
    # segment of (-0.11, -1.54), longer than the whole roughness span, ending at f = -0.24
    data, result = _sample(SAMPLES[0], **KERNEL_FITS["rbf"])
    segment = {s["point"]: s for s in figure_geometry(result, data.feature_names)["slack"]}[19]
    assert data.y[19] == 1
    f_end = result.decision_function(np.array([segment["to"]]))[0]
    assert abs(f_end - 1.0) < 1e-6
    roughness_span = np.ptp(data.X[:, 1])
    assert np.linalg.norm(np.subtract(segment["to"], segment["from"])) < roughness_span


def test_linear_slack_segment_is_slack_over_norm_w_along_w():
    # derivation: f(x + t w) = f(x) + t |w|^2 = y_i needs t = y_i xi_i / |w|^2,
    # a segment of length xi_i / |w| parallel to w
    data, result = _sample(SAMPLES[1])
    for segment in figure_geometry(result, data.feature_names)["slack"]:
        i = segment["point"]
        step = np.subtract(segment["to"], segment["from"])
        assert np.linalg.norm(step) == pytest.approx(result.slack[i] / result.weight_norm)
        cross = step[0] * result.w[1] - step[1] * result.w[0]
        assert abs(cross) < 1e-9 * np.linalg.norm(step) * result.weight_norm


@pytest.mark.parametrize("name", SAMPLES)
def test_w_runs_from_the_boundary_to_the_plus_one_edge_in_the_datas_units(name):
    data, result = _sample(name, kernel="linear")
    w = figure_geometry(result, data.feature_names)["w"]
    if result.w_is_zero:
        # the third sample is a ring around a core: no line separates them and the
        # linear optimum is w = 0 (|w| 1e-12, of rounding), so there is nothing to draw
        assert name.startswith("3-") and w is None
        assert figure_geometry(result, data.feature_names)["boundary"] == []
        return
    # derivation: from f = 0 along w by 1/|w| (w in the data's units, also under scaling)
    f = result.decision_function(np.array([w["from"], w["to"]]))
    assert f == pytest.approx([0.0, 1.0], abs=1e-9)
    step = np.subtract(w["to"], w["from"])
    assert step == pytest.approx(result.w / result.weight_norm ** 2, rel=1e-9)


def test_w_is_null_for_kernel_fits():
    data, result = _sample(SAMPLES[0], **KERNEL_FITS["rbf"])
    assert figure_geometry(result, data.feature_names)["w"] is None


def test_newton_steps_reach_a_level_set_a_lattice_only_approaches():
    # f(x, y) = x^2 + y^2: the level set f = 1 is the unit circle (definition)
    f = lambda p: (np.asarray(p) ** 2).sum(axis=1)  # noqa: E731
    start = np.array([[0.3, 0.1], [-2.0, 1.5], [0.0, -0.5]])
    moved, converged = geometry.newton_to_level(f, start, 1.0, np.array([1e-5, 1e-5]), 1.0)
    assert converged.all()
    assert np.linalg.norm(moved, axis=1) == pytest.approx([1.0, 1.0, 1.0], abs=1e-9)


def test_render_to_json_writes_exactly_the_figure_object(tmp_path):
    class Args:
        experiment, output, size = str(samples() / SAMPLES[0]), str(tmp_path / "f.json"), "640x480"
    assert render.run(Args()) == 0
    written = json.loads((tmp_path / "f.json").read_text())
    assert set(written) == {"kernel", "axes", "boundary", "band", "support", "slack", "w"}
    data = load_experiment(samples() / SAMPLES[0]).dataset
    assert written["axes"] == {"x": data.feature_names[0], "y": data.feature_names[1]}
    assert set(written["band"]) == {"positive", "negative"}
    assert set(written["w"]) == {"from", "to"}


def test_render_into_a_missing_folder_says_so_in_one_line(tmp_path, capsys):
    from cli.main import main
    target = tmp_path / "no such folder" / "figure.json"
    assert main(["render", str(samples() / SAMPLES[0]), "-o", str(target)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "figure.json" in err and "Traceback" not in err


def test_a_gaussian_fits_own_gradient_is_the_central_difference_of_f():
    # derivation: grad f = lim (f(x + h e_k) - f(x - h e_k)) / 2h; z-scored features
    # make the chain rule through the scaling count (gradient / scale)
    rng = np.random.default_rng(4)
    X = rng.normal(size=(150, 2)) * [3.0, 0.5] + [10.0, 2.0]
    y = np.where(X[:, 0] - 10.0 + rng.normal(size=150) > 0, 1, -1)
    result = fit(X, y, FitConfig(kernel="rbf", gamma=2.0, C=1.0, scaling="zscore"))
    P = rng.normal(size=(40, 2)) * [3.0, 0.5] + [10.0, 2.0]
    steps = np.array([3e-6, 5e-7])
    central = geometry.gradient(result.decision_function, P, steps)
    assert result.has_gradient
    np.testing.assert_allclose(result.decision_gradient(P), central, rtol=0, atol=1e-7)
    linear = fit(X, y, FitConfig(kernel="linear", C=1.0))
    assert not linear.has_gradient
    with pytest.raises(ValueError):
        linear.decision_gradient(P)


def test_slack_targets_by_the_fits_gradient_land_on_the_own_margin_edge():
    rng = np.random.default_rng(5)
    X = rng.normal(size=(300, 2))
    y = np.where(X[:, 0] + 0.8 * rng.normal(size=300) > 0, 1, -1)
    result = fit(X, y, FitConfig(kernel="rbf", gamma=20.0, C=1.0))
    points, starts, ends = geometry.slack_of(result, geometry.padded_bounds(X))
    assert len(points) > 50
    np.testing.assert_array_equal(starts, X[points])
    np.testing.assert_allclose(result.decision_function(ends), y[points], rtol=0, atol=1e-9)


def test_points_that_no_halving_moves_are_not_tried_again():
    # f = -x^2 never reaches 1; at x = 0 its gradient is 0, so no step moves the point:
    # its 8 halvings fail once, and then it is left alone (before: 40 iterations of them)
    calls = []

    def f(points):
        calls.append(len(points))
        return -np.asarray(points)[:, 0] ** 2

    start = np.array([[0.0, 0.0], [0.0, 1.0], [0.0, -3.0]])
    moved, converged = geometry.newton_to_level(
        f, start, 1.0, np.array([1e-5, 1e-5]), 1.0,
        grad=lambda p: np.c_[-2.0 * np.asarray(p)[:, 0], np.zeros(len(p))])
    assert not converged.any()
    np.testing.assert_array_equal(moved, start)
    # the first f, the full step, then its seven halvings in one evaluation
    assert calls == [3, 3, 7 * 3]


def _newton_halving_one_at_a_time(f, grad, points, level, max_step, tolerance=1e-9,
                                  iterations=40):
    """newton_to_level as first written: each halving its own evaluation of f."""
    x = np.array(points, dtype=float)
    level = np.asarray(level, dtype=float).copy()
    residual = level - f(x)
    stuck = np.zeros(len(x), dtype=bool)
    for _ in range(iterations):
        active = np.flatnonzero((np.abs(residual) > tolerance) & ~stuck)
        if not len(active):
            break
        g = grad(x[active])
        step = (residual[active] / np.maximum(np.einsum("ij,ij->i", g, g), 1e-300))[:, None] * g
        length = np.linalg.norm(step, axis=1)
        step *= np.minimum(1.0, max_step / np.maximum(length, 1e-300))[:, None]
        for _halving in range(8):
            trial = x[active] + step
            trial_residual = level[active] - f(trial)
            better = np.abs(trial_residual) < np.abs(residual[active])
            x[active[better]] = trial[better]
            residual[active[better]] = trial_residual[better]
            if better.all():
                break
            active, step = active[~better], 0.5 * step[~better]
        else:
            stuck[active] = True
    return x, np.abs(residual) <= tolerance


def test_halvings_in_one_evaluation_move_every_point_as_one_at_a_time():
    # a narrow Gaussian fit: many slack points need shorter steps, some never arrive
    rng = np.random.default_rng(6)
    X = rng.normal(size=(400, 2))
    y = np.where(X[:, 0] + 0.9 * rng.normal(size=400) > 0, 1, -1)
    result = fit(X, y, FitConfig(kernel="rbf", gamma=30.0, C=1.0))
    slack = np.flatnonzero(result.slack > 1e-9)
    rect = geometry.padded_bounds(X)
    reach = 0.25 * max(rect[1] - rect[0], rect[3] - rect[2])
    calls = []

    def f(points):
        calls.append(len(points))
        return result.decision_function(points)

    moved, converged = geometry.newton_to_level(f, X[slack], y[slack], np.ones(2), reach,
                                                grad=result.decision_gradient)
    expected, reached = _newton_halving_one_at_a_time(
        result.decision_function, result.decision_gradient, X[slack], y[slack], reach)
    assert (~reached).sum() > 10 and any(count % 7 == 0 and count < len(slack)
                                         for count in calls[1:])
    # the same steps; f itself may round differently in a batch of another size
    # (BLAS blocking, about 1e-16), and a step that ends at the tolerance (|f - y_i| at
    # most 1e-9) may then end a little apart: equal to well below a pixel
    np.testing.assert_allclose(moved, expected, rtol=0, atol=1e-8)
    np.testing.assert_array_equal(converged, reached)
    # f and its gradient from one evaluation: the trials' gradients carried to the next
    # step change nothing either
    values, gradients = result.decision_value_and_gradient(X[slack])
    np.testing.assert_allclose(values, result.decision_function(X[slack]), rtol=0, atol=1e-13)
    np.testing.assert_allclose(gradients, result.decision_gradient(X[slack]), rtol=0,
                               atol=1e-13)
    together, reached_together = geometry.newton_to_level(
        result.decision_function, X[slack], y[slack], np.ones(2), reach,
        both=result.decision_value_and_gradient)
    np.testing.assert_allclose(together, expected, rtol=0, atol=1e-8)
    np.testing.assert_array_equal(reached_together, reached)
