"""Files and the session: open a sample, import through the dialog, save and reopen, recovery."""

import json
from pathlib import Path

import numpy as np
import pytest
from PySide6.QtCore import QSettings, QTimer

from app.dialogs.about import about_text
from app.window.launch import first_sample
from solver.files.experiment import load_experiment

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401

SAMPLE = first_sample()
needs_sample = pytest.mark.skipif(SAMPLE is None or not SAMPLE.name.endswith(".json"),
                                  reason="no sample experiment in samples/")


@needs_sample
def test_opening_the_first_sample_shows_its_points_and_settings(window, qtbot):
    assert window.files.open_path(SAMPLE)
    settle(window, qtbot)
    stored = load_experiment(SAMPLE)
    assert np.array_equal(window.document.X, stored.dataset.X)
    assert window.document.config == stored.config
    assert SAMPLE.name in window.windowTitle()
    # expected: the figures the sample file stores (written by the solver at tight tolerance)
    assert np.isclose(window.document.result.b, stored.results["b"], rtol=1e-6, atol=1e-6)


def _write_csv(path, rows):
    path.write_text("diameter,roughness,verdict\n" + "".join(f"{a},{b},{c}\n" for a, b, c in rows))
    return path


def test_importing_a_csv_through_the_dialog_replaces_the_points(window, qtbot, tmp_path):
    data = gauge_points()
    labels = ["ok" if s > 0 else "scrap" for s in data.y]
    path = _write_csv(tmp_path / "batch.csv", [(a, b, c) for (a, b), c in zip(data.X, labels)])

    def choose_and_accept():
        dialog = window.last_import_dialog
        dialog.positive.setCurrentIndex(dialog.positive.findData("ok"))
        assert dialog.ok_button.isEnabled()
        dialog.accept()

    QTimer.singleShot(200, choose_and_accept)
    assert window.files.import_path(path)
    settle(window, qtbot)
    doc = window.document
    assert np.allclose(doc.X, data.X)
    assert np.array_equal(doc.y, data.y)
    assert doc.label_mapping == {"ok": 1, "scrap": -1}
    window.document.undo_stack.undo()
    assert len(doc.X) == 0


def test_the_import_dialog_shows_the_importers_error_in_place(qtbot, tmp_path, temporary_settings):
    from app.dialogs.import_dialog import ImportDialog
    path = _write_csv(tmp_path / "three.csv", [(1, 2, "a"), (2, 3, "b"), (3, 1, "c")])
    dialog = ImportDialog(str(path))
    qtbot.addWidget(dialog)
    assert not dialog.ok_button.isEnabled()
    assert "exactly two distinct values" in dialog.message.text()


def test_saving_and_reopening_gives_back_the_points_and_C(window, qtbot, tmp_path):
    load_points(window, qtbot, gauge_points(overlap=True))
    window.document.set_C(0.25)
    settle(window, qtbot)
    assert window.isWindowModified()
    path = tmp_path / "pilot.experiment.json"
    assert window.files.save_to(path)
    assert not window.isWindowModified()
    window.document.new()
    assert window.files.open_path(path)
    settle(window, qtbot)
    assert window.document.config.C == 0.25
    assert np.array_equal(window.document.X, gauge_points(overlap=True).X)
    assert str(path.resolve()) in window.files.recent()


def test_export_picture_writes_png_and_svg(window, qtbot, tmp_path):
    load_points(window, qtbot, gauge_points())
    assert window.files.export_picture(str(tmp_path / "fit.png"))
    assert window.files.export_picture(str(tmp_path / "fit.svg"))
    assert (tmp_path / "fit.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert "<svg" in (tmp_path / "fit.svg").read_text()


def test_export_points_table_and_classifier_write_files(window, qtbot, tmp_path):
    load_points(window, qtbot, gauge_points())
    assert window.files.export_points(str(tmp_path / "points.csv"))
    assert window.files.export_classifier(str(tmp_path / "classifier.json"))
    assert len((tmp_path / "points.csv").read_text().splitlines()) == 25
    classifier = json.loads((tmp_path / "classifier.json").read_text())
    assert classifier["format"] == "slackline-classifier" and classifier["cautions"]


def test_an_edit_writes_a_recovery_file_that_a_new_window_can_recover(window, qtbot):
    load_points(window, qtbot, gauge_points())
    window.document.add_point(0.0, 2.5, 1)
    window.recovery.write_now()
    assert window.recovery.path.exists()
    assert Path(QSettings().fileName()).parent == window.recovery.path.parent
    from app.window.main_window import MainWindow
    second = MainWindow(quiet=True)
    qtbot.addWidget(second)
    assert second.recover_from(window.recovery.path)
    assert len(second.document.X) == 25 and second.document.is_dirty
    second.document.shutdown()


def test_saving_removes_the_recovery_file(window, qtbot, tmp_path):
    load_points(window, qtbot, gauge_points())
    window.document.add_point(0.0, 2.5, 1)
    window.recovery.write_now()
    assert window.files.save_to(tmp_path / "saved.experiment.json")
    assert not window.recovery.path.exists()


def test_the_view_settings_come_back_in_the_next_window(window, qtbot):
    window.equal_axes_action.setChecked(False)
    window.save_settings()
    from app.window.main_window import MainWindow
    second = MainWindow(quiet=True)
    qtbot.addWidget(second)
    assert not second.equal_axes_action.isChecked()
    second.document.shutdown()


def test_the_about_box_carries_the_cautions():
    text = about_text()
    assert "not a validated model" in text
    assert "held-out data" in text
    assert "local regulations and licensed practice" in text
