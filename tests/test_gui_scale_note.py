"""w on unequal axis scales: the canvas says "axes not to scale" beside it; the ghost's legend."""

import numpy as np
from PySide6.QtCore import Qt

from solver.config import FitConfig
from solver.files.dataset import Dataset

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def _stretched():
    data = gauge_points()
    # the second feature spans 1/20 of the first: equal scales would squash it flat
    return Dataset.from_points(data.X * [1.0, 0.05], data.y, feature_names=("bore", "roughness"),
                               label_mapping={"pass": 1, "reject": -1})


def test_w_on_axes_not_to_scale_carries_the_mark_beside_it(window, qtbot):
    window.document.load(_stretched())
    window.match_axes_to_data()
    settle(window, qtbot)
    qtbot.wait(60)
    note = window.canvas.scene_items.scale_note
    assert not window.equal_axes_action.isChecked()
    assert note.shown and note.item.toPlainText().startswith("axes not to scale")
    tip = window.canvas.scene_items._arrow_tip[1]
    assert np.allclose([note.item.pos().x(), note.item.pos().y()], tip)


def test_equal_axis_scales_remove_the_mark(window, qtbot):
    window.document.load(_stretched())
    window.match_axes_to_data()
    settle(window, qtbot)
    window.equal_axes_action.trigger()            # View -> Equal axis scales
    qtbot.wait(60)
    assert window.equal_axes_action.isChecked()
    assert not window.canvas.scene_items.scale_note.shown


def test_a_kernel_fit_has_no_w_and_no_mark(window, qtbot):
    window.document.load(_stretched(), FitConfig(kernel="rbf"))
    window.match_axes_to_data()
    settle(window, qtbot)
    qtbot.wait(60)
    assert not window.canvas.scene_items.scale_note.shown


def test_pinning_adds_the_ghost_boundary_to_the_legend_and_clearing_removes_it(window, qtbot):
    load_points(window, qtbot, gauge_points())
    legend = window.canvas.scene_items.legend
    names = lambda: [label.text for _, label in legend.items]  # noqa: E731
    assert "pinned fit (ghost)" not in names()
    qtbot.keyClick(window, "p", Qt.ControlModifier)
    assert "pinned fit (ghost)" in names()
    window.document.clear_pin()
    assert "pinned fit (ghost)" not in names()
