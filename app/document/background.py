"""Run one solver call off the GUI thread, with progress and a cancel flag."""

from __future__ import annotations

import threading

from PySide6.QtCore import QThread, Signal


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
