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
    # and the canvas draws no boundary, margin, slack or w of rounding's direction
    items = window.canvas.scene_items
    for line in (items.boundary, items.band, items.slack, items.weight):
        xs, _ = line.getData()
        assert xs is None or len(xs) == 0
    assert not items.arrow.isVisible()

    def listed(item):
        return any(sample.item is item for sample, _ in items.legend.items)
    # ... nor lists them in its legend; the support vectors it does draw
    assert not any(listed(i) for i in (items.boundary, items.band, items.slack, items.weight))
    assert listed(items.rings)
    table = window.points_table.model
    table.flush()                                       # the table refreshes on a timer
    assert table.data(table.index(0, 6)) == "\u2014"          # no distance to no boundary
    names = [label.text for _, label in items.legend.items]
    load_points(window, qtbot, gauge_points())            # a fit with a line: back, in order
    fit_parts = [items.boundary.name(), items.band.name(), items.weight.name(),
                 items.slack.name()]
    assert [t for _, label in items.legend.items if (t := label.text) in fit_parts] == fit_parts
    assert len(items.legend.items) == len(names) + 4
    texts = [label.text for _, label in items.legend.items]     # right after the rings
    rings = texts.index(items.rings.name())
    assert texts[rings + 1:rings + 5] == fit_parts


def _cross_file(tmp_path):
    path = tmp_path / "cross.csv"
    path.write_text("along [mm],across [mm],result\n" + "".join(
        f"{a:g},{b:g},{'held' if s > 0 else 'leaked'}\n" for (a, b), s in zip(CROSS_X, CROSS_Y)))
    return path


def test_every_command_takes_a_fit_with_w_exactly_zero(tmp_path, capsys):
    # the cross gives w = 0 exactly (above): 2/|w| and y f / |w| divide by zero
    from cli.main import main
    path, saved = _cross_file(tmp_path), tmp_path / "cross.json"
    assert main(["fit", str(path), "--positive", "held", "--save", str(saved)]) == 0
    out = capsys.readouterr().out
    assert "w = 0 to rounding: no line separates these classes at this C" in out
    assert "margin width" not in out
    assert main(["check", str(saved)]) == 0                   # the file is consistent
    assert "agrees with the stored results" in capsys.readouterr().out
    table = tmp_path / "points.csv"
    assert main(["export", str(saved), "--points", str(table)]) == 0
    assert len(table.read_text().splitlines()) == 5


def test_a_w_of_rounding_agrees_with_a_w_of_other_rounding():
    # w = 0 to rounding is 1e-14 of either sign: 2/|w| and max|w| are noise, and a w
    # that moves no decision value f = w.x + b by more than their tolerance agrees
    from solver.study.agreement import agreement
    result = fit(CROSS_X * 100.0, CROSS_Y, FitConfig(C=1.0))
    stored, fresh = result.to_dict(), result.to_dict()
    stored["w"], fresh["w"] = [1e-14, -2e-17], [-3e-14, 1e-16]
    stored["margin_width"], fresh["margin_width"] = 2e14, 6.7e13
    rows = {row.quantity: row for row in agreement(stored, fresh, result.penalties, 100.0)}
    assert rows["w"].agrees and "margin width" not in rows
    stored["w"] = [1e-7, 0.0]           # 1e-7 * 100 moves f by 1e-5: a real difference
    rows = {row.quantity: row for row in agreement(stored, fresh, result.penalties, 100.0)}
    assert not rows["w"].agrees


def _noisy_cross():
    """The cross three times, shifted a little: w = 0 to rounding (1e-14), not exactly."""
    X = np.tile(CROSS_X, (3, 1)) + np.repeat([[0.0, 0.0], [0.01, 0.02], [-0.02, 0.01]], 4,
                                             axis=0)
    return Dataset.from_points(X, np.tile(CROSS_Y, 3))


def test_no_distance_to_no_boundary_in_scores_exports_and_stored_figures():
    # |f| / |w| with w = 0 read inf (exactly 0) or 1e14 (rounding); the points table of
    # the window already said "no distance": held-out scores, predict and the exported
    # table now say so too (NaN)
    from solver.files.exports import POINT_COLUMNS, points_table
    from solver.study.heldout import Classifier, score
    new = np.array([[0.5, 0.5], [-2.0, 1.0]])
    for dataset in (_noisy_cross(), Dataset.from_points(CROSS_X, CROSS_Y)):
        result = fit(dataset.X, dataset.y, FitConfig(C=1.0))
        assert result.w_is_zero or result.weight_norm == 0.0
        assert np.isnan(score(result, new, dataset.label_mapping).distance).all()
        stored = Classifier.from_figures(result.to_dict(), dataset.X)      # as predict
        assert np.isnan(score(stored, new, dataset.label_mapping).distance).all()
        header, rows = points_table(dataset, result)
        column = next(k for k, c in enumerate(POINT_COLUMNS) if c.startswith("distance"))
        assert all(np.isnan(row[column]) for row in rows)
    # a fit with a boundary keeps its distances
    gauge = gauge_points()
    result = fit(gauge.X, gauge.y, FitConfig(C=1.0))
    stored = Classifier.from_figures(result.to_dict(), gauge.X)
    assert np.allclose(score(stored, new, gauge.label_mapping).distance,
                       np.abs(result.decision_function(new)) / result.weight_norm)


def test_the_training_error_is_the_share_of_misclassified_points_also_on_the_boundary():
    # the exact cross ends with b = 0, so f = 0 at every point: on the boundary, each
    # is "inside" the margin, not misclassified, and the training error agrees (0%)
    result = fit(CROSS_X, CROSS_Y, FitConfig(C=1.0))
    assert np.all(result.decision == 0.0)
    assert result.training_error == result.count("misclassified") / 4 == 0.0


def test_a_new_window_lists_no_line_in_its_legend(window, qtbot):
    # an empty document has never had a fit: nothing is drawn, so nothing is listed
    items = window.canvas.scene_items
    assert window.document.result is None
    assert not any(sample.item is part for sample, _ in items.legend.items
                   for part in (items.boundary, items.band, items.weight, items.slack))
    load_points(window, qtbot, gauge_points())
    assert any(sample.item is items.boundary for sample, _ in items.legend.items)


def test_before_any_fit_the_legend_lists_no_line(window, qtbot):
    from test_gui_fixtures import settle
    load_points(window, qtbot, gauge_points())
    items = window.canvas.scene_items
    assert any(sample.item is items.boundary for sample, _ in items.legend.items)
    window.document.load(Dataset.from_points(np.zeros((0, 2)), np.zeros(0, dtype=int)))
    settle(window, qtbot)
    assert window.document.result is None
    assert not any(sample.item is part for sample, _ in items.legend.items
                   for part in (items.boundary, items.band, items.weight, items.slack))
