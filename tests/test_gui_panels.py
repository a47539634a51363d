"""The panel list is declared once and imported for real: no panel silently goes missing."""

import pytest
from PySide6.QtCore import Qt

import app.window.main_window as main_window
from app.window.panels import PANELS, Panel

from test_gui_fixtures import temporary_settings, window  # noqa: F401


def test_every_declared_panel_is_docked_under_its_title(window):
    assert [spec.title for spec in PANELS] == list(window.docks)
    for spec in PANELS:
        assert window.docks[spec.title].widget() is not None
        assert isinstance(getattr(window, spec.name), spec.widget)


def test_a_panel_that_fails_to_build_stops_the_window_loudly(qtbot, temporary_settings,
                                                             monkeypatch):
    class Broken:
        def __init__(self, document):
            raise RuntimeError("broken panel")
    monkeypatch.setattr(main_window, "PANELS",
                        PANELS + (Panel("broken", "Broken", Broken, Qt.BottomDockWidgetArea),))
    from app.document.document import Document
    document = Document(solve_in_background=False)   # no solver thread left behind
    with pytest.raises(RuntimeError, match="broken panel"):
        main_window.MainWindow(document, quiet=True)


def test_the_window_module_hides_no_import_error():
    from pathlib import Path
    for module in (main_window, __import__("app.window.panels", fromlist=["x"])):
        assert "except ImportError" not in Path(module.__file__).read_text()
