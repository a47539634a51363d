"""The window keeps the same promises as the commands: no save or export replaces a file
the document was read from without asking, and a failed write says so and leaves the
document unsaved (issue 10)."""

import numpy as np
import pytest
from PySide6.QtCore import Qt, QTimer
from PySide6.QtWidgets import QApplication, QMessageBox

from solver.files import load_experiment

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def _import(window, tmp_path):
    data = gauge_points()
    path = tmp_path / "batch.csv"
    path.write_text("bore,roughness,verdict\n" + "".join(
        f"{a},{b},{'ok' if s > 0 else 'scrap'}\n" for (a, b), s in zip(data.X, data.y)))

    def choose_and_accept():
        dialog = window.last_import_dialog
        dialog.positive.setCurrentIndex(dialog.positive.findData("ok"))
        dialog.accept()

    QTimer.singleShot(200, choose_and_accept)
    assert window.files.import_path(path)
    return path


def _answer(button):
    """Click ``button`` of the question box the window is about to show."""
    def click():
        box = QApplication.activeModalWidget()
        if isinstance(box, QMessageBox):
            box.button(button).click()
        else:
            QTimer.singleShot(50, click)
    QTimer.singleShot(100, click)


def test_saving_over_the_imported_data_file_is_refused_when_nobody_can_be_asked(
        window, qtbot, tmp_path):
    path = _import(window, tmp_path)
    settle(window, qtbot)
    before = path.read_bytes()
    assert not window.files.save_to(path)
    assert path.read_bytes() == before and window.isWindowModified()
    assert "not written" in window.statusBar().currentMessage()


@pytest.mark.parametrize("button, replaced", [(QMessageBox.No, False), (QMessageBox.Yes, True)])
def test_saving_over_the_imported_data_file_asks_first(window, qtbot, tmp_path, button,
                                                       replaced):
    path = _import(window, tmp_path)
    settle(window, qtbot)
    before = path.read_bytes()
    window.quiet = False
    _answer(button)
    try:
        saved = window.files.save_to(path)
    finally:
        window.quiet = True      # closing the window at the end must not ask either
    assert saved is replaced
    assert (path.read_bytes() != before) is replaced
    assert window.isWindowModified() is not replaced


def test_exporting_points_over_the_open_experiment_is_refused(window, qtbot, tmp_path):
    load_points(window, qtbot, gauge_points())
    experiment = tmp_path / "e.json"
    assert window.files.save_to(experiment)
    before = experiment.read_bytes()
    assert not window.files.export_points(experiment)
    assert not window.files.export_picture(experiment.with_suffix(".json"))
    assert experiment.read_bytes() == before
    load_experiment(experiment)


def test_ctrl_s_does_not_replace_an_experiment_another_program_changed(window, qtbot,
                                                                        tmp_path):
    load_points(window, qtbot, gauge_points())
    experiment = tmp_path / "e.json"
    assert window.files.save_to(experiment)
    window.document.set_C(0.5)
    settle(window, qtbot)
    experiment.write_text('{"written": "by another program"}')
    qtbot.keyClick(window, Qt.Key_S, Qt.ControlModifier)
    assert experiment.read_text() == '{"written": "by another program"}'
    assert window.isWindowModified()
    assert "changed by another program" in window.statusBar().currentMessage()


def test_a_save_into_a_missing_folder_says_so_and_keeps_the_document_unsaved(window, qtbot,
                                                                            tmp_path):
    load_points(window, qtbot, gauge_points())
    window.document.set_C(0.5)
    settle(window, qtbot)
    assert window.isWindowModified()
    assert not window.files.save_to(tmp_path / "missing" / "e.json")
    assert window.isWindowModified()
    assert "does not exist" in window.statusBar().currentMessage()


@pytest.mark.parametrize("name", ["p.png", "p.svg"])
def test_a_picture_export_into_a_missing_folder_fails_honestly(window, qtbot, tmp_path, name):
    load_points(window, qtbot, gauge_points())
    assert not window.files.export_picture(tmp_path / "missing" / name)
    assert not (tmp_path / "missing").exists()


@pytest.mark.parametrize("name, start", [("p.png", b"\x89PNG"), ("p.svg", b"<?xml")])
def test_a_picture_export_writes_the_picture_and_nothing_else(window, qtbot, tmp_path, name,
                                                              start):
    load_points(window, qtbot, gauge_points())
    assert window.files.export_picture(tmp_path / name)
    assert (tmp_path / name).read_bytes().startswith(start)
    assert sorted(p.name for p in tmp_path.iterdir() if p.name != "settings") == [name]
    assert np.isfinite(window.document.result.b)


@pytest.mark.parametrize("name", ["r.pdf", "r.png"])
def test_a_report_into_a_missing_folder_fails_and_a_good_one_leaves_nothing_else(
        qapp, tmp_path, name):
    from app.canvas.report import export_report
    from solver import SlacklineError, fit
    data = gauge_points()
    result = fit(data.X, data.y)
    with pytest.raises(SlacklineError, match="does not exist"):
        export_report(tmp_path / "missing" / name, data, result)
    export_report(tmp_path / name, data, result)
    assert (tmp_path / name).stat().st_size > 0
    assert sorted(p.name for p in tmp_path.iterdir()) == [name]


def test_the_table_beside_an_opened_experiment_counts_as_its_data_file(window, qtbot, tmp_path):
    import hostile_cli
    from cli.main import main
    table = hostile_cli.write_data(tmp_path, "batch.csv")
    experiment = tmp_path / "batch.experiment.json"
    assert main(["fit", str(table), "--positive", "pass", "--save", str(experiment)]) == 0
    assert window.files.open_path(experiment)
    settle(window, qtbot)
    before = table.read_bytes()
    assert not window.files.export_points(table)
    assert not window.files.save_to(table)
    assert table.read_bytes() == before
    assert window.files.export_points(tmp_path / "points.csv")     # elsewhere: written
