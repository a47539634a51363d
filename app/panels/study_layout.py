"""Building blocks of a study tab: a side column of settings and words, and a
scrolling home for a grid of charts that keeps every chart readable.

The study area under the canvas is wide and short.  A ChartArea puts as many
plots side by side as the width allows at MIN_PLOT_WIDTH each (1, 2 or 4),
and never lets a plot shrink below MIN_PLOT_HEIGHT: when the rows do not fit,
the area scrolls instead of squashing them.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QFrame, QLayout, QScrollArea, QVBoxLayout, QWidget

MIN_PLOT_WIDTH = 200
MIN_PLOT_HEIGHT = 220
ROW_EXTRA = 12           # spacing between rows of plots


class ChartArea(QScrollArea):
    def __init__(self, chart, parent=None):
        super().__init__(parent)
        self.chart = chart
        self.setWidget(chart)
        self.setWidgetResizable(True)
        self.setFrameShape(QFrame.NoFrame)
        self.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        self.setMinimumHeight(MIN_PLOT_HEIGHT + ROW_EXTRA)
        self.setMinimumWidth(MIN_PLOT_WIDTH + 20)

    def columns_for(self, width: int) -> int:
        count = len(self.chart.plots)
        fit = max(1, width // MIN_PLOT_WIDTH)
        return count if fit >= count else (2 if fit >= 2 else 1)

    def resizeEvent(self, event):
        width = self.viewport().width()
        self.chart.arrange(self.columns_for(width))
        self.chart.setMinimumHeight(self.chart.rows() * (MIN_PLOT_HEIGHT + ROW_EXTRA))
        super().resizeEvent(event)


def side_column(items, width: int) -> QScrollArea:
    """Widgets and layouts stacked top-down in a fixed-width column that scrolls when short."""
    inner = QWidget()
    column = QVBoxLayout(inner)
    column.setContentsMargins(0, 0, 4, 0)
    for item in items:
        if isinstance(item, QLayout):
            column.addLayout(item)
        else:
            column.addWidget(item)
    column.addStretch(1)
    holder = QScrollArea()
    holder.setWidget(inner)
    holder.setWidgetResizable(True)
    holder.setFrameShape(QFrame.NoFrame)
    holder.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
    holder.setFixedWidth(width)
    return holder
