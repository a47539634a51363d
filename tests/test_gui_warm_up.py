"""The kernel solver gets ready in the background after the window opens (issue 13):
the window keeps handling clicks and keys meanwhile, says plainly what is going on
when it takes a while, and a failed warm-up is only logged."""

import logging
import threading

from PySide6.QtCore import Qt, QTimer
from PySide6.QtWidgets import QApplication, QDialog, QMessageBox

from app.window.warm_up_status import READY_MESSAGE, SAY_AFTER_MS, install_warm_up
from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


class _HeldWork:
    """Stands in for the compilation: runs until the test lets it go."""

    def __init__(self):
        self.release = threading.Event()
        self.thread_name = None

    def __call__(self):
        self.thread_name = threading.current_thread().name
        assert self.release.wait(30)
        return 1.5


def _choose_rbf(window, qtbot):
    window.controls.kernel.setFocus()
    while window.document.config.kernel != "rbf":
        qtbot.keyClick(window.controls.kernel, Qt.Key_Down)
        qtbot.wait(20)


def test_the_warm_up_runs_off_the_gui_thread_while_the_window_fits_and_redraws(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    work = _HeldWork()
    status = install_warm_up(window, work)
    qtbot.waitUntil(lambda: status.warm_up.running, timeout=2000)
    ticks = []
    timer = QTimer(interval=10, timeout=lambda: ticks.append(1))
    timer.start()
    _choose_rbf(window, qtbot)                 # real keys, while the warm-up is held
    settle(window, qtbot)
    qtbot.wait(200)
    timer.stop()
    assert status.warm_up.running
    assert work.thread_name == "slackline-warm-up"
    assert window.document.current_result().config.kernel == "rbf"
    assert len(ticks) >= 10                    # the event loop kept turning
    with qtbot.waitSignal(status.warm_up.finished, timeout=5000) as finished:
        work.release.set()
    assert finished.args == [1.5]


def test_the_status_bar_says_plainly_that_the_kernel_solver_is_getting_ready(window, qtbot):
    work = _HeldWork()
    status = install_warm_up(window, work)
    qtbot.wait(SAY_AFTER_MS + 200)
    message = window.statusBar().currentMessage()
    assert message == READY_MESSAGE
    assert "Gaussian (RBF)" in message and "jit" not in message.lower()
    # at 1280 x 800 it ends before the status bar's own widgets begin (seen clipped)
    from PySide6.QtWidgets import QSizeGrip, QWidget
    bar = window.statusBar()
    assert window.width() == 1280
    first = min(w.x() for w in bar.findChildren(QWidget)
                if w.isVisible() and not isinstance(w, QSizeGrip))
    assert bar.fontMetrics().horizontalAdvance(message) + 12 <= first
    with qtbot.waitSignal(status.warm_up.finished, timeout=5000):
        work.release.set()
    qtbot.wait(5)
    assert window.statusBar().currentMessage() == ""


def test_a_quick_warm_up_leaves_the_status_bar_alone(window, qtbot):
    status = install_warm_up(window, lambda: 0.01)
    qtbot.waitUntil(lambda: status.warm_up.done, timeout=5000)
    qtbot.wait(SAY_AFTER_MS + 100)
    assert window.statusBar().currentMessage() == ""


def test_a_later_message_outlives_the_end_of_the_warm_up(window, qtbot):
    work = _HeldWork()
    status = install_warm_up(window, work)
    qtbot.wait(SAY_AFTER_MS + 100)
    window.statusBar().showMessage("saved gauges.experiment.json")
    with qtbot.waitSignal(status.warm_up.finished, timeout=5000):
        work.release.set()
    assert window.statusBar().currentMessage() == "saved gauges.experiment.json"


def test_a_failing_warm_up_is_logged_and_opens_no_dialog(window, qtbot, caplog):
    def broken():
        raise RuntimeError("no compiler on this machine")

    load_points(window, qtbot, gauge_points(overlap=True))
    with caplog.at_level(logging.WARNING, logger="app.document.warm_up"):
        status = install_warm_up(window, broken)
        with qtbot.waitSignal(status.warm_up.failed, timeout=5000) as failed:
            pass
    assert "no compiler on this machine" in failed.args[0]
    assert any("no compiler on this machine" in r.getMessage() for r in caplog.records)
    qtbot.wait(SAY_AFTER_MS + 100)
    dialogs = [w for w in QApplication.topLevelWidgets()
               if isinstance(w, (QDialog, QMessageBox)) and w.isVisible()]
    assert dialogs == []
    assert window.statusBar().currentMessage() != READY_MESSAGE
    _choose_rbf(window, qtbot)                  # kernel fits still work: they get ready on their own
    settle(window, qtbot)
    assert window.document.current_result().config.kernel == "rbf"


def test_the_real_warm_up_ends_and_the_first_rbf_fit_follows(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    status = install_warm_up(window)
    with qtbot.waitSignal(status.warm_up.finished, timeout=60000):
        pass
    _choose_rbf(window, qtbot)
    settle(window, qtbot)
    assert window.document.current_result().solver_status == "optimal"


def test_a_window_destroyed_before_the_warm_up_ends_leaves_nothing_to_crash(qtbot,
                                                                           temporary_settings):
    from app.window.main_window import MainWindow
    win = MainWindow(quiet=True)
    win.show()
    work = _HeldWork()
    status = install_warm_up(win, work)
    qtbot.waitUntil(lambda: status.warm_up.running, timeout=2000)
    warm_up = status.warm_up
    win.recovery.timer.stop()
    win.document.shutdown()
    win.deleteLater()
    qtbot.wait(50)                              # the window and its warm-up object are gone
    work.release.set()
    assert warm_up._thread is not None
    warm_up_thread = warm_up._thread
    warm_up_thread.join(10)
    assert not warm_up_thread.is_alive()
    qtbot.wait(3 * 50)                          # a poll that would fire now has nothing to touch
