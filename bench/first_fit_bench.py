"""The first Gaussian (RBF) fit after the window opens, with and without the warm-up.

    QT_QPA_PLATFORM=offscreen .venv/bin/python -m bench first_fit_bench

Each run is a fresh process with an empty numba cache (NUMBA_CACHE_DIR in a new
temporary folder), so the compiled pair steps are built from nothing, as on a
machine that never ran Slackline.  The child opens the window as ``slackline``
does (first sample: the pilot batch, 44 points), and ``pick`` seconds after the
window is shown switches the kernel list to Gaussian (RBF).  Reported: seconds
from the process start to the window shown and to the first RBF fit drawn, the
wait from the pick to that fit, and the longest event-loop stall (5 ms timer)
meanwhile.  Beside it, in the same run, the reference library's (scikit-learn
``SVC``) time for the same fit in a process that has already imported it.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
import time

PICKS = (0.0, 1.0, 3.0)


def _child(warm: bool, pick: float) -> None:
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    from PySide6.QtCore import QCoreApplication, QElapsedTimer, QSettings, QTimer
    from PySide6.QtWidgets import QApplication
    QSettings.setDefaultFormat(QSettings.IniFormat)
    QSettings.setPath(QSettings.IniFormat, QSettings.UserScope, tempfile.mkdtemp())
    QCoreApplication.setOrganizationName("SlacklineBench")
    QCoreApplication.setApplicationName("SlacklineBench")
    app = QApplication([])
    from app.window.launch import first_sample
    from app.window.main_window import MainWindow
    from app.window.warm_up_status import install_warm_up
    window = MainWindow(quiet=True)
    window.show()
    marks = {"shown": time.time()}
    if warm:
        status = install_warm_up(window)
        status.warm_up.finished.connect(lambda _s: marks.setdefault("ready", time.time()))
    window.files.open_path(first_sample())
    gaps, clock = [], QElapsedTimer()
    ticker = QTimer(interval=5)
    ticker.timeout.connect(lambda: gaps.append(clock.restart()))

    def choose_rbf():
        marks["pick"] = time.time()
        box = window.controls.kernel
        box.setCurrentIndex(box.findData("rbf"))

    def redrawn():
        result = window.document.current_result()
        if result is not None and result.config.kernel == "rbf" and "fit" not in marks:
            window.canvas.viewport().repaint()
            marks["fit"] = time.time()
            ticker.stop()
            QTimer.singleShot(0, app.quit)

    window.canvas.redrawn.connect(redrawn)
    QTimer.singleShot(int(pick * 1000), choose_rbf)
    QTimer.singleShot(120_000, app.quit)
    clock.start()
    ticker.start()
    app.exec()
    marks["stall_ms"] = max(gaps[1:]) if len(gaps) > 1 else float("nan")
    print(json.dumps(marks), flush=True)
    window.recovery.timer.stop()
    window.document.shutdown()


def _run(warm: bool, pick: float) -> dict:
    env = dict(os.environ, NUMBA_CACHE_DIR=tempfile.mkdtemp(prefix="numba-empty-"),
               QT_QPA_PLATFORM=os.environ.get("QT_QPA_PLATFORM", "offscreen"))
    started = time.time()
    out = subprocess.run([sys.executable, "-m", "bench.first_fit_bench", "--child",
                          "warm" if warm else "cold", str(pick)],
                         env=env, capture_output=True, text=True, timeout=300, check=True)
    marks = json.loads(out.stdout.strip().splitlines()[-1])
    return {key: (value - started if key != "stall_ms" else value) for key, value in marks.items()}


def _reference_seconds() -> float:
    import numpy as np
    from sklearn.svm import SVC
    from solver.files import bundled, load_experiment
    experiment = load_experiment(bundled.first_sample())
    X, y = experiment.dataset.X, experiment.dataset.y
    if experiment.config.scaling == "zscore":
        X = (X - X.mean(axis=0)) / X.std(axis=0)
    SVC(kernel="rbf", gamma=0.5).fit(X, y)              # imports and first call paid
    started = time.perf_counter()
    SVC(kernel="rbf", C=experiment.config.C, gamma=experiment.config.gamma).fit(
        np.asarray(X), np.asarray(y))
    return time.perf_counter() - started


def main():
    reference = _reference_seconds()
    print(f"reference (SVC) fit of the same 44 points: {reference * 1e3:.2f} ms", flush=True)
    for pick in PICKS:
        for warm in (False, True):
            marks = _run(warm, pick)
            wait = marks["fit"] - marks["pick"]
            ready = f", solver ready at {marks['ready']:.2f} s" if "ready" in marks else ""
            print(f"RBF picked {pick:.0f} s after the window is shown, "
                  f"{'with' if warm else 'without'} warm-up: window at {marks['shown']:.2f} s"
                  f"{ready}, first RBF fit drawn at {marks['fit']:.2f} s, wait after the pick "
                  f"{wait:.2f} s ({wait / reference:.0f}x the reference's fit), longest "
                  f"event-loop stall {marks['stall_ms']:.0f} ms", flush=True)


if __name__ == "__main__":
    if sys.argv[1:2] == ["--child"]:
        _child(sys.argv[2] == "warm", float(sys.argv[3]))
    else:
        main()
