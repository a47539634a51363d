"""The window's side of getting the kernel solver ready: start it once the window
is up, and say so in the status bar while it takes noticeable time."""

from __future__ import annotations

from PySide6.QtCore import QTimer

from app.document.warm_up import SolverWarmUp
from solver.compiled_cache import GENERIC_LIMIT

# short enough for the status bar at 1280 px beside the fit's own read-out; the 300
# is compiled_cache.GENERIC_LIMIT, the fits that take the working-set path meanwhile
READY_MESSAGE = (f"preparing the fast Gaussian (RBF) solver (first run only, up to 30 s); "
                 f"fits of up to {GENERIC_LIMIT} points run meanwhile")
SAY_AFTER_MS = 400        # a warm-up that is quicker than this (cached) goes unmentioned


class WarmUpStatus:
    def __init__(self, window, work=None):
        self.window = window
        self.warm_up = SolverWarmUp(window, work)
        self._said = False
        self._timer = QTimer(window, singleShot=True, interval=SAY_AFTER_MS)
        self._timer.timeout.connect(self._say)
        self.warm_up.finished.connect(self._ended)
        self.warm_up.failed.connect(self._ended)

    def start(self):
        """Start after the window is shown (launch calls it from the event loop)."""
        if self.warm_up.done or self.warm_up.running:
            return
        self.warm_up.start()
        self._timer.start()

    def _say(self):
        if self.warm_up.running:
            self.window.statusBar().showMessage(READY_MESSAGE)
            self._said = True

    def _ended(self, *_):
        self._timer.stop()
        bar = self.window.statusBar()
        if self._said and bar.currentMessage() == READY_MESSAGE:
            bar.clearMessage()     # never wipe a message that came later


def install_warm_up(window, work=None, delay_ms: int = 0) -> WarmUpStatus:
    """Attach the warm-up to ``window`` and start it once the event loop runs."""
    status = WarmUpStatus(window, work)
    window.warm_up_status = status
    QTimer.singleShot(delay_ms, window, status.start)   # not at all if the window is gone
    return status
