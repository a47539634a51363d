"""The exact C path of the document's points, computed in the background after every edit.

While the points and every setting but C stay as they were, the document
evaluates the path instead of solving (solver.CPath.evaluate: no QP).  A new
request cancels the one running (latest wins); until the new path is ready
the document solves as before.
"""

from __future__ import annotations

import math

import numpy as np
from PySide6.QtCore import QObject, Signal

from solver import SlacklineError, compute_path
from solver.study.path_curves import path_curves
from app.document.background import BackgroundTask

C_FROM, C_TO = 1e-3, 1e4      # the C slider's range
POINT_LIMIT = 20_000          # larger sets: the slider solves, no path is kept


def _key(X, y, config):
    """What the path depends on: the points and every setting but C."""
    return (np.asarray(X, float).tobytes(), np.asarray(y).tobytes(),
            config.with_changes(C=1.0, hard_margin=False))


class PathKeeper(QObject):
    ready = Signal(object)          # the CPath of the latest request (curves in .curves)
    progress = Signal(float)        # share of the C range done, 0 .. 1
    cleared = Signal()              # the kept path no longer fits the points / settings

    def __init__(self, parent=None, enabled: bool = True):
        super().__init__(parent)
        self.enabled = enabled
        self.path = None
        self.curves = None              # solver.study.path_curves of the kept path
        self.failure = None
        self._key = None
        self._task = None
        self._running: set = set()

    @property
    def computing(self) -> bool:
        return self._task is not None

    def request(self, X, y, config) -> None:
        """Start computing the path of these points and settings, unless it is kept
        or under way already."""
        if not self.enabled:
            return
        key = _key(X, y, config)
        if key == self._key:
            return
        self._key = key
        if self.path is not None:
            self.path = None
            self.cleared.emit()
        if self._task is not None:
            self._task.cancel()
        self._task = None
        self.failure = None
        if len(y) < 2 or len(y) > POINT_LIMIT or len(set(np.asarray(y).tolist())) < 2:
            return
        X, y = np.array(X, float), np.array(y)
        span = math.log(C_TO / C_FROM)

        def work(progress, cancel):
            share = lambda C: progress(int(1000 * math.log(C / C_FROM) / span), 1000)  # noqa: E731
            path = compute_path(X, y, config, C_FROM, C_TO, progress=share,
                                cancel=cancel.is_set)
            return path, path_curves(path)

        task = BackgroundTask(work, self)
        task.progressed.connect(lambda done, total, t=task: self._progressed(t, done, total))
        task.succeeded.connect(lambda path, t=task: self._succeeded(t, path))
        task.failed.connect(lambda message, t=task: self._failed(t, message))
        task.finished.connect(lambda t=task: self._running.discard(t))
        self._running.add(task)
        self._task = task
        self.progress.emit(0.0)
        task.start()

    def evaluate(self, X, y, config):
        """The FitResult at config.C from the kept path, or None (no path for these
        points and settings, a hard margin, or C outside the path's range)."""
        path = self.path
        if path is None or config.hard_margin or not C_FROM <= config.C <= C_TO:
            return None
        if _key(X, y, config) != self._key:
            return None
        try:
            return path.evaluate(config.C)
        except SlacklineError:
            return None

    def _progressed(self, task, done, total):
        if task is self._task:
            self.progress.emit(done / max(1, total))

    def _succeeded(self, task, outcome):
        if task is not self._task:
            return                  # a later request superseded it
        self._task = None
        self.path, self.curves = outcome
        self.progress.emit(1.0)
        self.ready.emit(self.path)

    def _failed(self, task, message):
        if task is self._task:
            self._task = None
            self.failure = message
            self.progress.emit(1.0)

    def shutdown(self) -> None:
        for task in list(self._running):
            task.cancel()
            task.wait(10000)
