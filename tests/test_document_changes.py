"""The document's one change notice and its public edit API.

A load, an import or any edit reaches the views as one notice naming what
changed; every undoable edit goes both ways (undo restores, redo re-applies).
The expected states are written out by hand in each test.
"""

import numpy as np
import pytest

pytest.importorskip("pytestqt")

from app.document.document import (CONFIG, DIRTY, EVERYTHING, METADATA, PATH,  # noqa: E402
                                   PINNED, POINTS, RESULT, SELECTION, Document)
from solver.config import FitConfig  # noqa: E402
from solver.files.dataset import Dataset  # noqa: E402

from test_gui_fixtures import gauge_points  # noqa: E402


@pytest.fixture
def document(qapp):
    doc = Document(solve_in_background=False)
    doc.load(gauge_points())
    yield doc
    doc.shutdown()


def _record(doc):
    notices = []
    doc.changed.connect(notices.append)
    return notices


def _state(doc):
    return (doc.X.copy(), doc.y.copy(), list(doc.labels), doc.config, doc.metadata())


def _same(a, b):
    return (np.array_equal(a[0], b[0]) and np.array_equal(a[1], b[1]) and a[2:] == b[2:])


def test_one_load_emits_one_notice_naming_everything(document):
    notices = _record(document)
    document.load(gauge_points(seed=3), FitConfig(C=2.0), path="x.experiment.json", note="n")
    assert len(notices) == 1
    assert notices[0] >= EVERYTHING


def test_a_load_with_a_background_solver_emits_one_notice_before_the_result(qapp):
    doc = Document(solve_in_background=True)
    try:
        notices = _record(doc)
        doc.load(gauge_points())
        assert len(notices) == 1
        assert doc.wait_for_solve()
        assert len(notices) == 2 and RESULT in notices[1]
    finally:
        doc.shutdown()


def test_an_import_emits_one_notice(document):
    notices = _record(document)
    document.replace_points(gauge_points(seed=5), "import other.csv")
    assert len(notices) == 1
    assert {POINTS, METADATA, SELECTION} <= notices[0]


def test_a_batch_of_edits_emits_one_notice_at_its_end(document):
    notices = _record(document)
    with document.batch():
        document.add_point(0.0, 0.0, 1)
        with document.batch():
            document.set_C(3.0)
        document.set_selection({0})
        assert notices == []
    assert len(notices) == 1 and {POINTS, CONFIG, SELECTION} <= notices[0]


def test_a_selection_change_names_only_the_selection(document):
    notices = _record(document)
    document.set_selection({1, 2})
    assert notices == [frozenset({SELECTION})]


def test_pinning_names_the_pin(document):
    notices = _record(document)
    document.pin_current()
    assert notices == [frozenset({PINNED})]


def test_saving_names_the_path_and_the_clean_state(document):
    document.add_point(0.0, 0.0, 1)
    notices = _record(document)
    document.mark_saved("saved.experiment.json")
    assert len(notices) == 1 and {PATH, DIRTY} <= notices[0]
    assert document.path == "saved.experiment.json" and not document.is_dirty


def _undo_and_redo(doc, edit):
    before = _state(doc)
    edit()
    after = _state(doc)
    assert not _same(before, after)
    doc.undo_stack.undo()
    assert _same(_state(doc), before)
    doc.undo_stack.redo()
    assert _same(_state(doc), after)


def test_adding_a_point_undoes_and_redoes(document):
    _undo_and_redo(document, lambda: document.add_point(0.25, -0.5, -1))
    assert document.X[-1].tolist() == [0.25, -0.5] and document.y[-1] == -1


def test_moving_points_undoes_and_redoes(document):
    _undo_and_redo(document, lambda: document.move_points([0, 3], [[9.0, 9.0], [8.0, 8.0]]))
    assert document.X[3].tolist() == [8.0, 8.0]


def test_deleting_points_undoes_and_redoes(document):
    count = len(document.X)
    _undo_and_redo(document, lambda: document.delete_points([1, 4]))
    assert len(document.X) == count - 2


def test_swapping_classes_undoes_and_redoes(document):
    old = document.y[[0, 1]].copy()
    _undo_and_redo(document, lambda: document.relabel([0, 1], None))
    assert document.y[[0, 1]].tolist() == (-old).tolist()
    assert document.labels[0] == document.label_for(int(document.y[0]))


def test_making_points_one_class_undoes_and_redoes(document):
    negatives = np.flatnonzero(document.y < 0)[:2]
    _undo_and_redo(document, lambda: document.relabel(negatives, 1))
    assert (document.y[negatives] == 1).all()


def test_changing_the_fit_settings_undoes_and_redoes(document):
    _undo_and_redo(document, lambda: document.set_config(FitConfig(kernel="rbf", gamma=2.0)))
    assert document.config.kernel == "rbf"


def test_an_import_undoes_and_redoes_with_its_names_units_note_and_path(document):
    document.load(gauge_points(), path="old.experiment.json", note="old note")
    table = Dataset.from_points(np.array([[1.0, 2.0], [3.0, 1.0], [2.0, 5.0]]), [1, -1, 1],
                                feature_names=("temperature", "time"),
                                label_mapping={"good": 1, "bad": -1}, label_name="batch",
                                units=("degC", "min"))
    _undo_and_redo(document, lambda: document.replace_points(table, "import t.csv"))
    assert document.feature_names == ("temperature", "time")
    assert document.units == ("degC", "min")
    assert document.note is None and document.path is None
    document.undo_stack.undo()
    assert document.note == "old note" and document.path == "old.experiment.json"


def test_an_undo_and_its_redo_each_emit_one_notice(document):
    document.move_points([0], [[5.0, 5.0]])
    notices = _record(document)
    document.undo()
    document.redo()
    assert len(notices) == 2
    assert all({POINTS, DIRTY} <= notice for notice in notices)
