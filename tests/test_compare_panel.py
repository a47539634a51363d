"""The comparison panel: lists what moved after a pin, and exports the report."""

import numpy as np
import pytest

from solver.config import FitConfig
from solver.dataset import Dataset

pytest.importorskip("pytestqt")
from app.compare_panel import ComparePanel  # noqa: E402
from app.document import Document  # noqa: E402


def pilot_batch(n=24, seed=3):
    """Invented demo data: two gauge readings on a pilot batch of parts, pass (+1) / fail (-1)."""
    rng = np.random.default_rng(seed)
    X = np.r_[rng.normal([2.0, 1.0], 0.6, (n // 2, 2)), rng.normal([3.2, 2.0], 0.6, (n // 2, 2))]
    y = np.r_[np.ones(n // 2, int), -np.ones(n // 2, int)]
    return Dataset(X=X, y=y, labels=tuple("pass" if s > 0 else "fail" for s in y),
                   feature_names=("bore_mm", "flatness_um"), label_name="verdict",
                   label_mapping={"pass": 1, "fail": -1}, source="pilot_batch.csv")


@pytest.fixture
def panel(qtbot):
    document = Document(solve_in_background=False)
    document.load(pilot_batch(), FitConfig(C=10.0))
    document.wait_for_solve()
    panel = ComparePanel(document)
    qtbot.addWidget(panel)
    yield panel
    panel.wait()
    document.shutdown()


def pin_and_lower_C(panel):
    panel.document.pin_current()
    panel.document.set_C(0.5)
    panel.document.wait_for_solve()


def test_without_a_pin_the_panel_says_what_to_do(panel):
    assert "Pin the current fit" in panel.summary.text()


def test_after_a_pin_and_a_change_of_C_the_summary_names_it(panel):
    pin_and_lower_C(panel)
    assert panel.summary.text().startswith("Lowering C from 10 to 0.5")


def test_every_status_change_has_a_row_with_both_slacks(panel):
    pin_and_lower_C(panel)
    comparison = panel.comparison
    assert panel.changes.rowCount() == len(comparison.changes) > 0
    first = comparison.changes[0]
    assert panel.changes.item(0, 4).text() == f"{first.slack_before:.3g}"


def test_the_quick_cv_estimate_adds_a_cv_row(panel, qtbot):
    pin_and_lower_C(panel)
    panel.estimate_cv()
    qtbot.waitUntil(lambda: panel.task is None, timeout=60000)
    names = [panel.table.item(r, 0).text() for r in range(panel.table.rowCount())]
    assert "cross-validated error" in names


def test_export_writes_a_one_page_pdf_with_the_summary(panel, tmp_path):
    pypdf = pytest.importorskip("pypdf")
    pin_and_lower_C(panel)
    path = panel.export_report_to(tmp_path / "report.pdf")
    text = " ".join(pypdf.PdfReader(str(path)).pages[0].extract_text().split())
    assert "Lowering C from 10 to 0.5" in text
