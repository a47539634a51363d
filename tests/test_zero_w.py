"""A linear fit whose optimum is w = 0 says so, instead of a margin width of 1e14.

Derivation (written out, no source): four points, +1 at (-1, 0) and (1, 0), -1 at
(0, -1) and (0, 1).  With every alpha_i = C, sum_i alpha_i y_i = 0 and
w = sum_i alpha_i y_i x_i = C [(-1, 0) + (1, 0) - (0, -1) - (0, 1)] = 0, so the dual
objective sum_i alpha_i - 1/2 |w|^2 = 4C is the largest any alpha in the box reaches:
this alpha is optimal at every C, and w = 0 with it.
"""

import numpy as np

from solver import FitConfig, fit
from solver.files.dataset import Dataset

from test_gui_fixtures import gauge_points, load_points, temporary_settings, window  # noqa: F401

CROSS_X = np.array([[-1.0, 0.0], [1.0, 0.0], [0.0, -1.0], [0.0, 1.0]])
CROSS_Y = np.array([1, 1, -1, -1])


def test_the_cross_has_w_zero_at_every_C_and_the_result_knows():
    for C in (0.01, 1.0, 100.0):
        result = fit(CROSS_X, CROSS_Y, FitConfig(C=C))
        assert np.abs(result.w).max() <= 1e-9 * C
        assert result.w_is_zero
    assert not fit(gauge_points().X, gauge_points().y, FitConfig(C=1.0)).w_is_zero
    # a tiny C scales w and its terms alike: not taken for zero
    assert not fit(gauge_points().X, gauge_points().y, FitConfig(C=1e-6)).w_is_zero


def test_the_summary_says_no_line_separates_instead_of_a_huge_margin(window, qtbot):
    cross = Dataset.from_points(np.tile(CROSS_X, (3, 1)) * [1, 1] + np.repeat(
        [[0.0, 0.0], [0.01, 0.02], [-0.02, 0.01]], 4, axis=0), np.tile(CROSS_Y, 3))
    load_points(window, qtbot, cross)
    summary = window.summary
    assert window.document.result.w_is_zero
    assert summary.text("margin") == "none (w = 0)"
    assert summary.text("w").startswith("0 to rounding: no line separates these classes")
