"""The always-visible read-out of the current fit's global figures."""

from __future__ import annotations

from PySide6.QtWidgets import QFormLayout, QLabel, QWidget

from solver import INSIDE, MISCLASSIFIED, ON_MARGIN
from solver.result import NO_LINE

from app.document.document import METADATA, RESULT
from app.panels.units import length_suffix, units_sentence

ROWS = (   # (key, title, tooltip)
    ("w", "w", "the weight vector: f(x) = w\u00b7x + b; w points from the \u22121 side to "
               "the +1 side, at right angles to the boundary"),
    ("b", "b", "the intercept of the decision function f(x) = w\u00b7x + b"),
    ("margin", "margin width", "2/|w|: the width of the band between f = \u22121 and f = +1"),
    ("units", "units", "in which units w, the margin width and the distances are"),
    ("support", "support vectors", "points with alpha > 0: they alone decide the boundary"),
    ("breakdown", "on / inside / wrong", "support vectors on the margin edge / inside the "
                                         "band / on the wrong side of the boundary"),
    ("error", "training error", "share of the training points on the wrong side; not an "
                                "estimate of the error on new data"),
    ("heldout", "held-out error", "share of the held-out points (kept out of the fit) on "
                                  "the wrong side: Edit \u2192 Hold out selected points, or "
                                  "File \u2192 Load held-out points"),
    ("confusion", "TP / FP / TN / FN", "held-out confusion counts: true positive, false "
                                       "positive, true negative, false negative"),
    ("regularisation", "\u00bd|w|\u00b2", "the regularisation term of the objective"),
    ("penalty", "\u03a3 C\u1d62\u03be\u1d62", "the slack penalty term of the objective"),
    ("gap", "duality gap", "primal minus dual objective: how far the solver is from the "
                           "exact optimum (smaller is better)"),
    ("time", "solve time", "wall-clock time of the last solve and its iterations"),
    ("state", "", "whether these figures belong to the current points and settings"),
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
        form.setVerticalSpacing(3)       # twelve rows under the Fit settings at 800 px high
        form.setRowWrapPolicy(QFormLayout.WrapLongRows)
        for key, title, tip in ROWS:
            label = QLabel("\u2014")
            label.setToolTip(tip)
            label.setObjectName(f"summary_{key}")
            label.setTextInteractionFlags(label.textInteractionFlags() | _selectable())
            # rows whose text grows with the data (a 5,000-point kernel fit: "409.0 ms,
            # 18231 iterations") wrap at 1280 px rather than lose their end
            label.setWordWrap(key in ("state", "units", "margin", "w", "time", "error", "heldout",
                                      "breakdown", "confusion"))
            self.values[key] = label
            if key == "state":
                # the whole width, so a long reason (hard margin refused) wraps, never cut
                form.addRow(label)
            else:
                form.addRow(title, label)
            if form.labelForField(label) is not None:
                form.labelForField(label).setToolTip(tip)
        document.changed.connect(self._document_changed)
        self.refresh()

    def text(self, key: str) -> str:
        return self.values[key].text()

    def _heldout(self, set_):
        error, counts = _heldout_lines(self.document)
        set_("heldout", error)
        set_("confusion", counts)

    def _document_changed(self, changes):
        if changes & {RESULT, METADATA}:
            self.refresh()

    def refresh(self):
        doc, result = self.document, self.document.result
        if result is None:
            for label in self.values.values():
                label.setText("\u2014")
            self.values["state"].setText(doc.last_error or "no fit yet")
            return
        set_ = lambda key, text: self.values[key].setText(text)  # noqa: E731
        unit = length_suffix(result, doc.units)
        if result.w_is_zero:
            set_("w", f"0 to rounding: {NO_LINE}")
        elif result.w is not None:
            set_("w", f"({number(result.w[0])}, {number(result.w[1])})")
        else:
            set_("w", "\u2014 (kernel fit: no w in the plane)")
        set_("margin", "none (w = 0)" if result.w_is_zero
             else number(result.margin_width) + unit)
        set_("units", units_sentence(result, doc.units, doc.feature_names))
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
        if doc.result_is_stale and not result.converged:
            self.values["state"].setText(
                "<b style='color:#8a5a00'>not converged</b>: these figures are the solver's "
                f"last iterate, not an optimal fit \u2014 {doc.last_error}")
        elif doc.result_is_stale:
            self.values["state"].setText(
                "<b style='color:#8a5a00'>stale</b>: the last good fit; the current "
                f"points or settings could not be fitted \u2014 {doc.last_error}")
        else:
            C = "hard margin" if result.config.hard_margin else f"C = {number(result.config.C)}"
            self.values["state"].setText(f"current: {result.config.kernel_spec.title}, {C}")


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
