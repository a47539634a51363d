"""solver.warm_up: one tiny RBF fit leaves the compiled pair and face steps ready for real fits."""

import numpy as np
from numba.core.dispatcher import Dispatcher
from sklearn.svm import SVC

from solver import FitConfig, fit
from solver.kernels import rbf_core
from solver.qp import face_core, smo_core
from solver.warm_up import prepare_kernel_solver

COMPILED = [f for module in (rbf_core, smo_core, face_core) for f in vars(module).values()
            if isinstance(f, Dispatcher)]                          # every compiled function


def _ring(n=200, seed=3):
    """Invented demo data: a ring of one class around a blob of the other, with overlap."""
    rng = np.random.default_rng(seed)
    X = rng.normal(size=(n, 2))
    radius = np.hypot(X[:, 0], X[:, 1]) + rng.normal(0, 0.3, n)
    return X, np.where(radius > 1.1, 1, -1)


def test_after_the_warm_up_rbf_fits_compile_nothing_more_whatever_the_number_type():
    assert smo_core.smo_rbf in COMPILED and face_core.face_steps in COMPILED
    prepare_kernel_solver()
    before = [len(f.signatures) for f in COMPILED]
    X, y = _ring()
    for gamma, C in ((2, 10), (0.7, 1.0), (1, 3)):
        config = FitConfig(kernel="rbf", C=C, gamma=gamma)
        first = fit(X, y, config)
        assert first.solver_status == "optimal"
        step = fit(X, y, config.with_changes(C=1.1 * C), warm_start=first)   # face steps
        assert step.solver_status == "optimal"
    assert [len(f.signatures) for f in COMPILED] == before


def test_the_warm_up_fit_is_the_reference_libraries_fit_of_its_points():
    from solver.warm_up import _CONFIG, _CORE, _RING
    X = np.array(_RING + _CORE, dtype=float)
    y = np.r_[np.ones(4, dtype=int), -np.ones(4, dtype=int)]
    ours = fit(X, y, _CONFIG)
    # the reference: scikit-learn's SVC at tight tolerance on the same problem
    svc = SVC(kernel="rbf", C=_CONFIG.C, gamma=_CONFIG.gamma, tol=1e-10).fit(X, y)
    assert np.allclose(ours.decision_function(X), svc.decision_function(X), atol=1e-6)
    assert prepare_kernel_solver() > 0
