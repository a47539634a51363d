"""Words the window shows: the status bar on a pin, the scaling menu's names."""

from PySide6.QtCore import Qt

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def _message(window):
    return window.statusBar().currentMessage()


def test_loading_points_says_nothing_of_a_pin_that_never_was(window, qtbot):
    # a load notifies every change at once, the pin's among them
    load_points(window, qtbot, gauge_points())
    assert "pin" not in _message(window)


def test_clearing_a_pin_says_so(window, qtbot):
    load_points(window, qtbot, gauge_points())
    qtbot.keyClick(window, "p", Qt.ControlModifier)
    assert _message(window).startswith("pinned the current fit")
    window.compare.clear_button.click()
    assert _message(window) == "pin cleared: the ghost boundary is gone"


def test_the_scaling_menu_names_each_method_in_words(window, qtbot):
    load_points(window, qtbot, gauge_points())
    combo = window.controls.scaling
    assert [combo.itemText(i) for i in range(combo.count())] == ["none", "z-score",
                                                                  "range [0, 1]"]
    combo.setFocus()
    qtbot.keyClick(combo, Qt.Key_Down)               # none -> z-score
    settle(window, qtbot)
    assert window.document.config.scaling == "zscore"
    assert combo.currentText() == "z-score"
    assert "z-score: each feature shifted" in combo.toolTip()


def _class_words(window):
    scene = window.canvas.scene_items
    legend = [scene.legend.getLabel(scene.legend_class[s]).text for s in (1, -1)]
    controls = window.controls
    buttons = [controls.add_positive.text(), controls.add_negative.text()]
    weights = [controls.weight_form.labelForField(box).text()
               for box in (controls.weight_positive, controls.weight_negative)]
    return legend, buttons, weights


def test_a_class_named_by_its_code_shows_the_code_once(window, qtbot):
    # a new document's classes are called +1 and -1: "+1 (+1)" said it twice
    legend, buttons, weights = _class_words(window)
    assert legend == buttons == weights == ["+1", "\u22121"]


def test_a_named_class_shows_its_name_and_code(window, qtbot):
    load_points(window, qtbot, gauge_points())
    legend, buttons, weights = _class_words(window)
    assert legend == ["pass  (+1)", "reject  (\u22121)"]
    assert buttons == weights == ["pass (+1)", "reject (\u22121)"]
