"""Following the exact C path from one anchored solution to the next breakpoint.

Parameterised by C (not lambda = 1/C), the partition E / L / R fixes

    alpha_i = C w_i on L,   alpha_i = 0 on R,   (alpha_E, b) from the edge system,

and the edge system's right-hand side [1 - C Q_EL w_L ; -C y_L'w_L] is affine in C,
so alpha_E and b are affine in C on a segment (equivalently, Hastie et al.'s
lambda * alpha is affine in lambda = 1/C).  Their slopes solve

    [Q_EE y_E; y_E' 0] [d_E; db] = -[Q_EL w_L; y_L'w_L]                     (1)

and every y_i f_i moves with slope s_i.  A segment ends at the first C where a
point of E reaches alpha = 0 or alpha = C w_i, or a point of L or R reaches
y f = 1.

At a breakpoint the next partition is found by a small active-set method on
the right derivative (the directional-derivative QP of the dual, restricted to
the points on the edge): points of E at a bound whose slope would leave the
box move out, points of L or R on the edge whose y f would move the wrong way
move in, one at a time, until every sign condition holds.  In general position
that is one move (Hastie, Rosset, Tibshirani & Zhu, JMLR 5, 2004); ties add
more moves at the same C, and dependent edge points (collinear, duplicates)
are kept at their bound on the edge (see edge_system.py) rather than making
the system singular, which is the remedy of Ong, Shao & Yang (IEEE TNN 21,
2010) in our terms.  When the moves do not settle, the caller re-anchors with
a cvxopt solve.
"""

from __future__ import annotations

import numpy as np

from solver.qp.edge_system import EdgeSystem, PathTrouble  # noqa: F401 (re-exported)

OUT, EDGE, HELD = 0, 1, 2          # R (alpha = 0), E (on the edge), L (alpha = C w)
ON_EDGE = 1e-9                     # |y f - 1| below this: on the edge
TIE = 1e-10                        # relative distance in C within which events are one
_BOUND = 1e-12                     # alpha / (C w) within this of 0 or 1: at the bound
_SIGN = 1e-10                      # slopes within this (relative) count as zero


class Tracer:
    """The path's state at the current C, and the step to the next breakpoint."""

    def __init__(self, gram, weights: np.ndarray):
        self.gram = gram
        self.y = gram.y
        self.weights = weights                       # C_i / C
        self.n = len(weights)

    # -- state ---------------------------------------------------------------
    def load(self, C: float, code: np.ndarray, alpha_edge: dict, b: float) -> None:
        """Start from a partition; E's alphas are recomputed from the edge system.

        ``alpha_edge`` maps E's points to approximate alphas (from a QP); a point
        whose row is dependent is kept at the bound nearer its alpha.
        """
        self.C = float(C)
        self.code = code.astype(np.int8).copy()
        self.b = float(b)
        self.edge = EdgeSystem(self.gram)
        order = sorted(alpha_edge, key=lambda j: -min(alpha_edge[j],
                                                      C * self.weights[j] - alpha_edge[j]))
        for j in order:
            if not self.edge.add(j):
                nearer_top = alpha_edge[j] > 0.5 * C * self.weights[j]
                self.code[j] = HELD if nearer_top else OUT
        self.code[self.edge.indices()] = EDGE
        self.refresh()

    def refresh(self) -> None:
        """Recompute the held sums, E's alphas, b and every margin from the partition."""
        self._slopes = None
        held = self.code == HELD
        self.gram.reset_held(held, self.weights)
        self.held_sum = float(self.y[held] @ self.weights[held])      # y_L' w_L
        self.edge.rebuild()
        E = self.edge.indices()
        alpha_E, b = self.edge.solve(1.0 - self.C * self.gram.held_margin(E),
                                     -self.C * self.held_sum)
        if b is not None:
            self.b = b
        self.alpha_edge = alpha_E
        self.margin = self.gram.margin(self.full_alpha(), self.b)
        self.margin[E] = 1.0

    def repair(self, moves: int = 200) -> bool:
        """Make the partition consistent at this C: exact E alphas inside their box,
        L points not beyond the edge, R points not inside it.  One move at a time,
        the worst first (a primal-dual active-set method); False if it does not end."""
        C, w = self.C, self.weights
        for _ in range(moves):
            self.refresh()
            E = self.edge.indices()
            scale = 1.0 + C * float(np.abs(self.gram.held_margin()).max())
            wrong = np.where(self.code == HELD, self.margin - 1.0, 1.0 - self.margin) / scale
            wrong[E] = 0.0
            k = int(np.argmax(wrong))
            box_worst, box_k = 0.0, -1
            if len(E):
                share = self.alpha_edge / (C * w[E])
                box = np.maximum(-share, share - 1.0)
                box_k = int(np.argmax(box))
                box_worst = float(box[box_k])
            if max(box_worst, wrong[k]) <= 1e-10:
                return True
            if box_worst >= wrong[k]:
                j = int(E[box_k])
                self._move("out", j, OUT if self.alpha_edge[box_k] < 0 else HELD)
                continue
            self._slopes = None
            if not self.edge.add(k):
                self.code[k] = OUT if self.code[k] == HELD else HELD   # dependent: flip sides
            else:
                self.code[k] = EDGE
        return False

    def full_alpha(self, C: float | None = None) -> np.ndarray:
        C = self.C if C is None else C
        alpha = np.where(self.code == HELD, C * self.weights, 0.0)
        alpha[self.edge.indices()] = self.alpha_edge
        return alpha

    def kkt_violation(self) -> float:
        """Largest KKT violation of the current state (0 on the exact path), relative:
        margins against the size of the terms that make them up (1 + C |held|)."""
        code, margin = self.code, self.margin
        scale = 1.0 + self.C * float(np.abs(self.gram.held_margin()).max())
        worst = 0.0
        for mask, side in ((code == HELD, margin - 1.0), (code == OUT, 1.0 - margin)):
            if mask.any():
                worst = max(worst, float(side[mask].max()) / scale)
        E = self.edge.indices()
        if len(E):
            top = self.C * self.weights[E]
            # E's alphas are first-order free in the objective (y f = 1 there) and
            # as ill-conditioned as the edge system: a looser test suffices
            worst = max(worst, 1e-2 * float(np.max(np.maximum(-self.alpha_edge,
                                                              self.alpha_edge - top) / top)))
        return worst

    # -- the slopes of a segment ----------------------------------------------
    def slopes(self) -> tuple[np.ndarray, float]:
        """(d_E, db) from (1); db = 0 when E is empty (b is then free in an interval)."""
        if self._slopes is None and not self.held_sum and not (self.code == HELD).any():
            # nothing held: the edge system's right-hand side is constant in C, the
            # solution stands still (separable data past its hard-margin C)
            self._slopes = (np.zeros(len(self.edge)), 0.0)
        if self._slopes is None:
            E = self.edge.indices()
            slope_E, slope_b = self.edge.solve(-self.gram.held_margin(E), -self.held_sum)
            self._slopes = (slope_E, 0.0 if slope_b is None else slope_b)
        return self._slopes

    def settle(self, candidates: np.ndarray) -> list[tuple[int, int, int]]:
        """Find the partition that continues the path beyond this C.

        ``candidates``: points not in E that are on the edge.  Returns the
        changes [(point, old code, new code)].
        """
        before = {int(j): int(self.code[j]) for j in candidates}
        before.update({int(j): EDGE for j in self.edge.index})
        C, w = self.C, self.weights
        parked: set[int] = set()
        for _ in range(3 * len(before) + 5):
            slope_E, slope_b = self.slopes()
            E = self.edge.indices()
            worst, move = 0.0, None
            if len(E):
                share = self.alpha_edge / (C * w[E])
                low = (share <= _BOUND) & (slope_E < -_SIGN * w[E])
                high = (share >= 1 - _BOUND) & (slope_E > w[E] * (1 + _SIGN))
                amount = np.where(low, -slope_E / w[E], 0.0) + \
                    np.where(high, slope_E / w[E] - 1.0, 0.0)
                k = int(np.argmax(amount))
                if amount[k] > 0:
                    worst, move = amount[k], ("out", int(E[k]), OUT if low[k] else HELD)
            others = np.array([j for j in before if self.code[j] != EDGE and j not in parked],
                              dtype=int)
            if len(others):
                s = self.gram.margin_slope(E, slope_E, slope_b, others) * C
                wrong = np.where(self.code[others] == OUT, -s, s)     # R must rise, L fall
                k = int(np.argmax(wrong))
                if wrong[k] > _SIGN and wrong[k] > worst:
                    move = ("in", int(others[k]), EDGE)
            if move is None:
                break
            if not self._move(*move):
                # a dependent row's slope is a combination of E's zeros: what we
                # measured is rounding, and the point stays at its bound on the edge
                parked.add(move[1])
        else:
            raise PathTrouble(f"the partition did not settle at C = {C:.6g}")
        return [(j, old, int(self.code[j])) for j, old in before.items()
                if int(self.code[j]) != old]

    def _move(self, kind: str, j: int, new: int) -> bool:
        """Move j out of E (to ``new``) or into E; False if E declines it (dependent)."""
        self._slopes = None
        w_j, y_j = self.weights[j], self.y[j]
        if kind == "out":
            position = self.edge.index.index(j)
            self.edge.remove(j)
            self.alpha_edge = np.delete(self.alpha_edge, position)
            self.code[j] = new
            if new == HELD:
                self.gram.change_held(j, w_j)
                self.held_sum += y_j * w_j
            return True
        if not self.edge.add(j):
            return False
        was_held = self.code[j] == HELD
        self.alpha_edge = np.append(self.alpha_edge, self.C * w_j if was_held else 0.0)
        if was_held:
            self.gram.change_held(j, -w_j)
            self.held_sum -= y_j * w_j
        self.code[j] = EDGE
        return True

    # -- one segment ------------------------------------------------------------
    def advance(self, C_stop: float):
        """Move to the next breakpoint (or C_stop).  Returns the segment and the
        points whose event ends it: (segment dict, event points).  Call it under
        np.errstate(divide="ignore", invalid="ignore"): its ratios divide by zero."""
        C, w = self.C, self.weights
        slope_E, slope_b = self.slopes()
        E = self.edge.indices()
        s = self.gram.margin_slope(E, slope_E, slope_b)
        s[E] = 0.0
        gap = 1.0 - self.margin
        reach = gap / s                     # L or R point reaches the edge (0/0 masked below)
        reach[~((gap * s > 0) & (np.abs(gap) > ON_EDGE))] = np.inf
        reach[E] = np.inf
        if len(E):
            # slopes within _SIGN of a bound's are rounding (settle's test too)
            falling = slope_E < -_SIGN * w[E]
            to_zero = np.where(falling, -self.alpha_edge / slope_E, np.inf)
            top_gap = C * w[E] - self.alpha_edge
            rising = slope_E > w[E] * (1 + _SIGN)
            to_top = np.where(rising, top_gap / (slope_E - w[E]), np.inf)
            to_zero = np.maximum(to_zero, 0.0)
            to_top = np.maximum(to_top, 0.0)
            reach[E] = np.minimum(to_zero, to_top)
        step = float(reach.min()) if len(reach) else np.inf
        ends = C + step
        if ends >= C_stop:
            ends, step, events = C_stop, C_stop - C, np.zeros(0, dtype=int)
        else:
            events = np.flatnonzero(reach <= step + TIE * ends)
        segment = dict(start=C, stop=ends, edge=E, alpha_edge=self.alpha_edge.copy(),
                       slope_edge=slope_E, b=self.b, slope_b=slope_b)
        # move along the segment
        self.alpha_edge = self.alpha_edge + step * slope_E
        self.b += step * slope_b
        self.margin += step * s
        self.C = ends
        if len(events):
            position = {j: k for k, j in enumerate(E)}
            for j in events:
                if self.code[j] == EDGE:
                    k = position[int(j)]
                    self.alpha_edge[k] = 0.0 if slope_E[k] < 0 else ends * w[j]
                else:
                    self.margin[j] = 1.0
        if len(E):
            self.alpha_edge = np.clip(self.alpha_edge, 0.0, ends * w[E])
        return segment, events

    def edge_candidates(self) -> np.ndarray:
        """Points of L or R that sit on the edge now."""
        near = np.abs(self.margin - 1.0) <= ON_EDGE
        near &= self.code != EDGE
        return np.flatnonzero(near)

    def exact_edge(self) -> None:
        """Replace E's alphas and b by the edge system's exact solution at this C."""
        E = self.edge.indices()
        if not len(E):
            return
        alpha_E, b = self.edge.solve(1.0 - self.C * self.gram.held_margin(E),
                                     -self.C * self.held_sum)
        self.alpha_edge = np.clip(alpha_E, 0.0, self.C * self.weights[E])
        self.b = b
