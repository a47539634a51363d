"""The exact regularisation path over a range of C, and its frozen result CPath.

    path = compute_path(X, y, FitConfig(kernel="rbf"), c_from=1e-3, c_to=1e4)
    path.evaluate(0.42)        # a FitResult at C = 0.42, no QP
    path.breakpoints, path.events

cvxopt anchors the path: ``solver.fit`` at the first C gives the partition,
from which E's alphas and b are recomputed exactly.  From there the path is
followed breakpoint by breakpoint (path_trace.py).  Every ``CHECK_EVERY``
breakpoints the state is rebuilt from its partition alone and its KKT
conditions are checked on every point; if they fail, or a breakpoint cannot
be continued exactly, the path is re-anchored with a fresh cvxopt solve at
that C, and the result lists where (``reanchors``).  Drift therefore never
accumulates beyond ``CHECK_EVERY`` steps of rounding.
"""

from __future__ import annotations

import bisect
import math
import time
from dataclasses import dataclass, field

import numpy as np
from threadpoolctl import ThreadpoolController

from solver import scaling
from solver.config import FitConfig
from solver.errors import ConvergenceError, InputError
from solver.messages import clip, one_line
from solver.qp.path_gram import KERNEL_LIMIT, FeatureGram, KernelGram
from solver.qp.path_trace import EDGE, HELD, OUT, PathTrouble, Tracer
from solver.qp.path_result import result_from_alpha

DEFAULT_FROM, DEFAULT_TO = 1e-3, 1e4     # the C slider's range
CHECK_EVERY = 16                         # breakpoints between KKT checks on all points
KKT_LIMIT = 1e-7                         # a larger violation re-anchors
_CHECKPOINT = 64                         # segments between stored partitions
_CODE_STATUS = {OUT: "outside", EDGE: "on_margin"}
_threads = []                            # one ThreadpoolController, made on first use


def one_blas_thread():
    """A context with BLAS on one thread: the path's products are small and many, and
    contending threads made a 1,000 x 1,000 product 12x slower on a loaded two-core
    machine.  The controller is made once (finding the libraries costs ms; a limit
    then costs microseconds)."""
    if not _threads:
        _threads.append(ThreadpoolController())
    return _threads[0].limit(limits=1, user_api="blas")


@dataclass(frozen=True)
class PathEvent:
    """At C, point ``point`` (row index, from 0) changes from one status to another."""

    C: float
    point: int
    before: str
    after: str

    def to_dict(self) -> dict:
        return {"C": self.C, "point": self.point, "from": self.before, "to": self.after}


@dataclass(frozen=True)
class Reanchor:
    C: float
    reason: str


@dataclass(frozen=True, eq=False)
class CPath:
    """The exact solution for every C in [c_from, c_to]; evaluate it anywhere."""

    config: FitConfig
    X: np.ndarray
    y: np.ndarray
    Xs: np.ndarray
    shift: np.ndarray
    scale: np.ndarray
    weights: np.ndarray            # C_i / C: the class weight of each point
    c_from: float
    c_to: float
    starts: np.ndarray             # C where each segment begins (first = c_from)
    events: tuple                  # PathEvent, ascending in C
    reanchors: tuple               # Reanchor: where a cvxopt solve restarted the path
    hard_margin_from: float | None  # separable data: the hard-margin solution from here on
    seconds: float
    gram: object = field(repr=False)
    _segments: tuple = field(repr=False)      # (edge, alpha_edge, slope_edge, b, slope_b)
    _changes: tuple = field(repr=False)       # per segment: (points, new codes)
    _checkpoints: tuple = field(repr=False)   # partition codes every _CHECKPOINT segments

    @property
    def breakpoints(self) -> np.ndarray:
        """The C values inside the range where the partition changes, ascending."""
        return self.starts[1:]

    def segment(self, C: float) -> int:
        C = self._check_c(C)
        return max(0, bisect.bisect_right(self.starts, C) - 1)

    def codes(self, k: int) -> np.ndarray:
        """Partition of segment k: 0 outside (alpha 0), 1 on the edge, 2 held (alpha C_i)."""
        base = k // _CHECKPOINT
        codes = self._checkpoints[base].copy()
        for j in range(base * _CHECKPOINT + 1, k + 1):
            points, new = self._changes[j]
            codes[points] = new
        return codes

    def alpha_b(self, C: float) -> tuple[np.ndarray, float]:
        """alpha (n) and b (in the scaled space the fit runs in) at C."""
        k = self.segment(C)
        edge, alpha_edge, slope_edge, b, slope_b = self._segments[k]
        step = C - self.starts[k]
        codes = self.codes(k)
        alpha = np.where(codes == HELD, C * self.weights, 0.0)
        if not len(edge):
            return alpha, b + step * slope_b
        exact = self._edge_solution(edge, alpha, C)
        if exact is None:          # the segment's straight line, should E's system fail
            alpha_E, b = alpha_edge + step * slope_edge, b + step * slope_b
        else:
            alpha_E, b = exact
        alpha[edge] = np.clip(alpha_E, 0.0, C * self.weights[edge])
        return alpha, b

    def _edge_solution(self, edge, held_alpha, C):
        """E's alphas and b solved afresh at C from the partition (the same line as the
        segment's, without the rounding its slopes carry over a long segment)."""
        y = self.gram.y
        m = len(edge)
        M = np.zeros((m + 1, m + 1))
        M[:m, :m] = self.gram.q_block(edge, edge)
        M[:m, m] = M[m, :m] = y[edge]
        rhs = np.append(1.0 - self.gram.margin_part(held_alpha, edge), -float(y @ held_alpha))
        try:
            x = np.linalg.solve(M, rhs)
            x += np.linalg.solve(M, rhs - M @ x)
        except np.linalg.LinAlgError:
            return None
        return x[:-1], float(x[-1])

    def evaluate(self, C: float):
        """The FitResult at C, from the path (no QP); solver_status is 'path'."""
        started = time.perf_counter()
        with one_blas_thread():
            alpha, b = self.alpha_b(C)
            return result_from_alpha(self, C, alpha, b, started)

    def events_near(self, C: float, count: int = 5) -> list:
        """The ``count`` events nearest to C in log C."""
        if not self.events or count <= 0:
            return []
        # events ascend in C, so the nearest lie within ``count`` places of C on either
        # side: a search and a handful of logarithms instead of thousands (the window
        # asks for them on every step of the C slider)
        at = bisect.bisect_left(self.events, C, key=lambda event: event.C)
        low = max(0, at - count)
        while low > 0 and self.events[low - 1].C == self.events[low].C:
            low -= 1          # of events at one C, the first come first (as in one sort)
        near = range(low, min(len(self.events), at + count))
        distance = {i: abs(math.log(self.events[i].C / C)) for i in near}
        order = sorted(near, key=distance.__getitem__)[:count]
        return [self.events[i] for i in sorted(order)]

    def _check_c(self, C) -> float:
        if isinstance(C, bool) or not isinstance(C, (int, float, np.floating)) \
                or not math.isfinite(C) or C <= 0:
            raise InputError(f"C must be a positive number; got {C!r}")
        if not self.c_from * (1 - 1e-12) <= C <= self.c_to * (1 + 1e-12):
            raise InputError(f"C = {C:g} is outside the path's range {self.c_from:g} .. "
                             f"{self.c_to:g}; compute the path over a wider range")
        return float(C)


def compute_path(X, y, config: FitConfig | None = None, c_from: float = DEFAULT_FROM,
                 c_to: float = DEFAULT_TO, *, progress=None, cancel=None) -> CPath:
    """The exact C path of ``config`` (its C and hard_margin are ignored) over
    [c_from, c_to].  progress(C) is called now and then; cancel() -> True stops
    and raises InputError."""
    from solver.fit import validate_points
    config = (config or FitConfig()).with_changes(hard_margin=False)
    X, y = validate_points(X, y)
    for name, value in (("from", c_from), ("to", c_to)):
        if isinstance(value, bool) or not isinstance(value, (int, float)) \
                or not math.isfinite(value) or value <= 0:
            raise InputError(f"the path's C range needs positive numbers; got {name} = {value!r}")
    if c_from >= c_to:
        raise InputError(f"the C range must run upwards: from ({c_from:g}) must be smaller "
                         f"than to ({c_to:g}); swap them")
    if not config.uses_feature_map and len(y) > KERNEL_LIMIT:
        raise InputError(f"the exact C path with the {config.kernel} kernel holds the full "
                         f"kernel matrix "
                         f"and is limited to {KERNEL_LIMIT} points; got {len(y)} — use the "
                         f"sweep, or a subsample")
    started = time.perf_counter()
    shift, scale = scaling.scaling_parameters(X, config.scaling)
    Xs = scaling.apply(X, shift, scale)
    kernel = config.kernel_spec
    if config.uses_feature_map:
        gram = FeatureGram(kernel.features(Xs, config), y)
    else:
        gram = KernelGram(kernel.gram(Xs, Xs, config), y)
    weights = np.where(y > 0, config.weight_positive, config.weight_negative).astype(float)
    walk = _Walk(X, y, config, Tracer(gram, weights))
    with one_blas_thread(), np.errstate(divide="ignore", invalid="ignore"):
        try:
            walk.run(float(c_from), float(c_to), progress, cancel)
        except PathTrouble as trouble:
            where = getattr(walk.tracer, "C", c_from)
            pieces = [piece.strip() for piece in str(trouble).split(";")
                      if piece.strip() not in ("start", "moved on a little", "None")]
            first = pieces[0] if pieces else str(trouble)
            raise ConvergenceError(one_line(
                f"the exact C path could not be continued at C = {where:.6g} "
                f"({clip(first.strip(), 120)}); try scaling the features (zscore) or a "
                f"narrower C range")) from None
    return CPath(config=config, X=X, y=y, Xs=Xs, shift=shift, scale=scale, weights=weights,
                 c_from=float(walk.starts[0]), c_to=float(c_to), starts=np.array(walk.starts),
                 events=tuple(walk.events), reanchors=tuple(walk.reanchors),
                 hard_margin_from=walk.hard_margin_from(),
                 seconds=time.perf_counter() - started, gram=gram,
                 _segments=tuple(walk.segments), _changes=tuple(walk.changes),
                 _checkpoints=tuple(walk.checkpoints))


class _Walk:
    """Runs the tracer across the range and records segments and events."""

    def __init__(self, X, y, config, tracer: Tracer):
        self.X, self.y, self.config, self.tracer = X, y, config, tracer
        self.starts, self.segments, self.changes, self.checkpoints = [], [], [], []
        self.events, self.reanchors, self.held_counts = [], [], []
        self._last_codes = None

    def run(self, c_from, c_to, progress, cancel) -> None:
        tracer = self.tracer
        start = c_from
        while True:
            try:
                self._anchor(start, None)
                break
            except PathTrouble as trouble:
                # e.g. unbalanced classes at tiny C: w = 0 and every point of the larger
                # class on the edge; start a decade later and say so (below the start,
                # the window and the CLI solve instead)
                if start * 10 >= c_to:
                    raise
                self.reanchors.append(Reanchor(start, f"no exact start at C = {start:g} "
                                               f"({trouble}); the path starts at "
                                               f"C = {start * 10:g}"))
                start *= 10
        steps = 0
        while True:
            codes = tracer.code.copy()
            segment, event_points = tracer.advance(c_to)
            self._record(segment, codes)
            if tracer.C >= c_to:
                break
            steps += 1
            before = {int(j): self._status(codes, j) for j in event_points}
            try:
                candidates = set(event_points.tolist()) | set(tracer.edge_candidates().tolist())
                changes = tracer.settle([j for j in candidates if tracer.code[j] != EDGE])
                tracer.exact_edge()
                if steps % CHECK_EVERY == 0:
                    tracer.refresh()
                    violation = tracer.kkt_violation()
                    if violation > KKT_LIMIT:
                        reason = f"KKT violation {violation:.1e} after {steps} steps"
                        if not tracer.repair():
                            raise PathTrouble(reason)
                        self.reanchors.append(Reanchor(tracer.C, reason + "; partition repaired"))
                        changes = tracer.settle(tracer.edge_candidates())
                        tracer.exact_edge()
            except PathTrouble as trouble:
                self._anchor(tracer.C, str(trouble))
                continue
            for j, old, new in changes:
                old_name = before.get(j) or self._status_of_code(old, j)
                self.events.append(PathEvent(tracer.C, j, old_name, self._status_of_code(new, j)))
            if progress is not None and steps % 200 == 0:
                progress(tracer.C)
            if cancel is not None and cancel():
                raise InputError("the C path was cancelled")

    def _anchor(self, C, reason) -> None:
        """A cvxopt solve at C gives the partition; E's alphas follow exactly."""
        for attempt in range(3):
            try:
                return self._anchor_once(C * (1 + 1e-6) ** attempt, reason)
            except PathTrouble as trouble:
                reason = f"{reason or 'start'}; {trouble}; moved on a little"
        raise PathTrouble(reason)

    def _anchor_once(self, C, reason) -> None:
        from solver.fit import fit
        try:
            result = fit(self.X, self.y, self.config.with_changes(C=C))
        except ConvergenceError as stopped:
            # its last iterate is close; repair() below makes the partition exact
            if stopped.best is None:
                raise PathTrouble(f"the QP at C = {C:.6g} gave no solution") from None
            result = stopped.best
        tracer = self.tracer
        top = C * tracer.weights
        share = result.alpha / top
        code = np.where(share >= 1 - 1e-6, HELD, np.where(share <= 1e-6, OUT, EDGE))
        edge = {int(j): float(result.alpha[j]) for j in np.flatnonzero(code == EDGE)}
        old = None if self._last_codes is None else tracer.code.copy()
        tracer.load(C, code, edge, result.model.b)
        if not tracer.repair():
            raise PathTrouble(f"the QP's partition at C = {C:.6g} could not be made exact")
        tracer.settle(tracer.edge_candidates())
        tracer.exact_edge()
        if reason is not None:
            self.reanchors.append(Reanchor(C, reason))
        if reason is not None and old is not None:
            changed = np.flatnonzero(old != tracer.code)
            for j in changed:
                self.events.append(PathEvent(C, int(j), self._status_of_code(old[j], j),
                                             self._status_of_code(tracer.code[j], j)))

    def _record(self, segment, codes) -> None:
        k = len(self.segments)
        if k % _CHECKPOINT == 0:
            self.checkpoints.append(codes.copy())
        if self._last_codes is None:
            changed = np.zeros(0, dtype=int)
        else:
            changed = np.flatnonzero(codes != self._last_codes)
        self.changes.append((changed, codes[changed].copy()))
        self._last_codes = codes
        self.starts.append(segment["start"])
        self.segments.append((segment["edge"], segment["alpha_edge"], segment["slope_edge"],
                              segment["b"], segment["slope_b"]))
        self.held_counts.append(int(np.count_nonzero(codes == HELD)))

    def _status(self, codes, j) -> str:
        return self._status_of_code(codes[j], j)

    def _status_of_code(self, code, j) -> str:
        if code == HELD:
            return "misclassified" if self.tracer.margin[j] < 0 else "inside"
        return _CODE_STATUS[int(code)]

    def hard_margin_from(self) -> float | None:
        """Where the trailing run of segments with nothing held begins (separable data)."""
        if not self.held_counts or self.held_counts[-1] != 0:
            return None
        k = len(self.held_counts) - 1
        while k > 0 and self.held_counts[k - 1] == 0:
            k -= 1
        return float(self.starts[k])
