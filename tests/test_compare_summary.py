"""The plain-words summary: every number in it is read back from the two results."""

import re

import pytest

from demo_data import pilot_batch_points
from solver.study.compare import compare
from solver.config import FitConfig
from solver.study.crossval import CVEstimate
from solver.fit import fit
from solver.study.narrative import summary
from solver.result import INSIDE, MISCLASSIFIED

NUMBER = r"-?\d+(?:\.\d+)?(?:e[+-]?\d+)?"


@pytest.fixture(scope="module")
def lowered():
    X, y = pilot_batch_points()
    return compare(fit(X, y, FitConfig(C=10.0)), fit(X, y, FitConfig(C=0.5)))


def close(text, value):
    """Three significant digits, as the summary writes figures (derivation: rounding)."""
    return float(text) == pytest.approx(value, rel=5e-3, abs=1e-12)


def test_lowering_C_names_both_values_of_C(lowered):
    match = re.search(rf"Lowering C from ({NUMBER}) to ({NUMBER})", summary(lowered))
    assert match and (float(match[1]), float(match[2])) == (10.0, 0.5)


def test_the_margin_figures_are_the_two_margin_widths(lowered):
    match = re.search(rf"(widened|narrowed) the margin from ({NUMBER}) to ({NUMBER}) units",
                      summary(lowered))
    assert match and close(match[2], lowered.before.margin_width)
    assert close(match[3], lowered.after.margin_width)
    assert match[1] == ("widened" if lowered.after.margin_width > lowered.before.margin_width
                        else "narrowed")


def test_the_band_count_is_the_number_of_points_inside_the_margin(lowered):
    match = re.search(rf"(\d+) points? now sits? inside the band \((\d+) before\)",
                      summary(lowered))
    assert (int(match[1]), int(match[2])) == (lowered.after.count(INSIDE),
                                              lowered.before.count(INSIDE))


def test_the_turn_is_the_absolute_angle_between_the_weight_vectors(lowered):
    match = re.search(rf"the boundary turned ({NUMBER}) degrees", summary(lowered))
    assert match and close(match[1], abs(lowered.angle_degrees))


def test_every_number_in_the_summary_comes_from_the_two_results(lowered):
    before, after = lowered.before, lowered.after
    known = [before.config.C, after.config.C, before.margin_width, after.margin_width,
             abs(lowered.angle_degrees), len(lowered.joined), len(lowered.left),
             before.count(INSIDE), after.count(INSIDE), before.count(MISCLASSIFIED),
             after.count(MISCLASSIFIED), 100 * before.training_error,
             100 * after.training_error]
    for text in re.findall(NUMBER, summary(lowered)):
        assert any(close(text, value) for value in known), text


def test_cv_errors_appear_as_percentages_when_known(lowered):
    with_cv = lowered.with_cv(CVEstimate(0.2, 0.1, 0.05, 4), CVEstimate(0.125, 0.1, 0.05, 4))
    assert "cross-validated error went from 20% to 12.5%" in summary(with_cv)


def test_added_points_are_named_as_the_cause():
    X, y = pilot_batch_points()
    before = fit(X[:-2], y[:-2], FitConfig(C=1.0))
    after = fit(X, y, FitConfig(C=1.0))
    assert summary(compare(before, after)).startswith("Adding 2 points ")


def test_a_kernel_change_says_the_margin_is_in_the_feature_space():
    X, y = pilot_batch_points(16)
    text = summary(compare(fit(X, y, FitConfig()), fit(X, y, FitConfig(kernel="rbf"))))
    assert text.startswith("Changing the kernel from linear to rbf")
    assert "in the kernel's feature space" in text and "turned" not in text


def test_the_same_fit_twice_says_nothing_moved():
    X, y = pilot_batch_points()
    result = fit(X, y, FitConfig())
    text = summary(compare(result, result))
    assert "left the margin width at" in text and "did not turn" in text
