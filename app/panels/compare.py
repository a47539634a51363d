"""The comparison panel: pin the current fit, see what moved, export a report.

Reads the Document (result, pinned) and the document's SweepStore; the facts
come from solver.study.compare and the sentence from solver.study.narrative.
"""

from __future__ import annotations

from PySide6.QtWidgets import (QFileDialog, QHBoxLayout, QHeaderView, QLabel, QMessageBox,
                               QPushButton, QTableWidget, QTableWidgetItem, QVBoxLayout,
                               QWidget)

from solver.study import compare
from solver.study import LEAVE_ONE_OUT, cross_validate, points_fingerprint
from solver import SlacklineError
from solver.study import heldout_sentence, summary
from solver import STATUS_TEXT

from app.document.background import BackgroundTask
from app.document.document import PINNED, RESULT
from app.document.evidence import evidence_of
from app.document.sweep_store import sweep_store
from app.document.provenance import provenance
from app.panels.points_table import SHORT_STATUS

QUICK_FOLDS = 5


class ComparePanel(QWidget):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.store = sweep_store(document)
        self.comparison = None
        self.task = None
        self._cv_cache = {}           # (points fingerprint, config) -> CVEstimate
        self._build()
        document.changed.connect(self._document_changed)
        self.store.sweep_changed.connect(self.refresh)
        self.refresh()

    def _build(self):
        self.pin_button = QPushButton("Pin current fit")
        self.clear_button = QPushButton("Clear pin")
        self.cv_button = QPushButton(f"Estimate CV error ({QUICK_FOLDS}-fold)")
        self.report_button = QPushButton("Export report...")
        self.pin_button.clicked.connect(self.document.pin_current)
        self.clear_button.clicked.connect(self.document.clear_pin)
        self.cv_button.clicked.connect(self.estimate_cv)
        self.report_button.clicked.connect(self._ask_and_export)
        buttons = QHBoxLayout()
        for button in (self.pin_button, self.clear_button, self.cv_button, self.report_button):
            buttons.addWidget(button)
        buttons.addStretch(1)
        self.summary = QLabel("")
        self.summary.setWordWrap(True)
        self.table = QTableWidget(0, 4)
        self.table.setHorizontalHeaderLabels(["figure", "pinned", "current", "change"])
        self.support = QLabel("")
        self.support.setWordWrap(True)
        self.changes = QTableWidget(0, 6)
        self.changes.setHorizontalHeaderLabels(["#", "class", "was", "now", "\u03be was",
                                                "\u03be now"])
        for table in (self.table, self.changes):
            _compact(table)
        # buttons and words across the top, the two tables side by side below: the
        # study area is wide and short, and the tables need the width
        tables = QHBoxLayout()
        tables.addWidget(self.table)
        tables.addWidget(self.changes, stretch=1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.addLayout(buttons)
        layout.addWidget(self.summary)
        layout.addWidget(self.support)
        layout.addLayout(tables, stretch=1)

    # -- reading the document -------------------------------------------------
    def cv_for(self, result):
        """A CV estimate of ``result``'s points and settings: from the sweep, or computed."""
        if result is None:
            return None
        sweep = self.store.current_for(result.X, result.y, result.config)
        if sweep is not None and not result.config.hard_margin:
            estimate = sweep.cv_at(result.config.C)
            if estimate is not None:
                return estimate
        return self._cv_cache.get(_key(result))

    def _document_changed(self, changes):
        if changes & {RESULT, PINNED}:
            self.refresh()

    def refresh(self):
        document = self.document
        current, pinned = document.result, document.pinned
        self.pin_button.setEnabled(current is not None)
        self.clear_button.setEnabled(pinned is not None)
        self.report_button.setEnabled(current is not None)
        self.cv_button.setEnabled(current is not None and self.task is None)
        if current is None or pinned is None:
            self.comparison = None
            self.summary.setText("Pin the current fit, then change C, settings or points to "
                                 "see what moved." if current is not None else
                                 "No fit yet.")
            self.table.setRowCount(0)
            self.changes.setRowCount(0)
            self.support.setText("")
            return
        self.comparison = compare(pinned, current, self.cv_for(pinned), self.cv_for(current))
        text = summary(self.comparison)
        if document.result_is_stale:
            text += " (The current fit is out of date: the last solve failed.)"
        counts = evidence_of(document).counts
        if counts is not None:
            text += " " + heldout_sentence(counts, current.training_error)
        self.summary.setText(text)
        self._fill_table()
        self._fill_changes()

    def _fill_table(self):
        rows = self.comparison.quantities
        self.table.setRowCount(len(rows))
        for r, q in enumerate(rows):
            for c, text in enumerate((q.name, f"{q.before:.4g}", f"{q.after:.4g}",
                                      f"{q.change:+.4g}")):
                self.table.setItem(r, c, QTableWidgetItem(text))
        # the figures table is as wide as its columns; the changes table takes the rest
        header = self.table.horizontalHeader()
        widths = [max(self.table.sizeHintForColumn(c), header.sectionSizeHint(c))
                  for c in range(self.table.columnCount())]
        scroll = self.table.verticalScrollBar().sizeHint().width()
        self.table.setMinimumWidth(sum(widths) + 2 * self.table.frameWidth() + scroll + 12)

    def _fill_changes(self):
        comparison = self.comparison
        words = (f"Support vectors joined: {_points(comparison.joined)}; "
                 f"left: {_points(comparison.left)}.")
        if not comparison.same_points:
            words += (f" The points differ from the pinned fit's: {len(comparison.moved)} moved,"
                      f" {len(comparison.added)} added, {len(comparison.removed)} removed "
                      f"(matched by coordinates and label).")
        self.support.setText(words)
        self.changes.setRowCount(len(comparison.changes))
        for r, change in enumerate(comparison.changes):
            label = self.document.label_for(change.sign) if hasattr(
                self.document, "label_for") else f"{change.sign:+d}"
            for c, text in enumerate((str(change.after_index), str(label),
                                      SHORT_STATUS[change.status_before],
                                      SHORT_STATUS[change.status_after],
                                      f"{change.slack_before:.3g}", f"{change.slack_after:.3g}")):
                item = QTableWidgetItem(text)
                if c in (2, 3):
                    status = (change.status_before, change.status_after)[c - 2]
                    item.setToolTip(STATUS_TEXT[status])
                self.changes.setItem(r, c, item)

    # -- the quick CV estimate --------------------------------------------------
    def estimate_cv(self):
        results = [r for r in (self.document.pinned, self.document.result)
                   if r is not None and _key(r) not in self._cv_cache]
        if not results or self.task is not None:
            return

        def work(progress, cancel):
            estimates = {}
            for result in results:
                smaller = int(min((result.y > 0).sum(), (result.y < 0).sum()))
                folds = QUICK_FOLDS if smaller >= QUICK_FOLDS else LEAVE_ONE_OUT
                estimates[_key(result)] = cross_validate(result.X, result.y, result.config,
                                                         folds=folds)
            return estimates

        self.task = BackgroundTask(work, self)
        self.task.succeeded.connect(self._cv_cache.update)
        self.task.failed.connect(lambda message: self.summary.setText(
            f"The CV estimate failed: {message}"))
        self.task.finished.connect(self._on_cv_finished)
        self.cv_button.setEnabled(False)
        self.task.start()

    def wait(self, timeout_ms: int = 60000) -> bool:
        """Block until the CV estimate ends (tests only)."""
        return True if self.task is None else self.task.wait(timeout_ms)

    def _on_cv_finished(self):
        self.task.deleteLater()
        self.task = None
        self.refresh()

    # -- the report ---------------------------------------------------------------
    def _ask_and_export(self):
        path, _ = QFileDialog.getSaveFileName(self, "Export report", "report.pdf",
                                              "PDF document (*.pdf);;PNG image (*.png)")
        if not path:
            return
        try:
            self.export_report_to(path)
        except SlacklineError as exc:
            QMessageBox.warning(self, "Export report", str(exc))

    def export_report_to(self, path):
        from app.canvas.report import export_report
        document = self.document
        current, pinned = document.result, document.pinned
        sweep = None
        if current is not None:
            sweep = self.store.current_for(current.X, current.y, current.config)
        return export_report(path, document.dataset(), current, pinned, sweep,
                             self.cv_for(pinned), self.cv_for(current), note=document.note,
                             edited=provenance(document).edited_since_import(),
                             heldout=evidence_of(document).counts)


def _compact(table):
    """Rows of text height, no row numbers, columns as wide as their contents."""
    table.verticalHeader().hide()
    table.verticalHeader().setDefaultSectionSize(20)
    table.setWordWrap(False)
    header = table.horizontalHeader()
    header.setSectionResizeMode(QHeaderView.ResizeToContents)
    header.setStretchLastSection(True)
    table.setEditTriggers(QTableWidget.NoEditTriggers)


def _key(result):
    return points_fingerprint(result.X, result.y), result.config


def _points(indices) -> str:
    if not indices:
        return "none"
    shown = ", ".join(str(i) for i in indices[:12])
    return shown + (f" and {len(indices) - 12} more" if len(indices) > 12 else "")
