"""Every control and read-out explains itself in a tooltip; Help has its two pages."""

from PySide6.QtWidgets import (QAbstractButton, QAbstractItemView, QAbstractSlider,
                               QAbstractSpinBox, QComboBox, QDockWidget, QLabel, QLineEdit,
                               QPlainTextEdit, QProgressBar, QScrollBar, QTabBar, QWidget)

from test_gui_fixtures import gauge_points, load_points, temporary_settings, window  # noqa: F401

CONTROLS = (QAbstractButton, QComboBox, QAbstractSpinBox, QLineEdit, QAbstractSlider,
            QAbstractItemView, QPlainTextEdit, QProgressBar)


def _part_of_another_control(widget):
    """Qt's own pieces: a spin box's line edit, scroll bars, dock and tab-bar buttons."""
    parent = widget.parentWidget()
    return (isinstance(widget, QScrollBar) or isinstance(parent, (QAbstractSpinBox, QComboBox,
                                                                  QTabBar, QDockWidget))
            or widget.objectName().startswith("qt_") or isinstance(parent, QAbstractItemView)
            or (parent is not None and parent.objectName().startswith("qt_")))


def _controls_without_tooltip(root):
    return [f"{type(w).__name__} {getattr(w, 'text', lambda: '')()!r} in "
            f"{type(w.parentWidget()).__name__}"
            for w in root.findChildren(QWidget) if isinstance(w, CONTROLS)
            if not _part_of_another_control(w) and not w.toolTip()
            and w.window() is root.window()]          # not a combo box's popup list


def test_every_control_in_the_window_has_a_tooltip(window, qtbot):
    load_points(window, qtbot, gauge_points())
    for dock in window.docks.values():
        assert _controls_without_tooltip(dock) == []


def test_every_read_out_of_summary_and_inspector_has_a_tooltip(window, qtbot):
    for panel in (window.summary, window.inspector):
        for label in panel.values.values():
            assert label.toolTip()


def test_the_status_bar_read_outs_have_tooltips(window, qtbot):
    for label in (window.status.cursor, window.status.fit_state):
        assert label.toolTip()


def _help_action(window, text):
    menu = next(a.menu() for a in window.menuBar().actions() if a.text() == "&Help")
    return next(a for a in menu.actions() if a.text() == text)


def test_help_keyboard_shortcuts_lists_every_menu_shortcut(window, qtbot):
    _help_action(window, "Keyboard shortcuts").trigger()
    page = window.help_page
    assert page.isVisible() and page.windowTitle() == "Keyboard shortcuts"
    from PySide6.QtWidgets import QTextBrowser
    text = page.findChild(QTextBrowser).toPlainText()
    for keys, what in (("Ctrl+P", "Pin current fit"), ("Ctrl+Z", "Undo"),
                       ("Ctrl+0", "Fit view to data"), ("Ctrl+I", "Import data")):
        assert keys in text and what in text
    assert "Shift + click" in text


def test_f1_opens_the_shortcut_page(window, qtbot):
    from PySide6.QtCore import Qt
    qtbot.keyClick(window, Qt.Key_F1)
    assert window.help_page.windowTitle() == "Keyboard shortcuts"


def test_help_reading_the_canvas_explains_every_drawn_item(window, qtbot):
    _help_action(window, "Reading the canvas").trigger()
    from PySide6.QtWidgets import QTextBrowser
    text = window.help_page.findChild(QTextBrowser).toPlainText()
    for words in ("boundary", "margin", "support vectors", "slack", "axes not to scale",
                  "pinned fit", "feature space", "not a validated model"):
        assert words in text
