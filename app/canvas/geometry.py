"""Where to draw things: clipping lines to the view, grids, segment ends.

Drawing geometry only.  Every number about the fit itself (w, b, f, slack)
comes from the solver's FitResult; this module only decides where on the
screen those numbers land.
"""

from __future__ import annotations

from dataclasses import dataclass

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


def axis_steps(rect, relative: float = 1e-5) -> np.ndarray:
    """Finite-difference steps (hx, hy), each relative to its own axis's span."""
    x0, x1, y0, y1 = rect
    spans = np.array([abs(x1 - x0), abs(y1 - y0)], dtype=float)
    return relative * np.maximum(spans, 1e-12)


def gradient(f, points, steps) -> np.ndarray:
    """Central differences of f at ``points``: (f(x + h e_k) - f(x - h e_k)) / 2h."""
    points = np.asarray(points, dtype=float).reshape(-1, 2)
    hx, hy = float(steps[0]), float(steps[1])
    offsets = np.array([[hx, 0.0], [-hx, 0.0], [0.0, hy], [0.0, -hy]])
    probe = (points[:, None, :] + offsets[None, :, :]).reshape(-1, 2)
    values = np.asarray(f(probe), dtype=float).reshape(-1, 4)
    return np.column_stack([(values[:, 0] - values[:, 1]) / (2.0 * hx),
                            (values[:, 2] - values[:, 3]) / (2.0 * hy)])


def newton_to_level(f, points, level, steps, max_step, tolerance=1e-9, iterations=40,
                    grad=None, both=None, stop=None):
    """Move each point onto {f = level} by Newton steps along the gradient.

    x <- x + (level - f(x)) g / |g|^2, g = grad f(x): the Newton step for
    f(x + t g) = level, quadratically convergent near the level set.  A step
    longer than ``max_step`` is shortened, and halved while it does not bring
    f closer to the level (a flat or curving f).  Returns (points, converged)
    with converged = |f - level| <= tolerance.  ``grad``: the fit's own gradient
    (``FitResult.decision_gradient``), else central differences with ``steps``
    (four evaluations of f a point where the fit's takes about one: n = 5,000,
    gamma 50, the slack segments of 2,252 points took 8.9 s so).  ``both``: f and
    its gradient from one evaluation (``FitResult.decision_value_and_gradient``):
    a full step's trial then brings the gradient for the next step along.  ``stop()``
    True ends the steps early (the caller no longer wants them).
    """
    x = np.array(points, dtype=float).reshape(-1, 2)
    level = np.broadcast_to(np.asarray(level, dtype=float), (len(x),)).copy()
    if not len(x):
        return x, np.zeros(0, dtype=bool)
    G = np.zeros_like(x)                    # grad f at x, where ``known``
    known = np.zeros(len(x), dtype=bool)
    if both is not None:
        values, G[:] = both(x)
        known[:] = True
    else:
        values = f(x)
    residual = level - np.asarray(values, dtype=float)
    # a point no halving brings closer stays where it is, and so would its next step:
    # it is left out of later iterations (n = 5,000, gamma 50: 668 of 2,252 slack
    # points, whose 40 iterations of 8 halvings were most of the work)
    stuck = np.zeros(len(x), dtype=bool)
    for _ in range(iterations):
        active = np.flatnonzero((np.abs(residual) > tolerance) & ~stuck)
        if not len(active) or (stop is not None and stop()):
            break
        need = active[~known[active]]
        if len(need) and grad is not None:
            G[need] = grad(x[need])
        elif len(need) and both is not None:
            G[need] = both(x[need])[1]
        elif len(need):
            G[need] = gradient(f, x[need], steps)
        g = G[active]
        norm2 = np.maximum(np.einsum("ij,ij->i", g, g), 1e-300)
        step = (residual[active] / norm2)[:, None] * g
        length = np.linalg.norm(step, axis=1)
        with np.errstate(over="ignore"):      # a huge max_step over a tiny step: factor 1
            step *= np.minimum(1.0, max_step / np.maximum(length, 1e-300))[:, None]
        trial = x[active] + step
        if both is not None:
            values, trial_gradient = both(trial)
        else:
            values, trial_gradient = f(trial), None
        trial_residual = level[active] - np.asarray(values, dtype=float)
        better = np.abs(trial_residual) < np.abs(residual[active])
        x[active[better]] = trial[better]
        residual[active[better]] = trial_residual[better]
        known[active] = False
        if trial_gradient is not None:
            G[active[better]] = trial_gradient[better]
            known[active[better]] = True
        if not better.all():
            active, step = active[~better], step[~better]
            stuck[active[~_halved(f, x, level, residual, active, step)]] = True
    return x, np.abs(residual) <= tolerance


HALVINGS = 7    # shorter steps tried after a full Newton step that brings f no closer
BATCH = 512     # trial points up to which the remaining halvings share one evaluation


def _halved(f, x, level, residual, active, step) -> np.ndarray:
    """Move each of ``active`` by the longest of step/2, step/4, ... (HALVINGS of them)
    that brings f closer to its level, as halving one at a time would (the factors are
    powers of two, exact).  The remaining halvings of a few points go in one evaluation
    of f (one at a time, a handful of points cost a call each: n = 1,000, a C step's
    slack segments made 39 calls, now 26); many points halve one at a time, since most
    stop at the first (n = 5,000, gamma 50: seven at once for all took 0.58 s of the
    window's 1.1 s).  True where a halving moved the point."""
    moved = np.zeros(len(active), dtype=bool)
    waiting = np.arange(len(active))
    for k in range(1, HALVINGS + 1):
        factors = 0.5 ** np.arange(k, HALVINGS + 1)
        if len(waiting) * len(factors) > BATCH:
            factors = factors[:1]
        points = active[waiting]
        trials = x[points][None, :, :] + factors[:, None, None] * step[waiting][None, :, :]
        values = np.asarray(f(trials.reshape(-1, 2)), dtype=float).reshape(len(factors),
                                                                          len(points))
        better = np.abs(level[points][None, :] - values) < np.abs(residual[points])[None, :]
        found = better.any(axis=0)
        first = better.argmax(axis=0)[found]
        chosen = points[found]
        x[chosen] = trials[first, np.flatnonzero(found)]
        residual[chosen] = level[chosen] - values[first, np.flatnonzero(found)]
        moved[waiting[found]] = True
        waiting = waiting[~found]
        if len(factors) > 1 or not len(waiting):
            break
    return moved


def slack_targets(f, X, y, rect, tolerance=1e-9, grad=None, both=None, stop=None):
    """Kernel fits: where each point meets its own class's margin edge f = y_i.

    Newton steps along the gradient of f from the point (newton_to_level: ``grad`` or
    ``both``, else finite differences with steps relative to each axis of ``rect``).  Returns
    (targets, converged); a point whose edge cannot be reached has
    converged False and is not drawn.
    """
    x0, x1, y0, y1 = rect
    reach = 0.25 * max(abs(x1 - x0), abs(y1 - y0))
    return newton_to_level(f, X, np.asarray(y, dtype=float), axis_steps(rect), reach,
                           tolerance=tolerance, grad=grad, both=both, stop=stop)


def level_polylines(values, xs, ys, level: float) -> list[np.ndarray]:
    """The level set {f = level} of values[iy, ix] over the grid as polylines.

    Marching squares by contourpy (matplotlib's contouring library): each
    polyline is a (k x 2) array of vertices; closed loops repeat their first
    vertex.
    """
    import contourpy
    generator = contourpy.contour_generator(xs, ys, values,
                                            line_type=contourpy.LineType.Separate)
    return [np.asarray(line, dtype=float) for line in generator.lines(level) if len(line) >= 2]


def projected_polylines(f, lines, level: float, rect, tolerance=1e-9,
                        grad=None, both=None) -> list[np.ndarray]:
    """``lines`` with every vertex moved onto {f = level} by Newton steps.

    The grid's linear interpolation leaves vertices a little off the level
    set; a vertex that does not converge is dropped, splitting its line.
    """
    if not lines:
        return []
    counts = [len(line) for line in lines]
    moved, converged = newton_to_level(f, np.concatenate(lines), level, axis_steps(rect),
                                       0.05 * max(rect[1] - rect[0], rect[3] - rect[2]),
                                       tolerance=tolerance, grad=grad, both=both)
    out = []
    for chunk, ok in zip(np.split(moved, np.cumsum(counts)[:-1]),
                         np.split(converged, np.cumsum(counts)[:-1])):
        pieces = np.split(np.arange(len(chunk)), np.flatnonzero(np.diff(ok.astype(int))) + 1)
        out.extend(chunk[piece] for piece in pieces if ok[piece[0]] and len(piece) >= 2)
    return out


def with_breaks(lines) -> np.ndarray:
    """Polylines as one (k x 2) array with NaN rows between them (connect="finite")."""
    if not lines:
        return np.zeros((0, 2))
    gap = np.full((1, 2), np.nan)
    return np.concatenate([part for line in lines for part in (line, gap)][:-1])


def padded_bounds(X, pad: float = 0.12):
    """(x0, x1, y0, y1) around the points with a margin; a unit box when empty."""
    if len(X) == 0:
        return (-5.0, 5.0, -5.0, 5.0)
    lo, hi = X.min(axis=0), X.max(axis=0)
    span = np.maximum(hi - lo, 1e-9)
    span = np.maximum(span, 0.05 * span.max())
    lo, hi = lo - pad * span, hi + pad * span
    return (float(lo[0]), float(hi[0]), float(lo[1]), float(hi[1]))


def comparable_spans(X, factor: float = 4.0) -> bool:
    """True when the two features span ranges within ``factor`` of each other,
    so equal axis scales keep both readable (and w visibly perpendicular)."""
    if len(X) < 2:
        return True
    spans = X.max(axis=0) - X.min(axis=0)
    small, large = float(min(spans)), float(max(spans))
    return small > 0 and large / small <= factor


KERNEL_GRID = 120   # contour lattice of kernel fits (the canvas shades on the same one)


@dataclass(frozen=True)
class FitGeometry:
    """What a picture of a fit draws, in the data's own units.

    boundary, band_positive, band_negative: polylines (k x 2 arrays) of
    f = 0, +1, -1; slack_points: indices of points with slack whose segment
    runs from slack_from[i] to slack_to[i] on the point's own margin edge;
    weight: (foot on f = 0, tip on f = +1) of the w arrow, or None.
    """
    boundary: list
    band_positive: list
    band_negative: list
    slack_points: np.ndarray
    slack_from: np.ndarray
    slack_to: np.ndarray
    weight: tuple | None


def fit_geometry(result, rect, grid_values=None, project: bool = True,
                 slack: bool = True) -> FitGeometry:
    """The level sets, slack segments and w arrow of ``result`` over ``rect``.

    Linear fits: exact straight lines.  Kernel fits: contours of f on a
    lattice (``grid_values`` = (xs, ys, values) when the caller has it),
    with ``project`` moving every vertex onto its level set by Newton steps.
    ``slack`` False: no slack segments (their Newton steps are most of a kernel
    fit's geometry; a redraw of the field after pan or zoom does not need them).
    """
    if result.w is not None and result.w_is_zero:
        # w = 0: f = b everywhere, no level set to draw, no margin for slack to reach
        return FitGeometry(boundary=[], band_positive=[], band_negative=[],
                           slack_points=np.zeros(0, dtype=int), slack_from=np.zeros((0, 2)),
                           slack_to=np.zeros((0, 2)), weight=None)
    if result.w is not None:
        lines = {}
        for level in (0.0, 1.0, -1.0):
            ends = clip_line(result.w, level - result.b, rect)
            lines[level] = [] if ends is None else [ends]
    else:
        xs, ys, values = grid_values or lattice_of(result, rect)
        lines = {level: level_polylines(values, xs, ys, level) for level in (0.0, 1.0, -1.0)}
        if project:
            lines = {level: projected_polylines(result.decision_function, found, level, rect,
                                                both=_value_and_gradient_of(result))
                     for level, found in lines.items()}
    points, starts, ends = slack_of(result, rect) if slack else _no_slack()
    return FitGeometry(boundary=lines[0.0], band_positive=lines[1.0], band_negative=lines[-1.0],
                       slack_points=points, slack_from=starts, slack_to=ends,
                       weight=weight_arrow(result))


def slack_work(result) -> int:
    """Kernel values one evaluation of f at every point with slack takes (points with
    slack x support vectors; 0 for linear fits, whose segments need no f): the slack
    segments' Newton steps take a few dozen such evaluations."""
    if result.w is not None:
        return 0
    return int(np.count_nonzero(result.slack > 1e-9)) * max(1, len(result.support))


def slack_of(result, rect, stop=None):
    """(indices, from, to): the slack segments of ``result``, each point with slack to
    where it meets its own margin edge (linear fits: along w; kernel fits: Newton
    steps, ``slack_targets``, finite differences relative to ``rect``'s axes where
    the fit has no gradient of its own); points whose edge is not reached are left out.
    None at all when w = 0 (to rounding): there is no margin for slack to reach.
    ``stop()`` True: the Newton steps end early, and the segments are incomplete."""
    if result.w is not None and result.w_is_zero:
        return _no_slack()
    with_slack = np.flatnonzero(result.slack > 1e-9)
    X, y = result.X[with_slack], result.y[with_slack]
    if result.w is not None:
        targets = linear_slack_targets(X, y, result.slack[with_slack], result.w)
        reached = np.ones(len(X), dtype=bool)
    else:
        targets, reached = slack_targets(result.decision_function, X, y, rect,
                                         both=_value_and_gradient_of(result), stop=stop)
    return with_slack[reached], X[reached], targets[reached]


def _no_slack():
    return np.zeros(0, dtype=int), np.zeros((0, 2)), np.zeros((0, 2))


def _value_and_gradient_of(result):
    """The fit's own (f, grad f) where it has a gradient (Gaussian kernel fits), else None."""
    return result.decision_value_and_gradient if result.has_gradient else None


def lattice_of(result, rect, size: int = KERNEL_GRID):
    """(xs, ys, values[iy, ix]) of a fit's f on a size x size lattice over rect, by
    the fit's own ``decision_grid`` (a Gaussian fit factors along the axes)."""
    xs, ys, _ = grid(rect, size)
    return xs, ys, np.asarray(result.decision_grid(xs, ys), dtype=float)


def weight_arrow(result):
    """(foot, tip) of w drawn from f = 0 to f = +1 (length 1/|w|, half the margin
    width), based at the boundary point nearest the points' mean; None without w."""
    if result.w is None or result.w_is_zero:
        return None
    anchor = result.X.mean(axis=0) if len(result.X) else np.zeros(2)
    foot = foot_on_boundary(result.w, result.b, anchor)
    return foot, foot + result.w / np.dot(result.w, result.w)
