"""Tooltips for the controls and read-outs of panels that do not set their own.

Kept in one table, panel attribute -> text, so the words can be read and
reviewed together; ``apply_tooltips`` leaves a tooltip a panel already set.
"""

from __future__ import annotations

TIPS = {
    "controls": {
        "hard": "no slack allowed: every point on its own side, outside the band; refused "
                "(with the reason) when no boundary separates the classes",
        "add_positive": "a click on empty canvas adds a point of this class",
        "add_negative": "a click on empty canvas adds a point of this class",
    },
    "sweep": {
        "c_from": "smallest C of the sweep", "c_to": "largest C of the sweep",
        "steps": "how many values of C, spaced evenly on a log scale",
        "folds": "cross-validation folds (stratified)",
        "leave_one_out": "leave one point out at a time instead of folds",
        "seed": "seed of the fold assignment: the same seed gives the same folds",
        "run_button": "fit every C on every fold in the background",
        "cancel_button": "stop after the fits under way", "progress": "fits done so far",
        "use_best": "set C to the swept value with the lowest cross-validated error",
        "use_largest": "set C to the largest value within one standard error of the lowest",
        "use_smallest": "set C to the smallest (most regularised) value within one standard "
                        "error of the lowest",
        "chart": "errors, support vectors, margin width and objective against C; the "
                 "vertical line is the current C; click to set C",
    },
    "compare": {
        "pin_button": "keep the current fit as the reference (Ctrl+P); it stays on the "
                      "canvas as a dashed ghost",
        "clear_button": "forget the reference fit",
        "cv_button": "estimate the cross-validated error of both fits in the background",
        "report_button": "write a one-page PDF or PNG report of the two fits",
        "table": "figures of the pinned and the current fit, and the change",
        "changes": "points whose status differs between the pinned and the current fit",
    },
}

INSPECTOR = {
    "index": "row number of the selected point", "coordinates": "its two feature values",
    "label": "its class label as written, and its sign",
    "decision": "f(x) at the point: positive on the +1 side",
    "margin": "y\u00b7f(x): 1 or more outside the band, below 0 on the wrong side",
    "distance": "signed distance to the boundary, y\u00b7f/|w|",
    "projection": "where the point lies along the direction of w",
    "alpha": "its dual weight; 0 outside the margin, C\u1d62 inside it",
    "slack": "\u03be = max(0, 1 \u2212 y\u00b7f): how far it is past its margin edge",
    "status": "outside the margin, on the margin, inside it, or misclassified",
}


def _set(widget, text):
    if widget is not None and not widget.toolTip():
        widget.setToolTip(text)


def apply_tooltips(window):
    """Give every listed control of ``window``'s panels its tooltip."""
    panels = window.panels          # by their names in app/window/panels.py
    for name, tips in TIPS.items():
        panel = panels.get(name)
        for attribute, text in tips.items() if panel is not None else ():
            _set(getattr(panel, attribute, None), text)
    for key, text in INSPECTOR.items():
        _set(window.inspector.values.get(key), text)
    _set(window.controls.weight_positive, "class weight: C\u1d62 = C \u00d7 weight")
    _set(window.controls.weight_negative, "class weight: C\u1d62 = C \u00d7 weight")
