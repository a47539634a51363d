"""The window knows when the points were edited since import, and the report says so."""

import dataclasses

import pytest

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401

pypdf = pytest.importorskip("pypdf")
from test_report import pdf_text  # noqa: E402

CHECKSUM = "ab" * 32


def _imported():
    return dataclasses.replace(gauge_points(), source="batch-7.csv", sha256=CHECKSUM)


def test_points_just_opened_are_not_edited_and_a_move_makes_them_edited(window, qtbot):
    from app.document.provenance import provenance
    load_points(window, qtbot, _imported())
    tracker = provenance(window.document)
    assert not tracker.edited_since_import()
    window.document.move_points([0], [[0.0, 0.0]])
    assert tracker.edited_since_import()
    window.document.undo_stack.undo()
    assert not tracker.edited_since_import()


def test_the_report_of_a_moved_point_says_edited_since_import(window, qtbot, tmp_path):
    load_points(window, qtbot, _imported())
    window.document.move_points([0], [[0.0, 0.0]])
    settle(window, qtbot)
    panel = window.compare
    text = pdf_text(panel.export_report_to(tmp_path / "report.pdf"))[1]
    assert "edited since import from batch-7.csv" in text
