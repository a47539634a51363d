"""Offscreen drawing of a fit: the picture ``slackline render`` and the report use.

draw_result uses the canvas's own SceneItems, so a rendered figure shows
what the window shows.
"""

from __future__ import annotations

import os
import re
import sys
from pathlib import Path

from solver import InputError

DEFAULT_SIZE = (1200, 800)
SIZE_LIMITS = (100, 8000)
FORMATS = (".png", ".svg")


def ensure_application():
    """The running QApplication, or a new one (offscreen when there is no display)."""
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance()
    if app is None:
        from app.display import display_problem
        if display_problem() is not None:
            os.environ["QT_QPA_PLATFORM"] = "offscreen"
        app = QApplication(sys.argv[:1])
    return app


def _plot_widget(dataset, result, width, height, pinned=None):
    import pyqtgraph as pg
    from PySide6.QtWidgets import QApplication

    from app.canvas import geometry
    from app.canvas.palette import palette
    from app.canvas.scene import SceneItems

    widget = pg.PlotWidget(background=palette()["background"])
    widget.resize(width, height)
    plot = widget.getPlotItem()
    axis_colour = palette()["axis"]
    for name in ("left", "bottom"):
        plot.getAxis(name).setPen(pg.mkPen(axis_colour))
        plot.getAxis(name).setTextPen(pg.mkPen(axis_colour))
    from app.canvas.canvas import axis_title
    plot.setLabel("bottom", axis_title(dataset, 0))
    plot.setLabel("left", axis_title(dataset, 1))
    view = plot.getViewBox()
    view.setAspectLocked(geometry.comparable_spans(dataset.X))   # as the window does
    view.disableAutoRange()
    widget.ensurePolished()
    QApplication.sendPostedEvents()
    widget.grab()  # lays the plot out at its final size before the range is set
    x0, x1, y0, y1 = geometry.padded_bounds(dataset.X)
    view.setRange(xRange=(x0, x1), yRange=(y0, y1), padding=0)
    items = SceneItems(plot)
    items.set_class_names(str(dataset.label_for(1)), str(dataset.label_for(-1)))
    items.set_points(dataset.X, dataset.y)
    (vx0, vx1), (vy0, vy1) = view.viewRange()
    rect = (vx0, vx1, vy0, vy1)
    items.set_result(result, dataset.X, dataset.y, rect)
    items.set_pinned(pinned, rect)
    return widget, items


def draw_result(dataset, result, width: int, height: int, pinned=None):
    """The canvas picture of ``result`` over ``dataset`` as a QImage, no window needed."""
    ensure_application()
    widget, _items = _plot_widget(dataset, result, int(width), int(height), pinned)
    image = widget.grab().toImage()
    widget.deleteLater()
    return image


def save_figure(path, dataset, result, width: int, height: int, pinned=None,
                suffix: str | None = None) -> Path:
    """Write the picture to ``path``: PNG or SVG, chosen by ``suffix`` (default: the
    extension; a staged temporary file has none of its own)."""
    path = Path(path)
    suffix = (suffix or path.suffix).lower()
    if suffix not in FORMATS:
        raise InputError(f"the figure must end in .png or .svg; got {path.name!r}")
    ensure_application()
    widget, _items = _plot_widget(dataset, result, int(width), int(height), pinned)
    try:
        if suffix == ".svg":
            write_svg(widget, path)
        elif not widget.grab().toImage().save(str(path), "PNG"):
            raise InputError(f"could not write {path}; check that the folder exists and "
                             f"is writable")
    finally:
        widget.deleteLater()
    return path


def write_svg(widget, path) -> None:
    """Draw ``widget`` into an SVG file through Qt's own SVG painter.

    (pyqtgraph's SVGExporter cannot parse the path data Qt 6.12 writes, so the
    picture goes through QSvgGenerator; lines and markers stay vectors.)
    """
    from PySide6.QtCore import QRect, QSize
    from PySide6.QtGui import QPainter
    from PySide6.QtSvg import QSvgGenerator
    generator = QSvgGenerator()
    generator.setFileName(str(path))
    generator.setSize(QSize(widget.width(), widget.height()))
    generator.setViewBox(QRect(0, 0, widget.width(), widget.height()))
    generator.setTitle("Slackline fit")
    painter = QPainter()
    if not painter.begin(generator):   # QSvgGenerator could not open the file
        raise InputError(f"could not write {path}; check that the folder exists and is "
                         f"writable")
    try:
        widget.render(painter)
    finally:
        painter.end()
    try:
        written = os.path.getsize(path)
    except OSError:
        written = 0
    if written == 0:
        raise InputError(f"nothing was written to {path}; check that the folder is "
                         f"writable and has free space")


def parse_size(text: str) -> tuple[int, int]:
    match = re.fullmatch(r"\s*(\d+)\s*[xX\u00d7]\s*(\d+)\s*", text or "")
    low, high = SIZE_LIMITS
    if not match:
        raise InputError(f"--size takes WIDTHxHEIGHT in pixels, for example 1200x800; "
                         f"got {text!r}")
    width, height = int(match[1]), int(match[2])
    if not (low <= width <= high and low <= height <= high):
        raise InputError(f"--size must be between {low} and {high} pixels each way; "
                         f"got {width}x{height}")
    return width, height
