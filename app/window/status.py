"""The status bar: what is under the cursor, and what state the fit is in.

Left to right: passing messages (saved, pinned, refused input ...); the cursor
read-out "x  y  f(x)"; the fit read-out "44 points · linear · 1.9 ms ·
current" whose last word is the state: current, solving, or stale with why.
"""

from __future__ import annotations

from PySide6.QtCore import QEvent, QObject, Qt
from PySide6.QtWidgets import QLabel, QProgressBar

from app.document.document import CONFIG, ERROR, PINNED, POINTS, RESULT

KERNEL_WORDS = {"linear": "linear", "polynomial": "polynomial", "rbf": "Gaussian (RBF)"}
PIN_MESSAGE_MS = 8000


def _g(value: float) -> str:
    return f"{value:.4g}"


class StatusReadouts:
    def __init__(self, window, document, canvas):
        self.window, self.document, self.canvas = window, document, canvas
        bar = window.statusBar()
        self.cursor = QLabel("", objectName="status_cursor")
        self.cursor.setToolTip("the data coordinates under the mouse and the decision value "
                               "f there (f > 0: the +1 side; |f| < 1: inside the margin band)")
        self.cursor.setMinimumWidth(260)
        self.fit_state = QLabel("", objectName="status_fit")
        self.fit_state.setToolTip("points, kernel, the last solve time and whether the fit "
                                  "on screen belongs to the current points and settings")
        self.busy_indicator = QProgressBar()
        self.busy_indicator.setRange(0, 0)
        self.busy_indicator.setMaximumSize(70, 12)
        self.busy_indicator.setTextVisible(False)
        self.busy_indicator.setToolTip("solving\u2026")
        # keep its room when hidden: a status bar that changes height re-lays
        # out the window and repaints the whole canvas during every solve
        policy = self.busy_indicator.sizePolicy()
        policy.setRetainSizeWhenHidden(True)
        self.busy_indicator.setSizePolicy(policy)
        self.busy_indicator.hide()
        bar.addPermanentWidget(self.cursor)
        bar.addPermanentWidget(self.fit_state)
        bar.addPermanentWidget(self.busy_indicator)
        self._mouse = None
        canvas.scene().sigMouseMoved.connect(self._mouse_moved)
        canvas.viewport().installEventFilter(_LeaveWatch(self, canvas.viewport()))
        document.busy_changed.connect(self._busy)
        self._failure = None
        self._had_pin = False     # a load notifies every change: "pin cleared" only after one
        document.changed.connect(self._document_changed)
        self.refresh()

    def _document_changed(self, changes):
        if changes & {POINTS, CONFIG, RESULT}:
            self.refresh()
        if ERROR in changes:      # after refresh: the read-outs' new width leaves the room
            self._failed(self.document.last_error)
        if PINNED in changes:
            self._pinned()

    # -- the cursor ------------------------------------------------------------
    def mouse_left(self):
        self._mouse = None
        self._show_cursor()

    def _mouse_moved(self, scene_pos):
        view = self.canvas.getPlotItem().getViewBox()
        if not view.sceneBoundingRect().contains(scene_pos):
            self._mouse = None
        else:
            point = view.mapSceneToView(scene_pos)
            self._mouse = (point.x(), point.y())
        self._show_cursor()

    def _show_cursor(self):
        if self._mouse is None:
            self.cursor.setText("")
            return
        x, y = self._mouse
        result = self.document.current_result()
        f = "\u2014" if result is None else _g(float(result.decision_function([[x, y]])[0]))
        self.cursor.setText(f"x {_g(x)}   y {_g(y)}   f(x) {f}")

    # -- the fit ---------------------------------------------------------------
    def state(self) -> tuple[str, str]:
        """(state word, why) for the fit on screen: current, solving or stale."""
        doc = self.document
        if doc.busy:
            return "solving", "a fit of the current points and settings is under way"
        if len(set(doc.y.tolist())) < 2:
            return "no fit", ("a fit needs points of both classes: click the canvas "
                              "(Shift+click for the other class) or import data (Ctrl+I)")
        if doc.last_error:
            return "stale", f"the last solve failed: {doc.last_error}"
        if doc.result is None:
            return "no fit", ("add points of both classes (click the canvas, Shift+click for "
                              "the other class) or import data (Ctrl+I)")
        if doc.current_result() is None:
            return "stale", "the points or settings changed since this fit"
        return "current", "the fit belongs to exactly the points and settings shown"

    def refresh(self, *_):
        doc = self.document
        word, why = self.state()
        parts = [f"{len(doc.X)} point{'s' if len(doc.X) != 1 else ''}",
                 KERNEL_WORDS.get(doc.config.kernel, doc.config.kernel)]
        if doc.result is not None and word != "no fit":
            parts.append(f"{doc.result.seconds * 1e3:.1f} ms")
        text = " \u00b7 ".join(parts)
        shown = {"current": "current", "solving": "solving\u2026", "no fit": "no fit yet"}
        if word == "stale":
            short = "last solve failed" if doc.last_error else "points or settings changed"
            state = f"<b style='color:#8a5a00'>stale</b> ({short})"
            if doc.result is not None and not doc.result.converged:
                state = "<b style='color:#8a5a00'>not converged</b> (its last iterate shown)"
        else:
            state = shown[word]
        self.fit_state.setText(f"{text} \u00b7 {state}")
        self.fit_state.setToolTip(f"{word}: {why}")
        bar = self.window.statusBar()
        if word == "current" and self._failure and bar.currentMessage() == self._failure:
            bar.clearMessage()
            bar.setToolTip("")
        self._show_cursor()

    def _failed(self, message: str):
        """The reason in the room left of the read-outs, cut with an ellipsis (not mid-word
        off the edge); all of it in the bar's tooltip and in the Summary."""
        bar = self.window.statusBar()
        room = bar.width() - sum(w.sizeHint().width() for w in
                                 (self.cursor, self.fit_state, self.busy_indicator)) - 48
        shown = bar.fontMetrics().elidedText(message, Qt.ElideRight, max(room, 160))
        self._failure = shown
        bar.setToolTip(message)
        bar.showMessage(shown)

    def _busy(self, busy: bool):
        self.busy_indicator.setVisible(busy)
        self.refresh()

    # -- the pin -----------------------------------------------------------------
    def pin(self):
        """Pin the current fit, saying so (or why not) in the status bar."""
        doc = self.document
        if doc.result is None:
            self.window.statusBar().showMessage(
                "nothing to pin yet: there is no fit (add points of both classes)",
                PIN_MESSAGE_MS)
            return
        doc.pin_current()

    def _pinned(self):
        doc, bar = self.document, self.window.statusBar()
        pinned = doc.pinned
        if pinned is None:
            if self._had_pin:
                bar.showMessage("pin cleared: the ghost boundary is gone", PIN_MESSAGE_MS)
            self._had_pin = False
            return
        self._had_pin = True
        config = pinned.config
        C = "hard margin" if config.hard_margin else f"C = {_g(config.C)}"
        bar.showMessage(f"pinned the current fit ({KERNEL_WORDS.get(config.kernel)}, {C}): "
                        f"it stays as the dashed grey ghost; Compare lists what changes",
                        PIN_MESSAGE_MS)


class _LeaveWatch(QObject):
    """Clears the cursor read-out when the mouse leaves the canvas."""

    def __init__(self, readouts, parent):
        super().__init__(parent)
        self._readouts = readouts

    def eventFilter(self, watched, event):
        if event.type() == QEvent.Leave:
            self._readouts.mouse_left()
        return False
