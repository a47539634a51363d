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


def _built_elsewhere(monkeypatch, during):
    """Run ``during()`` while another thread holds the building of the compiled steps
    (as the window's warm-up does); what ``during`` returned."""
    import threading
    from solver import compiled_cache
    started, finish, out = threading.Event(), threading.Event(), []

    def builder():
        compiled_cache.start_building()
        started.set()
        finish.wait(30)
        compiled_cache.end_building()

    thread = threading.Thread(target=builder)
    thread.start()
    try:
        assert started.wait(10)
        out.append(during())
    finally:
        finish.set()
        thread.join(30)
    return out[0]


def _count_pair_steps(monkeypatch):
    from solver.qp import smo
    calls, real = [], smo.solve_rbf
    monkeypatch.setattr(smo, "solve_rbf", lambda *a, **k: (calls.append(1), real(*a, **k))[1])
    return calls


def test_while_the_steps_are_built_elsewhere_small_fits_take_the_working_set_path(monkeypatch):
    # the reference: scikit-learn's SVC at tol=1e-10 on the same invented ring
    calls = _count_pair_steps(monkeypatch)
    X, y = _ring(n=150)
    config = FitConfig(kernel="rbf", C=3.0, gamma=2.0)
    result = _built_elsewhere(monkeypatch, lambda: fit(X, y, config))
    assert calls == [] and result.solver_status == "optimal" and result.relative_gap <= 1e-8
    svc = SVC(kernel="rbf", C=3.0, gamma=2.0, tol=1e-10).fit(X, y)
    np.testing.assert_allclose(result.decision_function(X), svc.decision_function(X),
                               rtol=0, atol=1e-6)


def test_large_fits_and_the_building_thread_itself_use_the_compiled_steps(monkeypatch):
    from solver import compiled_cache
    calls = _count_pair_steps(monkeypatch)
    X, y = _ring(n=compiled_cache.GENERIC_LIMIT + 1)
    _built_elsewhere(monkeypatch, lambda: fit(X, y, FitConfig(kernel="rbf", gamma=2.0)))
    assert calls == [1]
    compiled_cache.start_building()          # this thread builds: it must not go round
    try:
        fit(X[:50], y[:50], FitConfig(kernel="rbf", gamma=2.0))
    finally:
        compiled_cache.end_building()
    assert len(calls) == 2
    fit(X[:50], y[:50], FitConfig(kernel="rbf", gamma=2.0))     # nobody builds
    assert len(calls) == 3


def test_the_background_warm_up_builds_and_then_lets_go(monkeypatch):
    from solver import compiled_cache
    seen = []
    real = compiled_cache.start_building
    monkeypatch.setattr(compiled_cache, "start_building",
                        lambda: (real(), seen.append(compiled_cache._builder))[0])
    assert prepare_kernel_solver(background=True) > 0
    assert len(seen) == 1 and seen[0] is not None and compiled_cache._builder is None
