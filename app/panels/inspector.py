"""Everything the fit says about the selected point, with a plain-words reading."""

from __future__ import annotations

from PySide6.QtWidgets import QFormLayout, QLabel, QWidget

from solver import INSIDE, MISCLASSIFIED, ON_MARGIN, OUTSIDE, STATUS_TEXT

from app.document.class_words import caption
from app.document.document import METADATA, POINTS, RESULT, SELECTION
from app.panels.units import length_suffix

READING = {
    OUTSIDE: "outside the margin: alpha is 0, so this point has no say in where the "
             "boundary lies; moving it a little changes nothing",
    ON_MARGIN: "on the margin: this point holds the boundary in place",
    INSIDE: "inside the margin: on its own side of the boundary but closer than the "
            "margin allows; it pays C\u1d62\u00b7\u03be\u1d62 and pulls with full force",
    MISCLASSIFIED: "misclassified: on the wrong side of the boundary; it pays "
                   "C\u1d62\u00b7\u03be\u1d62 with \u03be\u1d62 > 1",
}

FIELDS = ("index", "coordinates", "label", "decision", "margin", "distance", "projection",
          "alpha", "slack", "status")
TITLES = {"index": "point", "coordinates": "coordinates", "label": "label",
          "decision": "decision value f(x)", "margin": "functional margin y\u00b7f",
          "distance": "distance to boundary", "projection": "projection onto w",
          "alpha": "alpha", "slack": "slack \u03be", "status": "status"}


def _g(value) -> str:
    return f"{value:.6g}" if value == value else "\u2014"      # NaN: w = 0, no boundary


class Inspector(QWidget):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.values = {}
        form = QFormLayout(self)
        # a narrow column: long values wrap under their title instead of being cut off
        form.setRowWrapPolicy(QFormLayout.WrapLongRows)
        for key in FIELDS:
            label = QLabel("\u2014")
            label.setObjectName(f"inspector_{key}")
            label.setWordWrap(True)
            self.values[key] = label
            form.addRow(TITLES[key], label)
        self.reading = QLabel()
        self.reading.setWordWrap(True)
        self.reading.setObjectName("inspector_reading")
        self.reading.setStyleSheet("font-style: italic;")
        form.addRow(self.reading)
        document.changed.connect(self._document_changed)
        self.refresh()

    def text(self, key: str) -> str:
        return self.values[key].text()

    def _document_changed(self, changes):
        if changes & {SELECTION, RESULT, POINTS, METADATA}:
            self.refresh()

    def refresh(self):
        doc = self.document
        selection = sorted(doc.selection)
        for label in self.values.values():
            label.setText("\u2014")
        if len(selection) != 1:
            self.reading.setText("select one point to inspect it" if not selection
                                 else f"{len(selection)} points selected")
            return
        i = selection[0]
        x, y = doc.X[i]
        self.values["index"].setText(f"#{i}")
        self.values["coordinates"].setText(f"({_g(x)}, {_g(y)})")
        self.values["label"].setText(caption(doc.labels[i], int(doc.y[i])))
        result = doc.result
        if result is None or len(result.y) != len(doc.X) or not (result.X[i] == doc.X[i]).all():
            self.reading.setText("no fit for the current points yet")
            return
        self.values["decision"].setText(_g(result.decision[i]))
        self.values["margin"].setText(_g(result.functional_margin[i]))
        unit = length_suffix(result, doc.units)
        distance = result.distance[i]
        self.values["distance"].setText(_g(distance) + (unit if distance == distance else ""))
        if result.projection is not None:
            self.values["projection"].setText(_g(result.projection[i]))
        self.values["alpha"].setText(f"{_g(result.alpha[i])}  (C\u1d62 = {_g(result.penalties[i])})")
        self.values["slack"].setText(_g(result.slack[i]))
        status = str(result.status[i])
        self.values["status"].setText(STATUS_TEXT[status])
        self.reading.setText(READING[status] + _influence_sentence(doc, i))


def _influence_sentence(document, i) -> str:
    """'; leaving this point out rotates the boundary by ...' once the ranking is in."""
    from app.document.evidence import evidence_of
    influence = evidence_of(document).influence
    entry = None if influence is None else influence.of(i)
    return "" if entry is None else f". {entry.sentence()[0].upper()}{entry.sentence()[1:]}"
