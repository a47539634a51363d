"""New rows scored by the current fit: one table row each, exportable as CSV.

Reads the document's Evidence; the scores come from solver.study.heldout and
the exported table from solver.files.scored_table (the same file
``slackline predict --csv`` writes).
"""

from __future__ import annotations

from PySide6.QtWidgets import (QAbstractItemView, QHBoxLayout, QHeaderView, QLabel,
                               QPushButton, QTableWidget, QTableWidgetItem, QVBoxLayout, QWidget)

from solver.files import scored_table

from app.document.evidence import evidence_of


class ScoredRowsPanel(QWidget):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.evidence = evidence_of(document)
        self.table = QTableWidget(0, 0)
        self.table.setObjectName("scored_table")
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.setToolTip("each scored row: its line in the file, decision value f(x), "
                              "predicted label, distance to the boundary and whether it is a "
                              "close call (inside the margin band, |f| < 1)")
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
        self.note = QLabel("File \u2192 Score data\u2026 reads rows with the fit's two feature "
                           "columns")
        self.note.setWordWrap(True)
        self.note.setObjectName("scored_note")
        self.export_button = QPushButton("Export scored rows\u2026")
        self.export_button.setObjectName("export_scored")
        self.export_button.setToolTip("write the scored rows as CSV (the table "
                                      "slackline predict --csv writes)")
        self.clear_button = QPushButton("Clear")
        self.clear_button.setToolTip("forget the scored rows")
        self.clear_button.clicked.connect(self.evidence.clear_rows)
        buttons = QHBoxLayout()
        buttons.addWidget(self.export_button)
        buttons.addWidget(self.clear_button)
        buttons.addStretch(1)
        layout = QVBoxLayout(self)
        layout.addWidget(self.note)
        layout.addWidget(self.table)
        layout.addLayout(buttons)
        self.evidence.changed.connect(self.refresh)
        self.refresh()

    def refresh(self):
        ev = self.evidence
        has_rows = ev.rows is not None and ev.scores is not None
        self.export_button.setEnabled(has_rows)
        self.clear_button.setEnabled(ev.rows is not None)
        if not has_rows:
            self.table.setRowCount(0)
            if ev.rows is not None:
                self.note.setText(f"{len(ev.rows)} rows of {ev.rows.source}: waiting for a fit")
            return
        header, rows = scored_table(ev.rows, ev.scores, self.document.feature_names)
        self.table.setColumnCount(len(header))
        self.table.setHorizontalHeaderLabels([str(h) for h in header])
        self.table.setRowCount(len(rows))
        for r, cells in enumerate(rows):
            for c, cell in enumerate(cells):
                text = f"{cell:.6g}" if isinstance(cell, float) else str(cell)
                self.table.setItem(r, c, QTableWidgetItem(text))
        scores = ev.scores
        units = scores.distance_space
        self.note.setText(f"{len(rows)} rows of {ev.rows.source}; {scores.close_calls} close "
                          f"calls (|f| < 1); distances in {units}")
