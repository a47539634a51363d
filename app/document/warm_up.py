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
before the warm-up ends; the interpreter waits for this thread at exit.  The
thread never touches Qt: it leaves its outcome behind, and a timer on the GUI
thread picks it up and emits the signals, so no signal is ever sent from the
thread to an object the window has already destroyed.
"""

from __future__ import annotations

import functools
import logging
import threading

from PySide6.QtCore import QObject, QTimer, Signal

from solver.warm_up import prepare_kernel_solver

log = logging.getLogger(__name__)
POLL_MS = 50              # how often the GUI thread looks whether the warm-up has ended


class SolverWarmUp(QObject):
    """Runs ``work()`` (default: ``prepare_kernel_solver``) once, off the GUI thread."""

    started = Signal()
    finished = Signal(float)     # seconds the work took
    failed = Signal(str)         # one line: what went wrong

    def __init__(self, parent=None, work=None):
        super().__init__(parent)
        # background: small Gaussian fits meanwhile take the working-set path
        self._work = work or functools.partial(prepare_kernel_solver, background=True)
        self._thread: threading.Thread | None = None
        self._outcome = _Outcome()   # all the thread touches: no Qt object
        self._poll = QTimer(self, interval=POLL_MS)
        self._poll.timeout.connect(self._collect)

    @property
    def running(self) -> bool:
        return self._thread is not None and not self._outcome.done.is_set()

    @property
    def done(self) -> bool:
        return self._outcome.done.is_set()

    def start(self):
        if self._thread is not None:
            return                # once per window
        self._thread = threading.Thread(target=_run, args=(self._work, self._outcome),
                                        name="slackline-warm-up")
        self.started.emit()
        self._thread.start()
        self._poll.start()

    def wait(self, timeout: float | None = None) -> bool:
        """Block until the work ended (tests, benchmarks); True when it did."""
        return self._outcome.done.wait(timeout)

    def _collect(self):             # on the GUI thread
        if not self._outcome.done.is_set():
            return
        self._poll.stop()
        seconds, message = self._outcome.seconds, self._outcome.message
        if message is None:
            self.finished.emit(seconds)
        else:
            self.failed.emit(message)


class _Outcome:
    """What the thread leaves behind: seconds or a message, then ``done`` set."""

    def __init__(self):
        self.done = threading.Event()
        self.seconds: float | None = None
        self.message: str | None = None


def _run(work, outcome: _Outcome):
    """The thread's body: no Qt here."""
    try:
        outcome.seconds = float(work())
    except Exception as exc:  # noqa: BLE001 - a failed warm-up must never reach the user
        outcome.message = f"{type(exc).__name__}: {exc}"
        log.warning("getting the kernel solver ready failed (%s); the first kernel fit "
                    "will do it instead", outcome.message)
    else:
        log.info("kernel solver ready after %.2f s", outcome.seconds)
    outcome.done.set()
