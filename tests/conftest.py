import gc
import os

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
