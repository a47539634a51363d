"""The C slider with a tick at every breakpoint of the exact C path."""

from __future__ import annotations

from PySide6.QtCore import QLineF
from PySide6.QtGui import QPainter, QPalette, QPen
from PySide6.QtWidgets import QSlider, QStyle, QStyleOptionSlider


class TickedSlider(QSlider):
    """A QSlider that also draws short ticks at given slider positions."""

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self._ticks: tuple[int, ...] = ()
        self._lines: tuple = (None, [])    # (geometry they were placed for, QLineF list)

    @property
    def ticks(self) -> tuple[int, ...]:
        return self._ticks

    def set_ticks(self, positions) -> None:
        self._ticks = tuple(sorted(set(int(p) for p in positions)))
        self.setToolTip(self.toolTip().split("\n")[0] + (
            f"\nticks: the {len(self._ticks)} places where the exact C path has a breakpoint"
            if self._ticks else ""))
        self.update()

    def paintEvent(self, event):
        super().paintEvent(event)
        if not self._ticks:
            return
        option = QStyleOptionSlider()
        self.initStyleOption(option)
        style = self.style()
        groove = style.subControlRect(QStyle.CC_Slider, option, QStyle.SC_SliderGroove, self)
        handle = style.subControlRect(QStyle.CC_Slider, option, QStyle.SC_SliderHandle, self)
        span = groove.width() - handle.width()
        left = groove.x() + handle.width() / 2
        bottom = self.height() - 1
        # placed once per geometry: a path has hundreds of ticks, and the slider repaints
        # on every step of C (one drawLines instead of a Python loop of drawLine)
        placed = (self._ticks, span, left, bottom, self.minimum(), self.maximum())
        if self._lines[0] != placed:
            lines = [QLineF(x, bottom - 3, x, bottom)
                     for x in (left + QStyle.sliderPositionFromValue(
                         self.minimum(), self.maximum(), position, span)
                         for position in self._ticks)]
            self._lines = (placed, lines)
        painter = QPainter(self)
        painter.setPen(QPen(self.palette().color(QPalette.WindowText), 1))
        painter.drawLines(self._lines[1])
        painter.end()
