"""The stakeholder report: one page, with pictures, summary, table, sweep and cautions."""

import unicodedata

import numpy as np
import pytest

from solver.config import FitConfig
from solver.files.dataset import Dataset
from solver.errors import InputError
from solver.fit import fit
from solver.study.sweep import SweepSettings, run_sweep

pypdf = pytest.importorskip("pypdf")
pytest.importorskip("app.canvas.figure")
from app.canvas.report import export_report  # noqa: E402
from solver import CAUTIONS  # noqa: E402

CHECKSUM = "0123456789abcdef" * 4


@pytest.fixture(scope="module")
def fits():
    """Invented demo data: two gauge readings on a pilot batch of parts, pass (+1) / fail (-1)."""
    rng = np.random.default_rng(3)
    X = np.r_[rng.normal([2.0, 1.0], 0.6, (12, 2)), rng.normal([3.2, 2.0], 0.6, (12, 2))]
    y = np.r_[np.ones(12, int), -np.ones(12, int)]
    dataset = Dataset(X=X, y=y, labels=tuple(y.tolist()), feature_names=("bore_mm", "flatness_um"),
                      label_name="verdict", label_mapping={1: 1, -1: -1},
                      source="pilot_batch.csv", sha256=CHECKSUM)
    sweep = run_sweep(X, y, FitConfig(), SweepSettings(steps=3, folds=3))
    return dataset, fit(X, y, FitConfig(C=10.0)), fit(X, y, FitConfig(C=0.5)), sweep


def pdf_text(path):
    """Page count and the first page's words (NFKC folds the fi / fl ligatures back)."""
    reader = pypdf.PdfReader(str(path))
    text = unicodedata.normalize("NFKC", reader.pages[0].extract_text())
    return len(reader.pages), " ".join(text.split())


@pytest.fixture(scope="module")
def full_report(fits, tmp_path_factory, qapp):
    dataset, pinned, current, sweep = fits
    path = tmp_path_factory.mktemp("report") / "report.pdf"
    export_report(path, dataset, current, pinned, sweep)
    return pdf_text(path)


def test_the_report_is_exactly_one_page(full_report):
    assert full_report[0] == 1


def test_the_report_carries_the_cautions_word_for_word(full_report):
    assert " ".join(" ".join(CAUTIONS).split()) in full_report[1]


def test_the_report_names_the_data_set_and_its_checksum(full_report):
    assert "pilot_batch.csv" in full_report[1] and CHECKSUM in full_report[1]


def test_the_report_holds_the_summary_table_sweep_and_configuration(full_report):
    text = full_report[1]
    assert "Lowering C from 10 to 0.5" in text and "margin width" in text
    assert "C sweep." in text and "Suggestion, not a validation" in text
    assert "linear kernel, C = 0.5, scaling none." in text


def test_without_a_pin_or_sweep_the_report_describes_the_single_fit(fits, tmp_path, qapp):
    dataset, _, current, _ = fits
    pages, text = pdf_text(export_report(tmp_path / "single.pdf", dataset, current))
    assert pages == 1 and "What changed" not in text and "C sweep" not in text
    assert f"Margin width {current.margin_width:.4g}" in text


def test_a_png_report_is_an_a4_page_picture(fits, tmp_path, qapp):
    from PySide6.QtGui import QImage
    dataset, pinned, current, sweep = fits
    image = QImage(str(export_report(tmp_path / "report.png", dataset, current, pinned, sweep)))
    assert (image.width(), image.height()) == (1240, 1754)  # A4 at 150 dpi (ISO 216)


def test_another_file_type_is_refused_naming_the_file(fits, tmp_path):
    dataset, _, current, _ = fits
    with pytest.raises(InputError, match="report.docx"):
        export_report(tmp_path / "report.docx", dataset, current)
