"""The interactive plot: shows the document's fit and turns mouse gestures into commands.

Click empty space     add a point of the current class (Shift: the other class)
Click a point         select it (Ctrl: add to / remove from the selection)
Drag a point          move it, or the whole selection it belongs to; the fit follows
Ctrl + drag           box-select
Drag empty space      pan; wheel or right-drag zooms (pyqtgraph's usual gestures)

Points are picked by pyqtgraph itself: each marker carries its point's index
as item data; a click on a marker arrives through the item's sigClicked, a
drag asks the items' pointsAt; a click that no marker takes reaches the view
box, which adds a point.
"""

from __future__ import annotations

import itertools

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QPoint, QPointF, QRectF, Qt, QTimer, Signal
from PySide6.QtWidgets import QGraphicsRectItem, QLabel

from app.canvas import geometry
from app.canvas.palette import palette
from app.canvas.scene import SceneItems
from app.document.document import METADATA, PINNED, POINTS, RESULT, SELECTION

_drag_ids = itertools.count(1)


def axis_title(source, axis: int) -> str:
    """Feature name with its unit, e.g. "bore diameter [mm]"."""
    name = str(source.feature_names[axis])
    units = getattr(source, "units", None) or ("", "")
    return f"{name} [{units[axis]}]" if units[axis] else name


class EditViewBox(pg.ViewBox):
    """A ViewBox whose left-button gestures edit points instead of only panning."""

    def __init__(self, canvas: "Canvas"):
        super().__init__(enableMenu=True)
        self._canvas = canvas
        self._move = None        # (indices, start positions, start mouse, drag id)
        self._box = None         # QGraphicsRectItem while box-selecting

    def mouseClickEvent(self, ev):
        if ev.button() != Qt.LeftButton:
            return super().mouseClickEvent(ev)
        ev.accept()
        pos = self.mapSceneToView(ev.scenePos())
        self._canvas.clicked(pos.x(), pos.y(), ev.modifiers())

    def mouseDragEvent(self, ev, axis=None):
        if ev.button() != Qt.LeftButton:
            return super().mouseDragEvent(ev, axis)
        canvas, doc = self._canvas, self._canvas.document
        if ev.isStart():
            start = self.mapSceneToView(ev.buttonDownScenePos())
            if (ev.modifiers() | canvas.press_modifiers) & Qt.ControlModifier:
                self._start_box(start)
            else:
                hit = canvas.point_at(ev.buttonDownScenePos())
                if hit is not None:
                    selection = doc.selection
                    indices = sorted(selection) if hit in selection else [hit]
                    if hit not in selection:
                        doc.set_selection({hit})
                    self._move = (np.array(indices), doc.X[indices].copy(),
                                  np.array([start.x(), start.y()]), next(_drag_ids))
        if self._move is not None:
            ev.accept()
            indices, origin, mouse0, drag_id = self._move
            now = self.mapSceneToView(ev.scenePos())
            shift = np.array([now.x(), now.y()]) - mouse0
            doc.move_points(indices, origin + shift, drag_id)
            if ev.isFinish():
                self._move = None
            return
        if self._box is not None:
            ev.accept()
            self._update_box(self.mapSceneToView(ev.buttonDownScenePos()),
                             self.mapSceneToView(ev.scenePos()), ev.isFinish())
            return
        super().mouseDragEvent(ev, axis)

    def _start_box(self, start):
        self._box = QGraphicsRectItem(QRectF(start, start))
        self._box.setPen(pg.mkPen(palette()["selection"], width=1, style=Qt.DashLine))
        self._box.setBrush(pg.mkBrush(0, 168, 132, 40))
        self._box.setZValue(100)
        self.addItem(self._box, ignoreBounds=True)

    def _update_box(self, a, b, finished):
        rect = QRectF(a, b).normalized()
        self._box.setRect(rect)
        if finished:
            self.removeItem(self._box)
            self._box = None
            X = self._canvas.document.X
            inside = ((X[:, 0] >= rect.left()) & (X[:, 0] <= rect.right())
                      & (X[:, 1] >= rect.top()) & (X[:, 1] <= rect.bottom()))
            self._canvas.document.set_selection(np.flatnonzero(inside).tolist())


class Canvas(pg.PlotWidget):
    redrawn = Signal()            # the fit's items now show the document's result

    def __init__(self, document, parent=None):
        view = EditViewBox(self)
        super().__init__(parent, viewBox=view, background=palette()["background"])
        self._view = view
        self.document = document
        self.new_point_sign = 1
        self.press_modifiers = Qt.NoModifier   # held at the last press (starts a gesture)
        self.plot = self.getPlotItem()
        # no grid: in software rendering it doubled the cost of every frame
        for name in ("left", "bottom"):
            axis = self.plot.getAxis(name)
            axis.setPen(pg.mkPen(palette()["axis"]))
            axis.setTextPen(pg.mkPen(palette()["axis"]))
        view.setAspectLocked(True)
        view.disableAutoRange()
        self.scene_items = SceneItems(self.plot, background=True)
        for item in self.scene_items.marker_items():
            item.sigClicked.connect(self._marker_clicked)
        self._stale = QLabel(self)
        self._stale.setStyleSheet("background: rgba(255, 244, 214, 235); color: #5a4300;"
                                  "border: 1px solid #d9b44a; padding: 3px 6px;")
        self._stale.hide()
        self._view_timer = QTimer(self, singleShot=True, interval=40)
        self._view_timer.timeout.connect(self._refresh_view)
        view.sigRangeChanged.connect(self._range_changed)
        document.changed.connect(self._document_changed)
        self.fit_view_to_data()
        self._points_changed()

    # -- view ----------------------------------------------------------------
    def view_rect(self):
        (x0, x1), (y0, y1) = self._view.viewRange()
        return (x0, x1, y0, y1)

    def fit_view_to_data(self):
        x0, x1, y0, y1 = geometry.padded_bounds(self.document.X)
        self._view.setRange(xRange=(x0, x1), yRange=(y0, y1), padding=0)

    def set_legend_visible(self, visible: bool):
        if self.scene_items.legend is not None:
            self.scene_items.legend.setVisible(bool(visible))

    def set_equal_axes(self, equal: bool):
        x0, x1, y0, y1 = self.view_rect()
        self._view.setAspectLocked(bool(equal))
        # re-apply the range: the lock alone takes effect only at the next pan or zoom
        self._view.setRange(xRange=(x0, x1), yRange=(y0, y1), padding=0)

    def pixel_of(self, x: float, y: float) -> QPoint:
        """Viewport pixel of data coordinate (x, y) (for tests and tools)."""
        scene = self._view.mapViewToScene(QPointF(x, y))
        return self.mapFromScene(scene)

    def point_at(self, scene_pos):
        """Index of the point whose marker is under ``scene_pos``, or None (pointsAt)."""
        for item in self.scene_items.marker_items():
            spots = item.pointsAt(item.mapFromScene(scene_pos))
            if len(spots):
                return int(spots[0].data())
        return None

    def _marker_clicked(self, _item, spots, ev):
        """A left click on a marker (pyqtgraph's sigClicked): select its point."""
        if not len(spots):
            return
        doc, hit = self.document, int(spots[0].data())
        if ev.modifiers() & Qt.ControlModifier:
            doc.set_selection(doc.selection ^ {hit})
        else:
            doc.set_selection({hit})

    def clicked(self, x: float, y: float, modifiers):
        """A left click that no marker took: add a point there (Ctrl: clear the selection)."""
        doc = self.document
        if modifiers & Qt.ControlModifier:
            doc.set_selection(set())
            return
        sign = -self.new_point_sign if modifiers & Qt.ShiftModifier else self.new_point_sign
        doc.add_point(x, y, sign)

    # -- document -> items -------------------------------------------------------
    def _document_changed(self, changes):
        if changes & {POINTS, METADATA}:
            self._points_changed()
        if changes & {POINTS, RESULT}:
            self._result_changed()
        elif SELECTION in changes:
            self._selection_changed()
        if PINNED in changes:
            self._pinned_changed()

    def _points_changed(self):
        doc = self.document
        self.scene_items.set_points(doc.X, doc.y)
        self.scene_items.set_class_names(str(doc.label_for(1)), str(doc.label_for(-1)))
        self.plot.setLabel("bottom", axis_title(doc, 0))
        self.plot.setLabel("left", axis_title(doc, 1))
        self.scene_items.set_selection(doc.X, doc.selection)

    def _result_changed(self):
        doc = self.document
        self.scene_items.set_result(doc.result, doc.X, doc.y, self.view_rect())
        self._show_stale(doc.result_is_stale)
        self.redrawn.emit()

    def _selection_changed(self):
        self.scene_items.set_selection(self.document.X, self.document.selection)

    def _pinned_changed(self):
        self.scene_items.set_pinned(self.document.pinned, self.view_rect())

    def _range_changed(self, *_):
        self.scene_items._place_arrow()
        self._view_timer.start()

    def _refresh_view(self):
        rect = self.view_rect()
        self.scene_items.refresh_view(rect)
        self.scene_items.set_pinned(self.document.pinned, rect)

    def _show_stale(self, stale: bool):
        if stale:
            result = self.document.result
            if result is not None and not result.converged:   # a failed solve's best iterate
                self._stale.setText("not converged: the solver's last iterate, not an optimal "
                                    "fit \u2014 see the status bar")
            else:
                self._stale.setText("showing the last good fit \u2014 see the status bar")
            self._stale.adjustSize()
            self._place_stale()
            self._stale.show()
        else:
            self._stale.hide()

    def _place_stale(self):
        self._stale.move(self.width() - self._stale.width() - 12, 10)

    def mousePressEvent(self, event):
        self.press_modifiers = event.modifiers()
        super().mousePressEvent(event)

    def resizeEvent(self, event):
        super().resizeEvent(event)
        if getattr(self, "_stale", None) is not None:
            self._place_stale()
