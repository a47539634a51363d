"""Controls, undo/redo keys, summary, inspector and the points table."""

import numpy as np
from PySide6.QtGui import QKeySequence

from app.panels.controls import C_to_slider, slider_to_C
from solver.config import FitConfig
from solver.result import ON_MARGIN

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def test_slider_ends_are_C_one_thousandth_and_ten_thousand():
    # expected: the range asked for, 1e-3 to 1e4 on a log scale (the design)
    assert np.isclose(slider_to_C(0), 1e-3) and np.isclose(slider_to_C(700), 1e4)
    assert C_to_slider(1.0) == 300


def test_dragging_the_C_slider_refits_and_one_undo_restores_C(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    slider = window.controls.slider
    slider.setSliderDown(True)
    for position in range(300, 149, -10):
        slider.setValue(position)
        qtbot.wait(2)
    slider.setSliderDown(False)
    settle(window, qtbot)
    C = window.document.config.C
    assert np.isclose(C, 10 ** (-3 + 7 * 150 / 700), rtol=1e-3)
    assert window.document.result.config.C == C
    window.document.undo_stack.undo()
    settle(window, qtbot)
    assert window.document.config.C == 1.0


def test_a_typed_C_is_applied_exactly(window, qtbot):
    load_points(window, qtbot, gauge_points())
    window.controls.C_field.setText("0.0123456")
    window.controls.C_field.editingFinished.emit()
    settle(window, qtbot)
    assert window.document.result.config.C == 0.0123456


def test_gamma_shows_only_for_kernels_that_use_it(window, qtbot):
    form, controls = window.controls.form, window.controls
    assert not form.isRowVisible(controls.gamma)
    window.document.set_config(FitConfig(kernel="polynomial"))
    assert form.isRowVisible(controls.gamma) and form.isRowVisible(controls.degree)
    window.document.set_config(FitConfig(kernel="rbf"))
    assert form.isRowVisible(controls.gamma) and not form.isRowVisible(controls.degree)


def test_undo_and_redo_keys_remove_and_restore_an_added_point(window, qtbot):
    load_points(window, qtbot, gauge_points())
    window.document.add_point(0.0, 2.5, 1)
    window.activateWindow()
    window.canvas.setFocus()
    qtbot.keySequence(window.canvas, QKeySequence(QKeySequence.Undo))
    assert len(window.document.X) == 24
    qtbot.keySequence(window.canvas, QKeySequence(QKeySequence.Redo))
    assert len(window.document.X) == 25


def test_summary_shows_the_solvers_w_b_and_support_vector_count(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    result = window.document.result
    assert window.summary.text("w") == f"({result.w[0]:.6g}, {result.w[1]:.6g})"
    assert window.summary.text("b") == f"{result.b:.6g}"
    assert window.summary.text("support") == str(result.n_support)


def test_inspector_reads_a_margin_point_in_plain_words(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    result = window.document.result
    index = int(np.flatnonzero(result.status == ON_MARGIN)[0])
    window.document.set_selection({index})
    assert window.inspector.text("status") == "on the margin"
    assert "holds the boundary in place" in window.inspector.reading.text()
    assert window.inspector.text("alpha").startswith(f"{result.alpha[index]:.6g}")


def test_selecting_a_table_row_selects_the_point_on_the_canvas(window, qtbot):
    load_points(window, qtbot, gauge_points())
    view = window.points_table.view
    view.selectRow(view.model().mapFromSource(window.points_table.model.index(5, 0)).row())
    assert window.document.selection == {5}
    xs, ys = window.canvas.scene_items.selected.getData()
    assert np.allclose([xs[0], ys[0]], window.document.X[5])


def test_a_canvas_selection_selects_the_table_row(window, qtbot):
    load_points(window, qtbot, gauge_points())
    window.document.set_selection({7})
    rows = window.points_table.view.selectionModel().selectedRows()
    assert [window.points_table.proxy.mapToSource(r).row() for r in rows] == [7]


def test_the_table_filters_points_by_status(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    table = window.points_table
    table.model.flush()
    table.filter.setCurrentIndex(table.filter.findData(ON_MARGIN))
    expected = window.document.result.count(ON_MARGIN)
    assert table.proxy.rowCount() == expected > 0


def test_deleting_the_selection_is_undoable(window, qtbot):
    data = gauge_points()
    load_points(window, qtbot, data)
    window.document.set_selection({0, 1})
    window.document.delete_points(window.document.selection)
    assert len(window.document.X) == 22
    window.document.undo_stack.undo()
    assert np.array_equal(window.document.X, data.X)


def test_relabelling_the_selection_swaps_its_class(window, qtbot):
    load_points(window, qtbot, gauge_points())
    window.document.relabel({0}, None)
    assert window.document.y[0] == -1 and window.document.labels[0] == "reject"
