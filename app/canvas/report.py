"""A one-page report for a stakeholder, as PDF (Qt's QPdfWriter) or PNG.

The page holds the canvas pictures (reference and current side by side, the
current one with the reference's ghost), the plain-words summary, the
comparison table, the sweep chart when a sweep of these points exists, the
configuration, the data set's name and checksum, and the cautions.  Text is
laid out by a QTextDocument, so the PDF carries real, searchable text.
"""

from __future__ import annotations

import html
from pathlib import Path

from PySide6.QtCore import QMarginsF, QRectF, QSizeF, QUrl
from PySide6.QtGui import QImage, QPageLayout, QPageSize, QPainter, QPdfWriter, QTextDocument

from solver.study import compare
from solver.study import points_fingerprint
from solver import InputError
from solver.study import heldout_sentence, summary
from solver import CAUTIONS, STATUS_TEXT, STATUSES
from solver import scaling
from solver.result import NO_LINE

LAYOUT_WIDTH = 1000          # logical width the page is laid out at, in pixels
PNG_SIZE = (1240, 1754)      # A4 portrait at 150 dpi
PICTURE = (470, 360)


def export_report(path, dataset, current, pinned=None, sweep=None, cv_before=None,
                  cv_after=None, title: str = "Support vector machine fit", note=None,
                  edited: bool = False, heldout=None) -> Path:
    """Write the one-page report to ``path`` (.pdf or .png) and return the path.

    ``note`` is the experiment's note; ``edited`` says the points were changed
    since they were imported from ``dataset.source``."""
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix not in (".pdf", ".png"):
        raise InputError(f"the report must end in .pdf or .png; got {path.name!r}")
    if current is None:
        raise InputError("there is no fit to report yet; add points of both classes first")
    from app.canvas.figure import ensure_application
    ensure_application()
    document = build_document(dataset, current, pinned, sweep, cv_before, cv_after, title,
                              note=note, edited=edited, heldout=heldout)
    from solver.files.atomic import commit, stage
    staged = stage(path)      # written beside the target, swapped in only when complete
    try:
        _write_report(staged, suffix, document, title)
    except BaseException:
        staged.unlink(missing_ok=True)
        raise
    commit([(staged, path)])
    return path


def _write_report(path: Path, suffix: str, document: QTextDocument, title: str) -> None:
    if suffix == ".pdf":
        writer = QPdfWriter(str(path))
        writer.setResolution(150)
        writer.setPageLayout(QPageLayout(QPageSize(QPageSize.A4), QPageLayout.Portrait,
                                         QMarginsF(12, 12, 12, 12)))
        writer.setTitle(title)
        writer.setCreator("Slackline")
        painter = QPainter()
        if not painter.begin(writer):
            raise InputError(f"could not write the report {path.name}; check that its folder "
                             f"is writable")
        _paint_fitted(painter, document, writer.width(), writer.height())
        painter.end()
    else:
        image = QImage(*PNG_SIZE, QImage.Format_RGB32)
        image.fill(0xFFFFFF)
        painter = QPainter(image)
        margin = 60
        painter.translate(margin, margin)
        _paint_fitted(painter, document, PNG_SIZE[0] - 2 * margin, PNG_SIZE[1] - 2 * margin)
        painter.end()
        if not image.save(str(path), "PNG"):
            raise InputError(f"could not write {path}; check that the folder exists and "
                             f"is writable")


def _paint_fitted(painter: QPainter, document: QTextDocument, width: float, height: float):
    """Draw the laid-out page scaled to the width, shrunk further if it would overflow."""
    scale = width / LAYOUT_WIDTH
    needed = document.size().height() * scale
    if needed > height:
        scale *= height / needed      # one page, always
    painter.setRenderHint(QPainter.Antialiasing)
    painter.setRenderHint(QPainter.SmoothPixmapTransform)
    painter.scale(scale, scale)
    document.drawContents(painter, QRectF(0, 0, LAYOUT_WIDTH, document.size().height()))


def build_document(dataset, current, pinned=None, sweep=None, cv_before=None, cv_after=None,
                   title="Support vector machine fit", note=None,
                   edited=False, heldout=None) -> QTextDocument:
    """``heldout``: the current fit's Confusion on held-out points, if any."""
    from app.canvas.figure import draw_result
    doc = QTextDocument()
    doc.setPageSize(QSizeF(LAYOUT_WIDTH, 100000))
    doc.setTextWidth(LAYOUT_WIDTH)
    parts = [f"<h2>{_e(title)}</h2>", f"<p>{_e(_data_line(dataset, current, edited))}</p>"]
    if note:
        parts.append("<p><b>Note.</b> " + _e(note).replace("\n", "<br>") + "</p>")
    pictures = []
    if pinned is not None:
        doc.addResource(QTextDocument.ImageResource, QUrl("image://pinned"),
                        draw_result(dataset, pinned, *PICTURE))
        pictures.append(("image://pinned", "Reference (pinned) fit"))
    doc.addResource(QTextDocument.ImageResource, QUrl("image://current"),
                    draw_result(dataset, current, *PICTURE, pinned=pinned))
    pictures.append(("image://current", "Current fit" + (" (reference as a ghost)"
                                                          if pinned is not None else "")))
    cells = "".join(f"<td align='center'><img src='{url}' width='{PICTURE[0]}'><br>"
                    f"{_e(caption)}</td>" for url, caption in pictures)
    parts.append(f"<table cellspacing='6'><tr>{cells}</tr></table>")
    if pinned is not None:
        comparison = compare(pinned, current, cv_before, cv_after)
        parts.append(f"<p><b>What changed.</b> {_e(summary(comparison))}</p>")
        parts.append(_comparison_table(comparison))
    else:
        parts.append(f"<p>{_e(_single_fit_line(current))}</p>")
    if heldout is not None:
        parts.append(f"<p><b>Held-out check.</b> "
                     f"{_e(heldout_sentence(heldout, current.training_error))}</p>")
    if sweep is not None and len(sweep.C):
        from app.panels.sweep_chart import chart_image
        doc.addResource(QTextDocument.ImageResource, QUrl("image://sweep"),
                        chart_image(sweep, 960, 420))
        parts.append("<p><b>C sweep.</b> " + _e(_sweep_line(sweep)) + "</p>")
        parts.append("<p><img src='image://sweep' width='960'></p>")
    parts.append(f"<p><b>Configuration.</b> {_e(_config_line(current.config))}</p>")
    parts.append(f"<p><b>Cautions.</b> {_e(' '.join(CAUTIONS))}</p>")
    doc.setHtml("<body style='font-family: sans-serif; font-size: 11pt'>"
                + "".join(parts) + "</body>")
    return doc


def _comparison_table(comparison) -> str:
    rows = ["<tr><th align='left'>figure</th><th>reference</th><th>current</th>"
            "<th>change</th></tr>"]
    for q in comparison.quantities:
        rows.append(f"<tr><td>{_e(q.name)}</td><td align='right'>{q.before:.4g}</td>"
                    f"<td align='right'>{q.after:.4g}</td>"
                    f"<td align='right'>{q.change:+.4g}</td></tr>")
    for status in STATUSES:
        before, after = comparison.before.count(status), comparison.after.count(status)
        rows.append(f"<tr><td>points {_e(STATUS_TEXT[status])}</td><td align='right'>{before}"
                    f"</td><td align='right'>{after}</td><td align='right'>{after - before:+d}"
                    f"</td></tr>")
    table = ("<table border='1' cellspacing='0' cellpadding='3'>" + "".join(rows)
             + "</table>")
    extra = (f"Support vectors joined: {len(comparison.joined)}, left: {len(comparison.left)}. "
             f"Points that changed status: {len(comparison.changes)}.")
    if not comparison.same_points:
        extra += (f" The point sets differ: {len(comparison.moved)} moved, "
                  f"{len(comparison.added)} added, {len(comparison.removed)} removed "
                  f"(matched by coordinates and label).")
    return table + f"<p>{_e(extra)}</p>"


def _data_line(dataset, result, edited=False) -> str:
    source = getattr(dataset, "source", None)
    checksum = getattr(dataset, "sha256", None)
    features = ", ".join(getattr(dataset, "feature_names", ("x1", "x2")))
    points = f"checksum of the points {points_fingerprint(result.X, result.y)}"
    if source and edited:
        # the file's checksum describes the points as read, not these
        origin = (f"edited since import from {source}" + (f" (file SHA-256 {checksum}, "
                  f"which describes the points as imported, not these)" if checksum else ""))
        return (f"Data set: {len(result.y)} points, {origin}; features {features}; "
                f"{points}.")
    name = source or "points placed by hand"
    check = f"file SHA-256 {checksum}" if checksum else points
    return f"Data set: {name}; {len(result.y)} points; features {features}; {check}."


def _single_fit_line(result) -> str:
    counts = ", ".join(f"{result.count(s)} {STATUS_TEXT[s]}" for s in STATUSES)
    margin = (f"No margin: w = 0 to rounding, {NO_LINE}" if result.w_is_zero
              else f"Margin width {result.margin_width:.4g}")
    return (f"{margin}, b = {result.b:.4g}, "
            f"{result.n_support} support vectors ({counts}), training error "
            f"{result.training_error:.1%}.")


def _sweep_line(sweep) -> str:
    folds = "leave-one-out" if sweep.folds == "loo" else f"{sweep.folds}-fold"
    text = (f"{len(sweep.C)} values of C from {sweep.C[0]:.3g} to {sweep.C[-1]:.3g}, "
            f"{folds} cross-validation (seed {sweep.seed}).")
    s = sweep.suggestion
    if s is not None:
        text += (f" Suggestion, not a validation: lowest cross-validated error "
                 f"{s.best_error:.1%} at C = {s.best_C:.4g}; within one standard error, "
                 f"C from {s.smallest_C_within_one_se:.4g} (more regularised) to "
                 f"{s.largest_C_within_one_se:.4g}.")
    return text


def _config_line(config) -> str:
    c_text = "hard margin" if config.hard_margin else f"C = {config.C:g}"
    text = (f"{config.kernel_spec.title} kernel, {c_text}, "
            f"scaling {scaling.TITLES.get(config.scaling, config.scaling)}")
    for name in config.kernel_spec.parameters:
        text += f", {name} = {getattr(config, name):g}"
    if (config.weight_positive, config.weight_negative) != (1.0, 1.0):
        text += (f", class weights +1: {config.weight_positive:g}, "
                 f"-1: {config.weight_negative:g}")
    return text + "."


def _e(text) -> str:
    return html.escape(str(text))
