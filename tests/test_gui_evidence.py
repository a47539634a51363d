"""The window's evidence views: scored rows, held-out points, which points hold the boundary.

Expected values: the solver's own fit applied to the same rows (its decision
function), sklearn.metrics.confusion_matrix on the same predictions, and an
independent reference fit (scikit-learn's SVC at tol=1e-10) without the
chosen support vector.  Data: the invented gauge points of the GUI tests.
"""

import csv
import math

import numpy as np
from PySide6.QtCore import Qt
from sklearn.metrics import confusion_matrix
from sklearn.svm import SVC

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def click(qtbot, window, x, y, modifier=Qt.NoModifier):
    qtbot.mouseClick(window.canvas.viewport(), Qt.LeftButton, modifier,
                     window.canvas.pixel_of(x, y))


def _new_rows(tmp_path, X, labels=None):
    path = tmp_path / "new.csv"
    header = "bore,roughness" + (",inspection" if labels is not None else "")
    lines = [header] + [f"{a!r},{b!r}" + (f",{labels[i]}" if labels is not None else "")
                        for i, (a, b) in enumerate(X.tolist())]
    path.write_text("\n".join(lines) + "\n")
    return path


def test_scored_rows_appear_as_hollow_markers_and_in_an_exportable_table(window, qtbot,
                                                                         tmp_path):
    load_points(window, qtbot, gauge_points())
    rows = np.random.default_rng(2).uniform(-2.5, 2.5, (7, 2))
    assert window.evidence_actions.score_path(_new_rows(tmp_path, rows))
    layer, panel = window.evidence_actions.layer, window.evidence_actions.scored_panel
    x, y = layer.scored.getData()
    np.testing.assert_allclose(np.c_[x, y], rows)
    assert all(spot.brush().style() == Qt.NoBrush for spot in layer.scored.points())
    assert panel.table.rowCount() == 7
    predicted = np.where(window.document.result.decision_function(rows) >= 0, "pass", "reject")
    label_column = [panel.table.horizontalHeaderItem(c).text()
                    for c in range(panel.table.columnCount())].index("label")
    assert [panel.table.item(r, label_column).text() for r in range(7)] == list(predicted)
    out = tmp_path / "scored.csv"
    assert window.evidence_actions.export_scored(out)
    with open(out, newline="") as stream:
        assert [row["label"] for row in csv.DictReader(stream)] == list(predicted)


def test_a_clicked_point_held_out_leaves_the_fit_and_the_summary_counts_it(window, qtbot):
    data = gauge_points(overlap=True)
    load_points(window, qtbot, data)
    click(qtbot, window, *data.X[3])
    click(qtbot, window, *data.X[20], Qt.ControlModifier)
    assert window.document.selection == {3, 20}
    qtbot.keyClick(window, Qt.Key_H, Qt.ControlModifier)
    settle(window, qtbot)
    doc, evidence = window.document, window.evidence_actions.evidence
    assert len(doc.X) == 22 and len(evidence.heldout) == 2
    np.testing.assert_allclose(evidence.heldout.X, data.X[[3, 20]])
    predicted = doc.result.predict(data.X[[3, 20]])
    (tn, fp), (fn, tp) = confusion_matrix(data.y[[3, 20]], predicted, labels=[-1, 1])
    assert window.summary.text("confusion").startswith(f"{tp} / {fp} / {tn} / {fn}")
    assert window.summary.text("heldout").endswith(f"({fp + fn} of 2)")
    x, _ = window.evidence_actions.layer.heldout.getData()
    assert len(x) == 2
    qtbot.keyClick(window, Qt.Key_Z, Qt.ControlModifier)
    settle(window, qtbot)
    assert len(doc.X) == 24 and evidence.heldout is None
    assert window.summary.text("heldout").startswith("\u2014")


def test_the_influence_view_ranks_support_vectors_and_draws_the_boundary_without_one(
        window, qtbot):
    data = gauge_points(overlap=True)
    load_points(window, qtbot, data)
    window.workspace.show_study("Influence")
    evidence, panel = window.evidence_actions.evidence, window.evidence_actions.influence_panel
    qtbot.waitUntil(lambda: evidence.influence is not None, timeout=20000)
    result = window.document.result
    assert panel.table.rowCount() == result.n_support
    item = panel.table.item(0, 0)
    panel.table.scrollToItem(item)
    qtbot.mouseClick(panel.table.viewport(), Qt.LeftButton, Qt.NoModifier,
                     panel.table.visualItemRect(item).center())
    top = evidence.influence.entries[0]
    assert window.document.selection == {top.point}
    assert evidence.ghost is top
    gx, gy = window.evidence_actions.layer.ghost.getData()
    assert gx is not None and len(gx) == 2        # a line: its two ends on the view's edges
    keep = np.arange(len(data.y)) != top.point
    svc = SVC(kernel="linear", C=result.config.C, tol=1e-10).fit(data.X[keep], data.y[keep])
    # the ghost is the reference's boundary w.x + b = 0 (to the reference's accuracy)
    f_on_ghost = svc.decision_function(np.c_[gx, gy])
    assert np.abs(f_on_ghost).max() < 1e-3 * max(1.0, np.abs(svc.decision_function(data.X)).max())
    reading = window.inspector.reading.text()
    assert (f"Leaving this point out rotates the boundary by "
            f"{abs(top.angle_change):.3g} degrees") in reading
    assert math.isfinite(top.angle_change)


def test_held_out_points_are_saved_with_the_experiment_and_come_back_on_open(window, qtbot,
                                                                           tmp_path):
    from solver.files import load_experiment
    data = gauge_points(overlap=True)
    load_points(window, qtbot, data)
    click(qtbot, window, *data.X[5])
    qtbot.keyClick(window, Qt.Key_H, Qt.ControlModifier)
    settle(window, qtbot)
    path = tmp_path / "gauges.experiment.json"
    assert window.files.save_to(path)
    stored = load_experiment(path).heldout
    assert stored["points"][0]["x"] == data.X[5].tolist()
    # expected: the fit's own decision value at the held-out point
    assert stored["decision"][0] == window.document.result.decision_function(data.X[[5]])[0]
    window.files.new()
    assert window.evidence_actions.evidence.heldout is None
    assert window.files.open_path(path)
    settle(window, qtbot)
    np.testing.assert_allclose(window.evidence_actions.evidence.heldout.X, data.X[[5]])
    assert window.summary.text("heldout") != "\u2014 (none held out)"


def test_the_report_and_compare_view_give_the_held_out_check_beside_the_training_error(
        window, qtbot, tmp_path):
    pypdf = __import__("pytest").importorskip("pypdf")
    data = gauge_points(overlap=True)
    load_points(window, qtbot, data)
    for i in (2, 14, 19):
        click(qtbot, window, *data.X[i], Qt.ControlModifier)
    qtbot.keyClick(window, Qt.Key_H, Qt.ControlModifier)
    settle(window, qtbot)
    result = window.document.result
    predicted = result.predict(data.X[[2, 14, 19]])
    (tn, fp), (fn, tp) = confusion_matrix(data.y[[2, 14, 19]], predicted, labels=[-1, 1])
    expected = f"On 3 held-out points the error is {(fp + fn) / 3:.1%}"
    compare = window.compare
    window.document.pin_current()
    assert expected in compare.summary.text()
    path = compare.export_report_to(tmp_path / "report.pdf")
    text = " ".join(" ".join(page.extract_text().split())
                    for page in pypdf.PdfReader(str(path)).pages)
    assert "Held-out check" in text and expected in text
    assert f"training error of {result.training_error:.1%}" in text
