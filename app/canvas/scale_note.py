"""The "axes not to scale" mark beside w.

w is at right angles to the boundary in the data's units.  When one unit of
x takes a different number of pixels than one unit of y, the arrow no longer
looks perpendicular; the mark says so next to the arrow, so nobody reads a
skewed angle into the fit.  With equal axis scales (View menu) it goes away.
"""

from __future__ import annotations

import pyqtgraph as pg

NOTE = "axes not to scale:\nw is \u27c2 to the boundary in data units"
TOLERANCE = 0.03       # pixel sizes of x and y within 3 % count as to scale


def axes_to_scale(view) -> bool:
    """True when one data unit spans the same number of pixels on both axes."""
    sx, sy = view.viewPixelSize()
    return sx > 0 and sy > 0 and abs(sx / sy - 1.0) <= TOLERANCE


class ScaleNote:
    def __init__(self, plot, colour):
        self.item = pg.TextItem(NOTE, color=colour, anchor=(-0.06, 0.5),
                                fill=pg.mkBrush(255, 255, 255, 170))
        self.item.setZValue(3)      # under the points: it never hides one
        plot.addItem(self.item, ignoreBounds=True)
        self.item.hide()

    @property
    def shown(self) -> bool:
        return self.item.isVisible()

    def update(self, view, tip):
        """Beside ``tip`` (the arrow's head) when w is drawn on axes not to scale."""
        if tip is None or axes_to_scale(view):
            self.item.hide()
            return
        self.item.setPos(float(tip[0]), float(tip[1]))
        self.item.show()
