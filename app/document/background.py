"""Run one solver call off the GUI thread, with progress and a cancel flag."""

from __future__ import annotations

import atexit
import threading

from PySide6.QtCore import QObject, QThread, Signal, Slot


class BackgroundTask(QThread):
    """Runs ``work(progress, cancel)`` in its own thread.

    ``progress(done, total)`` and the outcome arrive on the GUI thread as
    signals; ``cancel`` is a threading.Event the work checks between steps.
    """

    progressed = Signal(int, int)
    succeeded = Signal(object)
    failed = Signal(str)

    def __init__(self, work, parent=None):
        super().__init__(parent)
        self._work = work
        self.cancel_event = threading.Event()

    def run(self):
        try:
            outcome = self._work(self.progressed.emit, self.cancel_event)
        except Exception as exc:  # shown in the panel; the window must stay up
            self.failed.emit(str(exc) or type(exc).__name__)
            return
        self.succeeded.emit(outcome)

    def cancel(self):
        self.cancel_event.set()


# every LatestTask thread still running, held here so that none is destroyed mid-run
# (a window closed while its thread works); waited for at exit
_RUNNING: set = set()


class LatestTask(QObject):
    """Runs ``work(cancel)`` off the GUI thread where only the latest call matters.

    Starting another cancels the one before (``cancel`` is a threading.Event its work
    checks now and then) and drops its outcome; ``done(outcome)`` runs on the GUI
    thread for the latest only.  For drawing that is too slow for the GUI thread.
    """

    def __init__(self, parent=None):
        super().__init__(parent)
        self._current = None
        self._done = None

    @property
    def busy(self) -> bool:
        return self._current is not None

    def start(self, work, done) -> None:
        self.cancel()
        task = BackgroundTask(lambda progress, cancel: work(cancel))
        self._current, self._done = task, done
        task.succeeded.connect(self._on_succeeded)
        task.failed.connect(self._on_failed)
        task.finished.connect(self._on_finished)
        _RUNNING.add(task)
        task.start()

    def cancel(self) -> None:
        if self._current is not None:
            self._current.cancel()
        self._current = self._done = None

    def wait(self, timeout_ms: int = 60000) -> bool:
        """Block until the latest task's outcome has been delivered (tests)."""
        return events_until(lambda: not self.busy, timeout_ms)

    @Slot(object)
    def _on_succeeded(self, outcome):
        if self._current is not None and self.sender() is self._current:
            done = self._done
            self._current = self._done = None
            done(outcome)

    @Slot(str)
    def _on_failed(self, message):
        # drawing only: a failure leaves that part of the picture out, as a stale one
        # would be; the fit itself is shown by the views that do not need it
        if self._current is not None and self.sender() is self._current:
            self._current = self._done = None

    @Slot()
    def _on_finished(self):
        task = self.sender()
        _RUNNING.discard(task)
        if task is not None:
            task.deleteLater()


def events_until(done, timeout_ms: int) -> bool:
    """Process events until ``done()`` or the time-out; done() at the end (tests, headless)."""
    from PySide6.QtCore import QCoreApplication, QElapsedTimer
    clock = QElapsedTimer()
    clock.start()
    while not done() and clock.elapsed() < timeout_ms:
        QCoreApplication.processEvents()
        QThread.msleep(1)
    return done()


def _wait_for_running_tasks():
    for task in list(_RUNNING):
        task.cancel()
        try:
            task.wait(10000)
        except RuntimeError:       # the C++ object is already gone
            pass


atexit.register(_wait_for_running_tasks)
