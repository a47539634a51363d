"""The canvas as a PNG or SVG file, written honestly: staged beside the target, checked
for content, then swapped in (solver.files.atomic), or a SlacklineError saying why not."""

from __future__ import annotations

from pathlib import Path

from solver.errors import InputError
from solver.files.atomic import commit, stage


def write_picture(canvas, path) -> None:
    from pyqtgraph.exporters import ImageExporter

    from app.canvas.figure import write_svg
    path = Path(path)
    staged = stage(path)
    try:
        if path.suffix.lower() == ".svg":
            write_svg(canvas, staged)
        else:
            image = ImageExporter(canvas.getPlotItem()).export(toBytes=True)
            if image is None or image.isNull() or not image.save(str(staged), "PNG"):
                raise InputError(f"could not draw or write the picture {path.name}; check "
                                 f"that its folder is writable and has free space")
    except BaseException:
        staged.unlink(missing_ok=True)
        raise
    commit([(staged, path)])
