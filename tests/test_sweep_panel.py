"""The sweep panel: runs in the background, follows C, sets C, shows staleness."""

import pytest

from solver.config import FitConfig
from demo_data import pilot_batch

pytest.importorskip("pytestqt")
from app.document.document import Document  # noqa: E402
from app.panels.sweep import SweepPanel  # noqa: E402


@pytest.fixture
def panel(qtbot):
    document = Document(solve_in_background=False)
    document.load(pilot_batch(), FitConfig(C=1.0))
    panel = SweepPanel(document)
    qtbot.addWidget(panel)
    panel.steps.setValue(4)
    panel.folds.setValue(3)
    yield panel
    panel.wait()
    document.shutdown()


def run(panel, qtbot):
    with qtbot.waitSignal(panel.store.sweep_changed, timeout=60000):
        panel.start_sweep()
    qtbot.waitUntil(lambda: panel.task is None, timeout=60000)


def test_a_finished_sweep_is_published_with_the_chosen_grid(panel, qtbot):
    run(panel, qtbot)
    assert len(panel.store.sweep.C) == 4 and panel.store.sweep.folds == 3
    assert panel.progress.value() == panel.progress.maximum() == 16  # 4 C x (all + 3 folds)


def test_the_marker_follows_the_documents_C(panel):
    panel.document.set_C(3.0)
    assert panel.chart.marker_C() == pytest.approx(3.0)


def test_a_click_on_the_chart_sets_the_nearest_swept_C(panel, qtbot):
    run(panel, qtbot)
    panel._on_chart_click(0.8)   # what a click at C = 0.8 reports
    # the grid 1e-3 .. 1e4 in 4 steps is 1e-3, 0.215, 46.4, 1e4: 0.215 is nearest in log C
    assert panel.document.config.C == pytest.approx(10 ** (-3 + 7 / 3))


def test_changing_the_points_marks_the_sweep_stale_in_words(panel, qtbot):
    run(panel, qtbot)
    panel.document.add_point(2.5, 1.5, 1)
    assert panel.is_stale()
    assert "points changed since this sweep — run again" in panel.status.text()


def test_changing_only_C_keeps_the_sweep_current(panel, qtbot):
    run(panel, qtbot)
    panel.document.set_C(5.0)
    assert not panel.is_stale()


def test_the_suggestion_is_labelled_and_names_both_one_se_choices(panel, qtbot):
    run(panel, qtbot)
    text = panel.suggestion.text()
    assert "Suggestion" in text and "largest C" in text and "smallest C" in text
    assert "not a validated model" in text


def test_cancel_stops_the_sweep_and_keeps_what_finished(panel, qtbot):
    panel.steps.setValue(40)
    with qtbot.waitSignal(panel.store.sweep_changed, timeout=60000):
        panel.start_sweep()
        panel.cancel_sweep()
    assert panel.store.sweep.cancelled and len(panel.store.sweep.C) < 40


def test_a_bad_range_is_reported_in_the_panel_not_raised(panel):
    panel.c_from.setValue(10.0)
    panel.c_to.setValue(1.0)
    panel.start_sweep()
    assert panel.task is None and "swap" in panel.status.text()
