"""A new kernel is one module and one registry line: proved with a throw-away
Laplacian kernel k(x, z) = exp(-gamma |x - z|_1) registered only for this test."""

import numpy as np
import pytest
from sklearn.metrics.pairwise import laplacian_kernel
from sklearn.svm import SVC

from cli.main import build_parser
from solver import FitConfig, InputError, fit, kernels
from solver.files.schema_check import experiment_schema
from solver.kernels.base import Kernel


def _laplacian_gram(A, B, settings):
    return np.exp(-settings.gamma * np.abs(A[:, None, :] - B[None, :, :]).sum(-1))


LAPLACIAN = Kernel(name="laplacian", title="Laplacian", parameters=("gamma",),
                   help="k(x, z) = exp(-gamma |x - z|_1)", gram=_laplacian_gram,
                   formula="laplacian: f(x) = b + sum_j c_j exp(-gamma |u - s_j|_1)",
                   export_terms=lambda model: {"gamma": model["gamma"]})


@pytest.fixture
def laplacian():
    kernels.register(LAPLACIAN)
    yield LAPLACIAN
    kernels.unregister("laplacian")


def _points():
    rng = np.random.default_rng(4)
    X = np.vstack([rng.normal(-1, 1, (30, 2)), rng.normal(1, 1, (30, 2))])
    return X, np.repeat([-1, 1], 30)


def test_an_unregistered_kernel_is_refused_with_the_known_ones():
    with pytest.raises(InputError, match="linear, polynomial, rbf; got 'laplacian'"):
        FitConfig(kernel="laplacian")


def test_a_registered_kernel_is_accepted_by_the_config_and_validates_its_parameters(laplacian):
    assert FitConfig(kernel="laplacian", gamma=2.0).kernel_spec is laplacian
    with pytest.raises(InputError, match="gamma must be a positive number"):
        FitConfig(kernel="laplacian", gamma=0.0)


def test_a_registered_kernel_fits_like_the_reference_library(laplacian):
    X, y = _points()
    result = fit(X, y, FitConfig(C=1.0, kernel="laplacian", gamma=0.7))
    # reference: scikit-learn SVC on the precomputed Laplacian Gram matrix
    # (sklearn.metrics.pairwise.laplacian_kernel), tol 1e-10
    K = laplacian_kernel(X, X, gamma=0.7)
    svc = SVC(kernel="precomputed", C=1.0, tol=1e-10).fit(K, y)
    alpha = np.zeros(len(y))
    alpha[svc.support_] = np.abs(svc.dual_coef_[0])
    reference_dual = alpha.sum() - 0.5 * (alpha * y) @ K @ (alpha * y)
    assert result.dual_objective == pytest.approx(reference_dual, rel=1e-6)
    assert np.allclose(result.decision_function(X), svc.decision_function(K), atol=1e-4)


def test_the_command_line_and_the_schema_list_a_registered_kernel(laplacian):
    args = build_parser().parse_args(["fit", "data.csv", "--kernel", "laplacian"])
    assert args.kernel == "laplacian"
    schema = experiment_schema()
    assert "laplacian" in schema["properties"]["config"]["properties"]["kernel"]["enum"]


def test_the_window_lists_a_registered_kernel(laplacian, qtbot):
    from app.document.document import Document
    from app.panels.controls import Controls

    document = Document()
    try:
        controls = Controls(document)
        qtbot.addWidget(controls)
        titles = [controls.kernel.itemText(i) for i in range(controls.kernel.count())]
        assert titles == ["linear", "polynomial", "Gaussian (RBF)", "Laplacian"]
    finally:
        document.shutdown()
