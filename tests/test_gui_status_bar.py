"""The status bar: x, y and f(x) under the cursor; the fit's state and why; pin feedback."""

import numpy as np
from PySide6.QtCore import QPointF, Qt

from solver.files.dataset import Dataset

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def _hover(window, qtbot, x, y):
    canvas = window.canvas
    scene_pos = canvas.plotItem.vb.mapViewToScene(QPointF(x, y))
    canvas.scene().sigMouseMoved.emit(scene_pos)     # what a mouse move over the plot sends
    qtbot.wait(5)
    return window.status.cursor.text()


def test_the_cursor_read_out_gives_x_y_and_the_decision_value_there(window, qtbot):
    load_points(window, qtbot, gauge_points())
    result = window.document.result
    text = _hover(window, qtbot, 0.5, -0.25)
    # derivation: a linear fit's decision value is f(x) = w.x + b (w, b from the result)
    f = float(result.w @ [0.5, -0.25] + result.b)
    numbers = [float(t.replace("\u2212", "-")) for t in text.split()[1::2]]
    assert np.allclose(numbers, [0.5, -0.25, f], rtol=1e-3, atol=1e-3)


def test_moving_the_mouse_over_the_canvas_updates_the_read_out(window, qtbot):
    load_points(window, qtbot, gauge_points())
    canvas = window.canvas
    qtbot.mouseMove(canvas.viewport(), canvas.pixel_of(1.0, 1.0))
    qtbot.wait(30)
    qtbot.mouseMove(canvas.viewport(), canvas.pixel_of(-1.0, 0.5))
    qtbot.wait(30)
    text = window.status.cursor.text()
    assert text.startswith("x ") and "f(x)" in text


def test_the_fit_read_out_names_points_kernel_time_and_current(window, qtbot):
    load_points(window, qtbot, gauge_points())
    text = window.status.fit_state.text()
    assert text.startswith("24 points \u00b7 linear \u00b7 ") and " ms" in text
    assert text.endswith("current")


def test_a_failed_solve_leaves_the_fit_stale_and_says_why(window, qtbot):
    data = gauge_points()
    flipped = data.y.copy()
    flipped[0] = -1  # a reject inside the pass cluster: no line separates the classes
    load_points(window, qtbot, Dataset.from_points(data.X, flipped))
    window.document.set_config(window.document.config.with_changes(hard_margin=True))
    settle(window, qtbot)
    assert "stale" in window.status.fit_state.text()
    assert "last solve failed" in window.status.fit_state.text()
    assert "separ" in window.status.fit_state.toolTip()


def test_after_file_new_the_read_out_counts_no_points(window, qtbot):
    load_points(window, qtbot, gauge_points())
    window.files.new()
    settle(window, qtbot)
    assert window.status.fit_state.text().startswith("0 points")
    assert "no fit yet" in window.status.fit_state.text()


def test_ctrl_p_says_in_the_status_bar_that_the_fit_is_pinned(window, qtbot):
    load_points(window, qtbot, gauge_points())
    window.canvas.setFocus()
    qtbot.keyClick(window, "p", Qt.ControlModifier)
    assert window.document.pinned is not None
    message = window.statusBar().currentMessage()
    assert message.startswith("pinned the current fit (linear, C = 1)") and "ghost" in message


def test_ctrl_p_without_a_fit_says_there_is_nothing_to_pin(window, qtbot):
    qtbot.keyClick(window, "p", Qt.ControlModifier)
    assert window.document.pinned is None
    assert "nothing to pin" in window.statusBar().currentMessage()


def test_the_cursor_read_out_clears_when_the_mouse_leaves_the_canvas(window, qtbot):
    from PySide6.QtCore import QEvent
    from PySide6.QtWidgets import QApplication
    load_points(window, qtbot, gauge_points())
    assert _hover(window, qtbot, 0.5, 0.5)
    QApplication.sendEvent(window.canvas.viewport(), QEvent(QEvent.Leave))
    assert window.status.cursor.text() == ""
