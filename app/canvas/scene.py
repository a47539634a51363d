"""The canvas's drawn items, created once and updated in place.

Used by the interactive canvas and by offscreen rendering alike, so a saved
picture shows exactly what the window shows.  Items are reused: an update
only hands new arrays to existing items.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QRectF, Qt

from app.canvas import geometry
from app.document.class_words import caption
from app.canvas.scale_note import ScaleNote
from app.canvas.palette import class_colour, class_symbol, palette
from app.document.background import LatestTask

SLACK_INLINE = 2_000_000   # kernel values an evaluation of f at the slack points, up to
                           # which their segments are made on the window's thread (n = 1,000,
                           # every point with slack: 1e6, about 55 ms in all)

KERNEL_GRID = geometry.KERNEL_GRID   # contour and shading lattice for kernel fits
LINEAR_GRID = 64    # linear f is a plane: a coarse shading grid is exact enough
SHADE_LIMIT = 2.0   # f is shaded from -2 to +2; beyond, the colour saturates


SHADE_STRENGTH = 0.45   # how far the shading goes from white towards a class colour


def _shade_lookup() -> np.ndarray:
    """A diverging table: negative class colour -> white -> positive class colour.

    The light tint is baked into the table (instead of an item opacity, which
    makes Qt compose a layer on every paint and cost ~10 ms per frame)."""
    colours = palette()
    neg = np.array(pg.mkColor(colours["shade_negative"]).getRgb()[:3], dtype=float)
    pos = np.array(pg.mkColor(colours["shade_positive"]).getRgb()[:3], dtype=float)
    white = np.array([255.0, 255.0, 255.0])
    t = SHADE_STRENGTH * np.linspace(-1, 1, 256)[:, None]
    table = np.where(t < 0, white + (neg - white) * -t, white + (pos - white) * t)
    return np.rint(table).astype(np.ubyte)


def _show_lines(item, lines):
    """Polylines into one line item, NaN rows between them (connect="finite")."""
    joined = geometry.with_breaks(lines)
    item.setData(joined[:, 0], joined[:, 1])


class SceneItems:
    """Every item of one plot: shading, boundary, band, w, slack, points, rings."""

    def __init__(self, plot: pg.PlotItem, legend: bool = True, background: bool = False):
        colours = palette()
        self.plot = plot
        self.result = None
        self.shade = pg.ImageItem(lut=_shade_lookup(), levels=(-SHADE_LIMIT, SHADE_LIMIT))
        # ``background``: slack segments too slow for the window's thread are made off it
        # (a figure rendered to a file draws them all at once)
        self.slack_task = LatestTask() if background else None
        self.shade.setZValue(-20)
        plot.addItem(self.shade, ignoreBounds=True)

        def line(colour, width, style=Qt.SolidLine, z=0, name=None, connect="pairs"):
            pen = pg.mkPen(colour, width=width, style=style)
            item = pg.PlotDataItem(pen=pen, connect=connect, name=name, antialias=True)
            item.setZValue(z)
            plot.addItem(item, ignoreBounds=True)
            return item

        finite = dict(connect="finite")     # polylines with NaN breaks
        self.ghost_boundary = line(colours["ghost"], 2, Qt.DashLine, -8,
                                   name="pinned fit (ghost)", **finite)
        self.ghost_band = line(colours["ghost"], 1, Qt.DotLine, -8, **finite)
        self.band = line(colours["band"], 1.4, Qt.DashLine, -4, name="margin  f = \u00b11",
                         **finite)
        self.boundary = line(colours["boundary"], 2.6, Qt.SolidLine, -3,
                             name="boundary  f = 0", **finite)
        self.slack = line(colours["slack"], 1.8, Qt.SolidLine, -2, name="slack \u03be")
        self.weight = line(colours["weight_vector"], 2.4, Qt.SolidLine, -1, name="w")
        self.arrow = pg.ArrowItem(pen=pg.mkPen(colours["weight_vector"]), headLen=13,
                                  tipAngle=32, tailLen=0,
                                  brush=pg.mkBrush(colours["weight_vector"]))
        self.arrow.setZValue(-1)
        plot.addItem(self.arrow, ignoreBounds=True)
        self.arrow.hide()
        self.scale_note = ScaleNote(plot, colours["weight_vector"])

        self.points = {}
        for sign in (1, -1):
            item = pg.ScatterPlotItem(symbol=class_symbol(sign), size=9,
                                      pen=pg.mkPen(colours["marker_outline"], width=1.0),
                                      brush=pg.mkBrush(class_colour(sign)), name=None)
            item.setZValue(5)
            plot.addItem(item)
            self.points[sign] = item
        self.rings = pg.ScatterPlotItem(symbol="o", size=17, brush=None,
                                        pen=pg.mkPen(colours["support_ring"], width=1.6),
                                        name="support vector")
        self.rings.setZValue(4)
        plot.addItem(self.rings, ignoreBounds=True)
        self.selected = pg.ScatterPlotItem(symbol="o", size=23, brush=None,
                                           pen=pg.mkPen(colours["selection"], width=3.2))
        self.selected.setZValue(6)
        plot.addItem(self.selected, ignoreBounds=True)
        self.legend = None
        if legend:
            self._build_legend(plot)

    def _build_legend(self, plot):
        self.legend = plot.addLegend(offset=(8, 8), labelTextSize="8pt",
                                     labelTextColor=palette()["axis"],
                                     brush=pg.mkBrush(255, 255, 255, 215),
                                     pen=pg.mkPen("#c8c8c8"))
        self.legend.setZValue(50)
        self.legend_class = {}
        for sign in (1, -1):
            sample = pg.ScatterPlotItem(symbol=class_symbol(sign), size=9,
                                        brush=pg.mkBrush(class_colour(sign)),
                                        pen=pg.mkPen(palette()["marker_outline"], width=1.0))
            self.legend_class[sign] = sample
            self.legend.addItem(sample, "+1" if sign > 0 else "-1")
        # the fit's entries (boundary, band, w, slack) come with a fit: _legend_lists_fit
        self.legend.addItem(self.rings, self.rings.name())

    def set_class_names(self, positive: str, negative: str):
        if self.legend is None:
            return
        for sign, text in ((1, positive), (-1, negative)):
            label = self.legend.getLabel(self.legend_class[sign])
            label.setText(caption(text, sign, gap="  "))

    # -- points ------------------------------------------------------------
    # every marker carries its point's index as item data, so pyqtgraph's own
    # picking (pointsAt, sigClicked) answers "which point": see marker_items
    def set_points(self, X: np.ndarray, y: np.ndarray):
        for sign, item in self.points.items():
            rows = np.flatnonzero(y == sign)
            item.setData(x=X[rows, 0], y=X[rows, 1], data=rows)

    def set_selection(self, X: np.ndarray, indices):
        rows = np.array(sorted(indices), dtype=int)
        self.selected.setData(x=X[rows, 0], y=X[rows, 1], data=rows)

    def marker_items(self):
        """The items whose markers stand for points, topmost first."""
        return (self.selected, self.points[1], self.points[-1], self.rings)

    # -- the fit -----------------------------------------------------------
    def set_result(self, result, X: np.ndarray, y: np.ndarray, rect):
        """Draw ``result`` over ``rect``; per-point items only while they match X."""
        self.result = result
        if self.slack_task is not None:
            self.slack_task.cancel()          # segments of an earlier fit are not wanted
        if result is None:
            for item in (self.boundary, self.band, self.weight, self.slack):
                item.setData([], [])
            self.rings.setData([], [])
            self.shade.clear()
            self.arrow.hide()
            self._arrow_tip = None
            self.scale_note.update(None, None)
            self._legend_lists_fit(None)
            return
        matches = len(result.y) == len(X) and np.array_equal(result.X, X)
        self._draw_field(result, rect)
        if matches:
            support = result.X[result.support]
            self.rings.setData(x=support[:, 0], y=support[:, 1], data=result.support)
            self._make_slack(result, rect)
        else:
            self.rings.setData([], [])
            self.slack.setData([], [])
        self._draw_weight(result)
        self._legend_lists_fit(result)

    def _legend_lists_fit(self, result):
        """The legend lists what the fit draws: no w for a kernel fit, and no boundary,
        band, w or slack when w = 0 (to rounding), which has no line to draw, nor before
        there is a fit (``result`` None)."""
        if self.legend is None:
            return
        no_line = result is None or (result.w is not None and result.w_is_zero)
        drawn = [] if no_line else [self.boundary, self.band] + (
            [self.weight] if result.w is not None else []) + [self.slack]
        parts = (self.boundary, self.band, self.weight, self.slack, self.ghost_boundary)
        listed = [sample.item for sample, _ in self.legend.items
                  if any(sample.item is part for part in parts)]
        ghost = any(item is self.ghost_boundary for item in listed)
        wanted = drawn + ([self.ghost_boundary] if ghost else [])
        if len(listed) == len(wanted) and all(a is b for a, b in zip(listed, wanted)):
            return
        # the fit's entries go right after the support vectors' (boundary, band, w,
        # slack, ghost), the other entries after them as they were
        entries = [(sample.item, label.text) for sample, label in self.legend.items]
        start = next(k for k, (item, _) in enumerate(entries) if item is self.rings) + 1
        later = [(item, text) for item, text in entries[start:]
                 if not any(item is part for part in parts)]
        for item, _ in entries[start:]:
            self.legend.removeItem(item)
        for item in wanted:
            self.legend.addItem(item, item.name())
        for item, text in later:
            self.legend.addItem(item, text)

    def set_pinned(self, pinned, rect):
        self._legend_lists_ghost(pinned is not None)
        if pinned is None:
            self.ghost_boundary.setData([], [])
            self.ghost_band.setData([], [])
            return
        shape = geometry.fit_geometry(pinned, rect, project=False, slack=False)
        _show_lines(self.ghost_boundary, shape.boundary)
        _show_lines(self.ghost_band, shape.band_positive + shape.band_negative)

    def _legend_lists_ghost(self, show: bool):
        """The pinned fit's dashed ghost has a legend entry while there is one."""
        if self.legend is None:
            return
        listed = any(sample.item is self.ghost_boundary for sample, _ in self.legend.items)
        if show and not listed:
            self.legend.addItem(self.ghost_boundary, self.ghost_boundary.name())
        elif listed and not show:
            self.legend.removeItem(self.ghost_boundary)

    def refresh_view(self, rect):
        """Redo what depends on the visible rectangle (after pan or zoom)."""
        if self.result is not None:
            self._draw_field(self.result, rect)
            self._place_arrow()

    def _draw_field(self, result, rect):
        x0, x1, y0, y1 = rect
        size = LINEAR_GRID if result.w is not None else KERNEL_GRID
        xs, ys, values = geometry.lattice_of(result, rect, size)
        # ImageItem reads image[x, y]; each texel covers one lattice cell
        self.shade.setImage(values.T, autoLevels=False, levels=(-SHADE_LIMIT, SHADE_LIMIT))
        dx, dy = (x1 - x0) / (size - 1), (y1 - y0) / (size - 1)
        self.shade.setRect(QRectF(x0 - dx / 2, y0 - dy / 2, x1 - x0 + dx, y1 - y0 + dy))
        # the live picture keeps the lattice's contours (exact for linear fits);
        # `slackline render -o figure.json` projects them onto the level sets
        shape = geometry.fit_geometry(result, rect, grid_values=(xs, ys, values),
                                      project=False, slack=False)
        _show_lines(self.boundary, shape.boundary)
        _show_lines(self.band, shape.band_positive + shape.band_negative)

    def _make_slack(self, result, rect):
        """The slack segments of ``result``: at once, or, past SLACK_INLINE kernel values
        an evaluation, off the window's thread (n = 5,000, gamma 50, C 0.1: 4 s a step
        of C), drawn when they arrive; until then none (an earlier fit's would mislead)."""
        if self.slack_task is None or geometry.slack_work(result) <= SLACK_INLINE:
            _, starts, ends = geometry.slack_of(result, rect)
            self._draw_slack(starts, ends)
            return
        self.slack.setData([], [])
        self.slack_task.start(lambda cancel: geometry.slack_of(result, rect, stop=cancel.is_set),
                              lambda made: self._draw_slack(made[1], made[2]))

    def shutdown(self):
        """Stop making slack segments (the window closes)."""
        if self.slack_task is not None:
            self.slack_task.cancel()

    def _draw_slack(self, starts, ends):
        pairs = geometry.slack_segments(starts, ends)
        pairs = pairs[~np.isnan(pairs[:, 0])]
        self.slack.setData(pairs[:, 0], pairs[:, 1])

    def _draw_weight(self, result):
        ends = geometry.weight_arrow(result)
        self._arrow_tip = ends
        if ends is None:
            self.weight.setData([], [])
            self.arrow.hide()
            self.scale_note.update(None, None)
            return
        foot, tip = ends
        self.weight.setData([foot[0], tip[0]], [foot[1], tip[1]])
        self._place_arrow()

    def _place_arrow(self):
        ends = getattr(self, "_arrow_tip", None)
        if ends is None:
            return
        foot, tip = ends
        view = self.plot.getViewBox()
        a, b = view.mapViewToDevice(pg.Point(*foot)), view.mapViewToDevice(pg.Point(*tip))
        if a is None or b is None:
            return
        # ArrowItem: angle 0 points left (towards -x on screen); screen y grows downward
        angle = np.degrees(np.arctan2(b.y() - a.y(), b.x() - a.x())) + 180.0
        self.arrow.setStyle(angle=angle)
        self.arrow.setPos(tip[0], tip[1])
        self.arrow.show()
        self.scale_note.update(view, tip)
