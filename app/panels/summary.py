"""The always-visible read-out of the current fit's global figures."""

from __future__ import annotations

from PySide6.QtWidgets import QFormLayout, QLabel, QWidget

from solver import INSIDE, MISCLASSIFIED, ON_MARGIN

ROWS = (
    ("w", "w (weight vector)"),
    ("b", "b (intercept)"),
    ("margin", "margin width 2/|w|"),
    ("support", "support vectors"),
    ("breakdown", "  on / inside / misclassified"),
    ("error", "training error"),
    ("heldout", "held-out error"),
    ("confusion", "  TP / FP / TN / FN"),
    ("regularisation", "\u00bd|w|\u00b2"),
    ("penalty", "\u03a3 C\u1d62\u03be\u1d62"),
    ("gap", "duality gap"),
    ("time", "solve time"),
    ("state", ""),
)


def number(value: float, digits: int = 6) -> str:
    return f"{value:.{digits}g}"


class Summary(QWidget):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.values = {}
        form = QFormLayout(self)
        form.setHorizontalSpacing(14)
        for key, title in ROWS:
            label = QLabel("\u2014")
            label.setObjectName(f"summary_{key}")
            label.setTextInteractionFlags(label.textInteractionFlags() | _selectable())
            label.setStyleSheet("font-family: monospace;" if key != "state" else "")
            label.setWordWrap(key == "state")
            self.values[key] = label
            form.addRow(title, label)
        document.result_changed.connect(self.refresh)
        document.solve_failed.connect(lambda _message: self.refresh())
        self.refresh()

    def text(self, key: str) -> str:
        return self.values[key].text()

    def _heldout(self, set_):
        error, counts = _heldout_lines(self.document)
        set_("heldout", error)
        set_("confusion", counts)

    def refresh(self):
        doc, result = self.document, self.document.result
        if result is None:
            for label in self.values.values():
                label.setText("\u2014")
            self.values["state"].setText(doc.last_error or "no fit yet")
            return
        set_ = lambda key, text: self.values[key].setText(text)  # noqa: E731
        if result.w is not None:
            set_("w", f"({number(result.w[0])}, {number(result.w[1])})")
            set_("margin", number(result.margin_width))
        else:
            set_("w", f"\u2014 ({result.config.kernel} kernel: no w in the plane)")
            set_("margin", f"2/|w| = {number(result.margin_width)} in feature space")
        set_("b", number(result.b))
        set_("support", str(result.n_support))
        set_("breakdown", f"{result.count(ON_MARGIN)} / {result.count(INSIDE)} / "
                          f"{result.count(MISCLASSIFIED)}")
        wrong = int(round(result.training_error * len(result.y)))
        set_("error", f"{result.training_error:.1%}  ({wrong} of {len(result.y)})")
        self._heldout(set_)
        set_("regularisation", number(result.half_norm_w2))
        set_("penalty", number(result.penalty_term))
        set_("gap", f"{result.duality_gap:.2e}")
        set_("time", f"{result.seconds * 1e3:.1f} ms, {result.iterations} iterations")
        if doc.result_is_stale:
            self.values["state"].setText(
                "<b style='color:#8a5a00'>stale</b>: the last good fit; the current "
                f"points or settings could not be fitted \u2014 {doc.last_error}")
        else:
            C = "hard margin" if result.config.hard_margin else f"C = {number(result.config.C)}"
            self.values["state"].setText(f"current: {result.config.kernel}, {C}")


def _heldout_lines(document):
    """(held-out error, confusion counts) texts from the document's evidence, if any."""
    from app.document.evidence import evidence_of
    counts = evidence_of(document).counts
    if counts is None:
        return "\u2014 (none held out)", "\u2014"
    wrong = counts.false_positive + counts.false_negative
    return (f"{counts.error:.1%}  ({wrong} of {counts.rows})",
            f"{counts.true_positive} / {counts.false_positive} / {counts.true_negative} / "
            f"{counts.false_negative}  (+1 = {counts.positive_label})")


def _selectable():
    from PySide6.QtCore import Qt
    return Qt.TextSelectableByMouse
