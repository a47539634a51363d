"""The panel list, declared once: each panel's class, title and place in the workspace.

A new panel is one module in app/panels/ and one line here.  The imports are
real: a panel that fails to import or to build stops the window loudly
instead of silently leaving its place empty.  Places (app/window/workspace.py):
"settings" the fixed-width Fit settings column; "left" a dock under it;
"study" a tab of the study area under the canvas; "inspector" beside the tabs.
"""

from __future__ import annotations

from dataclasses import dataclass

from app.panels.compare import ComparePanel
from app.panels.influence import InfluencePanel
from app.panels.scored_rows import ScoredRowsPanel
from app.panels.controls import Controls
from app.panels.inspector import Inspector
from app.panels.note import NoteEditor
from app.panels.points_table import PointsTable
from app.panels.summary import Summary
from app.panels.sweep import SweepPanel

PLACES = ("settings", "left", "study", "inspector")


@dataclass(frozen=True)
class Panel:
    name: str                       # the window's attribute for it (window.summary, ...)
    title: str                      # its dock or tab title
    widget: type                    # built as widget(document) or widget(document, canvas)
    place: str                      # one of PLACES
    tooltip: str = ""               # a study tab's tooltip
    needs_canvas: bool = False

    def build(self, document, canvas):
        return self.widget(document, canvas) if self.needs_canvas else self.widget(document)


PANELS = (
    Panel("controls", "Fit settings", Controls, "settings", needs_canvas=True),
    Panel("summary", "Summary", Summary, "left"),
    Panel("points_table", "Points", PointsTable, "study",
          "every point with its figures; double-click a coordinate or label to edit it"),
    Panel("sweep", "C sweep", SweepPanel, "study",
          "cross-validated error and more against C; click the chart to set C"),
    Panel("compare", "Compare", ComparePanel, "study",
          "the current fit against the pinned one, in numbers and words"),
    Panel("influence_panel", "Influence", InfluencePanel, "study",
          "which points hold the boundary: each support vector left out in turn"),
    Panel("scored_panel", "Scored rows", ScoredRowsPanel, "study",
          "new rows scored by the current fit (File \u2192 Score data)"),
    Panel("note_editor", "Note", NoteEditor, "study",
          "the experiment's note: saved in the file and printed in the report"),
    Panel("inspector", "Point", Inspector, "inspector"),
)
