"""The report says when the points were edited since import, and prints the note."""

import numpy as np
import pytest

from solver.config import FitConfig
from solver.files.dataset import Dataset
from solver.fit import fit

pypdf = pytest.importorskip("pypdf")
from app.canvas.report import export_report  # noqa: E402

from test_report import CHECKSUM, pdf_text  # noqa: E402


@pytest.fixture(scope="module")
def imported():
    """Invented demo data: two gauge readings, pass (+1) / fail (-1), 'imported' from a file."""
    rng = np.random.default_rng(5)
    X = np.r_[rng.normal([2.0, 1.0], 0.5, (10, 2)), rng.normal([3.5, 2.5], 0.5, (10, 2))]
    y = np.r_[np.ones(10, int), -np.ones(10, int)]
    return Dataset(X=X, y=y, labels=tuple(y.tolist()), feature_names=("bore", "flatness"),
                   label_name="verdict", label_mapping={1: 1, -1: -1},
                   source="pilot_batch.csv", sha256=CHECKSUM)


def test_a_report_of_edited_points_says_edited_since_import_from_the_file(imported, tmp_path,
                                                                          qapp):
    result = fit(imported.X, imported.y, FitConfig())
    path = export_report(tmp_path / "r.pdf", imported, result, edited=True)
    text = pdf_text(path)[1]
    assert "edited since import from pilot_batch.csv" in text
    assert "describes the points as imported, not these" in text


def test_a_report_of_unedited_points_quotes_the_file_checksum_plainly(imported, tmp_path, qapp):
    result = fit(imported.X, imported.y, FitConfig())
    text = pdf_text(export_report(tmp_path / "r.pdf", imported, result))[1]
    assert "edited" not in text and f"file SHA-256 {CHECKSUM}" in text


def test_the_report_prints_the_experiment_note(imported, tmp_path, qapp):
    result = fit(imported.X, imported.y, FitConfig())
    path = export_report(tmp_path / "r.pdf", imported, result, note="Second shift, new gauge")
    assert "Note. Second shift, new gauge" in pdf_text(path)[1]
