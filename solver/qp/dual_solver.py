"""The kernel dual by decomposition: small cvxopt QPs on a working set.

    minimise   D(a) = 1/2 a'Qa - 1'a,   Q_ij = y_i y_j k(x_i, x_j)
    subject to 0 <= a_i <= C_i,  y'a = 0

A feasible a is kept at all times, with its gradient g = Qa - 1.  Each round
picks a working set W (every free variable, up to MAX_WORK, plus the worst
KKT violators of each side), holds every other variable where it is, and
solves exactly

    minimise   1/2 a_W' Q_WW a_W + (g_W - Q_WW a_W^old)' a_W
    subject to 0 <= a_W <= C_W,   y_W' a_W = y_W' a_W^old,

which can only lower D.  Sub-problem sizes follow the free set: there is no
fixed cap on the free variables below MAX_WORK, and the violators added per
round grow when a round gains little.  Columns of K come from a cache
(``kernel_cache``), so K[:, W] is computed once for variables that stay in W.

Optimality is judged on the whole problem, never on a sub-QP's status: each
round takes the b that minimises the primal for the current alpha
(``dual_certify``) and stops when the relative duality gap of the whole
problem is at most GAP_TARGET.  A fit that runs out of rounds, or stalls,
is still optimal when its gap, on a gradient computed afresh, is at most
GAP_ACCEPT (the 1e-8 every fit promises); otherwise it returns its last
(best: D only decreases) iterate with a status other than "optimal", and
``fit`` raises ConvergenceError with it.
"""

from __future__ import annotations

import logging
from dataclasses import replace

import numpy as np

from threadpoolctl import ThreadpoolController

from solver.qp import dual_certify as certify
from solver.qp import smo
from solver.qp.point_order import along_first_feature
from solver.qp.dual_qp import DualSolution, check_conflicting_duplicates, solve_qp
from solver.qp.active_set import active_set
from solver.qp.dual_polish import polish
from solver.qp.dual_start import alpha_from_margins, feasible, subsample
from solver.qp.kernel_cache import RECENT, KernelColumns
from solver.qp.low_rank import pivoted_cholesky, solve_low_rank

FULL_QP_LIMIT = 250     # up to this many points: the first round takes them all
MAX_WORK = 600         # variables in one sub-QP, as a rule
LARGEST_WORK = 1000    # ... and when the free set is larger
BATCH = 40              # violators of each side added per round, at least
MAX_ROUNDS = 1000
GAP_TARGET = 5e-9       # relative duality gap of the whole problem (issue 13 asks 1e-8)
GAP_ACCEPT = 1e-8       # ... and what a fit that stalls or runs out of rounds may still end at
                        # (n = 10,000 moons, gamma 100, C 1 stalled at 5.8e-9 on rounding)
STALL_ROUNDS = 6        # rounds in a row without progress before giving up
STEADY_ROUNDS = 2       # rounds with the same number free before an exact solve on them all
STEADY_SHARE = 0.05     # ... within this share (n = 5,000, 8 cells: 0.01 40 s, 0.05 35 s),
STEADY_SHARE_LARGE = 0.01   # above 1,500 free (n = 10,000, gamma 50, C 1: 76 rounds, 101 at 5%)
STEADY_SHARE_FREE = 1_500
FACE_TRIES = 4          # ... tried at most this often in one fit,
TRY_AGAIN = 0.1         # ... each time the gap fell to this share of the last try's
PROGRESS = 0.99         # a round that leaves the gap above this share of the best is no progress
SNAP = 1e-6             # when the exact face step fails: alphas this close to a bound are put on it
log = logging.getLogger(__name__)   # rounds at DEBUG level
ACTIVE_SET_STEPS = 60   # active-set steps tried before the interior point
ACTIVE_SET_LIMIT = 300  # free variables up to which they are worth a try
ACTIVE_SET_FAILURES = 2 # after this many misses in one fit (a poor start), cvxopt only
_BLAS = ThreadpoolController()
START = "low_rank"
LOW_RANK = 200
LOW_RANK_TOL = 1e-7
LOW_RANK_RELTOL = 1e-4
POOR_RESIDUAL = 0.9      # largest residual k(x, x) of the factor that still guides well
POOR = object()          # the low-rank guess would be poor
PAIR_STEPS_ALL_STAGES = 2_000   # points up to which pair steps go through every stage
LARGE_STAGES = 2                # ... and above, the stages they go through


def solve_dual(X, y, penalties, kernel_matrix, options, guess_margin=None,
               alpha_start=None, rbf_gamma=None) -> DualSolution:
    """Solve the kernel dual.  ``alpha_start`` (with ``guess_margin`` to order its repair) or
    ``guess_margin`` alone seeds the first round.  ``penalties``: C_i, inf
    everywhere for a hard margin.  ``rbf_gamma`` (the RBF kernel, soft margin):
    compiled pair steps and an exact face finish (``smo``) come first; the
    decomposition below continues from their point only when they did not
    certify the whole problem.

    numpy's BLAS runs one thread meanwhile: its thread pool and cvxopt's own
    BLAS took turns spinning on two cores, which made each small matrix
    product about ten times slower (measured on the 2-core machines we use).
    """
    with _BLAS.limit(limits=1, user_api="blas"):
        if rbf_gamma is not None and np.isfinite(penalties).all():
            return along_first_feature(_rbf, rbf_gamma, np.asarray(X, dtype=float), y,
                                       penalties, guess_margin, alpha_start, kernel_matrix,
                                       options, rbf_gamma)
        return _solve_dual(X, y, penalties, kernel_matrix, options, guess_margin, alpha_start)


def _rbf(X, y, penalties, guess_margin, alpha_start, kernel_matrix, options, gamma):
    """The RBF dual: pair steps and their finish, then rounds if need be, on one row
    cache (the last fit's, when it had these points and this gamma: a C step)."""
    key = ("rbf", float(gamma))
    columns = RECENT.take(X, key) or smo.rbf_columns(X, gamma)
    try:
        fast, found = _pair_steps(X, y, penalties, gamma, guess_margin, alpha_start,
                                  columns=columns)
        if fast is not None:
            return fast
        rest = _solve_dual(X, y, penalties, kernel_matrix, options, guess_margin,
                           found.alpha, columns)
        # the count a ConvergenceError reports includes the steps before the hand-over
        return replace(rest, iterations=rest.iterations + found.steps + found.face_steps)
    finally:
        RECENT.keep(key, columns)


def _pair_steps(X, y, upper, gamma, guess_margin, alpha_start, columns=None):
    """(solution, None) when the pair steps certify the whole problem, else (None, what
    they found: its alpha is the best, for the decomposition to continue from)."""
    y = np.asarray(y, dtype=float)
    start = None
    if alpha_start is not None:
        margin = guess_margin if guess_margin is not None else np.zeros(len(y))
        start = feasible(np.clip(alpha_start, 0.0, upper), y, margin)
    # on many points the tight stages cost more than the decomposition's rounds from
    # where the first two left off (n = 10,000, gamma 10, C 1: 22 s against 6.6 s)
    stages = len(smo.VIOLATIONS) if len(y) <= PAIR_STEPS_ALL_STAGES else LARGE_STAGES
    # ... and after the first, none when its free variables fit one sub-QP: from there
    # the rounds end it sooner (n = 5,000, gamma 10, C 1: 1.5-1.9 s against 2.2-2.4 s)
    hand_over = LARGEST_WORK if len(y) > PAIR_STEPS_ALL_STAGES else -1
    found = smo.solve_rbf(X, y, upper, gamma, GAP_TARGET, start, columns, stages=stages,
                          hand_over_free=hand_over)
    if not found.optimal:
        log.debug("pair steps stopped at gap %.1e: the decomposition goes on", found.gap)
        return None, found
    decision = y - found.F + found.b             # f_i = (K beta)_i + b = y_i - F_i + b
    quadratic = float(found.alpha @ (y * (y - found.F)))   # a'Qa = beta'K beta
    # iterations: pair and face steps; rounds: stages of pair steps; working set: the pair
    return DualSolution(found.alpha, found.b, decision, found.steps + found.face_steps,
                        found.stages, 2,
                        "optimal", found.gap, quadratic=quadratic), None


def _solve_dual(X, y, penalties, kernel_matrix, options, guess_margin, alpha_start,
                columns=None):
    y = np.asarray(y, dtype=float)
    n = len(y)
    hard = bool(np.isinf(penalties).all())
    if hard:
        check_conflicting_duplicates(X, y)
    upper = np.asarray(penalties, dtype=float)
    if columns is None:
        columns = KernelColumns(X, kernel_matrix)
    full_first = False
    if alpha_start is None:
        full_first = n <= FULL_QP_LIMIT
        if not full_first and guess_margin is None and START == "low_rank":
            # a narrow kernel has no good low-rank factor; up to LARGEST_WORK points one
            # QP on all of them beat rounds from a poor guess (measured: 1.5-2x at gamma 50)
            alpha_start = _alpha_from_low_rank(columns, y, upper, options, hard,
                                               give_up_when_poor=n <= LARGEST_WORK)
            full_first = alpha_start is POOR
        if full_first:
            alpha_start = np.zeros(n)
        elif alpha_start is None:
            if guess_margin is None:
                guess_margin = _margins_from_subsample(columns, y, upper, options)
            alpha_start = alpha_from_margins(guess_margin, upper, hard)
    if guess_margin is None:
        guess_margin = np.zeros(n)
    alpha = feasible(np.clip(alpha_start, 0.0, upper), y, guess_margin)
    return _decompose(columns, y, upper, alpha, options, hard, full_first)


def _gradient(columns, y, alpha):
    """g = Q a - 1 with Q a = y * (K[:, S] (a y)_S) over S = {a_i > 0}."""
    nonzero = np.flatnonzero(alpha > 0)
    return y * columns.product(nonzero, alpha[nonzero] * y[nonzero]) - 1.0


def _decompose(columns, y, upper, alpha, options, hard, full_first) -> DualSolution:
    n = len(y)
    gradient = _gradient(columns, y, alpha)
    max_work = min(MAX_WORK, columns.capacity)
    tol = max(1e-7, 10 * options.feastol)
    iterations, batch, stalls, status, work = 0, BATCH, 0, "max_rounds", np.arange(0)
    fresh = True                                  # the gradient was just computed from alpha
    failures = 0                                  # rounds the active-set method did not end
    best_gap = previous_gap = np.inf              # the smallest gap before this round's
    steady, free_before, tries = 0, -1, 0         # rounds the free count held; exact solves
    tried_gap = np.inf                            # the gap at the last one
    for rounds in range(1, MAX_ROUNDS + 1):
        b, gap, violation = _certificate(alpha, gradient, y, upper)
        best_gap = min(best_gap, previous_gap)
        previous_gap = gap
        log.debug("round %d: gap %.2e, violation %.2e, free %d, batch %d", rounds, gap,
                  violation, np.count_nonzero((alpha > 0) & (alpha < upper)), batch)
        if (violation <= tol) if hard else (gap <= GAP_TARGET):
            if fresh:
                status = "optimal"
                break
            # certify on a gradient computed afresh, not on one updated round by round
            gradient = _gradient(columns, y, alpha)
            fresh = True
            b, gap, violation = _certificate(alpha, gradient, y, upper)
            if (violation <= tol) if hard else (gap <= GAP_TARGET):
                status = "optimal"
                break
        free_now = int(np.count_nonzero((alpha > 0) & (alpha < upper)))
        share = STEADY_SHARE if free_now <= STEADY_SHARE_FREE else STEADY_SHARE_LARGE
        steady = steady + 1 if abs(free_now - free_before) <= share * free_now else 0
        free_before = free_now
        if not hard and steady >= STEADY_ROUNDS and tries < FACE_TRIES \
                and gap <= TRY_AGAIN * tried_gap \
                and free_now <= smo.FACE_LIMIT:
            tries, tried_gap = tries + 1, gap
            done = smo.finish_on_face(columns, y, upper, alpha, gradient, GAP_TARGET)
            log.debug("   exact solve on the %d free: %s", free_now, done is not None)
            if done is not None:
                alpha, F, b, gap = done
                gradient, status = -y * F, "optimal"
                break
        fresh = False
        if full_first and rounds == 1:
            work = np.arange(n)
        else:
            # sub-QPs grow with the free set up to LARGEST_WORK (narrow kernels, large C)
            size = min(max(max_work, free_now + 2 * BATCH), LARGEST_WORK, columns.capacity)
            work = _select(-y * gradient, y, alpha, upper, b, batch, size, columns)
        yw, a_old = y[work], alpha[work]
        Q_ww = yw[:, None] * yw[None, :] * columns.block(work)
        linear = gradient[work] - Q_ww @ a_old
        bound = np.where(hard, 0.0, upper[work])
        rest = float(y @ alpha - yw @ a_old)          # y'a outside W: y_W'a_W = -rest
        # an active-set step from the face the round starts on (cheap: one solve on the
        # free set) often ends a warm start; cvxopt's interior point where it does not
        a_new = None
        if failures < ACTIVE_SET_FAILURES:
            a_new = _face_step(Q_ww, linear, yw, upper[work], -rest, a_old)
            failures += a_new is None
        if a_new is None:
            a_ip, nu, its, qp_status, _ = solve_qp(Q_ww, linear, yw, bound, -rest, options,
                                                   hard, start=a_old)
            iterations += its
            a_new, exact = polish(Q_ww, linear, yw, upper[work], -rest, a_ip, nu, SNAP)
            log.debug("   |W| = %d, %d its, %s, exact face step %s", len(work), its, qp_status,
                      exact)
        else:
            iterations += 1                   # a round the active-set steps solved counts one
            log.debug("   |W| = %d, solved by an active-set step", len(work))
        a_new = _restore_equality(a_new, yw, upper[work], rest)
        step = a_new - a_old
        decrease = -(gradient[work] @ step + 0.5 * step @ Q_ww @ step)
        moved = np.flatnonzero(step != 0.0)
        if len(moved):
            gradient += y * columns.product(work[moved], yw[moved] * step[moved])
            alpha[work] = a_new
        # no progress: the round's gain is below the rounding of D itself (a small gain is
        # still progress: many free variables, each a little off, make a large gap), and
        # the gap is no better than before (at C = 1e4 the gain of a round that still
        # takes a fifth off the gap can be below 1e-15 |D|: n = 5,000, gamma 100)
        if decrease <= 1e-15 * max(1.0, abs(float(alpha @ (gradient - 1.0))) / 2) \
                and gap >= PROGRESS * best_gap:
            stalls += 1
            batch = min(2 * batch, max_work // 2)
            if stalls >= STALL_ROUNDS:
                status = "stalled"
                break
        else:
            stalls = 0
    else:
        rounds = MAX_ROUNDS
    if status != "optimal":
        gradient = _gradient(columns, y, alpha)       # judged on a gradient computed afresh
        b, gap, violation = _certificate(alpha, gradient, y, upper)
        done = None
        if not hard and gap > GAP_TARGET and \
                np.count_nonzero((alpha > 0) & (alpha < upper)) <= smo.FACE_LIMIT:
            done = smo.finish_on_face(columns, y, upper, alpha, gradient, GAP_TARGET)
        if done is not None:
            alpha, F, b, gap = done
            gradient, status = -y * F, "optimal"
        elif not hard and gap <= GAP_ACCEPT:
            status = "optimal"     # short of the target by rounding, within what fits promise
    # (Q a)_i = g_i + 1 = y_i sum_j alpha_j y_j k_ij, so f_i = y_i (g_i + 1) + b
    decision = y * (gradient + 1.0) + b
    return DualSolution(alpha, b, decision, iterations, rounds, int(len(work)), status, gap,
                        quadratic=float(alpha @ (gradient + 1.0)))    # a'Qa = a'(g + 1)


def _face_step(Q_ww, linear, y_w, upper_w, rhs, a_old):
    """The sub-QP's optimum by active-set steps from a_old, or None when they
    do not finish within ACTIVE_SET_STEPS (or the free set is too large to be cheap)."""
    free = np.count_nonzero((a_old > 0) & (a_old < upper_w))
    if not free or free > ACTIVE_SET_LIMIT:
        return None
    a_new, optimal = active_set(Q_ww, linear, y_w, upper_w, rhs, a_old, ACTIVE_SET_STEPS)
    return a_new if optimal else None


def _certificate(alpha, gradient, y, upper):
    """(b, relative duality gap, KKT violation) of the whole problem."""
    G = -y * gradient
    b = certify.intercept(G, y, upper, alpha)
    primal, dual = certify.objectives(alpha, gradient, y, upper, b)
    return b, certify.relative_gap(primal, dual), certify.violation(G, y, alpha, upper)


def _select(G, y, alpha, upper, b, batch, max_work, columns):
    """Free variables and the worst violators of each side.

    "up" means a_i y_i can grow (y_i = +1, a_i < C_i, or y_i = -1, a_i > 0);
    at the optimum G_i <= b there, and G_i >= b where a_i y_i can shrink.
    When the free set is larger than a sub-QP holds (narrow kernels), W takes
    the worst violators and then the free variables most coupled to them
    (largest k(x_i, x_j)): a narrow kernel couples only neighbours, so a block
    of neighbours moves together.
    """
    below_upper, above_zero = alpha < upper, alpha > 0
    can_up = np.where(y > 0, below_upper, above_zero)
    can_down = np.where(y > 0, above_zero, below_upper)
    is_free = below_upper & above_zero
    free = np.flatnonzero(is_free)
    up = np.flatnonzero(can_up & ~is_free)
    down = np.flatnonzero(can_down & ~is_free)
    room = max_work - 2 * min(batch, max_work // 4)
    if len(free) <= room:
        # a poor start leaves hundreds of violators: take up to half of them per round
        violators = max(np.count_nonzero(G[up] > b), np.count_nonzero(G[down] < b))
        batch = min(max(batch, len(free) // 2, violators // 2), (max_work - len(free)) // 2)
        # the bound variables nearest to (or deepest in) violation on each side
        top_up = up[np.argsort(-G[up], kind="stable")[:batch]]
        top_down = down[np.argsort(G[down], kind="stable")[:batch]]
        return np.unique(np.concatenate([free, top_up, top_down]))
    # seeds: the worst violators of each side (free ones count on both), so that the
    # sub-QP, which keeps y_W'a_W, can trade between the classes
    half = min(max(batch, max_work // 12), max_work // 6)
    up_all, down_all = np.flatnonzero(can_up), np.flatnonzero(can_down)
    seeds = np.unique(np.concatenate([up_all[np.argsort(-G[up_all], kind="stable")[:half]],
                                      down_all[np.argsort(G[down_all], kind="stable")[:half]]]))
    coupling = columns.rows(seeds).max(axis=0)
    coupling[seeds] = np.inf
    if batch > BATCH:
        # the last rounds stalled on the same neighbourhoods: mix in other free variables
        coupling[free] += np.random.default_rng(batch).random(len(free))
    candidates = np.concatenate([seeds, free])
    ranked = candidates[np.argsort(-coupling[candidates], kind="stable")]
    return np.unique(ranked[:max_work])


def _restore_equality(a_w, y_w, upper_w, rest):
    """Spread the y'a left over by snapping (y_W'a_W + rest should be 0) over the free ones."""
    residual = float(y_w @ a_w) + rest
    free = np.flatnonzero((a_w > 0) & (a_w < upper_w))
    if residual == 0.0 or not len(free):
        return a_w
    a_w = a_w.copy()
    a_w[free] = np.clip(a_w[free] - y_w[free] * residual / len(free), 0.0, upper_w[free])
    return a_w


def _margins_from_subsample(columns, y, upper, options):
    """y f(x) on all points from a fit on a seeded, stratified subsample.

    The subsample is solved the same way, so each level guesses the next.
    C is not rescaled: for RBF, scaling it by n/m made the guess worse.
    """
    sub = subsample(y)
    X = columns.X
    sol = _solve_dual(X[sub], y[sub], upper[sub], columns.kernel_matrix, options, None, None)
    support = sub[sol.alpha > 0]
    decision = columns.product(support, sol.alpha[sol.alpha > 0] * y[support]) + sol.b
    return y * decision


def _alpha_from_low_rank(columns, y, upper, options, hard, give_up_when_poor):
    """Alphas of the whole problem on a pivoted-Cholesky kernel, snapped onto their bounds."""
    # rank 100 up to n = 2,000 (the reference is fast there), 200 above
    rank = min(LOW_RANK if len(y) > 2_000 else LOW_RANK // 2, len(y) // 2)
    V, d, _ = pivoted_cholesky(columns, rank, LOW_RANK_TOL)
    loose = replace(options, reltol=max(options.reltol, LOW_RANK_RELTOL),
                    abstol=max(options.abstol, 1e-7), feastol=max(options.feastol, 1e-7))
    if give_up_when_poor and float(d.max()) > POOR_RESIDUAL:
        return POOR
    found = solve_low_rank(V, d, y, upper, loose, hard)
    log.debug("low rank: r = %d, max residual %.1e, %s its", len(V), d.max(),
              found[2] if found else "-")
    if found is None:
        return None
    alpha = found[0]
    scale = np.where(np.isfinite(upper), upper, max(float(alpha.max()), 1.0))
    # a loose interior point leaves bound alphas about sqrt(reltol) C off their bound
    tau = 10 * np.sqrt(LOW_RANK_RELTOL)
    alpha = np.where(alpha <= tau * scale, 0.0, alpha)
    return np.where(np.isfinite(upper) & (alpha >= (1 - tau) * upper), upper, alpha)
