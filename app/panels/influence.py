"""Which points hold the boundary: the support vectors ranked by what leaving each out changes.

Reads the document's Evidence (app.document.evidence); the figures come from
solver.study.influence.  Selecting a row selects that point on the canvas and
draws the boundary the fit would have without it as a ghost.
"""

from __future__ import annotations

from PySide6.QtCore import Qt, QTimer
from PySide6.QtWidgets import (QAbstractItemView, QHeaderView, QLabel, QTableWidget,
                               QTableWidgetItem, QVBoxLayout, QWidget)

from app.document.document import RESULT
from app.document.evidence import evidence_of

COLUMNS = ("point", "turn [deg]", "b change", "margin change", "flips")
DELAY_MS = 250        # a new fit is ranked once the slider rests this long


def _g(value) -> str:
    return "\u2014" if value is None else f"{value:+.3g}"


class InfluencePanel(QWidget):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.evidence = evidence_of(document)
        self.table = QTableWidget(0, len(COLUMNS))
        self.table.setObjectName("influence_table")
        self.table.setHorizontalHeaderLabels(COLUMNS)
        self.table.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SingleSelection)
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.setMouseTracking(True)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
        self.table.setToolTip("each support vector left out in turn: how far the boundary "
                              "turns (linear), the change of b and of the margin width, and "
                              "how many predictions flip; choose a row to see the boundary "
                              "without that point")
        self.table.itemSelectionChanged.connect(self._row_chosen)
        self.table.cellEntered.connect(lambda row, _col: self._show_ghost(row))
        self.note = QLabel("")
        self.note.setWordWrap(True)
        self.note.setObjectName("influence_note")
        layout = QVBoxLayout(self)
        layout.addWidget(self.note)
        layout.addWidget(self.table)
        self._timer = QTimer(self, singleShot=True, interval=DELAY_MS)
        self._timer.timeout.connect(self._request)
        document.changed.connect(lambda changes: self._timer.start() if RESULT in changes
                                 else None)
        self.evidence.influence_changed.connect(self.refresh)
        self.refresh()

    def showEvent(self, event):
        super().showEvent(event)
        self._timer.start()

    def _request(self):
        if self.isVisible():
            self.note.setText("leaving each support vector out in turn\u2026")
            self.evidence.request_influence()

    def refresh(self):
        influence = self.evidence.influence
        self.table.blockSignals(True)
        self.table.setRowCount(0)
        if influence is None:
            self.table.blockSignals(False)
            self.note.setText("no ranking yet" if self.document.current_result() is None
                              else "ranking when shown\u2026")
            return
        self.table.setRowCount(len(influence.entries))
        for row, entry in enumerate(influence.entries):
            flips = len(entry.flips) + len(entry.heldout_flips)
            cells = (f"#{entry.point}", _g(entry.angle_change), _g(entry.b_change),
                     _g(entry.margin_change), str(flips))
            for column, text in enumerate(cells):
                item = QTableWidgetItem(text)
                item.setData(Qt.UserRole, entry.point)
                self.table.setItem(row, column, item)
        self.table.blockSignals(False)
        self.note.setText(f"{len(influence.entries)} support vectors, largest effect first; "
                          f"{influence.note()}")

    def _point_of(self, row):
        item = self.table.item(row, 0)
        return None if item is None else int(item.data(Qt.UserRole))

    def _show_ghost(self, row):
        self.evidence.set_ghost(self._point_of(row))

    def _row_chosen(self):
        rows = self.table.selectionModel().selectedRows()
        if not rows:
            self.evidence.set_ghost(None)
            return
        point = self._point_of(rows[0].row())
        self.evidence.set_ghost(point)
        self.document.set_selection({point})
