import faulthandler
import gc
import os
import sys

import pytest

# Every test runs headless, also when started without `make test`.
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


@pytest.fixture(autouse=True)
def collect_garbage_on_the_main_thread():
    """Cyclic garbage is collected between tests, on the main thread, and never by a
    solver thread: a Qt object left in a cycle by one test and freed in a background
    thread of the next was destroyed off the GUI thread and deadlocked the run (a path
    solve in gc, in ~QObject waiting for the GIL; seen once in a full run).  The
    window does the same with pyqtgraph's GarbageCollector (app/window/launch.py)."""
    gc.disable()
    yield
    # the young generations hold what this test made (a few ms); all of it, 100 ms
    # with Qt, scikit-learn and dask loaded, every FULL_EVERY tests
    _collections[0] += 1
    gc.collect(2 if _collections[0] % FULL_EVERY == 0 else 1)


FULL_EVERY = 100
_collections = [0]


LAST_RESORT = 600      # seconds: twice pytest-timeout's, for a test it cannot end
_terminal = [None]     # a copy of the terminal's stderr, which output capture leaves alone


def pytest_configure(config):
    # pytest suspends its capture between loading conftest files and running tests
    _terminal[0] = os.dup(sys.__stderr__.fileno())


@pytest.fixture(autouse=True)
def end_the_run_if_a_test_hangs_for_good():
    """pytest-timeout's thread needs the GIL, so a thread stuck holding it (the gc
    deadlock above) hangs the run until CI gives up at 90 minutes.  faulthandler's
    watchdog is a C thread: it prints every stack and ends the process."""
    faulthandler.dump_traceback_later(LAST_RESORT, exit=True, file=_terminal[0])
    yield
    faulthandler.cancel_dump_traceback_later()
