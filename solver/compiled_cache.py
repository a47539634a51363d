"""A place for numba's cache of the compiled RBF steps, wherever the solver is installed.

``solver/kernels/rbf_core.py`` (exp), ``solver/qp/smo_core.py`` (pair steps) and
``face_core.py`` (face steps) compile with ``cache=True``: numba keeps the compiled code beside the module
(``solver/qp/__pycache__``) or, when that folder is read-only, in the user's
cache folder (``~/.cache/numba``).  When
neither can be written (a system-wide install run by a user whose home is
read-only, a locked-down container) numba refuses to import the module at all
("cannot cache function ...: no locator available"), and with it every fit,
linear ones too.  ``import_compiled_steps`` then points numba at a folder of
our own in the temporary directory and imports again: the steps compile once
per boot there instead of once per machine, and everything works.
"""

from __future__ import annotations

import importlib
import logging
import os
import tempfile
import threading

COMPILED = ("solver.kernels.rbf_core", "solver.qp.smo_core", "solver.qp.row_sums",
            "solver.qp.face_core")
log = logging.getLogger(__name__)

# While the compiled steps are being built in the background (the window's warm-up,
# ``solver.warm_up.prepare_kernel_solver(background=True)``), a Gaussian fit of at most
# GENERIC_LIMIT points in another thread takes the working-set path, which needs only the
# kernel rows and row sums compiled (built first, about a second from nothing), instead of
# waiting 12-15 s for the pair and face steps; as exact, and 3-60 ms at 300 points.
GENERIC_LIMIT = 300
_builder: threading.Thread | None = None


def start_building() -> None:
    """The calling thread builds the compiled steps from now on (``end_building``)."""
    global _builder
    _builder = threading.current_thread()


def end_building() -> None:
    global _builder
    _builder = None


def wait_would_be_long(n: int) -> bool:
    """Whether a Gaussian fit of n points in this thread should leave the compiled steps
    alone now: another thread is building them, and n is small enough not to need them."""
    builder = _builder
    return builder is not None and builder is not threading.current_thread() \
        and n <= GENERIC_LIMIT


def fallback_folder() -> str:
    user = os.getuid() if hasattr(os, "getuid") else os.environ.get("USERNAME", "user")
    return os.path.join(tempfile.gettempdir(), f"slackline-compiled-{user}")


def import_compiled_steps():
    """Import the compiled steps, finding numba a writable cache folder if need be."""
    try:
        return [importlib.import_module(name) for name in COMPILED]
    except RuntimeError as exc:
        if "no locator available" not in str(exc) or os.environ.get("NUMBA_CACHE_DIR"):
            raise
    folder = fallback_folder()
    log.info("no writable cache beside the solver or in the home folder; "
             "compiled code is kept in %s", folder)
    os.environ["NUMBA_CACHE_DIR"] = folder
    from numba.core import config
    config.reload_config()          # numba reads NUMBA_CACHE_DIR when it is asked again
    return [importlib.import_module(name) for name in COMPILED]
