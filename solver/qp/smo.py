"""The RBF dual, fast and exact: compiled pair steps, then the face they found.

Pair steps (``smo_core``) reach a small KKT violation quickly but approach the
optimum only linearly.  The optimum itself is the solution of one linear
system on the right face: with the free set S (0 < a_i < C_i) and the others
held at their bounds, K_SS beta_S + b 1 = y_S - K_S,rest beta_rest and
sum(beta) = 0 (beta = alpha * y).  Since F = y - K beta is kept on every
point, the correction from the current point needs no other kernel block:

    [K_SS  1] [d]   [F_S        ]
    [1'    0] [b] = [-sum(beta) ]         beta_S <- beta_S + d.

The finish is a primal active-set method on these systems (``_face_steps``):
when the corrected alphas leave the box the step stops at the first bound and
drops what reached one; when they stay inside, bound variables on the wrong
side of b are released, worst first.  Pair steps run in stages of tighter
violation (VIOLATIONS), each followed by a finish: when the cache holds the
free set's kernel rows, a long patient one in compiled steps (LONG_STEPS),
which from the first stage often ends the fit (a free set a little larger is first
fitted to the cache, ``face_kept.onto_room``); otherwise a short one in
Python, skipped when more than FAR bound variables are on the wrong side of a
large free set's b (then it rarely ends the fit, and its first step alone is a
Cholesky factor of K_SS).  Every
candidate is judged on the whole problem, on F computed afresh from kernel values, by the
relative duality gap of ``dual_certify`` and by y'a = 0; the result says
``optimal`` only when both pass, and otherwise carries its best alpha for the
decomposition (``dual_solver``) to continue from.
"""
from __future__ import annotations

import logging
from dataclasses import dataclass

import numpy as np

from solver.kernels.rbf_core import rbf_block
from solver.qp import dual_certify as certify
from solver.qp import face_core, face_kept, point_order, smo_core
from solver.qp.copies import gathered
from solver.qp.face_factor import FaceFactor
from solver.qp.face_system import NEAR_BOUND, face_system, step_in_box
from solver.qp.kernel_cache import KernelColumns
from solver.qp.pair_rows import rows_for_pair_steps

log = logging.getLogger(__name__)

CACHE_BYTES = 300 * 2**20        # kernel rows kept (whole K up to 6,270 points): at n = 10,000
                                 # the 3,932 rows hold the free sets narrow kernels leave
                                 # (gamma 50, C 1: 2,829-3,254 after one or two stages) with
                                 # room for the face finish, where 200 MiB (the reference
                                 # library's default, 2,621 rows) sent them to ten
                                 # decomposition rounds first (moons 3.97 -> 2.46 s)
VIOLATIONS = (1e-3, 1e-4, 1e-6, 1e-9)   # pair steps stop at these, one after another
PREFILL = 2_000                  # points up to which all of K is computed up front
FACE_LIMIT = 4_000               # free variables up to which the face system is solved
                                 # (the cache's rows less face_kept.SPARE bound it too:
                                 # 3,868 at n = 10,000).  3,000 left n = 10,000, gamma 100,
                                 # C 1 to the decomposition: blobs 15.4 s, 100 rounds; moons
                                 # 32 s, 194 rounds; 2.5 and 4.7 s so; blobs gamma 50:
                                 # 5.2 -> 4.3 s (3,254 free after the first stage)
STEP_LIMIT = 50_000_000          # pair steps in one fit, all stages together, at most
STEPS_PER_POINT = 15             # ... and at most this many per point: past it (large C,
                                 # a nearly hard margin) the decomposition's rounds and its
                                 # exact solve on the free set do better (C = 1e3, 1e4 on
                                 # 5,000 points, 16 cells: 300 per point 66 s in all, 50: 54 s;
                                 # C = 100 to 1e4, 8 cells at n = 5,000: 50 per point 54 s,
                                 # 15: 38 s, 8: 37 s but C = 1e3 slower; n = 10,000, gamma 2,
                                 # C 100: 13.5 s -> 8.2 s; all measured side by side)
FACE_STEPS = 30                  # active-set steps in Python after each stage of pair steps
WIDE_FACE = 200                  # ... up to this many free; above, FEW_STEPS
FEW_STEPS = 20
LONG_STEPS = 1_600               # ... or, on any free set, when they run compiled, this
                                 # many, patient (n = 5,000 blobs, gamma 10, C 1: 536 steps
                                 # from 935 free on a singular face end the fit, 0.54 s,
                                 # where 400 left it to the decomposition, 0.68 s; n =
                                 # 10,000 density, gamma 50, C 1: 800 left 2,514 free at
                                 # 1,671, then a second stage and 406 steps, 3.1 s; 1,600
                                 # end it from the first stage, 1.75 s)
ON_FACE_STEPS = 800              # finish_on_face's: at large C the decomposition's rounds
                                 # do better after that many (n = 10,000 blobs, gamma 10,
                                 # C 1e4: 22.4 s, 29.9 s with 1,600)
SHORT, SHORT_STEPS = 1e-2, 3     # face steps this short, this many in a row: back to pairs
                                 # (one, above WIDE_FACE free: each costs |S|^3 / 3)
PATIENT_FROM = 2                 # from this stage on (and after a warm start) the finish
PATIENT_STEPS = 30               # is patient, short steps do not end it, for this many
PATIENT_FREE = 1_000             # steps, when at most this many are free (n = 1,000 moons,
                                 # gamma 10, C 1: from 1e-4 six patient steps end the fit,
                                 # where the impatient finish stopped and a third stage ran)
WARM_STEPS = 30                  # face steps straight from a warm start, at most ...
FAR = 64                         # ... ended early when a release finds more than this many
                                 # on the wrong side (gamma moved: pair steps do better)
COMPILED_WARM_STEPS = 200        # ... and when they run compiled, with no such end: at
                                 # n = 1,000, gamma 2, C 100 a gamma step took 50,000 pair
                                 # steps (94 ms) after 30 face steps, and ends in 90-120
                                 # compiled face steps alone (12-18 ms), measured
NEAR_REACH = 16.0                # on single rows, pair steps update F where k >= exp(-16)
                                 # = 1e-7, about single precision's own rounding of k <= 1
                                 # (F is computed afresh after them): gamma 50, C 1, side by
                                 # side twice, n = 5,000 blobs 554-586 -> 504-513 ms, moons
                                 # 710-745 -> 682-687, rings, density within noise; n = 10,000
                                 # moons 4.61-4.67 -> 4.08-4.20 s, blobs within noise.
                                 # exp(-10) .. exp(-24) measured alike
RELEASE = 32                     # bound variables released per face step, worst first
                                 # (compiled: the worst of those apart, face_release.APART).
                                 # 16 while they were taken worst first alone (more
                                 # bounced straight back); apart, 32: n = 10,000,
                                 # gamma 50, C 1, side by side twice, blobs 3.17 -> 2.89 s,
                                 # moons 1.85 -> 1.66 s; n = 5,000 moons 461 -> 417 ms;
                                 # the other cells of the grids within noise


@dataclass(frozen=True)
class FastSolution:
    alpha: np.ndarray
    b: float
    F: np.ndarray          # y - K beta on every point, computed afresh
    gap: float
    steps: int             # pair steps
    stages: int
    optimal: bool
    face_steps: int = 0


def solve_rbf(X, y, upper, gamma, gap_target, alpha_start=None, columns=None,
              stages=len(VIOLATIONS), hand_over_free=-1) -> FastSolution:
    """The soft-margin RBF dual from alpha_start (feasible) or zero.

    ``columns`` (a KernelColumns of this kernel) is shared: the pair steps fill its
    rows, the finish and a decomposition that follows read them.  ``stages``: how many
    of VIOLATIONS to go through before giving up, or fewer: after a stage that leaves at
    most ``hand_over_free`` variables free, the stages end (the decomposition's sub-QPs
    hold them all).
    """
    X = np.ascontiguousarray(X, dtype=float)
    y = np.ascontiguousarray(y, dtype=float)
    upper = np.ascontiguousarray(upper, dtype=float)
    # a float always: numba compiles one version per argument type, and an int gamma
    # (a script's 2) would build a second one for seconds
    gamma = float(gamma)
    n = len(y)
    if columns is None:
        columns = rbf_columns(X, gamma)
    if alpha_start is None and n <= PREFILL and columns.capacity >= n:
        columns.fill(np.arange(n))     # vectorised exp beats rows one by one in the loop
    alpha = np.zeros(n) if alpha_start is None else np.array(alpha_start, dtype=float)
    F = _fresh_F(columns, y, alpha)
    steps, stage = 0, 0
    tally = [0]                     # face steps, counted by _face_steps
    limit = min(STEP_LIMIT, STEPS_PER_POINT * n)
    best = None
    if alpha_start is not None:
        # a warm start (C or gamma moved a little) is often a few face steps from the optimum
        compiled = face_kept.available(
            columns, n, np.count_nonzero((alpha > 0) & (alpha < upper)), FACE_LIMIT)
        if _finish(columns, y, upper, alpha, F, COMPILED_WARM_STEPS if compiled else WARM_STEPS,
                   tally, patient=True, far=None if compiled else FAR):
            F = _fresh_F(columns, y, alpha)
            b, gap = _certificate(alpha, F, y, upper)
            if gap <= gap_target and _balanced(alpha, y):
                return FastSolution(gathered(X, y, alpha, upper), b, F, gap, 0, 0, True,
                                    tally[0])
    for stage, eps in enumerate(VIOLATIONS[:stages], start=1):
        taken, violation, F = _pair_steps(X, y, upper, gamma, alpha, F, eps, limit - steps,
                                          columns)
        steps += taken
        free = int(np.count_nonzero((alpha > 0) & (alpha < upper)))
        patient = (stage >= PATIENT_FROM or alpha_start is not None) and free <= PATIENT_FREE
        paired = alpha.copy()
        F = face_kept.onto_room(columns, y, upper, alpha, F,
                                face_kept.room(columns, n, FACE_LIMIT))
        free = int(np.count_nonzero((alpha > 0) & (alpha < upper)))
        if face_kept.available(columns, n, free, FACE_LIMIT):
            # compiled face steps: a long patient finish, which from the first stage's
            # 1e-3 ends most fits (n = 5,000, gamma 50, C 1: 203 steps from 1,744 free
            # with 104 on the wrong side, 0.8 s, where a second stage and four rounds
            # took 1.3 s; n = 1,000, 40 cells: 584 ms -> 573 ms in all, when it also
            # serves at most 200 free); no Python steps when they hand back
            finished = True
            _finish(columns, y, upper, alpha, F, LONG_STEPS, tally, patient=True, python=False)
        else:
            finished = free <= WIDE_FACE or _wrong_side(alpha, F, y, upper) <= FAR
            if finished:
                _finish(columns, y, upper, alpha, F,
                        PATIENT_STEPS if patient else FACE_STEPS if free <= WIDE_FACE
                        else FEW_STEPS, tally, patient)
        F = _fresh_F(columns, y, alpha)               # certify on F computed afresh
        b, gap = _certificate(alpha, F, y, upper)
        if gap > gap_target and finished:
            # a finish that stopped short can leave a point worse than the pair steps'
            # (n = 5,000, gamma 10, C 1: gap 7e-5 before it, 2e-2 after): keep the better
            F_paired = _fresh_F(columns, y, paired)
            b_paired, gap_paired = _certificate(paired, F_paired, y, upper)
            if gap_paired < gap:
                alpha[:], F, b, gap = paired, F_paired, b_paired, gap_paired
        log.debug("stage %d: eps %.0e, %d pair steps, violation %.1e, gap %.1e",
                  stage, eps, taken, violation, gap)
        optimal = gap <= gap_target and _balanced(alpha, y)
        best = FastSolution(gathered(X, y, alpha, upper) if optimal else alpha.copy(), b,
                            F.copy(), gap, steps, stage, optimal, tally[0])
        if best.optimal or steps >= limit or \
                np.count_nonzero((alpha > 0) & (alpha < upper)) <= hand_over_free:
            break
    return best


def _pair_steps(X, y, upper, gamma, alpha, F, eps, budget, columns):
    """(steps, violation, F): pair steps until the violation over all points is <= eps
    (each time the searched ones meet it, F is computed afresh and all are checked).
    On many points they read rows in single precision (``qp/pair_rows.py``); the F they
    hand back is then computed afresh, in double precision, from alpha."""
    rows = rows_for_pair_steps(columns)
    taken = 0
    while True:
        steps, violation, left_out = smo_core.smo_rbf(
            X, y, upper, gamma, columns.reach, _near(columns, rows, gamma), alpha, F, eps,
            budget - taken,
            rows.store, rows.slot, rows.owner, rows.stamp,
            columns.store, columns.slot, columns.owner, columns.stamp)
        rows.clock = max(rows.clock, int(rows.stamp.max()))
        columns.clock = max(columns.clock, int(columns.stamp.max()))
        taken += int(steps)
        if not left_out:
            if rows is not columns:
                F = _fresh_F(columns, y, alpha)
            return taken, violation, F
        F = _fresh_F(columns, y, alpha)
        violation = certify.violation(F, y, alpha, upper)
        if violation <= eps or taken >= budget:
            return taken, violation, F


def _near(columns, rows, gamma) -> float:
    """How far the pair steps update F: on single rows, whose F is computed afresh after
    them anyway, only where k >= exp(-NEAR_REACH); else as far as the rows reach."""
    if rows is columns or columns.reach == np.inf:
        return columns.reach
    return min(columns.reach, float(np.sqrt(NEAR_REACH / gamma)))


def finish_on_face(columns, y, upper, alpha, gradient, gap_target):
    """(alpha, F, b, gap) certified after patient face steps from alpha (its gradient
    g = Qa - 1), or None.  For the decomposition: when its working sets cannot hold the
    whole free set (narrow kernels at large C), that free set is often already the
    optimum's, and one exact solve on all of it ends the fit.  ``columns`` may be of any
    kernel."""
    alpha = np.array(alpha, dtype=float)
    F = -y * gradient
    free = np.count_nonzero((alpha > 0) & (alpha < upper))
    # compiled, the long finish of a stage (n = 10,000 blobs, gamma 50, C 100: 28 rounds
    # and 9.7 s with 100 steps on at most 1,500 free, 5 rounds and 7.1 s so)
    compiled = face_kept.available(columns, len(y), free, FACE_LIMIT)
    _finish(columns, y, upper, alpha, F, ON_FACE_STEPS if compiled else PATIENT_STEPS, [0],
            patient=True)
    F = _fresh_F(columns, y, alpha)
    b, gap = _certificate(alpha, F, y, upper)
    if gap <= gap_target and _balanced(alpha, y):
        return gathered(columns.X, y, alpha, upper), F, b, gap
    return None


def rbf_columns(X, gamma) -> KernelColumns:
    """A kernel row cache of CACHE_BYTES for the RBF kernel on (a private copy of) X."""
    gamma = float(gamma)
    X = np.array(X, dtype=float, order="C")
    reach = point_order.reach(X, gamma)
    floor = smo_core.floor(reach)
    columns = KernelColumns(X, lambda A, B: rbf_block(np.ascontiguousarray(A), B, gamma, floor),
                            budget=CACHE_BYTES)
    columns.rbf_gamma = gamma             # the compiled face steps compute rows themselves
    columns.reach = reach                 # ... within this reach (point_order)
    return columns


def _fresh_F(columns, y, alpha):
    """F = y - K (alpha * y), from kernel values rather than step-by-step updates."""
    support = np.flatnonzero(alpha > 0)
    if not len(support):
        return y.copy()
    return y - columns.product(support, alpha[support] * y[support])


def _wrong_side(alpha, F, y, upper) -> int:
    """How many bound variables are on the wrong side of b: the face steps release RELEASE
    (32) a step, so with more than FAR of them a finish on a large free set (its first step a
    Cholesky factor of K_SS) rarely ends the fit.  (n = 5,000, every stage finish of
    the bench's grid: those that ended it had at most 26; those above 64 failed, after
    0.06-0.66 s; at n = 1,000 none had more than 8.)"""
    free = (alpha > 0) & (alpha < upper)
    wrong = _wrong_by(alpha, F, y, upper, certify.intercept(F, y, upper, alpha))
    scale = 1e-12 * max(1.0, float(np.abs(F).max()))
    return int(np.count_nonzero(~free & (wrong > scale)))


def _wrong_by(alpha, F, y, upper, b):
    """How far each variable is on the wrong side of b: F_i - b for one that can only go
    up, b - F_i for one that can only go down, 0 for a free one (positive: wrong)."""
    can_up = np.where(y > 0, alpha < upper, alpha > 0)
    can_down = np.where(y > 0, alpha > 0, alpha < upper)
    return np.where(can_up & ~can_down, F - b, np.where(can_down & ~can_up, b - F, 0.0))


def _balanced(alpha, y) -> bool:
    """y'a = 0 up to rounding: D(a) bounds the optimum from below only then."""
    return abs(float(alpha @ y)) <= 1e-12 * max(1.0, float(alpha.sum()))


def _certificate(alpha, F, y, upper):
    b = certify.intercept(F, y, upper, alpha)
    gradient = -y * F                                  # g = Qa - 1 = -y F
    primal, dual = certify.objectives(alpha, gradient, y, upper, b)
    return b, certify.relative_gap(primal, dual)


def _finish(columns, y, upper, alpha, F, limit, tally, patient=False, far=None, python=True):
    """_face_steps, then y'a = 0 made exact again if dropping variables broke it."""
    done = _face_steps(columns, y, upper, alpha, F, limit, tally, patient, far, python)
    if _balanced(alpha, y):
        return done
    face_kept.balance(columns, y, alpha, F)
    return False


def _face_steps(columns, y, upper, alpha, F, limit, tally, patient=False, far=None,
                python=True):
    """Active-set steps on the face the pair steps found (alpha and F in place).

    Each step solves the face system on the working free set S; when the
    corrected alphas leave the box it stops at the first bound and drops the
    variables that reached one; when they stay inside, bound variables on the
    wrong side of b (F_i > b for one that can only go up, F_i < b for one that
    can only go down) are released into S, worst first.  Returns True when no
    variable is left on the wrong side: alpha is the optimum of the whole problem.

    The same steps run compiled (``face_core``) for an RBF kernel whose cache holds the
    rows of the free set (``face_kept.room``); these steps here go on where those hand
    back, unless ``python`` is False.
    """
    room = face_kept.room(columns, len(y), FACE_LIMIT)
    if face_kept.available(columns, len(y), np.count_nonzero((alpha > 0) & (alpha < upper)),
                           FACE_LIMIT):
        status, steps = face_kept.face_steps(
            columns, y, upper, alpha, F, limit, patient, far,
            (RELEASE, WIDE_FACE, NEAR_BOUND, SHORT, SHORT_STEPS), room)
        tally[0] += steps
        if status != face_core.HAND_BACK or not python:
            return status == face_core.DONE
        limit -= steps
    S = (alpha > 0) & (alpha < upper)
    scale = 1e-12 * max(1.0, float(np.abs(F).max()))
    short = 0                 # steps in a row that went less than SHORT of the way
    factor = FaceFactor(columns)      # large free sets: one factor, updated step to step
    for _ in range(limit):
        free = np.flatnonzero(S)
        if len(free) > FACE_LIMIT:
            return False
        if len(free):
            tally[0] += 1
            solved = factor.solve(free, F, float(alpha @ y)) if len(free) > WIDE_FACE else None
            if solved is None:
                solved = face_system(columns, alpha @ y, F, free)
            if solved is None:
                return False
            d, b = solved
            step = y[free] * d                            # change of alpha_S
            t, new, hit = step_in_box(alpha[free], step, upper[free])
            change = (new - alpha[free]) * y[free]        # change of beta_S
            alpha[free] = new
            F -= columns.product(free, change)
            if t < 1.0:
                S[free[hit]] = False
                short = short + 1 if t < SHORT else 0
                # (patient: from a warm start, where short steps onto nearby bounds are usual)
                if not patient and short >= (SHORT_STEPS if len(free) <= WIDE_FACE else 1):
                    return False     # the face is still far: more pair steps first
                continue
        else:
            b = certify.intercept(F, y, upper, alpha)
        wrong = _wrong_by(alpha, F, y, upper, b)
        wrong[S | (wrong <= scale)] = 0.0
        count = int(np.count_nonzero(wrong))
        log.debug("face step: %d free, %d on the wrong side", len(free), count)
        if not count:
            return True
        if far is not None and count > far:
            return False       # this many on the wrong side: the face is far, pairs first
        release = np.argsort(-wrong, kind="stable")[:RELEASE]
        S[release[wrong[release] > 0]] = True
    return False
