"""The panel list, declared once: each panel's module, dock title and place.

A new panel is one module in app/panels/ and one line here.  The imports are
real: a panel that fails to import or to build stops the window loudly
instead of silently leaving its dock out.
"""

from __future__ import annotations

from dataclasses import dataclass

from PySide6.QtCore import Qt

from app.panels.compare import ComparePanel
from app.panels.controls import Controls
from app.panels.inspector import Inspector
from app.panels.points_table import PointsTable
from app.panels.summary import Summary
from app.panels.sweep import SweepPanel


@dataclass(frozen=True)
class Panel:
    name: str                       # the window's attribute for it (window.summary, ...)
    title: str                      # its dock's title, also in the View menu
    widget: type                    # built as widget(document) or widget(document, canvas)
    area: Qt.DockWidgetArea
    scroll: bool = False            # inside a scroll area (tall forms)
    shown: bool = True              # docked visible at start
    needs_canvas: bool = False

    def build(self, document, canvas):
        return self.widget(document, canvas) if self.needs_canvas else self.widget(document)


PANELS = (
    Panel("controls", "Fit settings", Controls, Qt.LeftDockWidgetArea, scroll=True,
          needs_canvas=True),
    Panel("summary", "Summary", Summary, Qt.LeftDockWidgetArea),
    Panel("inspector", "Point", Inspector, Qt.RightDockWidgetArea),
    Panel("points_table", "Points", PointsTable, Qt.RightDockWidgetArea),
    Panel("sweep", "C sweep", SweepPanel, Qt.BottomDockWidgetArea, shown=False),
    Panel("compare", "Compare", ComparePanel, Qt.BottomDockWidgetArea, shown=False),
)
