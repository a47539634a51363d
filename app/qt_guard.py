"""Guard against a reference-counting fault of PySide6 6.12.0 under Python 3.11.

PySide6 6.12.0 returns True from every ``Signal.emit()`` without taking a
reference, and drops references to None from some slot calls; after enough
signals the interpreter frees True or None and aborts ("bool_dealloc" /
"none_dealloc").  6.11.3 does not do this (checked with a 200-emit probe).
Until the constraint moves off 6.12.0, the window keeps a large reserve of
references on True, False and None, which makes them effectively immortal
(as Python 3.12 makes them anyway).
"""

from __future__ import annotations

import ctypes
import sys

RESERVE = 1 << 40
_done = False


def guard_refcounts() -> bool:
    """Apply the reserve once when running the affected PySide6; True if applied."""
    global _done
    if _done or sys.version_info >= (3, 12):
        return False
    import PySide6
    if PySide6.__version__ != "6.12.0":
        return False
    ssize_t = ctypes.c_ssize_t
    for obj in (True, False, None):
        # ob_refcnt is the first field of every CPython object
        ssize_t.from_address(id(obj)).value += RESERVE
    _done = True
    return True
