"""Points are picked through pyqtgraph's own item API: index data, pointsAt, sigClicked.

No marker item has its mouse handler replaced; clicks on markers arrive
through the items' sigClicked and select, clicks elsewhere add points.
"""

import numpy as np
from PySide6.QtCore import Qt

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def click(qtbot, window, x, y, modifier=Qt.NoModifier):
    qtbot.mouseClick(window.canvas.viewport(), Qt.LeftButton, modifier,
                     window.canvas.pixel_of(x, y))


def test_every_marker_carries_its_points_index_as_item_data(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    for sign, item in window.canvas.scene_items.points.items():
        rows = [int(spot.data()) for spot in item.points()]
        assert rows == np.flatnonzero(data.y == sign).tolist()
        xs, ys = item.getData()
        assert np.array_equal(np.column_stack([xs, ys]), data.X[rows])


def test_no_marker_item_has_its_mouse_handler_replaced(window):
    for item in window.canvas.scene_items.marker_items():
        assert "mouseClickEvent" not in vars(item)


def test_a_click_on_a_marker_arrives_through_its_sigClicked(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    item = window.canvas.scene_items.points[-1]
    with qtbot.waitSignal(item.sigClicked, timeout=2000) as blocker:
        click(qtbot, window, *data.X[15])
    assert int(blocker.args[1][0].data()) == 15
    assert window.document.selection == {15}


def test_ctrl_click_on_points_adds_and_removes_them_from_the_selection(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    click(qtbot, window, *data.X[2])
    click(qtbot, window, *data.X[20], Qt.ControlModifier)
    assert window.document.selection == {2, 20}
    click(qtbot, window, *data.X[2], Qt.ControlModifier)
    assert window.document.selection == {20}
    assert len(window.document.X) == 24


def test_a_click_on_a_support_vector_ring_selects_its_point(window, qtbot):
    data = gauge_points(overlap=True)
    load_points(window, qtbot, data)
    i = int(window.document.result.support[0])
    # the ring is 17 px across and the marker 9 px: click 6 px to the right of the centre
    at = window.canvas.pixel_of(*data.X[i])
    at.setX(at.x() + 6)
    assert window.canvas.point_at(window.canvas.mapToScene(at)) is not None
    qtbot.mouseClick(window.canvas.viewport(), Qt.LeftButton, Qt.NoModifier, at)
    assert i in window.document.selection
    assert len(window.document.X) == len(data.X)


def test_point_at_answers_through_points_at_and_misses_empty_space(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    canvas = window.canvas
    assert canvas.point_at(canvas.mapToScene(canvas.pixel_of(*data.X[7]))) == 7
    assert canvas.point_at(canvas.mapToScene(canvas.pixel_of(0.0, 2.5))) is None
