"""Where the panels sit: a layout designed for 1280 x 800 and up.

    +-------------+---------------------------------------------+
    | Fit         |                                             |
    | settings    |                 canvas                      |
    | (fixed      |                                             |
    |  width)     |                                             |
    +-------------+---------------------------------------------+
    | Summary     | Studies: Points | C sweep | Compare | Note  | Point  |
    | (read-outs) |                                       | (the   |
    |             |                                       | chosen |
    +-------------+---------------------------------------+--------+

The left column runs the full height (it owns both left corners), so the
fit settings and the read-outs are always in sight and the canvas gets the
whole remaining width.  The study views share one tabbed dock under the
canvas, with the inspector of the selected point beside them: a panel in the
window's OPTIONAL_PANELS becomes one more tab.  The Fit settings column has a
fixed width, so it never jumps when the kernel shows or hides gamma, degree
and offset.
"""

from __future__ import annotations

import importlib

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QDockWidget, QScrollArea, QTabWidget

SETTINGS_WIDTH = 300       # px: the widest Fit settings row ("C" slider + field) fits
INSPECTOR_WIDTH = 270      # px: "functional margin y·f  -0.123456" fits
SETTINGS_HEIGHT = 330      # px: every Fit settings row shown, the polynomial kernel's too
STUDY_HEIGHT = 290         # px at 800 high; the sweep charts get >= 220 px of it
STUDY_MIN_HEIGHT = 270


def _scrolled(widget):
    holder = QScrollArea()
    holder.setWidget(widget)
    holder.setWidgetResizable(True)
    holder.setFrameShape(QScrollArea.NoFrame)
    holder.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
    return holder


class Workspace:
    """Builds the docks of ``window`` around its canvas and keeps the study tabs."""

    def __init__(self, window):
        self.window = window
        self.docks = {}
        window.setCorner(Qt.TopLeftCorner, Qt.LeftDockWidgetArea)
        window.setCorner(Qt.BottomLeftCorner, Qt.LeftDockWidgetArea)
        window.setCorner(Qt.BottomRightCorner, Qt.BottomDockWidgetArea)
        window.setDockNestingEnabled(True)
        self.studies = QTabWidget(objectName="study_tabs")
        self.studies.setDocumentMode(True)
        self.studies.setMinimumHeight(STUDY_MIN_HEIGHT)
        self.study_panels = {}

    # -- building ------------------------------------------------------------
    def dock(self, title, widget, area, scroll=False):
        dock = QDockWidget(title, self.window)
        dock.setObjectName(f"dock_{title.lower().replace(' ', '_')}")
        dock.setFeatures(QDockWidget.DockWidgetMovable | QDockWidget.DockWidgetClosable
                         | QDockWidget.DockWidgetFloatable)
        dock.setWidget(_scrolled(widget) if scroll else widget)
        self.window.addDockWidget(area, dock)
        self.docks[title] = dock
        return dock

    def settings_column(self, controls):
        """The Fit settings dock, as wide as its widest state and never wider or narrower."""
        dock = self.dock("Fit settings", controls, Qt.LeftDockWidgetArea, scroll=True)
        dock.widget().setFixedWidth(max(SETTINGS_WIDTH, _widest(controls)))
        return dock

    def add_study(self, title, panel, tooltip=""):
        index = self.studies.addTab(panel, title)
        self.studies.setTabToolTip(index, tooltip)
        self.study_panels[title] = panel
        return index

    def add_optional_studies(self, document, specs):
        """(module, class, title[, tooltip]) panels written elsewhere; absent ones are skipped."""
        panels = {}
        for spec in specs:
            module_name, class_name, title = spec[:3]
            try:
                panel_class = getattr(importlib.import_module(module_name), class_name)
            except (ImportError, AttributeError):
                continue
            panel = panel_class(document)
            panels[class_name] = panel
            self.add_study(title, panel, spec[3] if len(spec) > 3 else "")
        return panels

    def finish(self, inspector=None):
        """Dock the study tabs (and the inspector beside them); set the starting sizes."""
        window = self.window
        study = self.dock("Studies", self.studies, Qt.BottomDockWidgetArea)
        study.setMinimumHeight(STUDY_MIN_HEIGHT)
        if inspector is not None:
            point = self.dock("Point", inspector, Qt.BottomDockWidgetArea, scroll=True)
            window.splitDockWidget(study, point, Qt.Horizontal)
            window.resizeDocks([point], [INSPECTOR_WIDTH], Qt.Horizontal)
        window.resizeDocks([study], [STUDY_HEIGHT], Qt.Vertical)
        left = [self.docks[t] for t in ("Fit settings", "Summary") if t in self.docks]
        window.resizeDocks(left, [SETTINGS_HEIGHT, window.height() - SETTINGS_HEIGHT][:len(left)],
                           Qt.Vertical)

    # -- use -------------------------------------------------------------------
    def show_study(self, title):
        """Bring the study tab ``title`` to the front (and the dock into view)."""
        panel = self.study_panels.get(title)
        if panel is None:
            return False
        self.docks["Studies"].show()
        self.studies.setCurrentWidget(panel)
        return True


def _widest(controls) -> int:
    """Width the Fit settings need, plus room for a vertical scroll bar."""
    return controls.minimumSizeHint().width() + 24
