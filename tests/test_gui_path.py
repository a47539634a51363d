"""The exact C path in the window: computed in the background, then the slider
evaluates it (no solve), ticks at breakpoints, the C-path view and its events.

Reference for the numbers: a fresh cvxopt solve (solver.fit) at the same C.
"""

import numpy as np
import pytest
from PySide6.QtCore import Qt

import app.document.worker
from solver import FitConfig, fit

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def _path_ready(window, qtbot):
    qtbot.waitUntil(lambda: window.document.paths.path is not None, timeout=20000)
    qtbot.wait(5)


def test_once_the_path_is_ready_slider_steps_evaluate_it_without_a_solve(window, qtbot,
                                                                         monkeypatch):
    dataset = gauge_points(overlap=True)
    load_points(window, qtbot, dataset)
    _path_ready(window, qtbot)
    calls = []
    real_fit = app.document.worker.fit
    monkeypatch.setattr(app.document.worker, "fit",
                        lambda *a, **k: (calls.append(1), real_fit(*a, **k))[1])
    slider = window.controls.slider
    slider.setFocus()
    for _ in range(5):
        qtbot.keyClick(slider, Qt.Key_PageUp)
    assert not window.document.busy and calls == []
    result = window.document.result
    assert result.solver_status == "path"
    fresh = fit(dataset.X, dataset.y, FitConfig(C=window.document.config.C))   # source: cvxopt
    assert result.primal_objective == pytest.approx(fresh.primal_objective, rel=1e-7)
    assert list(result.status) == list(fresh.status)


def test_moving_a_point_drops_the_path_and_solves_until_the_new_one_is_ready(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    _path_ready(window, qtbot)
    window.document.move_points([0], [[0.3, 0.2]])
    assert window.document.paths.path is None or window.document.busy
    settle(window, qtbot)
    _path_ready(window, qtbot)
    window.document.set_C(2.5)
    assert window.document.result.solver_status == "path"
    np.testing.assert_allclose(window.document.result.X[0], [0.3, 0.2])


def test_the_slider_shows_a_tick_at_every_breakpoint(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    _path_ready(window, qtbot)
    from app.panels.controls import C_to_slider
    path = window.document.paths.path
    assert set(window.controls.slider.ticks) == {C_to_slider(C) for C in path.breakpoints}


def _tick_columns(slider):
    """Columns of the slider's bottom rows that the ticks change (painted with, then
    without them)."""
    ticks = slider.ticks
    ticked = slider.grab().toImage()
    slider.set_ticks(())
    plain = slider.grab().toImage()
    slider.set_ticks(ticks)
    return {x for x in range(plain.width())
            for row in range(plain.height() - 4, plain.height())
            if ticked.pixel(x, row) != plain.pixel(x, row)}


def _where_ticks_go(slider):
    from PySide6.QtWidgets import QStyle, QStyleOptionSlider
    option = QStyleOptionSlider()
    slider.initStyleOption(option)
    style = slider.style()
    groove = style.subControlRect(QStyle.CC_Slider, option, QStyle.SC_SliderGroove, slider)
    handle = style.subControlRect(QStyle.CC_Slider, option, QStyle.SC_SliderHandle, slider)
    span, left = groove.width() - handle.width(), groove.x() + handle.width() / 2
    return {left + QStyle.sliderPositionFromValue(slider.minimum(), slider.maximum(), t, span)
            for t in slider.ticks}


def test_the_ticks_are_painted_where_their_values_sit_also_after_a_resize(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    _path_ready(window, qtbot)
    slider = window.controls.slider
    for width in (slider.width(), slider.width() // 2):
        slider.resize(width, slider.height())
        painted, expected = _tick_columns(slider), _where_ticks_go(slider)
        assert len(expected) > 3
        assert all(any(abs(x - column) <= 1 for column in painted) for x in expected)
        assert all(any(abs(x - column) <= 1 for x in expected) for column in painted)


def test_path_view_lists_nearby_events_and_a_click_sets_c_just_past_one(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    _path_ready(window, qtbot)
    view = window.c_path
    window.document.set_C(0.5)
    assert view.events.count() > 0
    item = view.events.item(0)
    assert " moves from " in item.text() and item.text().startswith("at C = ")
    event_C = item.data(Qt.UserRole)
    assert window.workspace.show_study("C path")
    qtbot.wait(20)
    rect = view.events.visualItemRect(item)
    qtbot.mouseClick(view.events.viewport(), Qt.LeftButton, pos=rect.center())
    assert window.document.config.C == pytest.approx(event_C * (1 + 1e-6), rel=1e-12)
    assert window.document.config.C > event_C
