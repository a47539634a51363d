"""The canvas: clicks and drags edit points, and the drawn items show the solver's fit."""

import numpy as np
from PySide6.QtCore import QPoint, Qt

from solver.config import FitConfig

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def click(qtbot, window, x, y, modifier=Qt.NoModifier):
    qtbot.mouseClick(window.canvas.viewport(), Qt.LeftButton, modifier,
                     window.canvas.pixel_of(x, y))


def test_click_on_empty_canvas_adds_a_point_of_the_current_class(window, qtbot):
    load_points(window, qtbot, gauge_points())
    click(qtbot, window, 0.0, 2.5)
    doc = window.document
    assert len(doc.X) == 25
    assert doc.y[-1] == 1
    # pixel rounding: one pixel is under 0.02 data units in a 1280 x 800 window
    assert np.allclose(doc.X[-1], [0.0, 2.5], atol=0.03)


def test_shift_click_adds_a_point_of_the_other_class(window, qtbot):
    load_points(window, qtbot, gauge_points())
    click(qtbot, window, 0.0, 2.5, Qt.ShiftModifier)
    assert window.document.y[-1] == -1
    assert window.document.labels[-1] == "reject"


def test_click_on_a_point_selects_it(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    click(qtbot, window, *data.X[3])
    assert window.document.selection == {3}
    assert len(window.document.X) == 24


def test_dragging_a_point_moves_it_and_one_undo_puts_it_back(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    canvas = window.canvas.viewport()
    start, end = window.canvas.pixel_of(*data.X[0]), window.canvas.pixel_of(0.5, 2.8)
    qtbot.mousePress(canvas, Qt.LeftButton, Qt.NoModifier, start)
    for t in np.linspace(0.2, 1.0, 5):
        qtbot.mouseMove(canvas, start + (end - start) * t)
        qtbot.wait(30)  # pyqtgraph drops moves closer than 10 ms apart
    qtbot.wait(60)
    view = window.canvas.getPlotItem().getViewBox()

    def data_at(pixel):  # the data point under a viewport pixel, as the view maps it now
        point = view.mapSceneToView(window.canvas.mapToScene(pixel))
        return np.array([point.x(), point.y()])
    release_spot = data_at(end)
    pixel_size = np.abs(data_at(end + QPoint(1, 1)) - release_spot)
    qtbot.mouseRelease(canvas, Qt.LeftButton, Qt.NoModifier, end)
    settle(window, qtbot)
    # the point lands under the mouse where it was let go (to 2 px: pyqtgraph
    # rate-limits moves, and the release event carries the final position)
    assert np.all(np.abs(window.document.X[0] - release_spot) <= 2 * pixel_size)
    window.document.undo_stack.undo()
    assert np.array_equal(window.document.X[0], data.X[0])


def test_ctrl_drag_box_selects_the_points_inside(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    canvas = window.canvas.viewport()
    # from the top right corner: the legend sits top left
    a, b = window.canvas.pixel_of(2.2, 2.2), window.canvas.pixel_of(0.2, 0.2)
    qtbot.mousePress(canvas, Qt.LeftButton, Qt.ControlModifier, a)
    for t in np.linspace(0.25, 1.0, 4):
        qtbot.mouseMove(canvas, a + (b - a) * t)
        qtbot.wait(30)
    qtbot.mouseRelease(canvas, Qt.LeftButton, Qt.ControlModifier, b)
    inside = {i for i, (x, y) in enumerate(data.X) if 0.2 <= x <= 2.2 and 0.2 <= y <= 2.2}
    assert inside and window.document.selection == inside


def test_linear_boundary_end_points_lie_on_the_solvers_boundary(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    result = window.document.result
    xs, ys = window.canvas.scene_items.boundary.getData()
    assert len(xs) == 2
    # expected: w.p + b = 0 for the solver's own w and b (the drawn line is the solver's)
    values = result.w @ np.array([xs, ys]) + result.b
    assert np.allclose(values, 0.0, atol=1e-9 * max(1.0, abs(result.b)))


def test_linear_band_edges_lie_at_f_plus_and_minus_one(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    result = window.document.result
    xs, ys = window.canvas.scene_items.band.getData()
    drawn = np.column_stack([xs, ys])
    values = np.sort(result.decision_function(drawn[np.isfinite(drawn[:, 0])]))
    # expected: the margin edges are the level sets f = -1 and f = +1 (definition)
    assert np.allclose(values, [-1, -1, 1, 1], atol=1e-9)


def test_support_vectors_are_ringed(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    result = window.document.result
    xs, ys = window.canvas.scene_items.rings.getData()
    assert np.allclose(np.column_stack([xs, ys]), result.X[result.support])


def test_every_point_with_slack_gets_a_segment_to_its_own_margin_edge(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    result = window.document.result
    xs, ys = window.canvas.scene_items.slack.getData()
    ends = np.column_stack([xs, ys])[1::2]
    with_slack = result.slack > 1e-9
    assert len(ends) == with_slack.sum() > 0
    # derivation: the segment ends where f = y_i, i.e. y_i f(end) = 1
    margin = result.y[with_slack] * result.decision_function(ends)
    assert np.allclose(margin, 1.0, atol=1e-9)


def test_weight_arrow_runs_from_the_boundary_to_the_plus_one_edge(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    result = window.document.result
    xs, ys = window.canvas.scene_items.weight.getData()
    f = result.decision_function(np.column_stack([xs, ys]))
    # derivation: the arrow has length 1/|w| along w, so f rises from 0 to 1
    assert np.allclose(f, [0.0, 1.0], atol=1e-9)


def test_rbf_boundary_contour_follows_the_zero_level_of_f(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True), FitConfig(kernel="rbf", gamma=0.5))
    result = window.document.result
    xs, ys = window.canvas.scene_items.boundary.getData()
    assert len(xs) > 10
    drawn = np.column_stack([xs, ys])             # polylines with NaN rows between them
    f = result.decision_function(drawn[np.isfinite(drawn[:, 0])])
    # linear interpolation on a 120 x 120 grid: error well under 0.05 of f's unit
    # (common practice, no source: second-order interpolation error at this spacing)
    assert np.max(np.abs(f)) < 0.05


def test_pinned_fit_stays_drawn_as_a_ghost_after_C_changes(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    window.document.pin_current()
    pinned = window.document.pinned
    window.document.set_C(0.01)
    settle(window, qtbot)
    xs, ys = window.canvas.scene_items.ghost_boundary.getData()
    values = pinned.w @ np.array([xs, ys]) + pinned.b
    assert np.allclose(values, 0.0, atol=1e-9)
    assert window.document.result is not pinned
