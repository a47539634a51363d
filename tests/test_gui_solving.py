"""Background solving: the event loop keeps running, latest request wins, errors keep the last fit."""

import time

import numpy as np
from PySide6.QtCore import QElapsedTimer, QTimer

import app.document.worker
from app.document.document import RESULT
from solver.config import FitConfig
from solver.files.dataset import Dataset

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def test_a_slow_solve_does_not_block_the_event_loop(window, qtbot, monkeypatch):
    load_points(window, qtbot, gauge_points())
    real_fit = app.document.worker.fit

    def slow_fit(*args, **kwargs):
        time.sleep(0.6)
        return real_fit(*args, **kwargs)

    monkeypatch.setattr(app.document.worker, "fit", slow_fit)
    ticks, gaps, clock = [], [], QElapsedTimer()
    timer = QTimer(interval=10)
    timer.timeout.connect(lambda: (gaps.append(clock.restart()), ticks.append(1)))
    clock.start()
    timer.start()
    window.document.set_C(0.5)
    assert window.document.busy
    qtbot.waitUntil(lambda: not window.document.busy, timeout=5000)
    timer.stop()
    # a 0.6 s solve in the worker: the GUI thread kept ticking every ~10 ms
    assert len(ticks) >= 20
    assert max(gaps) < 250


def test_the_busy_indicator_shows_while_a_solve_runs(window, qtbot, monkeypatch):
    load_points(window, qtbot, gauge_points())
    real_fit = app.document.worker.fit
    monkeypatch.setattr(app.document.worker, "fit", lambda *a, **k: (time.sleep(0.3), real_fit(*a, **k))[1])
    window.document.set_C(0.5)
    qtbot.waitUntil(lambda: window.busy_indicator.isVisible(), timeout=1000)
    settle(window, qtbot)
    assert not window.busy_indicator.isVisible()


def test_only_the_latest_of_many_requests_reaches_the_screen(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    shown = []
    window.document.changed.connect(
        lambda changes: shown.append(window.document.result) if RESULT in changes else None)
    for C in (0.01, 0.1, 1.0, 10.0, 3.0):
        window.document.set_C(C)
    settle(window, qtbot)
    assert window.document.result.config.C == 3.0
    assert all(r.config.C in (0.01, 0.1, 1.0, 10.0, 3.0) for r in shown)
    assert shown[-1].config.C == 3.0


def test_hard_margin_on_non_separable_points_keeps_the_last_fit_marked_stale(window, qtbot):
    data = gauge_points()
    flipped = data.y.copy()
    flipped[0] = -1  # a reject inside the pass cluster: no line separates the classes
    load_points(window, qtbot, Dataset.from_points(data.X, flipped))
    good = window.document.result
    drawn = window.canvas.scene_items.boundary.getData()
    window.document.set_config(window.document.config.with_changes(hard_margin=True))
    settle(window, qtbot)
    doc = window.document
    assert doc.result is good and doc.result_is_stale
    assert "separ" in window.statusBar().currentMessage()
    assert "stale" in window.summary.text("state")
    assert np.array_equal(window.canvas.scene_items.boundary.getData()[0], drawn[0])


def test_warm_start_hands_the_previous_result_to_the_solver(window, qtbot, monkeypatch):
    load_points(window, qtbot, gauge_points(overlap=True), FitConfig(kernel="rbf"))
    previous = window.document.result
    seen = []
    real_fit = app.document.worker.fit
    monkeypatch.setattr(app.document.worker, "fit",
                        lambda X, y, c, warm_start=None: (seen.append(warm_start),
                                                          real_fit(X, y, c, warm_start))[1])
    window.document.set_C(2.0)
    settle(window, qtbot)
    assert seen == [previous]
