"""Coordinates and labels typed in the points table are undoable edits."""

import numpy as np
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QApplication, QLineEdit

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def _type_into(window, qtbot, row, column, text):
    table = window.points_table
    index = table.proxy.mapFromSource(table.model.index(row, column))
    view = table.view
    view.scrollTo(index)
    rect = view.visualRect(index)
    qtbot.mouseClick(view.viewport(), Qt.LeftButton, pos=rect.center())
    qtbot.mouseDClick(view.viewport(), Qt.LeftButton, pos=rect.center())
    editor = QApplication.focusWidget()
    assert isinstance(editor, QLineEdit)
    editor.selectAll()
    qtbot.keyClicks(editor, text)
    qtbot.keyClick(editor, Qt.Key_Return)
    qtbot.wait(10)


def test_typing_a_coordinate_moves_the_point_and_undo_puts_it_back(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    _type_into(window, qtbot, 3, 1, "2.75")
    assert window.document.X[3, 0] == 2.75 and window.document.X[3, 1] == data.X[3, 1]
    assert window.document.undo_stack.undoText() == "move point"
    qtbot.keyClick(window, "z", Qt.ControlModifier)
    assert np.array_equal(window.document.X, data.X)


def test_a_typed_coordinate_refits(window, qtbot):
    load_points(window, qtbot, gauge_points())
    _type_into(window, qtbot, 0, 2, "-4")
    settle(window, qtbot)
    assert window.document.current_result() is not None
    assert window.document.result.X[0, 1] == -4.0


def test_text_typed_as_a_coordinate_is_refused_with_a_reason(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    _type_into(window, qtbot, 2, 1, "abc")
    assert np.array_equal(window.document.X, data.X)
    message = window.points_table.refusal.text()
    assert "bore" in message and "'abc'" in message and "number" in message


def test_typing_the_other_class_label_relabels_the_point(window, qtbot):
    load_points(window, qtbot, gauge_points())
    assert window.document.y[1] == 1
    _type_into(window, qtbot, 1, 3, "reject")
    assert window.document.y[1] == -1 and window.document.labels[1] == "reject"
    window.document.undo_stack.undo()
    assert window.document.y[1] == 1


def test_an_unknown_label_is_refused_and_names_the_two_classes(window, qtbot):
    load_points(window, qtbot, gauge_points())
    _type_into(window, qtbot, 1, 3, "maybe")
    assert window.document.y[1] == 1
    message = window.points_table.refusal.text()
    assert "'maybe'" in message and "'pass'" in message and "'reject'" in message


def test_numbers_with_an_exponent_are_written_short_enough_for_their_column():
    # a decision value of -1.9715e-5 read "-1.972e-..." in a 1280-pixel window
    from app.panels.points_table import _compact
    assert _compact(-1.9715e-05, 4) == "-1.97e-5"
    assert _compact(2.5e-12, 3) == "2.5e-12"
    assert _compact(1e100, 4) == "1e100"
    assert _compact(0.4321, 4) == "0.4321" and _compact(-3.0, 4) == "-3"
