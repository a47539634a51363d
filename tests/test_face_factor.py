"""Face systems from a kept Cholesky factor equal the bordered system solved afresh.

The system (derivation in solver/qp/face_factor.py): on a free set S,
K_SS d + b 1 = F_S and 1'd = -e, written out here as one (|S|+1)-square
matrix and solved with numpy; the factor is made for another set S0 that
differs from S by dropped and added points.
"""

import numpy as np
import pytest
from sklearn.datasets import make_moons

from solver.qp.face_factor import FaceFactor
from solver.qp.smo import rbf_columns


def _bordered(K, F, excess):
    m = len(F)
    M = np.zeros((m + 1, m + 1))
    M[:m, :m] = K
    M[:m, m] = M[m, :m] = 1.0
    solution = np.linalg.solve(M, np.concatenate([F, [-excess]]))
    return solution[:m], solution[m]


@pytest.mark.parametrize("dropped, added", [(0, 0), (5, 0), (0, 7), (6, 9)])
def test_an_updated_factor_solves_the_face_system_of_the_new_set(dropped, added):
    X, _ = make_moons(n_samples=400, noise=0.25, random_state=0)   # scikit-learn's generator
    gamma = 60.0                                 # narrow: K_SS well conditioned
    columns = rbf_columns(X, gamma)
    rng = np.random.default_rng(1)
    F = rng.normal(size=len(X))
    base = np.sort(rng.choice(400, 150, replace=False))
    factor = FaceFactor(columns)
    factor.solve(base, F, 0.3)                   # the factor is made for base
    rest = np.setdiff1d(np.arange(400), base)
    free = np.union1d(np.setdiff1d(base, rng.choice(base, dropped, replace=False)),
                      rng.choice(rest, added, replace=False))
    d, b = factor.solve(free, F, 0.3)
    K = np.exp(-gamma * ((X[free][:, None, :] - X[free][None, :, :]) ** 2).sum(axis=2))
    d_ref, b_ref = _bordered(K, F[free], 0.3)
    scale = np.abs(d_ref).max()
    np.testing.assert_allclose(d, d_ref, atol=1e-9 * scale)
    assert b == pytest.approx(b_ref, abs=1e-9 * scale)
    assert factor.base is not None and len(factor.base) == 150      # no fresh factor
