"""Get the compiled parts of the solver ready before anyone waits for them.

The RBF pair and face steps and kernel rows (``qp/smo_core.py``, ``qp/face_core.py``,
``kernels/rbf_core.py``) are compiled by numba on their first call: about 15 s on
our 2-core test machines when its cache is empty, a fifth of a second when the
compiled code is found in a cache (``python -m solver.warm_up``, which the
Makefile's set-up runs, fills it).  ``prepare_kernel_solver`` makes
that first call on a tiny invented problem, so that a program with time to
spare (the window, just after it opens) pays it before the user asks for a
kernel fit.  numba compiles a function once per process under its own lock:
a real fit that starts meanwhile waits for the same compilation instead of
doing it again.
"""

from __future__ import annotations

import time

import numpy as np

from solver import compiled_cache
from solver.config import FitConfig
from solver.fit import fit
from solver.kernels.rbf_core import UNDERFLOW, rbf_block
from solver.qp import pair_rows, row_sums, smo

# eight invented points: a ring of one class around a square of the other, which
# no line separates, so the fit has free and bound support vectors alike
_RING = [(2.0, 0.0), (0.0, 2.0), (-2.0, 0.0), (0.0, -2.0)]
_CORE = [(0.4, 0.4), (-0.4, 0.4), (-0.4, -0.4), (0.4, -0.3)]
_CONFIG = FitConfig(kernel="rbf", C=1.0, gamma=0.5)


def prepare_kernel_solver(background: bool = False) -> float:
    """Fit the tiny RBF problem once; the seconds it took (compiling or loading included).

    ``background``: other threads' small Gaussian fits meanwhile take the working-set
    path (``compiled_cache.wait_would_be_long``), whose kernel rows and row sums are
    built first, instead of waiting for the rest."""
    started = time.perf_counter()
    if not background:
        return _compile_all(started)
    compiled_cache.start_building()
    try:
        _compile_rows()
        return _compile_all(started)
    finally:
        compiled_cache.end_building()


def _compile_rows() -> None:
    """The compiled parts the working-set path uses: kernel rows and row sums."""
    X = np.array(_RING + _CORE, dtype=float)
    rbf_block(X, X, _CONFIG.gamma, UNDERFLOW)
    row_sums.add_rows(np.ones((2, len(X))), np.arange(2, dtype=np.intp), np.ones(2),
                      np.zeros(len(X)), X, np.arange(2, dtype=np.intp), np.inf)


def _compile_all(started: float) -> float:
    X = np.array(_RING + _CORE, dtype=float)
    y = np.r_[np.ones(len(_RING), dtype=int), -np.ones(len(_CORE), dtype=int)]
    fit(X, y, _CONFIG)
    # fits of many points run the pair steps on single rows (``qp/pair_rows.py``), which
    # numba compiles apart: once more on the same points, with such rows
    columns = smo.rbf_columns(X, _CONFIG.gamma)
    columns.pair_rows = pair_rows.PairRows(len(X))
    labels = y.astype(float)
    smo.solve_rbf(X, labels, np.full(len(X), _CONFIG.C), _CONFIG.gamma, 1e-8, columns=columns)
    return time.perf_counter() - started


if __name__ == "__main__":          # `python -m solver.warm_up`: the set-up step of the Makefile
    print(f"kernel solver compiled and cached ({prepare_kernel_solver():.1f} s)")
