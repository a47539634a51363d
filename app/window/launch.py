"""Start the workbench window on the first sample, or say in one line why no
window can open (the check itself is app.display)."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from app.display import display_problem
from solver.files import bundled


def first_sample() -> Path | None:
    """The first bundled sample experiment (or table), as a path on disk."""
    sample = bundled.first_sample()
    return None if sample is None else Path(str(sample))


def _parse(argv):
    parser = argparse.ArgumentParser(prog="slackline", add_help=False)
    parser.add_argument("--empty", action="store_true", help="start with an empty document")
    known, qt_args = parser.parse_known_args(argv)
    return known, qt_args


def launch_window(argv) -> int:
    options, qt_args = _parse(list(argv))
    problem = display_problem()
    if problem is not None:
        print(problem, file=sys.stderr)
        return 2
    from PySide6.QtCore import QCoreApplication
    from PySide6.QtWidgets import QApplication

    from app.window.main_window import MainWindow
    QCoreApplication.setOrganizationName("Slackline")
    QCoreApplication.setApplicationName("Slackline")
    app = QApplication.instance() or QApplication([sys.argv[0], *qt_args])
    # Python's cyclic garbage collector runs in whichever thread allocates when its
    # count is due, solver threads included, and a Qt object it frees there is
    # destroyed off the GUI thread: seen as a deadlock (a solve thread in gc, waiting
    # in ~QObject for the GIL the GUI thread needed).  pyqtgraph's collector turns
    # automatic collection off and collects on a GUI-thread timer instead.
    from pyqtgraph.util.garbage_collector import GarbageCollector
    collector = GarbageCollector(interval=1.0)   # noqa: F841 (kept alive with the app)
    window = MainWindow()
    window.show()
    from app.window.warm_up_status import install_warm_up
    install_warm_up(window)      # the kernel solver gets ready while the user looks around
    if not window.offer_recovery() and not options.empty:
        sample = first_sample()
        if sample is not None:
            window.files.open_path(sample)
    return app.exec()
