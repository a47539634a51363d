"""The panel list is declared once and imported for real: no panel silently goes missing."""

import pytest

import app.window.main_window as main_window
from app.window.panels import PANELS, Panel

from test_gui_fixtures import temporary_settings, window  # noqa: F401


def test_every_declared_panel_is_in_its_place_under_its_title(window):
    tabs = window.workspace.studies
    tab_titles = [tabs.tabText(i) for i in range(tabs.count())]
    for spec in PANELS:
        panel = getattr(window, spec.name)
        assert isinstance(panel, spec.widget) and window.panels[spec.name] is panel
        if spec.place == "study":
            assert tab_titles.count(spec.title) == 1
        else:
            assert spec.title in window.docks
    assert [s.title for s in PANELS if s.place == "study"] == tab_titles


def test_a_panel_that_fails_to_build_stops_the_window_loudly(qtbot, temporary_settings,
                                                             monkeypatch):
    class Broken:
        def __init__(self, document):
            raise RuntimeError("broken panel")
    monkeypatch.setattr(main_window, "PANELS",
                        PANELS + (Panel("broken", "Broken", Broken, "study"),))
    from app.document.document import Document
    document = Document(solve_in_background=False)   # no solver thread left behind
    with pytest.raises(RuntimeError, match="broken panel"):
        main_window.MainWindow(document, quiet=True)


def test_the_window_module_hides_no_import_error():
    from pathlib import Path
    import app.window.panels
    import app.window.workspace
    for module in (main_window, app.window.panels, app.window.workspace):
        assert "except ImportError" not in Path(module.__file__).read_text()
