"""Get the kernel solver ready in the background, right after the window opens.

The RBF solver's compiled parts are built on their first call (seconds on a
machine that has never run them, ``solver/warm_up.py``).  ``SolverWarmUp``
makes that call in a plain Python thread, so the window keeps handling events
and a user who picks the Gaussian (RBF) kernel soon after start finds it
ready; a fit requested meanwhile waits for the same compilation, not a second
one.  A failure is logged and otherwise ignored: the real fit would compile
on its own, or say why it cannot.

A plain (non-daemon) thread rather than a QThread: a QThread still running
when its owner is destroyed aborts the program, and a window may close
before the warm-up ends; the interpreter waits for this thread at exit.
"""

from __future__ import annotations

import logging
import threading

from PySide6.QtCore import QObject, Signal

from solver.warm_up import prepare_kernel_solver

log = logging.getLogger(__name__)


class SolverWarmUp(QObject):
    """Runs ``work()`` (default: ``prepare_kernel_solver``) once, off the GUI thread."""

    started = Signal()
    finished = Signal(float)     # seconds the work took
    failed = Signal(str)         # one line: what went wrong

    def __init__(self, parent=None, work=None):
        super().__init__(parent)
        self._work = work or prepare_kernel_solver
        self._thread: threading.Thread | None = None
        self._done = threading.Event()

    @property
    def running(self) -> bool:
        return self._thread is not None and not self._done.is_set()

    @property
    def done(self) -> bool:
        return self._done.is_set()

    def start(self):
        if self._thread is not None:
            return                # once per window
        self._thread = threading.Thread(target=self._run, name="slackline-warm-up")
        self.started.emit()
        self._thread.start()

    def wait(self, timeout: float | None = None) -> bool:
        """Block until the work ended (tests, benchmarks); True when it did."""
        return self._done.wait(timeout)

    def _run(self):
        try:
            seconds = float(self._work())
        except Exception as exc:  # noqa: BLE001 - a failed warm-up must never reach the user
            message = f"{type(exc).__name__}: {exc}"
            log.warning("getting the kernel solver ready failed (%s); the first kernel fit "
                        "will do it instead", message)
            self._done.set()
            self._emit(self.failed, message)
            return
        log.info("kernel solver ready after %.2f s", seconds)
        self._done.set()
        self._emit(self.finished, seconds)

    @staticmethod
    def _emit(signal, value):
        try:
            signal.emit(value)    # queued to the GUI thread
        except RuntimeError:      # the window is already gone
            pass
