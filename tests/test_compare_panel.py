"""The comparison panel: lists what moved after a pin, and exports the report."""

import pytest

from solver.config import FitConfig
from demo_data import pilot_batch

pytest.importorskip("pytestqt")
from app.panels.compare import ComparePanel  # noqa: E402
from app.document.document import Document  # noqa: E402


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
