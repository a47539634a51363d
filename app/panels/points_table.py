"""All points in a sortable table, filterable by status, selection linked to the canvas.

The columns fit the study area's width without a horizontal scroll bar: short
headers, each explained in its tooltip.  Coordinates and labels are editable
in place; an edit goes to the document as an undoable move or relabel, and a
value that cannot be used is refused with a one-line reason under the table.
"""

from __future__ import annotations

import numpy as np
import math

from PySide6.QtCore import (QAbstractTableModel, QItemSelection, QItemSelectionModel,
                            QModelIndex, QSortFilterProxyModel, Qt, QTimer, Signal)
from PySide6.QtWidgets import (QAbstractItemView, QComboBox, QHBoxLayout, QHeaderView, QLabel,
                               QTableView, QVBoxLayout, QWidget)

from solver import INSIDE, MISCLASSIFIED, ON_MARGIN, OUTSIDE, STATUS_TEXT, STATUSES

from app.document.document import METADATA, POINTS, RESULT, SELECTION
from app.panels.units import length_suffix

REFRESH_MS = 120   # new fits reach the table at most this often: the canvas goes first
COLUMNS = ("#", "x1", "x2", "label", "f(x)", "y\u00b7f", "dist", "\u03b1", "\u03be", "status")
TIPS = ("the point's row number", "first feature (double-click to type a new value)",
        "second feature (double-click to type a new value)",
        "class label as written in the data (double-click to change the class)",
        "decision value f(x): positive on the +1 side, 0 on the boundary",
        "functional margin y\u00b7f(x): at least 1 outside the band, below 0 on the wrong side",
        "distance to the boundary, y\u00b7f/|w| (negative on the wrong side)",
        "alpha, the point's dual weight: 0 outside the margin, C\u1d62 when inside it",
        "slack \u03be = max(0, 1 \u2212 y\u00b7f): how far the point is on the wrong side of "
        "its margin edge, in units of f",
        "where the point is: outside the margin, on the margin edge, inside the band, or "
        "misclassified")
SHORT_STATUS = {OUTSIDE: "outside", ON_MARGIN: "on margin", INSIDE: "inside",
                MISCLASSIFIED: "misclassified"}
EDITABLE = (1, 2, 3)
SORT_ROLE = Qt.UserRole + 1


class PointsModel(QAbstractTableModel):
    refused = Signal(str)          # an edit that could not be applied, and why

    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self._result = None
        self._refresh = QTimer(self, singleShot=True, interval=REFRESH_MS)
        self._refresh.timeout.connect(self._result_changed)
        document.changed.connect(self._document_changed)
        self._reset()

    def _document_changed(self, changes):
        if changes & {POINTS, METADATA}:
            self._reset()
        elif RESULT in changes:
            self._refresh.start()

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
        if orientation != Qt.Horizontal:
            return None
        names, units = self.document.feature_names, self.document.units or ("", "")
        if role == Qt.DisplayRole:
            return {1: names[0], 2: names[1]}.get(section, COLUMNS[section])
        if role == Qt.ToolTipRole:
            if section in (1, 2):
                unit = f" [{units[section - 1]}]" if units[section - 1] else ""
                return f"{names[section - 1]}{unit}: {TIPS[section]}"
            if section == 6 and self._result is not None:
                suffix = length_suffix(self._result, units).strip(" ()")
                return f"{TIPS[6]}; in {suffix}" if suffix else TIPS[6]
            return TIPS[section]
        return None

    def flags(self, index):
        flags = super().flags(index)
        return flags | Qt.ItemIsEditable if index.column() in EDITABLE else flags

    def setData(self, index, value, role=Qt.EditRole):
        if role != Qt.EditRole or not index.isValid() or index.column() not in EDITABLE:
            return False
        row, column, doc = index.row(), index.column(), self.document
        text = str(value).strip()
        if column == 3:
            return self._relabel(row, text)
        try:
            number = float(text.replace("\u2212", "-"))
        except ValueError:
            number = math.nan
        if not math.isfinite(number):
            name = doc.feature_names[column - 1]
            self.refused.emit(f"{name} must be a finite number; got {text!r}; type a number "
                              f"such as 1.25")
            return False
        position = doc.X[row].copy()
        if position[column - 1] == number:
            return False
        position[column - 1] = number
        doc.move_points([row], [position])
        return True

    def _relabel(self, row, text):
        doc = self.document
        signs = {str(label): sign for label, sign in doc.label_mapping.items()}
        signs.update({"+1": 1, "1": 1, "-1": -1, "\u22121": -1})
        if text not in signs:
            choices = f"{doc.label_for(1)!r} (+1) or {doc.label_for(-1)!r} (\u22121)"
            self.refused.emit(f"the label {text!r} is not one of the two classes; type "
                              f"{choices}")
            return False
        if signs[text] != int(doc.y[row]):
            doc.relabel([row], signs[text])
        return True

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
        column = index.column()
        if role == SORT_ROLE:
            return value if value is not None else ""
        if role == Qt.EditRole:
            return repr(value) if isinstance(value, float) else str(value)
        if role == Qt.ToolTipRole and value is not None:
            if column == 9:
                return STATUS_TEXT[value]
            return repr(value) if isinstance(value, float) else None
        if role == Qt.DisplayRole:
            if value is None:
                return ""
            if column == 9:
                return SHORT_STATUS[value]
            if isinstance(value, float) and value != value:
                return "\u2014"              # NaN: no distance without a boundary (w = 0)
            digits = {1: 6, 2: 6, 7: 3, 8: 3}.get(column, 4)   # alpha, slack: room for e-12
            return _compact(value, digits) if isinstance(value, float) else str(value)
        if role == Qt.TextAlignmentRole and index.column() not in (3, 9):
            return int(Qt.AlignRight | Qt.AlignVCenter)
        return None


def _compact(value: float, digits: int) -> str:
    """``value`` to ``digits`` significant digits, an exponent written short and with one
    digit less: -1.97e-5, not -1.972e-05, which a column of the table's width clips."""
    text = f"{value:.{digits}g}"
    if "e" not in text:
        return text
    mantissa, exponent = f"{value:.{max(0, digits - 2)}e}".split("e")
    if "." in mantissa:
        mantissa = mantissa.rstrip("0").rstrip(".")
    return f"{mantissa}e{int(exponent)}"


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
        header = self.view.horizontalHeader()
        header.setMinimumSectionSize(36)
        header.setSectionResizeMode(QHeaderView.Stretch)      # share the width: no h-scroll
        # the row number and the status get fixed widths from the font: measuring
        # contents would walk every row on every new fit
        metrics = self.view.fontMetrics()
        widths = {0: metrics.horizontalAdvance("00000") + 18,
                  9: max(metrics.horizontalAdvance(t) for t in SHORT_STATUS.values()) + 14}
        for column, width in widths.items():
            header.setSectionResizeMode(column, QHeaderView.Fixed)
            header.resizeSection(column, width)
        header.setTextElideMode(Qt.ElideRight)
        self.view.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        triggers = QAbstractItemView
        self.view.setEditTriggers(triggers.DoubleClicked | triggers.EditKeyPressed
                                  | triggers.AnyKeyPressed)
        self.filter = QComboBox()
        self.filter.addItem("all points", None)
        for status in STATUSES:
            self.filter.addItem(STATUS_TEXT[status], status)
        self.filter.currentIndexChanged.connect(
            lambda _: self.proxy.set_status(self.filter.currentData()))
        self.filter.setToolTip("show every point, or only those with one status")
        self.view.setToolTip("every point with its figures from the fit; double-click a "
                             "coordinate or a label to type a new one (Ctrl+Z undoes)")
        self.refusal = QLabel("", objectName="points_refusal")
        self.refusal.setStyleSheet("color: #a4161a;")
        self.model.refused.connect(self.refusal.setText)
        top = QHBoxLayout()
        top.addWidget(QLabel("show"))
        top.addWidget(self.filter)
        top.addWidget(self.refusal, 1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.addLayout(top)
        layout.addWidget(self.view)
        self._syncing = False
        self.view.selectionModel().selectionChanged.connect(self._table_selected)
        document.changed.connect(self._document_changed_for_view)
        self.model.modelReset.connect(self._document_selected)

    def _document_changed_for_view(self, changes):
        if SELECTION in changes:
            self._document_selected()
        if POINTS in changes:
            self.refusal.setText("")

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
