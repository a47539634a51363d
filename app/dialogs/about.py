"""The About box: version and the cautions that go with a hand-tuned classifier."""

from __future__ import annotations

from PySide6.QtWidgets import QMessageBox

from solver import CAUTIONS, __version__

def about_text() -> str:
    items = "".join(f"<li>{c}</li>" for c in CAUTIONS)
    return (f"<h3>Slackline {__version__}</h3>"
            "<p>A workbench for fitting and explaining two-feature support vector "
            "machines: place or import labelled points, change C and the kernel, and "
            "watch the boundary, the margin and every point's slack.</p>"
            f"<p><b>Cautions</b></p><ul>{items}</ul>")


def show_about(parent):
    box = QMessageBox(parent)
    box.setWindowTitle("About Slackline")
    box.setText(about_text())
    box.setIcon(QMessageBox.Information)
    box.exec()
