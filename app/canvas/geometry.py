"""Where to draw things: clipping lines to the view, grids, segment ends.

Drawing geometry only.  Every number about the fit itself (w, b, f, slack)
comes from the solver's FitResult; this module only decides where on the
screen those numbers land.
"""

from __future__ import annotations

import numpy as np


def clip_line(w, c, rect):
    """End points of {x : w.x = c} inside rect = (x0, x1, y0, y1), or None.

    The line meets each edge of the rectangle at most once; of the hits that
    lie on the rectangle, the two farthest apart are the visible segment.
    """
    x0, x1, y0, y1 = rect
    w1, w2 = float(w[0]), float(w[1])
    hits = []
    if w2 != 0.0:
        for x in (x0, x1):
            y = (c - w1 * x) / w2
            if y0 - 1e-12 * abs(y1 - y0) <= y <= y1 + 1e-12 * abs(y1 - y0):
                hits.append((x, y))
    if w1 != 0.0:
        for y in (y0, y1):
            x = (c - w2 * y) / w1
            if x0 - 1e-12 * abs(x1 - x0) <= x <= x1 + 1e-12 * abs(x1 - x0):
                hits.append((x, y))
    if len(hits) < 2:
        return None
    points = np.array(hits)
    span = np.linalg.norm(points[:, None, :] - points[None, :, :], axis=2)
    i, j = np.unravel_index(np.argmax(span), span.shape)
    return points[[i, j]]


def grid(rect, size: int):
    """(xs, ys, points) of a size x size lattice over rect; points row-major in y."""
    x0, x1, y0, y1 = rect
    xs = np.linspace(x0, x1, size)
    ys = np.linspace(y0, y1, size)
    gx, gy = np.meshgrid(xs, ys)
    return xs, ys, np.column_stack([gx.ravel(), gy.ravel()])


def foot_on_boundary(w, b, anchor):
    """The point of {w.x + b = 0} nearest ``anchor`` (where the w arrow starts)."""
    w = np.asarray(w, dtype=float)
    return np.asarray(anchor, dtype=float) - (np.dot(w, anchor) + b) / np.dot(w, w) * w


def slack_segments(points, targets):
    """Pairs (point, target) as one array with NaN breaks, for a single line item."""
    count = len(points)
    out = np.full((3 * count, 2), np.nan)
    out[0::3] = points
    out[1::3] = targets
    return out


def linear_slack_targets(X, y, slack, w):
    """Where each point would have to move along w to reach its own margin edge.

    f(x + t w) = f(x) + t |w|^2, and f = y_i on the edge, so
    t = (y_i - f_i) / |w|^2 = y_i xi_i / |w|^2 (a length of xi_i / |w|).
    """
    w = np.asarray(w, dtype=float)
    step = (y * slack / np.dot(w, w))[:, None]
    return X + step * w[None, :]


def gradient_slack_targets(result, X, y, slack, reach, steps: int = 32):
    """Kernel fits: walk from each point along the local gradient of f to f = y_i.

    The direction is a central difference of result.decision_function (step
    reach * 1e-5).  Along it f is sampled at ``steps`` distances up to
    ``reach``; the first crossing of the point's own edge level y_i is
    interpolated linearly.  A point whose edge lies farther gets a short stub
    in the right direction.
    """
    h = max(float(reach), 1e-12) * 1e-5
    offsets = np.array([[h, 0.0], [-h, 0.0], [0.0, h], [0.0, -h]])
    probe = (X[:, None, :] + offsets[None, :, :]).reshape(-1, 2)
    values = result.decision_function(probe).reshape(-1, 4)
    grad = np.column_stack([values[:, 0] - values[:, 1], values[:, 2] - values[:, 3]])
    norm = np.maximum(np.linalg.norm(grad, axis=1), 1e-300)[:, None]
    # walk towards larger y_i f: along +grad for y = +1, along -grad for y = -1
    direction = grad / norm * y[:, None]
    distances = np.linspace(0.0, reach, steps + 1)
    walk = X[:, None, :] + distances[None, :, None] * direction[:, None, :]
    margin = y[:, None] * result.decision_function(walk.reshape(-1, 2)).reshape(len(X), -1)
    reached = margin >= 1.0
    first = np.where(reached.any(axis=1), reached.argmax(axis=1), steps)
    before = np.maximum(first - 1, 0)
    rows = np.arange(len(X))
    m0, m1 = margin[rows, before], margin[rows, first]
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(m1 > m0, np.clip((1.0 - m0) / (m1 - m0), 0.0, 1.0), 1.0)
    length = distances[before] + t * (distances[first] - distances[before])
    # the edge out of reach, or reached only far along a curving f: fall back to
    # the first-order length xi_i / |grad f|, kept short (a stub showing direction)
    first_order = np.minimum(slack / norm[:, 0], 0.15 * reach)
    trusted = reached.any(axis=1) & (length <= 2.0 * first_order + 1e-12)
    length = np.where(trusted, length, first_order)
    return X + length[:, None] * direction


def padded_bounds(X, pad: float = 0.12):
    """(x0, x1, y0, y1) around the points with a margin; a unit box when empty."""
    if len(X) == 0:
        return (-5.0, 5.0, -5.0, 5.0)
    lo, hi = X.min(axis=0), X.max(axis=0)
    span = np.maximum(hi - lo, 1e-9)
    span = np.maximum(span, 0.05 * span.max())
    lo, hi = lo - pad * span, hi + pad * span
    return (float(lo[0]), float(hi[0]), float(lo[1]), float(hi[1]))


def contour_segments(values, xs, ys, level: float) -> np.ndarray:
    """Marching squares: the level set of values[iy, ix] as (2k x 2) segment end points.

    Each grid cell whose corners straddle ``level`` contributes one segment
    (two for a saddle) between linearly interpolated edge crossings.  Drawn
    with connect="pairs".
    """
    v00, v10 = values[:-1, :-1], values[:-1, 1:]   # (y, x), (y, x + 1)
    v01, v11 = values[1:, :-1], values[1:, 1:]     # (y + 1, x), (y + 1, x + 1)
    x0, x1 = xs[:-1][None, :], xs[1:][None, :]
    y0, y1 = ys[:-1][:, None], ys[1:][:, None]
    shape = v00.shape

    def crossing(a, b, pa, pb):
        with np.errstate(divide="ignore", invalid="ignore"):
            t = np.clip((level - a) / (b - a), 0.0, 1.0)
        return ((a > level) != (b > level)), pa + t * (pb - pa)

    bx, by = np.broadcast_to(x0, shape), np.broadcast_to(y0, shape)
    ex, ey = np.broadcast_to(x1, shape), np.broadcast_to(y1, shape)
    m0, px0 = crossing(v00, v10, bx, ex)           # bottom edge, varies in x at y0
    m1, py1 = crossing(v10, v11, by, ey)           # right edge, varies in y at x1
    m2, px2 = crossing(v01, v11, bx, ex)           # top edge, varies in x at y1
    m3, py3 = crossing(v00, v01, by, ey)           # left edge, varies in y at x0
    points = np.stack([np.stack([px0, by], -1), np.stack([ex, py1], -1),
                       np.stack([px2, ey], -1), np.stack([bx, py3], -1)], axis=2)
    masks = np.stack([m0, m1, m2, m3], axis=-1).reshape(-1, 4)
    points = points.reshape(-1, 4, 2)
    count = masks.sum(axis=1)
    two = count == 2
    rows, edges = np.nonzero(masks[two])
    segments = [points[two][rows, edges]]
    four = np.flatnonzero(count == 4)
    if len(four):
        centre = (v00 + v10 + v01 + v11).reshape(-1)[four] / 4 > level
        low = (v00.reshape(-1)[four] > level) == centre
        # a saddle: pair each crossing with its neighbour on the centre's side
        for a, b in ((0, np.where(low, 1, 3)), (2, np.where(low, 3, 1))):
            pair = np.stack([points[four, a], points[four, b]], axis=1).reshape(-1, 2)
            segments.append(pair)
    return np.concatenate(segments) if segments else np.zeros((0, 2))


def comparable_spans(X, factor: float = 4.0) -> bool:
    """True when the two features span ranges within ``factor`` of each other,
    so equal axis scales keep both readable (and w visibly perpendicular)."""
    if len(X) < 2:
        return True
    spans = X.max(axis=0) - X.min(axis=0)
    small, large = float(min(spans)), float(max(spans))
    return small > 0 and large / small <= factor
