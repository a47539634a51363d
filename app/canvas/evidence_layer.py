"""Canvas items of the evidence views: scored rows, held-out points, the leave-out ghost.

Scored rows are hollow diamonds in the colour of their predicted class;
held-out points hollow squares in the colour of their own class (so a
held-out point in the other class's region stands out); the ghost is the
boundary the fit would have without the chosen support vector, dash-dotted.
None of them take part in clicks: the view box edits the training points.
"""

from __future__ import annotations

import pyqtgraph as pg
from PySide6.QtCore import Qt

from app.canvas import geometry
from app.canvas.palette import class_colour, palette

SCORED_SYMBOL = "d"
HELDOUT_SYMBOL = "s"


def _hollow(symbol, size, z, name):
    item = pg.ScatterPlotItem(symbol=symbol, size=size, brush=None, name=name)
    item.setZValue(z)
    item.setAcceptedMouseButtons(Qt.NoButton)
    return item


class EvidenceLayer:
    def __init__(self, canvas, evidence):
        self.canvas, self.evidence = canvas, evidence
        plot = canvas.plot
        self.scored = _hollow(SCORED_SYMBOL, 11, 3, "scored row")
        self.heldout = _hollow(HELDOUT_SYMBOL, 10, 3, "held-out point")
        for item in (self.scored, self.heldout):
            plot.addItem(item, ignoreBounds=True)
        self.ghost = pg.PlotDataItem(pen=pg.mkPen(palette()["selection"], width=2,
                                                  style=Qt.DashDotLine),
                                     connect="finite", name="without the chosen point")
        self.ghost.setZValue(-7)
        plot.addItem(self.ghost, ignoreBounds=True)
        evidence.changed.connect(self.redraw_points)
        evidence.ghost_changed.connect(self.redraw_ghost)
        canvas.redrawn.connect(self.redraw_ghost)
        canvas.plot.getViewBox().sigRangeChanged.connect(lambda *_: self.redraw_ghost())
        self.redraw_points()

    def redraw_points(self):
        ev = self.evidence
        self._draw(self.scored, None if ev.rows is None else ev.rows.X,
                   None if ev.scores is None else ev.scores.signs)
        self._draw(self.heldout, None if ev.heldout is None else ev.heldout.X,
                   None if ev.heldout is None else ev.heldout.signs)

    @staticmethod
    def _draw(item, X, signs):
        if X is None or not len(X):
            item.setData([], [])
            return
        if signs is None:                       # no fit yet: neutral outline
            pens = [pg.mkPen(palette()["axis"], width=1.6)] * len(X)
        else:
            pens = [pg.mkPen(class_colour(int(s)), width=1.8) for s in signs]
        item.setData(x=X[:, 0], y=X[:, 1], pen=pens, brush=None)

    def redraw_ghost(self):
        entry = self.evidence.ghost
        if entry is None:
            self.ghost.setData([], [])
            return
        rect = self.canvas.view_rect()
        if entry.w is not None:                 # a line: exact ends on the view's edges
            ends = geometry.clip_line(entry.w, -entry.b, rect)
            lines = [] if ends is None else [ends]
        else:                                   # a contour of f = 0 on the view's lattice
            xs, ys, values = geometry.lattice_of(entry, rect)
            lines = geometry.level_polylines(values, xs, ys, 0.0)
        if not lines:
            self.ghost.setData([], [])
            return
        joined = geometry.with_breaks(lines)
        self.ghost.setData(joined[:, 0], joined[:, 1])
