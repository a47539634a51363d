"""Issue 11's wrong results on screen, each driven as a user would (offscreen).

Each test failed before its fix.  The expected values are what the files say
(the bundled samples: our own invented demo data) or plain facts of the
window (an empty document has no fit).
"""

from pathlib import Path

import numpy as np
import pytest
from PySide6.QtCore import QSettings, Qt, QTimer
from PySide6.QtGui import QAction

from app.canvas import geometry
from solver.config import FitConfig
from solver.files.bundled import samples
from solver.files.experiment import load_experiment, save_experiment

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401

PILOT = Path(str(samples() / "1-pilot-batch-gauges.experiment.json"))
PROOFING_TABLE = Path(str(samples() / "2-proofing-trials.csv"))
PROOFING = Path(str(samples() / "2-proofing-trials.experiment.json"))


def _import(window, path, positive):
    def choose_and_accept():
        dialog = window.last_import_dialog
        dialog.positive.setCurrentIndex(dialog.positive.findData(positive))
        dialog.accept()
    QTimer.singleShot(200, choose_and_accept)
    assert window.files.import_path(path)


def test_importing_a_table_after_an_experiment_drops_the_old_units_note_and_path(window, qtbot):
    assert window.files.open_path(PILOT)
    settle(window, qtbot)
    assert window.document.units == ("um", "um") and window.document.note
    _import(window, PROOFING_TABLE, "rose")
    settle(window, qtbot)
    doc = window.document
    assert doc.units == ("degC", "min")           # the table's own header says so
    bottom = window.canvas.plot.getAxis("bottom").labelText
    assert "[um]" not in bottom and "degC" in bottom
    assert doc.note is None and doc.path is None
    assert window.windowTitle().startswith("untitled")
    assert window.files._stem() == "2-proofing-trials"


def test_saving_after_an_import_does_not_overwrite_the_old_experiment(window, qtbot, tmp_path):
    copy = tmp_path / "pilot.experiment.json"
    copy.write_bytes(PILOT.read_bytes())
    assert window.files.open_path(copy)
    _import(window, PROOFING_TABLE, "rose")
    settle(window, qtbot)
    asked = []
    window.files._ask_save = lambda *args: asked.append(args) or None
    assert not window.files.save()
    assert asked and copy.read_bytes() == PILOT.read_bytes()


def _write_recovery(window, tmp_path):
    stored = load_experiment(PROOFING)
    path = tmp_path / "recovery.experiment.json"
    save_experiment(path, stored.dataset, None, config=stored.config)
    return path, stored.dataset.X


def test_a_recovered_document_gets_the_automatic_axis_choice(window, qtbot, tmp_path):
    path, X = _write_recovery(window, tmp_path)
    assert not geometry.comparable_spans(X)       # 11 degC against 104 min
    assert window.recover_from(path)
    settle(window, qtbot)
    assert not window.equal_axes_action.isChecked()
    x0, x1, y0, y1 = window.canvas.view_rect()
    bx0, bx1, by0, by1 = geometry.padded_bounds(X)
    assert (y0, y1) == pytest.approx((by0, by1), rel=1e-3)
    assert (x0, x1) == pytest.approx((bx0, bx1), rel=1e-3)


def test_ctrl_0_fits_the_view_of_a_recovered_document(window, qtbot, tmp_path):
    path, X = _write_recovery(window, tmp_path)
    assert window.recover_from(path)
    settle(window, qtbot)
    window.canvas.getPlotItem().getViewBox().scaleBy((4.0, 4.0))
    window.activateWindow()
    window.canvas.setFocus()
    qtbot.keyClick(window.canvas, Qt.Key_0, Qt.ControlModifier)
    x0, x1, y0, y1 = window.canvas.view_rect()
    bx0, bx1, by0, by1 = geometry.padded_bounds(X)
    assert (x0, x1, y0, y1) == pytest.approx((bx0, bx1, by0, by1), rel=1e-3)


def test_file_new_and_three_clicks_leave_no_old_figures_in_the_status_bar(window, qtbot):
    assert window.files.open_path(PILOT)
    settle(window, qtbot)
    assert window.fit_state.text().startswith("44 points")
    window.findChild(QAction, "new").trigger()
    settle(window, qtbot)
    for x, y in ((0.0, 0.0), (1.0, 1.0), (-1.0, 2.0)):
        qtbot.mouseClick(window.canvas.viewport(), Qt.LeftButton, Qt.NoModifier,
                         window.canvas.pixel_of(x, y))
        settle(window, qtbot)
    assert len(window.document.X) == 3
    assert "44" not in window.fit_state.text()
    assert window.fit_state.text().startswith("3 points")


def _type(qtbot, field, text):
    field.selectAll()
    qtbot.keyClicks(field, text)
    qtbot.keyClick(field, Qt.Key_Return)


@pytest.mark.parametrize("typed", ["-5", "abc"])
def test_a_C_that_cannot_be_used_is_refused_in_place_with_the_reason(window, qtbot, typed):
    load_points(window, qtbot, gauge_points(), FitConfig(C=1.0))
    controls = window.controls
    _type(qtbot, controls.C_field, typed)
    assert window.document.config.C == 1.0
    assert controls.C_field.text() == typed            # not reverted, not sign-flipped
    assert controls.hint.isVisible()
    assert typed in controls.hint.text() and "C must be a positive number" in controls.hint.text()
    _type(qtbot, controls.C_field, "2")
    assert window.document.config.C == 2.0 and not controls.hint.isVisible()


def test_gamma_zero_is_refused_in_place_with_the_reason(window, qtbot):
    load_points(window, qtbot, gauge_points(), FitConfig(kernel="rbf", gamma=0.5))
    controls = window.controls
    _type(qtbot, controls.gamma.lineEdit(), "0")
    assert window.document.config.gamma == 0.5
    assert controls.hint.isVisible() and "gamma must be a positive number" in controls.hint.text()


def test_an_edit_clears_the_old_sweep_suggestion(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    from app.panels.sweep import SweepPanel
    panel = window.findChild(SweepPanel)
    panel.steps.setValue(3)
    panel.folds.setValue(2)
    with qtbot.waitSignal(panel.store.sweep_changed, timeout=60000):
        panel.start_sweep()
    qtbot.waitUntil(lambda: panel.task is None, timeout=60000)
    assert "Suggestion" in panel.suggestion.text()
    window.document.add_point(0.0, 0.0, 1)
    assert panel.suggestion.text() == ""
    window.document.undo_stack.undo()
    assert "Suggestion" in panel.suggestion.text()


def test_the_hard_margin_refusal_is_shown_whole_in_the_summary(window, qtbot):
    from solver.files.dataset import Dataset
    crossed = Dataset.from_points(np.array([[0, 0], [1, 1], [0, 1], [1, 0], [0.5, 0.2]]),
                                  [1, 1, -1, -1, 1])
    load_points(window, qtbot, crossed, FitConfig(hard_margin=True))
    qtbot.wait(50)
    state = window.summary.values["state"]
    assert "not linearly separable" in state.text()
    # every wrapped line has room: the label is as tall as its text needs at its width
    assert state.height() >= state.heightForWidth(state.width())
    assert state.geometry().bottom() <= window.summary.height()


def test_the_undo_action_undoes_through_the_document_with_one_notice(window, qtbot):
    load_points(window, qtbot, gauge_points())
    window.document.add_point(0.0, 2.5, 1)
    settle(window, qtbot)
    notices = []
    window.document.changed.connect(notices.append)
    window.undo_action.trigger()
    assert len(window.document.X) == 24
    assert len(notices) == 1
    window.redo_action.trigger()
    assert len(window.document.X) == 25
