"""Figure geometry as data: what the canvas draws, as one JSON-ready object.

``slackline render EXP -o figure.json`` writes it, so users can redraw a fit
in their own plotting style.  Everything is in the data's own units and
comes from app.canvas.geometry.fit_geometry, the same geometry the canvas
draws (here with every kernel contour vertex projected onto its level set).
No Qt here.
"""

from __future__ import annotations

import json

import numpy as np

from app.canvas import geometry


def _points(array) -> list:
    return [[float(x), float(y)] for x, y in np.asarray(array, dtype=float)]


def figure_geometry(result, feature_names, rect=None) -> dict:
    """The figure of ``result`` over ``rect`` (default: the points' padded bounds).

    {"kernel", "axes": {"x", "y"}, "boundary": [polyline, ...],
     "band": {"positive": [...], "negative": [...]}, "support": [index, ...],
     "slack": [{"point", "from", "to"}, ...], "w": {"from", "to"} or None}
    A slack segment runs from the point to its own class's margin edge
    (f = +1 for the positive class, f = -1 for the negative).
    """
    rect = rect or geometry.padded_bounds(result.X)
    shape = geometry.fit_geometry(result, rect, project=True)
    weight = None
    if shape.weight is not None:
        foot, tip = shape.weight
        weight = {"from": _points([foot])[0], "to": _points([tip])[0]}
    return {
        "kernel": str(result.config.kernel),
        "axes": {"x": str(feature_names[0]), "y": str(feature_names[1])},
        "boundary": [_points(line) for line in shape.boundary],
        "band": {"positive": [_points(line) for line in shape.band_positive],
                 "negative": [_points(line) for line in shape.band_negative]},
        "support": [int(i) for i in result.support],
        "slack": [{"point": int(i), "from": _points([a])[0], "to": _points([b])[0]}
                  for i, a, b in zip(shape.slack_points, shape.slack_from, shape.slack_to)],
        "w": weight,
    }


def figure_json(result, feature_names, rect=None) -> str:
    return json.dumps(figure_geometry(result, feature_names, rect), indent=1) + "\n"
