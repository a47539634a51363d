"""Import a CSV/TSV table: pick the two features, the label and the positive class.

The preview and every check come from the file layer (solver.files.tables,
solver.files.dataset.load_table); the importer's message is shown in place and
the OK button stays off until the table reads cleanly.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtGui import QStandardItem, QStandardItemModel
from PySide6.QtWidgets import (QCheckBox, QComboBox, QDialog, QDialogButtonBox, QFormLayout,
                               QLabel, QTableView, QVBoxLayout)

from app.dialogs.plain_words import plain
from solver.files import load_table, read_table
from solver import SlacklineError

PREVIEW_ROWS = 20
LABEL_SCAN_ROWS = 200


class ImportDialog(QDialog):
    def __init__(self, path, parent=None):
        super().__init__(parent)
        self.setWindowTitle(f"Import data \u2014 {path}")
        self.path = path
        self.dataset = None
        self.preview = None
        self._table = None           # the whole file, once read (_whole_table)
        self.feature_x = QComboBox(objectName="import_feature_x")
        self.feature_y = QComboBox(objectName="import_feature_y")
        self.label = QComboBox(objectName="import_label")
        self.positive = QComboBox(objectName="import_positive")
        self.drop = QCheckBox("skip rows with a missing or non-numeric value")
        self.table = QTableView()
        self.table.verticalHeader().setDefaultSectionSize(20)
        self.message = QLabel(objectName="import_message")
        self.message.setWordWrap(True)
        self.message.setTextInteractionFlags(Qt.TextSelectableByMouse)
        form = QFormLayout()
        form.addRow("feature on the x axis", self.feature_x)
        form.addRow("feature on the y axis", self.feature_y)
        form.addRow("label column", self.label)
        form.addRow("positive class (+1)", self.positive)
        form.addRow("", self.drop)
        for widget, tip in ((self.feature_x, "the column drawn across, as the first feature"),
                            (self.feature_y, "the column drawn up, as the second feature"),
                            (self.label, "the column that says which class each row is in"),
                            (self.positive, "which of the two labels is the positive class "
                                            "(+1); the other becomes \u22121"),
                            (self.drop, "leave out rows where a feature is missing or not a "
                                        "number, or the label is missing; they are listed"),
                            (self.table, "the first rows of the file as read")):
            widget.setToolTip(tip)
        self.buttons = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)
        self.buttons.accepted.connect(self.accept)
        self.buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addWidget(self.table, 1)
        layout.addLayout(form)
        layout.addWidget(self.message)
        layout.addWidget(self.buttons)
        self.resize(760, 560)
        self._read_preview()
        for box in (self.feature_x, self.feature_y, self.positive):
            box.currentIndexChanged.connect(self._check)
        self.label.currentIndexChanged.connect(self._label_changed)
        self.drop.toggled.connect(self._check)
        self._check()

    @property
    def ok_button(self):
        return self.buttons.button(QDialogButtonBox.Ok)

    def _read_preview(self):
        from solver.files import preview_table
        try:
            self.preview = preview_table(self.path, rows=LABEL_SCAN_ROWS)
        except (SlacklineError, ValueError) as exc:
            self._show_error(str(exc), getattr(exc, "problems", []))
            return
        preview = self.preview
        model = QStandardItemModel(0, len(preview.columns), self)
        model.setHorizontalHeaderLabels([str(c) for c in preview.columns])
        for row in preview.rows[:PREVIEW_ROWS]:
            model.appendRow([QStandardItem("" if v is None else str(v)) for v in row])
        self.table.setModel(model)
        # each column as wide as its header and first rows: a long header ("seal
        # temperature [C]") was cut on both sides of a centred title
        self.table.resizeColumnsToContents()
        numeric = [str(c) for c, ok in zip(preview.columns, preview.numeric) if ok]
        columns = [str(c) for c in preview.columns]
        self.feature_x.addItems(columns)
        self.feature_y.addItems(columns)
        self.label.addItems(columns)
        label = next((c for c in reversed(columns) if c not in numeric[:2]), columns[-1])
        self.label.setCurrentText(label)
        others = [c for c in numeric if c != label]
        if len(others) >= 2:
            self.feature_x.setCurrentText(others[0])
            self.feature_y.setCurrentText(others[1])
        self._fill_positive()

    def _label_changed(self):
        self._fill_positive()
        self._check()

    def _fill_positive(self):
        if self.preview is None:
            return
        from solver.files import column_values
        try:         # every label in the file, not only the preview's first rows
            values = [v for v in column_values(self._whole_table(), self.label.currentText())
                      if v != "nan"]
        except (SlacklineError, ValueError):
            values = []
        self.positive.blockSignals(True)
        self.positive.clear()
        self.positive.addItem("(automatic for labels 0/1 or \u22121/+1)", None)
        for value in sorted(values):
            self.positive.addItem(value, value)
        self.positive.blockSignals(False)

    def _whole_table(self):
        """The whole file, read once per dialog (each choice of columns checks it again):
        a FileFormatError is raised again on every call, as a fresh read would."""
        if self._table is None:
            self._table = read_table(self.path)
        return self._table

    def _check(self, *_):
        self.dataset = None
        self.ok_button.setEnabled(False)
        if self.preview is None:
            return
        try:
            dataset = load_table(self.path,
                                 features=[self.feature_x.currentText(),
                                           self.feature_y.currentText()],
                                 label=self.label.currentText(),
                                 positive=self.positive.currentData(),
                                 drop_incomplete=self.drop.isChecked(),
                                 table=self._whole_table())
        except SlacklineError as exc:
            self._show_error(str(exc), getattr(exc, "problems", []))
            return
        self.dataset = dataset
        skipped = f"; {len(dataset.skipped)} incomplete row(s) skipped" if dataset.skipped else ""
        self.message.setStyleSheet("color: #1d5e20;")
        self.message.setText(f"{len(dataset.y)} points, labels {dataset.mapping_text()}"
                             f"{skipped}")
        self.ok_button.setEnabled(True)

    def _show_error(self, message, problems=()):
        lines = [plain(message)] + [f"  \u2022 {p}" for p in list(problems)[:6]]
        if len(problems) > 6:
            lines.append(f"  \u2026 and {len(problems) - 6} more")
        self.message.setStyleSheet("color: #a4161a;")
        self.message.setText("\n".join(lines))
