"""GUI latency: a C slider step to the redrawn boundary, and event-loop stalls.

    QT_QPA_PLATFORM=offscreen .venv/bin/python -m bench gui_bench

Targets (DESIGN.md): linear, n = 1,000: median <= 33 ms from a slider step to
the repainted canvas; once the exact C path is ready, <= 12 ms (linear) and
<= 16 ms (RBF, n = 1,000); no event-loop stall over 50 ms while the slider is dragged.
Invented data: two overlapping Gaussian classes (a demo workload, seeded).
"""

from __future__ import annotations

import os
import statistics
import tempfile
import time

import numpy as np

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


def _points(n, seed=11):
    from solver.files.dataset import Dataset
    rng = np.random.default_rng(seed)
    half = n // 2
    X = np.vstack([rng.normal(0, 1.1, (half, 2)) + [1, 1], rng.normal(0, 1.1, (n - half, 2)) - [1, 1]])
    y = np.r_[np.ones(half, int), -np.ones(n - half, int)]
    return Dataset.from_points(X, y)


def _window():
    from PySide6.QtCore import QCoreApplication, QSettings
    from PySide6.QtWidgets import QApplication
    QSettings.setDefaultFormat(QSettings.IniFormat)
    QSettings.setPath(QSettings.IniFormat, QSettings.UserScope, tempfile.mkdtemp())
    QCoreApplication.setOrganizationName("SlacklineBench")
    QCoreApplication.setApplicationName("SlacklineBench")
    app = QApplication.instance() or QApplication([])
    from app.window.main_window import MainWindow
    window = MainWindow(quiet=True)
    window.resize(1280, 800)
    window.show()
    app.processEvents()
    return app, window


def _percentile(values, q):
    return float(np.percentile(np.asarray(values), q))


def _wait_for_path(app, window, seconds=600.0):
    end = time.perf_counter() + seconds
    while window.document.paths.path is None and time.perf_counter() < end:
        app.processEvents()
        time.sleep(0.005)


def step_latency(app, window, dataset, config, steps, path=False):
    """ms from slider.setValue to the canvas having drawn the new result and repainted.
    ``path``: wait for the exact C path first (steps evaluate it); otherwise keep the
    window from computing one, so every step is a solve."""
    window.document.paths.enabled = path
    window.document.load(dataset, config)
    window.canvas.fit_view_to_data()
    window.document.wait_for_solve(600000)
    if path:
        _wait_for_path(app, window)
    app.processEvents()
    slider = window.controls.slider
    from PySide6.QtCore import QEventLoop, QTimer
    times = []
    for position in steps:
        if position == slider.value():
            continue  # no change, no solve: it would only wait for the time-out
        # a real event loop that sleeps between events, as the application's
        # does; a loop spinning processEvents() would starve the solver thread
        # of the GIL and measure that instead
        loop, drawn = QEventLoop(), []
        mark = lambda: (drawn.append(1), loop.quit())  # noqa: E731
        window.canvas.redrawn.connect(mark)
        QTimer.singleShot(120_000, loop.quit)
        start = time.perf_counter()
        slider.setValue(position)
        if not drawn:          # an answer from the exact path may redraw within setValue
            loop.exec()
        window.canvas.redrawn.disconnect(mark)
        window.canvas.viewport().repaint()     # the paint itself is part of the latency
        times.append((time.perf_counter() - start) * 1e3)
    return times


def drag_stalls(app, window, dataset, seconds=2.0, step_ms=16, path=False):
    """Longest gap between 5 ms timer ticks while the slider moves every step_ms."""
    from PySide6.QtCore import QElapsedTimer, QTimer
    from solver.config import FitConfig
    window.document.paths.enabled = path
    window.document.load(dataset, FitConfig(kernel="linear"))   # not the last case's kernel
    window.document.wait_for_solve(600000)
    if path:
        _wait_for_path(app, window)
    slider = window.controls.slider
    slider.setSliderDown(True)
    gaps, clock = [], QElapsedTimer()
    ticker = QTimer(interval=5)
    ticker.timeout.connect(lambda: gaps.append(clock.restart()))
    positions = iter(np.linspace(300, 100, int(seconds * 1000 / step_ms)).astype(int))
    mover = QTimer(interval=step_ms)
    mover.timeout.connect(lambda: slider.setValue(next(positions, 100)))
    clock.start()
    ticker.start()
    mover.start()
    end = time.perf_counter() + seconds
    while time.perf_counter() < end:
        app.processEvents()
        time.sleep(0.0005)
    mover.stop()
    ticker.stop()
    slider.setSliderDown(False)
    window.document.wait_for_solve(600000)
    return max(gaps[1:]) if len(gaps) > 1 else float("nan")


def main():
    from solver.config import FitConfig
    app, window = _window()
    steps = list(range(300, 240, -2))
    rbf = FitConfig(kernel="rbf", gamma=0.5, scaling="zscore")
    cases = [("linear, n = 1,000", _points(1000), FitConfig(kernel="linear"), steps, 33.0,
              False),
             ("rbf, n = 500", _points(500), FitConfig(kernel="rbf", gamma=0.5), steps[:8], None,
              False),
             ("linear, n = 1,000, path ready", _points(1000), FitConfig(kernel="linear"), steps,
              12.0, True),
             ("rbf, n = 1,000, path ready", _points(1000), rbf, steps, 16.0, True)]
    for name, dataset, config, positions, target, path in cases:
        times = step_latency(app, window, dataset, config, positions, path=path)
        median, p95 = statistics.median(times), _percentile(times, 95)
        verdict = "" if target is None else ("  OK" if median <= target else f"  over {target} ms")
        print(f"slider step -> redrawn boundary, {name}: median {median:.1f} ms, "
              f"p95 {p95:.1f} ms over {len(times)} steps{verdict}", flush=True)
    for path in (False, True):
        stall = drag_stalls(app, window, _points(1000), path=path)
        verdict = "OK" if stall <= 50 else "over 50 ms"
        when = "path ready" if path else "solving"
        print(f"longest event-loop stall while dragging C (linear, n = 1,000, {when}): "
              f"{stall:.0f} ms {verdict}", flush=True)
    window.recovery.timer.stop()
    window.document.shutdown()


if __name__ == "__main__":
    main()
