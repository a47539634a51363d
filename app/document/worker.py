"""Fits off the GUI thread: the latest request wins, stale answers are dropped.

The controller keeps at most one pending request.  A new request overwrites
it; the worker thread, when free, takes whatever is pending at that moment.
Every request carries an id; an answer whose id is not the latest is dropped
on arrival, so the screen never shows a fit of points that are gone.
"""

from __future__ import annotations

import atexit
import threading
import weakref

from PySide6.QtCore import QObject, QThread, Signal, Slot

from app.document.background import events_until
from solver import ConvergenceError, SlacklineError
from solver import fit  # looked up at call time, so tests can replace it


class _Request:
    __slots__ = ("request_id", "X", "y", "config", "warm_start")

    def __init__(self, request_id, X, y, config, warm_start):
        self.request_id, self.X, self.y = request_id, X, y
        self.config, self.warm_start = config, warm_start


def run_request(request: _Request):
    """(result, None, None) or (None, message, best) for one request."""
    try:
        result = fit(request.X, request.y, request.config, warm_start=request.warm_start)
        return result, None, None
    except ConvergenceError as exc:
        return None, str(exc), exc.best
    except SlacklineError as exc:
        return None, str(exc), None
    except Exception as exc:  # a bug in the solver must not take the window down
        return None, f"the solver failed unexpectedly: {type(exc).__name__}: {exc}", None


class _SolveWorker(QObject):
    """Lives in the worker thread."""

    # one tuple (request id, result, message, best): PySide6 miscounts references
    # of None passed as a bare ``object`` argument across threads
    answered = Signal(object)

    def __init__(self, controller: "SolveController"):
        super().__init__()
        self._controller = controller

    @Slot()
    def take_pending(self):
        request = self._controller._take()
        if request is None:
            return  # a later wake-up already took it: latest wins
        result, message, best = run_request(request)
        self.answered.emit((request.request_id, result, message, best))


def _shutdown_at_exit(controller_ref):
    controller = controller_ref()
    if controller is not None:
        try:
            controller.shutdown()
        except RuntimeError:  # the C++ object is already gone
            pass


class SolveController(QObject):
    """Owned by the Document; the GUI thread only posts requests and reads answers."""

    solved = Signal(object)             # FitResult of the latest request
    failed = Signal(object)             # (message, best-effort result or None)
    busy_changed = Signal(bool)
    _wake = Signal()

    def __init__(self, parent=None, background: bool = True):
        super().__init__(parent)
        self._lock = threading.Lock()
        self._pending: _Request | None = None
        self._latest_id = 0
        self._answered_id = 0
        self._background = background
        self._thread = None
        if background:
            self._thread = QThread()
            self._thread.setObjectName("slackline-solver")
            self._worker = _SolveWorker(self)
            self._worker.moveToThread(self._thread)
            self._wake.connect(self._worker.take_pending)
            self._worker.answered.connect(self._on_answered)
            self._thread.start()
            # a script that ends without closing the window must not abort in
            # QThread's destructor ("Destroyed while thread is still running")
            atexit.register(_shutdown_at_exit, weakref.ref(self))

    @property
    def busy(self) -> bool:
        return self._answered_id != self._latest_id

    def request(self, X, y, config, warm_start=None) -> int:
        was_busy = self.busy
        self._latest_id += 1
        request = _Request(self._latest_id, X, y, config, warm_start)
        if not self._background:
            self._answered_id = self._latest_id
            self._deliver(*run_request(request))
            return request.request_id
        with self._lock:
            self._pending = request
        if not was_busy:
            self.busy_changed.emit(True)
        self._wake.emit()
        return request.request_id

    def supersede(self):
        """The latest request was answered another way (the exact C path): whatever is
        pending or running now answers stale and is dropped."""
        with self._lock:
            self._pending = None
        was_busy = self.busy
        self._latest_id += 1
        self._answered_id = self._latest_id
        if was_busy:
            self.busy_changed.emit(False)

    def _take(self):
        with self._lock:
            request, self._pending = self._pending, None
        return request

    @Slot(object)
    def _on_answered(self, answer):
        request_id, result, message, best = answer
        if request_id != self._latest_id:
            return  # stale: a newer request is queued or running
        self._answered_id = request_id
        self.busy_changed.emit(False)
        self._deliver(result, message, best)

    def _deliver(self, result, message, best):
        if result is not None:
            self.solved.emit(result)
        else:
            self.failed.emit((message, best))

    def wait(self, timeout_ms: int) -> bool:
        """Process events until the latest request is answered (tests, headless)."""
        return events_until(lambda: not self.busy, timeout_ms)

    def shutdown(self):
        if self._thread is not None and self._thread.isRunning():
            self._thread.quit()
            self._thread.wait(60000)
