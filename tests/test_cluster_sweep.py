"""Fold fits through joblib run unchanged on a Dask cluster."""

import numpy as np
import pytest

from solver.config import FitConfig
from solver.study.sweep import SweepSettings, run_sweep

distributed = pytest.importorskip("distributed")


def pilot_batch(n=24, seed=11):
    """Invented demo data: two gauge readings on a pilot batch of parts, pass (+1) / fail (-1)."""
    rng = np.random.default_rng(seed)
    X = np.r_[rng.normal([2.0, 1.0], 0.6, (n // 2, 2)), rng.normal([3.2, 2.0], 0.6, (n // 2, 2))]
    return X, np.r_[np.ones(n // 2, int), -np.ones(n // 2, int)]


def test_a_sweep_on_a_local_dask_cluster_gives_the_numbers_of_a_local_run():
    from joblib import parallel_config
    X, y = pilot_batch()
    settings = SweepSettings(c_from=0.01, c_to=100, steps=4, folds=3, seed=2)
    local = run_sweep(X, y, FitConfig(), settings, n_jobs=1)
    with distributed.LocalCluster(processes=False, n_workers=2, threads_per_worker=1,
                                  dashboard_address=None) as cluster, \
            distributed.Client(cluster):
        with parallel_config(backend="dask"):
            remote = run_sweep(X, y, FitConfig(), settings)
    # reference: the same sweep run in-process; the fits are deterministic
    np.testing.assert_array_equal(remote.fold_errors, local.fold_errors)
    np.testing.assert_allclose(remote.margin_width, local.margin_width, rtol=1e-12)
    assert remote.suggestion == local.suggestion
