"""The experiment note, and the units the summary gives its lengths in."""

import re

import numpy as np
from PySide6.QtCore import Qt

from solver.config import FitConfig
from solver.files.dataset import Dataset
from solver.files.experiment import load_experiment

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def _in_millimetres(data):
    return Dataset.from_points(data.X * [1.0, 40.0], data.y, feature_names=("bore", "depth"),
                               units=("mm", "mm"), label_mapping={"pass": 1, "reject": -1})


def test_a_note_typed_in_the_window_is_saved_in_the_experiment_file(window, qtbot, tmp_path):
    load_points(window, qtbot, gauge_points())
    window.workspace.show_study("Note")
    editor = window.note_editor.text
    qtbot.mouseClick(editor.viewport(), Qt.LeftButton)
    qtbot.keyClicks(editor, "Second shift, new gauge")
    assert window.isWindowModified() or window.document.is_dirty
    assert window.files.save_to(tmp_path / "noted.experiment.json")
    assert load_experiment(tmp_path / "noted.experiment.json").note == "Second shift, new gauge"


def test_one_stretch_of_typing_in_the_note_is_one_undo_step(window, qtbot):
    load_points(window, qtbot, gauge_points())
    window.workspace.show_study("Note")
    editor = window.note_editor.text
    qtbot.mouseClick(editor.viewport(), Qt.LeftButton)
    qtbot.keyClicks(editor, "abc")
    window.document.undo_stack.undo()
    assert window.document.note is None and editor.toPlainText() == ""


def test_the_margin_width_is_in_the_datas_units_also_under_zscore_scaling(window, qtbot):
    from sklearn.preprocessing import StandardScaler
    from sklearn.svm import SVC
    data = _in_millimetres(gauge_points(overlap=True))
    load_points(window, qtbot, data, FitConfig(C=1.0, scaling="zscore"))
    text = window.summary.text("margin")
    assert text.endswith(" mm")
    # reference: scikit-learn's SVC (tol=1e-10) on the z-scored points; w in the data's
    # units is w_scaled / scale (f(x) = w_s . (x - mean) / scale + b), margin 2/|w|
    scaler = StandardScaler().fit(data.X)
    svc = SVC(kernel="linear", C=1.0, tol=1e-10).fit(scaler.transform(data.X), data.y)
    w = svc.coef_[0] / scaler.scale_
    assert np.isclose(float(text.split()[0]), 2 / np.linalg.norm(w), rtol=1e-4)
    assert "converted back from the z-scored features" in window.summary.text("units")


def test_a_kernel_fit_says_its_lengths_are_in_feature_space(window, qtbot):
    load_points(window, qtbot, _in_millimetres(gauge_points()), FitConfig(kernel="rbf"))
    assert window.summary.text("margin").endswith("(feature space)")
    assert "feature space" in window.summary.text("units")
    assert "mm" not in window.summary.text("margin")
