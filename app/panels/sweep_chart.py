"""The sweep's curves against log C (pyqtgraph): errors, support vectors, margin, objective.

Only draws a SweepResult; a click is reported as the C under the mouse.
"""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt, Signal

from solver import INSIDE, MISCLASSIFIED, ON_MARGIN, STATUS_TEXT

STALE_PEN = pg.mkPen((170, 170, 170), width=1, style=Qt.DashLine)
CURVES = {  # plot -> [(attribute or status, legend text, colour)]
    "error": [("training_error", "training error", (40, 90, 200)),
              ("cv_error", "cross-validated error", (200, 60, 40))],
    "support vectors": [("n_support", "all", (60, 60, 60)),
                        (ON_MARGIN, STATUS_TEXT[ON_MARGIN], (30, 150, 80)),
                        (INSIDE, STATUS_TEXT[INSIDE], (220, 150, 30)),
                        (MISCLASSIFIED, STATUS_TEXT[MISCLASSIFIED], (190, 40, 120))],
    "margin width": [("margin_width", "2/|w|", (90, 60, 170))],
    "objective terms": [("half_norm_w2", "1/2 |w|^2", (40, 120, 160)),
                        ("penalty_term", "sum C_i xi_i", (170, 90, 40))],
}


class SweepChart(pg.GraphicsLayoutWidget):
    C_clicked = Signal(float)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setBackground("w")
        self.plots, self.markers, self.curves = {}, [], {}
        first = None
        for row, title in enumerate(CURVES):
            plot = self.addPlot(row=row // 2, col=row % 2, title=title)
            plot.setLogMode(x=True, y=title == "objective terms")
            plot.setLabel("bottom", "C")
            plot.addLegend(offset=(5, 5), labelTextSize="7pt")
            plot.showGrid(x=True, y=True, alpha=0.2)
            if first is None:
                first = plot
            else:
                plot.setXLink(first)
            marker = pg.InfiniteLine(angle=90, movable=False,
                                     pen=pg.mkPen((0, 0, 0), width=1.5))
            marker.setVisible(False)
            plot.addItem(marker, ignoreBounds=True)
            self.plots[title], self.markers = plot, self.markers + [marker]
        self._columns = 2
        self.band = None
        self.scene().sigMouseClicked.connect(self._on_click)

    def arrange(self, columns: int) -> None:
        """Lay the plots out ``columns`` to a row (1, 2 or 4), in the order of CURVES."""
        columns = max(1, min(int(columns), len(self.plots)))
        if getattr(self, "_columns", None) == columns:
            return
        self._columns = columns
        for plot in self.plots.values():
            self.ci.removeItem(plot)
        for place, plot in enumerate(self.plots.values()):
            self.ci.addItem(plot, row=place // columns, col=place % columns)

    def rows(self) -> int:
        columns = getattr(self, "_columns", 2)
        return -(-len(self.plots) // columns)

    def show_sweep(self, sweep, stale: bool = False) -> None:
        """Draw ``sweep`` (None clears); ``stale`` greys every curve."""
        for items in self.curves.values():
            for plot, item in items:
                plot.removeItem(item)
        self.curves = {}
        for plot in self.plots.values():
            if plot.legend is not None:
                plot.legend.clear()
        if sweep is None or len(sweep.C) == 0:
            return
        C = np.asarray(sweep.C)
        for title, curves in CURVES.items():
            plot = self.plots[title]
            for name, legend, colour in curves:
                values = _values(sweep, name)
                if title == "objective terms":
                    values = np.where(values > 0, values, np.nan)   # log axis
                pen = STALE_PEN if stale else pg.mkPen(colour, width=2)
                item = plot.plot(C, values, pen=pen, name=legend, connect="finite")
                self.curves.setdefault(name, []).append((plot, item))
        self._add_cv_band(sweep, stale)

    def _add_cv_band(self, sweep, stale):
        """CV error +- one standard error as a shaded band."""
        error, se = sweep.cv_error, np.nan_to_num(sweep.cv_standard_error)
        plot = self.plots["error"]
        upper = plot.plot(sweep.C, error + se, pen=None)
        lower = plot.plot(sweep.C, error - se, pen=None)
        brush = pg.mkBrush(170, 170, 170, 50) if stale else pg.mkBrush(200, 60, 40, 40)
        band = pg.FillBetweenItem(upper, lower, brush=brush)
        plot.addItem(band)
        self.curves["cv_band"] = [(plot, upper), (plot, lower), (plot, band)]

    def set_marker(self, C: float | None) -> None:
        """A vertical line at the current C (hidden for None or a hard margin)."""
        for marker in self.markers:
            if C is None or not math.isfinite(C) or C <= 0:
                marker.setVisible(False)
            else:
                marker.setPos(math.log10(C))   # log-mode axes place items in log10 units
                marker.setVisible(True)

    def marker_C(self) -> float | None:
        marker = self.markers[0]
        return 10 ** marker.value() if marker.isVisible() else None

    def C_at_scene_pos(self, pos) -> float | None:
        for plot in self.plots.values():
            if plot.sceneBoundingRect().contains(pos):
                return 10 ** plot.getViewBox().mapSceneToView(pos).x()
        return None

    def _on_click(self, event):
        if event.button() != Qt.LeftButton:
            return
        C = self.C_at_scene_pos(event.scenePos())
        if C is not None:
            self.C_clicked.emit(C)


def _values(sweep, name) -> np.ndarray:
    if name in sweep.counts:
        return np.asarray(sweep.counts[name], dtype=float)
    return np.asarray(getattr(sweep, name), dtype=float)


def chart_image(sweep, width: int = 900, height: int = 520):
    """The chart as a QImage (for the report); needs a QApplication."""
    chart = SweepChart()
    chart.resize(int(width), int(height))
    chart.show_sweep(sweep)
    image = chart.grab().toImage()
    chart.deleteLater()
    return image
