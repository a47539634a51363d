"""The numeric limits of a fit: what the solver resolves, checked before it starts.

Settings have fixed ranges, declared in solver.parameters (C from 1e-9 to
1e12, gamma from 1e-9 to 1e9, offset from 0 to 1e9, class weights from 1e-6
to 1e6, degree 1 to 10).  The data add more, because a support vector machine's solution depends on C
and the kernel only through their product with the size of the kernel
values: scaling the coordinates by s multiplies the linear kernel by s^2,
and the fit with C on the scaled points is the fit with C s^2 on the
originals.  So the product

    effective C = C_i * max_i k(u_i, u_i)      u: the coordinates after scaling

must lie in ``EFFECTIVE_C``; outside it the interior-point method either sees
every alpha pinned below its absolute tolerance (too small) or a hard margin
in all but name that it can no longer resolve (too large).  For the linear
kernel k(u, u) = |u|^2, for the polynomial (gamma |u|^2 + offset)^degree
(bounded by ``KERNEL_VALUE``, computed in logarithms so that it cannot
overflow), for the RBF 1.

The coordinates themselves stay within ``COORDINATE`` in absolute value, and
each feature that varies varies by at least ``SPREAD`` (relative to its
size) so that w = w_scaled / scale stays a float.  For the RBF kernel the
scaled points must not lie more than ``OFF_CENTRE`` times their spread from
the origin: its squared distances are |a|^2 + |b|^2 - 2 a.b, which keeps
about 16 - 2 log10(OFF_CENTRE) = 8 significant digits at that ratio.

Where the numbers come from: measured on invented overlapping classes
(60 points, all three kernels) against scikit-learn's SVC at tol=1e-10 and
by primal objective: every C from 1e-9 to 1e12 on unit-sized data solved
with a relative duality gap below 1e-9; at C = 1e-14 the dual objective was
off by 11 % (cvxopt's absolute tolerance 1e-12 dominates).  The coordinate
bound keeps x^2 and the degree-10 monomials of scaled data far from 1e308.
"""

from __future__ import annotations

import math

import numpy as np

from solver.errors import InputError

COORDINATE = 1e100               # largest |x| of a point, in the user's units
SPREAD = 1e-12                   # smallest (max - min) / max|x| of a feature that varies
EFFECTIVE_C = (1e-9, 1e12)       # C_i * max k(u_i, u_i)
KERNEL_VALUE = 1e100             # largest polynomial k(u, u)
OFF_CENTRE = 1e4                 # RBF: largest max|u| / spread of the scaled points


def check_coordinates(X: np.ndarray) -> None:
    """The points' own limits: size and, per feature, a spread a float can resolve."""
    largest = float(np.max(np.abs(X)))
    if largest > COORDINATE:
        raise InputError(f"coordinates reach {largest:.3g}; Slackline fits coordinates up to "
                         f"{COORDINATE:g} in size — express the data in larger units (divide "
                         f"by a power of ten) first")
    for j in range(X.shape[1]):
        size = float(np.max(np.abs(X[:, j])))
        spread = float(np.max(X[:, j]) - np.min(X[:, j]))
        if 0 < spread < SPREAD * size or 0 < spread < 1 / COORDINATE:
            raise InputError(f"feature {j + 1} varies by only {spread:.3g} around {size:.3g}; "
                             f"that is rounding noise to a float — express it in smaller "
                             f"units, or subtract a common value first")


def kernel_scale(Xs: np.ndarray, config) -> float:
    """log10 of max_i k(u_i, u_i) for the scaled points ``Xs`` (no overflow)."""
    norms2 = np.einsum("ij,ij->i", Xs, Xs)
    if config.kernel == "rbf":
        return 0.0
    if config.kernel == "linear":
        largest = float(norms2.max())
        return math.log10(largest) if largest > 0 else -math.inf
    inner = float(config.gamma * norms2.max() + config.offset)
    return config.degree * math.log10(inner) if inner > 0 else -math.inf


def check_problem_scale(Xs: np.ndarray, config, penalties: np.ndarray) -> None:
    """InputError unless C_i * max k(u_i, u_i) lies in EFFECTIVE_C (hard margin: only the
    kernel value is checked)."""
    if config.kernel == "rbf":
        _check_rbf_distances(Xs)
    log_k = kernel_scale(Xs, config)
    if config.kernel == "polynomial" and log_k > math.log10(KERNEL_VALUE):
        raise InputError(f"the polynomial kernel reaches about 1e{log_k:.0f} on these points "
                         f"(largest allowed {KERNEL_VALUE:g}); scale the features "
                         f"(--scale zscore), or lower gamma, offset or the degree")
    if config.hard_margin:
        if log_k == -math.inf:
            raise InputError("every point sits at the origin of the scaled features; "
                             "move or add points")
        return
    finite = penalties[np.isfinite(penalties)]
    low, high = EFFECTIVE_C
    largest = math.log10(float(finite.max())) + log_k
    smallest = math.log10(float(finite.min())) + log_k
    what = "C times the largest kernel value k(x, x) of the points"
    polynomial = config.kernel == "polynomial"
    if largest > math.log10(high):
        raise InputError(f"{what} is about 1e{largest:.0f}, more than the solver resolves "
                         f"({high:g}); scale the features (--scale zscore)"
                         f"{', lower gamma, offset or degree' if polynomial else ''} or choose "
                         f"C at most {_power(math.log10(high) - log_k)}")
    if smallest < math.log10(low):
        raise InputError(f"{what} is about 1e{smallest:.0f}, less than the solver resolves "
                         f"({low:g}); scale the features (--scale zscore)"
                         f"{', raise gamma or offset' if polynomial else ''} or choose C at "
                         f"least {_power(math.log10(low) - log_k, up=True)}")


def _check_rbf_distances(Xs: np.ndarray) -> None:
    """|a - b|^2 is computed as |a|^2 + |b|^2 - 2 a.b (solver.kernels.rbf): far from the
    origin compared with their spread, the points' distances lose every digit."""
    size = float(np.max(np.abs(Xs)))
    spread = float(np.max(Xs.max(axis=0) - Xs.min(axis=0)))
    if size > OFF_CENTRE * spread:
        raise InputError(f"the points lie about {size:.3g} from the origin but spread over "
                         f"only {spread:.3g}, so their RBF distances would be rounding noise; "
                         f"scale the features (--scale zscore or range) or subtract a common "
                         f"value first")


def check_figures(w, b, decision) -> None:
    """The fit's figures in the user's units must be floats too (w ~ 1 / scale)."""
    values = [np.asarray(decision, float), np.atleast_1d(float(b))]
    if w is not None:
        values.append(np.asarray(w, float))
    if not all(np.isfinite(v).all() for v in values):
        raise InputError("the fit's weight vector or decision values overflow a float in the "
                         "data's units; express the data in other units (multiply or divide "
                         "by a power of ten) first")


def _power(log_value: float, up: bool = False) -> str:
    """10 ** log_value rounded to a power of ten inside the allowed side."""
    if not math.isfinite(log_value):
        return "any value"
    return f"1e{(math.ceil(log_value) if up else math.floor(log_value)):d}"
