"""Can a window open here?  Asked before QApplication exists, because Qt aborts
the process (rather than raising) when its platform plugin cannot start."""

from __future__ import annotations

import ctypes
import os
import sys

XCB_FIX = ("sudo apt-get install libxcb-cursor0 libxkbcommon-x11-0 libxcb-icccm4 "
           "libxcb-keysyms1 libxcb-image0 libxcb-render-util0 libxcb-xinerama0 "
           "libxcb-shape0 libxcb-randr0 libxcb-xkb1")
# what Qt's xcb platform plugin loads at start-up (Debian/Ubuntu library names)
XCB_LIBRARIES = ("libxcb-cursor.so.0", "libxkbcommon-x11.so.0", "libxcb-icccm.so.4",
                 "libxcb-keysyms.so.1", "libxcb-image.so.0", "libxcb-render-util.so.0",
                 "libxcb-shape.so.0", "libxcb-randr.so.0", "libxcb-xkb.so.1")
RENDER_HINT = ("draw a picture without a window instead: "
               "slackline render EXPERIMENT.json -o figure.png")


def display_problem(environ=None, platform: str | None = None, load=None) -> str | None:
    """One line saying why no window can open here, or None when one can."""
    environ = os.environ if environ is None else environ
    platform = sys.platform if platform is None else platform
    if not platform.startswith("linux") or environ.get("QT_QPA_PLATFORM"):
        return None
    if not environ.get("DISPLAY") and not environ.get("WAYLAND_DISPLAY"):
        return f"slackline: no display to open a window on (DISPLAY is not set); {RENDER_HINT}"
    if environ.get("WAYLAND_DISPLAY") and not environ.get("DISPLAY"):
        return None
    load = load or ctypes.CDLL
    missing = []
    for name in XCB_LIBRARIES:
        try:
            load(name)
        except OSError:
            missing.append(name)
    if missing:
        return (f"slackline: Qt's xcb display plugin cannot start, {', '.join(missing)} "
                f"missing; install them with: {XCB_FIX} (or {RENDER_HINT})")
    return None
