"""All points in a sortable table, filterable by status, selection linked to the canvas."""

from __future__ import annotations

import numpy as np
from PySide6.QtCore import (QAbstractTableModel, QItemSelection, QItemSelectionModel,
                            QModelIndex, QSortFilterProxyModel, Qt, QTimer)

REFRESH_MS = 120   # new fits reach the table at most this often: the canvas goes first
from PySide6.QtWidgets import (QAbstractItemView, QComboBox, QHBoxLayout, QHeaderView, QLabel,
                               QTableView, QVBoxLayout, QWidget)

from solver import STATUS_TEXT, STATUSES

COLUMNS = ("#", "x1", "x2", "label", "f(x)", "y\u00b7f", "distance", "alpha", "slack",
           "status")
SORT_ROLE = Qt.UserRole + 1


class PointsModel(QAbstractTableModel):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self._result = None
        self._refresh = QTimer(self, singleShot=True, interval=REFRESH_MS)
        self._refresh.timeout.connect(self._result_changed)
        document.points_changed.connect(self._reset)
        document.result_changed.connect(self._refresh.start)
        self._reset()

    def _matching_result(self):
        doc, result = self.document, self.document.result
        if result is None or len(result.y) != len(doc.X) or not np.array_equal(result.X, doc.X):
            return None
        return result

    def _reset(self):
        self.beginResetModel()
        self._result = self._matching_result()
        self.endResetModel()

    def flush(self):
        """Show the latest result now (tests, exports)."""
        self._refresh.stop()
        self._result_changed()

    def _result_changed(self):
        self._result = self._matching_result()
        if self.rowCount():
            self.dataChanged.emit(self.index(0, 4), self.index(self.rowCount() - 1,
                                                               len(COLUMNS) - 1))

    def rowCount(self, parent=QModelIndex()):
        return 0 if parent.isValid() else len(self.document.X)

    def columnCount(self, parent=QModelIndex()):
        return 0 if parent.isValid() else len(COLUMNS)

    def headerData(self, section, orientation, role=Qt.DisplayRole):
        if role != Qt.DisplayRole:
            return None
        if orientation == Qt.Horizontal:
            names = self.document.feature_names
            return {1: names[0], 2: names[1]}.get(section, COLUMNS[section])
        return None

    def value(self, row: int, column: int):
        doc, result = self.document, self._result
        if column == 0:
            return row
        if column in (1, 2):
            return float(doc.X[row, column - 1])
        if column == 3:
            return str(doc.labels[row])
        if result is None:
            return None
        return {4: lambda: float(result.decision[row]),
                5: lambda: float(result.functional_margin[row]),
                6: lambda: float(result.distance[row]),
                7: lambda: float(result.alpha[row]),
                8: lambda: float(result.slack[row]),
                9: lambda: str(result.status[row])}[column]()

    def data(self, index, role=Qt.DisplayRole):
        if not index.isValid():
            return None
        value = self.value(index.row(), index.column())
        if role == SORT_ROLE:
            return value if value is not None else ""
        if role == Qt.DisplayRole:
            if value is None:
                return ""
            if index.column() == 9:
                return STATUS_TEXT[value]
            return f"{value:.5g}" if isinstance(value, float) else str(value)
        if role == Qt.TextAlignmentRole and index.column() not in (3, 9):
            return int(Qt.AlignRight | Qt.AlignVCenter)
        return None


class StatusFilter(QSortFilterProxyModel):
    def __init__(self, parent=None):
        super().__init__(parent)
        self.status = None
        self.setSortRole(SORT_ROLE)

    def set_status(self, status):
        if hasattr(self, "beginFilterChange"):      # Qt 6.9 and later
            self.beginFilterChange()
            self.status = status
            self.endFilterChange(QSortFilterProxyModel.Direction.Rows)
        else:
            self.status = status
            self.invalidateFilter()

    def filterAcceptsRow(self, row, parent):
        if self.status is None:
            return True
        return self.sourceModel().value(row, 9) == self.status


class PointsTable(QWidget):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.model = PointsModel(document, self)
        self.proxy = StatusFilter(self)
        self.proxy.setSourceModel(self.model)
        # Re-sorting 1,000 rows on every fit costs ~150 ms of GUI-thread Python
        # (and slows the solver thread through the GIL); only redo the order
        # when it depends on the fit: a sort on a fit column or a status filter.
        self.proxy.setDynamicSortFilter(False)
        self.model.dataChanged.connect(self._fit_values_changed)
        self.view = QTableView()
        self.view.setModel(self.proxy)
        self.view.setSortingEnabled(True)
        self.view.sortByColumn(0, Qt.AscendingOrder)
        self.view.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.view.verticalHeader().hide()
        self.view.verticalHeader().setDefaultSectionSize(20)
        self.view.horizontalHeader().setSectionResizeMode(QHeaderView.Interactive)
        self.view.horizontalHeader().setDefaultSectionSize(74)
        self.view.horizontalHeader().setStretchLastSection(True)
        self.filter = QComboBox()
        self.filter.addItem("all points", None)
        for status in STATUSES:
            self.filter.addItem(STATUS_TEXT[status], status)
        self.filter.currentIndexChanged.connect(
            lambda _: self.proxy.set_status(self.filter.currentData()))
        top = QHBoxLayout()
        top.addWidget(QLabel("show"))
        top.addWidget(self.filter)
        top.addStretch(1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.addLayout(top)
        layout.addWidget(self.view)
        self._syncing = False
        self.view.selectionModel().selectionChanged.connect(self._table_selected)
        document.selection_changed.connect(self._document_selected)
        self.model.modelReset.connect(self._document_selected)
        self.model.modelReset.connect(self._fit_headers)
        self._fit_headers()

    def _fit_headers(self):
        """Feature columns as wide as their names (with units), so none is cut."""
        header = self.view.horizontalHeader()
        metrics = header.fontMetrics()
        for column in (1, 2):
            text = str(self.model.headerData(column, Qt.Horizontal))
            header.resizeSection(column, max(header.defaultSectionSize(),
                                             metrics.horizontalAdvance(text) + 24))

    def _fit_values_changed(self, *_):
        if self.proxy.status is not None or self.proxy.sortColumn() >= 4:
            self.proxy.invalidate()
            self._document_selected()

    def _table_selected(self, *_):
        if self._syncing:
            return
        rows = {self.proxy.mapToSource(index).row()
                for index in self.view.selectionModel().selectedRows()}
        self._syncing = True
        try:
            self.document.set_selection(rows)
        finally:
            self._syncing = False

    def _document_selected(self):
        if self._syncing:
            return
        selection = QItemSelection()
        last = len(COLUMNS) - 1
        for row in sorted(self.document.selection):
            top = self.proxy.mapFromSource(self.model.index(row, 0))
            if top.isValid():
                selection.select(top, top.siblingAtColumn(last))
        self._syncing = True
        try:
            self.view.selectionModel().select(selection, QItemSelectionModel.ClearAndSelect)
            if len(self.document.selection) == 1 and not selection.isEmpty():
                self.view.scrollTo(selection.indexes()[0])
        finally:
            self._syncing = False
