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
canvas, with the inspector of the selected point beside them: a "study"
panel in app/window/panels.py becomes one more tab.  The Fit settings column has a
fixed width, so it never jumps when the kernel shows or hides gamma, degree
and offset.
"""

from __future__ import annotations

from PySide6.QtCore import Qt, QTimer
from PySide6.QtWidgets import QDockWidget, QScrollArea, QTabWidget

SETTINGS_WIDTH = 300       # px: the widest Fit settings row ("C" slider + field) fits
INSPECTOR_WIDTH = 250      # px: "functional margin y·f  -0.123456" fits
SETTINGS_HEIGHT = 425      # px: every Fit settings row shown, the polynomial kernel's too
STUDY_HEIGHT = 290         # px at 800 high; the sweep charts get >= 220 px of it
STUDY_MIN_HEIGHT = 270
STUDY_SHARE = 0.3          # of a taller window's height
BASE_SIZE = (1280, 800)    # the smallest screen the layout is designed for
SCREEN_SHARE = 0.92        # of a larger screen, on first start (later: as the user left it)


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

    def place(self, spec, panel):
        """Put ``panel`` where its app.window.panels entry says."""
        if spec.place == "settings":
            self.settings_column(panel)
        elif spec.place == "left":
            self.dock(spec.title, panel, Qt.LeftDockWidgetArea, scroll=True)
        elif spec.place == "study":
            self.add_study(spec.title, panel, spec.tooltip)
        elif spec.place != "inspector":          # the inspector is docked by finish()
            raise ValueError(f"unknown panel place {spec.place!r} for {spec.title!r}")

    def finish(self, inspector=None):
        """Dock the study tabs (and the inspector beside them); set the starting sizes."""
        window = self.window
        study = self.dock("Studies", self.studies, Qt.BottomDockWidgetArea)
        study.setMinimumHeight(STUDY_MIN_HEIGHT)
        if inspector is not None:
            point = self.dock("Point", inspector, Qt.BottomDockWidgetArea, scroll=True)
            window.splitDockWidget(study, point, Qt.Horizontal)
        self.starting_sizes()

    def starting_sizes(self):
        """The designed sizes of the columns and rows (before the user moves them)."""
        window, docks = self.window, self.docks
        if "Point" in docks:
            window.resizeDocks([docks["Point"]], [INSPECTOR_WIDTH], Qt.Horizontal)
        study = max(STUDY_HEIGHT, int(window.height() * STUDY_SHARE))
        window.resizeDocks([docks["Studies"]], [study], Qt.Vertical)
        left = [docks[t] for t in ("Fit settings", "Summary") if t in docks]
        window.resizeDocks(left, [SETTINGS_HEIGHT, window.height() - SETTINGS_HEIGHT][:len(left)],
                           Qt.Vertical)

    def starting_sizes_when_shown(self):
        """Once the window is on screen at its final size (first start only)."""
        QTimer.singleShot(0, self.starting_sizes)

    def fit_to_screen(self, share: float = SCREEN_SHARE):
        """First start: 1280 x 800, or ``share`` of a larger screen, centred on it."""
        window, screen = self.window, self.window.screen()
        if screen is None:
            return
        room = screen.availableGeometry()
        width = min(room.width(), max(BASE_SIZE[0], int(room.width() * share)))
        height = min(room.height(), max(BASE_SIZE[1], int(room.height() * share)))
        window.resize(width, height)
        window.move(room.x() + (room.width() - width) // 2,
                    room.y() + (room.height() - height) // 2)

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
