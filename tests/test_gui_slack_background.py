"""Slack segments too slow for the window's thread are made off it (large kernel fits).

The window must stay responsive while they are made, show none of an earlier
fit's meanwhile, and draw exactly what the figure geometry gives for the fit on
screen (the reference: geometry.slack_of run directly, whose targets land on
f = y_i, tested in test_figure_geometry.py).  Small fits, below SLACK_INLINE,
draw theirs at once as before; the tests lower it to make small fits slow.
"""

import threading

import numpy as np
import pytest
from PySide6.QtCore import QTimer

import app.canvas.scene as scene_module
import app.document.background as background
from app.canvas import geometry
from solver import FitConfig

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401

CONFIG = FitConfig(kernel="rbf", gamma=2.0, C=0.3)


class _Gates:
    """One gate per held call, opened oldest first (``release``), so a test decides
    which call's segments are ready, and in which order."""

    def __init__(self):
        self.events, self.opened, self.all_open = [], 0, False

    def wait_turn(self):
        event = threading.Event()
        self.events.append(event)
        if self.all_open:
            event.set()
        assert event.wait(20)

    def release(self):
        self.events[self.opened].set()
        self.opened += 1

    def open_all(self):
        self.all_open = True
        for event in self.events:
            event.set()


@pytest.fixture
def held(monkeypatch):
    """slack_of that waits off the window's thread until the test lets that call through
    (``gate.release()``, oldest first): the made-off-thread case, with the test deciding
    when segments are ready."""
    monkeypatch.setattr(scene_module, "SLACK_INLINE", 0)
    gate, calls = _Gates(), []
    real = geometry.slack_of

    def slow(result, rect, stop=None):
        if threading.current_thread() is not threading.main_thread():
            calls.append(result)
            gate.wait_turn()
        return real(result, rect, stop=stop)

    monkeypatch.setattr(geometry, "slack_of", slow)
    yield gate, calls
    gate.open_all()


def _drawn(window):
    xs, _ = window.canvas.scene_items.slack.getData()
    return 0 if xs is None else len(xs)


def _expected(window):
    result = window.document.result
    _, starts, ends = geometry.slack_of(result, window.canvas.view_rect())
    return starts, ends


def test_segments_are_made_off_the_windows_thread_and_drawn_when_ready(window, qtbot, held):
    gate, calls = held
    load_points(window, qtbot, gauge_points(n_per_class=30, overlap=True), CONFIG)
    items = window.canvas.scene_items
    qtbot.waitUntil(lambda: len(calls) == 1, timeout=10000)
    # meanwhile the window goes on: no segments yet, and its timers fire
    assert _drawn(window) == 0 and items.slack_task.busy
    ticks = []
    QTimer.singleShot(10, lambda: ticks.append(1))
    qtbot.waitUntil(lambda: ticks == [1], timeout=5000)
    gate.release()
    assert items.slack_task.wait(20000)
    starts, ends = _expected(window)
    assert len(starts) > 5
    xs, ys = items.slack.getData()
    drawn = np.column_stack([xs, ys])
    np.testing.assert_allclose(drawn[0::2], starts, rtol=0, atol=1e-12)
    np.testing.assert_allclose(drawn[1::2], ends, rtol=0, atol=1e-12)


def test_an_earlier_fits_segments_never_reach_the_screen(window, qtbot, held):
    gate, calls = held
    load_points(window, qtbot, gauge_points(n_per_class=30, overlap=True), CONFIG)
    qtbot.waitUntil(lambda: len(calls) == 1, timeout=10000)
    gate.release()
    assert window.canvas.scene_items.slack_task.wait(20000) and _drawn(window) > 0
    # the next fit's are held: the first fit's segments are gone meanwhile
    window.document.set_C(0.5)
    settle(window, qtbot)
    qtbot.waitUntil(lambda: len(calls) == 2, timeout=10000)
    assert _drawn(window) == 0
    # a third fit comes while they are made: the second's are dropped
    window.document.set_C(3.0)
    settle(window, qtbot)
    qtbot.waitUntil(lambda: len(calls) == 3, timeout=10000)
    # the dropped second's outcome arrives first, then the third's
    gate.release()
    qtbot.waitUntil(lambda: len(background._RUNNING) == 1, timeout=10000)
    qtbot.wait(50)
    gate.release()
    assert window.canvas.scene_items.slack_task.wait(20000)
    starts, ends = _expected(window)
    xs, ys = window.canvas.scene_items.slack.getData()
    assert len(xs) == 2 * len(starts)
    np.testing.assert_allclose(np.column_stack([xs, ys])[1::2], ends, rtol=0, atol=1e-12)


def test_a_fit_drawn_at_once_is_not_overwritten_by_an_earlier_ones(window, qtbot, held,
                                                                   monkeypatch):
    gate, calls = held
    load_points(window, qtbot, gauge_points(n_per_class=30, overlap=True), CONFIG)
    qtbot.waitUntil(lambda: len(calls) == 1, timeout=10000)
    monkeypatch.setattr(scene_module, "SLACK_INLINE", 10 ** 12)   # the next is small
    window.document.set_C(3.0)
    settle(window, qtbot)
    starts, ends = _expected(window)
    assert _drawn(window) == 2 * len(starts) > 0
    gate.release()
    qtbot.waitUntil(lambda: not background._RUNNING, timeout=10000)
    qtbot.wait(100)
    xs, ys = window.canvas.scene_items.slack.getData()
    np.testing.assert_allclose(np.column_stack([xs, ys])[1::2], ends, rtol=0, atol=1e-12)


def test_small_fits_draw_their_segments_at_once(window, qtbot):
    load_points(window, qtbot, gauge_points(n_per_class=30, overlap=True), CONFIG)
    assert not window.canvas.scene_items.slack_task.busy
    assert _drawn(window) == 2 * len(_expected(window)[0]) > 0


def test_closing_the_window_while_segments_are_made_stops_them(window, qtbot, held,
                                                              monkeypatch):
    gate, calls = held
    reached = []
    real_newton = geometry.newton_to_level

    def watched(*args, stop=None, **kwargs):
        out = real_newton(*args, stop=stop, **kwargs)
        reached.append(int(out[1].sum()))
        return out

    monkeypatch.setattr(geometry, "newton_to_level", watched)
    load_points(window, qtbot, gauge_points(n_per_class=30, overlap=True), CONFIG)
    qtbot.waitUntil(lambda: len(calls) == 1, timeout=10000)
    task = window.canvas.scene_items.slack_task
    window.canvas.scene_items.shutdown()          # as closing the window does
    assert not task.busy
    gate.release()
    # the thread sees its cancel flag before its first Newton step, ends, and is let go
    qtbot.waitUntil(lambda: len(reached) == 1 and not background._RUNNING, timeout=10000)
    assert _drawn(window) == 0
    _, starts, _ = geometry.slack_of(window.document.result, window.canvas.view_rect())
    assert reached[0] == 0 < len(starts)
