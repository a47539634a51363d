"""The C-path view: the exact path's figures against log C and the events near the current C.

Only draws what the document's PathKeeper computed in the background; a click on
the chart or on an event sends the document a new C (just past the event, so
the point has its new status).
"""

from __future__ import annotations

import numpy as np
from PySide6.QtCore import Qt
from PySide6.QtWidgets import (QHBoxLayout, QLabel, QListWidget, QListWidgetItem, QProgressBar,
                               QVBoxLayout, QWidget)

from solver import STATUSES
from solver.study.path_words import event_sentence

from app.document.document import CONFIG
from app.panels.sweep_chart import SweepChart

NEAR = 8                 # events listed around the current C
JUST_PAST = 1e-6         # relative: a click on an event sets C this far beyond it


class _Curves:
    """The path's curves in the shape the sweep chart draws (no cross-validation here)."""

    def __init__(self, curves: dict):
        self.C = curves["C"]
        self.counts = {status: curves[status] for status in STATUSES}
        for name in ("margin_width", "n_support", "training_error", "half_norm_w2",
                     "penalty_term"):
            setattr(self, name, curves[name])
        self.cv_error = np.full(len(self.C), np.nan)
        self.cv_standard_error = np.full(len(self.C), np.nan)


class PathPanel(QWidget):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.state = QLabel("the exact C path is computed after every edit")
        self.state.setWordWrap(True)
        self.progress = QProgressBar()
        self.progress.setRange(0, 1000)
        self.progress.setVisible(False)
        self.progress.setToolTip("the exact C path, computed in the background; until it is "
                                 "ready the slider solves at every step")
        self.state.setToolTip("what the exact C path holds, or why there is none")
        self.chart = SweepChart()
        self.chart.setToolTip("the exact solution's figures against C; click to set C")
        self.events = QListWidget()
        self.events.setWordWrap(True)
        self.events.setToolTip("status changes near the current C; click one to set C just "
                               "past it")
        side = QVBoxLayout()
        side.addWidget(self.state)
        side.addWidget(self.progress)
        side.addWidget(QLabel("events near the current C:"))
        side.addWidget(self.events, 1)
        row = QHBoxLayout(self)
        row.addWidget(self.chart, 3)
        row.addLayout(side, 2)
        paths = document.paths
        paths.progress.connect(self._progressed)
        paths.ready.connect(self._ready)
        paths.cleared.connect(self._cleared)
        document.changed.connect(self._document_changed)
        self.chart.C_clicked.connect(self._set_C)
        self.events.itemClicked.connect(self._event_clicked)
        if paths.path is not None:
            self._ready(paths.path)

    def _progressed(self, share: float):
        self.progress.setVisible(share < 1.0)
        self.progress.setValue(int(1000 * share))
        if share < 1.0:
            self.state.setText("computing the exact C path …")
        elif self.document.paths.failure:
            self.state.setText(f"no exact C path: {self.document.paths.failure}; the slider "
                               f"solves at every step")

    def _ready(self, path):
        self.progress.setVisible(False)
        hard = (f"; from C = {path.hard_margin_from:.3g} on, the hard margin"
                if path.hard_margin_from is not None else "")
        self.state.setText(f"{len(path.breakpoints)} breakpoints, {len(path.events)} events "
                           f"over C = {path.c_from:g} .. {path.c_to:g} ({path.seconds:.2f} s)"
                           f"{hard}. The slider evaluates the path: no solve per step.")
        curves = self.document.paths.curves
        self.chart.show_sweep(None if curves is None else _Curves(curves))
        self._show_current()

    def _cleared(self):
        self.chart.show_sweep(None)
        self.events.clear()

    def _document_changed(self, changes):
        if CONFIG in changes:
            self._show_current()

    def _show_current(self):
        config = self.document.config
        path = self.document.paths.path
        self.chart.set_marker(None if config.hard_margin else config.C)
        self.events.clear()
        if path is None or config.hard_margin:
            return
        for event in path.events_near(config.C, NEAR):
            item = QListWidgetItem(event_sentence(event))
            item.setData(Qt.UserRole, float(event.C))
            self.events.addItem(item)

    def _event_clicked(self, item):
        self._set_C(item.data(Qt.UserRole) * (1 + JUST_PAST))

    def _set_C(self, C: float):
        self.document.set_C(float(C))
