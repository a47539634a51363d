"""The import dialog speaks in its own words, not the command line's."""

import re

from PySide6.QtCore import Qt

from test_gui_fixtures import temporary_settings  # noqa: F401


def _write(path, rows):
    path.write_text("bore [mm],flatness [um],verdict\n"
                    + "".join(f"{a},{b},{c}\n" for a, b, c in rows), encoding="utf-8")
    return path


def _dialog(qtbot, path):
    from app.dialogs.import_dialog import ImportDialog
    dialog = ImportDialog(str(path))
    qtbot.addWidget(dialog)
    return dialog


def test_two_word_labels_ask_for_the_positive_class_by_the_controls_name(qtbot, tmp_path,
                                                                         temporary_settings):
    path = _write(tmp_path / "batch.csv", [(1.0, 2.0, "ok"), (2.0, 1.0, "scrap"),
                                           (1.5, 2.5, "ok")])
    dialog = _dialog(qtbot, path)
    text = dialog.message.text()
    assert not dialog.ok_button.isEnabled()
    assert "positive class (+1)" in text and "below" in text
    assert not re.search(r"--\w", text)


def test_incomplete_rows_point_to_the_skip_box(qtbot, tmp_path, temporary_settings):
    path = _write(tmp_path / "gaps.csv", [(1.0, 2.0, 1), (2.0, "", -1), (1.5, 2.5, 1),
                                          (3.0, 0.5, -1)])
    dialog = _dialog(qtbot, path)
    text = dialog.message.text()
    assert "skip rows with a missing or non-numeric value" in text
    assert not re.search(r"--\w", text)
    dialog.drop.setFocus()
    qtbot.keyClick(dialog.drop, Qt.Key_Space)
    assert dialog.ok_button.isEnabled()


def test_every_control_of_the_import_dialog_has_a_tooltip(qtbot, tmp_path, temporary_settings):
    path = _write(tmp_path / "ok.csv", [(1.0, 2.0, 1), (2.0, 1.0, -1)])
    dialog = _dialog(qtbot, path)
    for widget in (dialog.feature_x, dialog.feature_y, dialog.label, dialog.positive,
                   dialog.drop):
        assert widget.toolTip()


def test_every_column_of_the_preview_is_as_wide_as_its_header(qtbot, tmp_path,
                                                              temporary_settings):
    path = tmp_path / "seals.csv"
    path.write_text("seal temperature [C],dwell time [s],seal verdict after peel test\n"
                    "150.5,1.2,held\n162.0,0.8,leaked\n", encoding="utf-8")
    dialog = _dialog(qtbot, path)
    dialog.show()
    qtbot.waitExposed(dialog)
    header = dialog.table.horizontalHeader()
    metrics = header.fontMetrics()
    for column, title in enumerate(("seal temperature [C]", "dwell time [s]",
                                    "seal verdict after peel test")):
        assert header.sectionSize(column) >= metrics.horizontalAdvance(title)


def test_the_positive_class_choices_cover_labels_past_the_first_rows(qtbot, tmp_path,
                                                                     temporary_settings):
    # sorted by label: the second label first appears on row 301, past the preview
    path = _write(tmp_path / "sorted.csv", [(1.0 + i / 300, 2.0, "ok") for i in range(300)]
                  + [(3.0 + i / 20, 1.0, "scrap") for i in range(20)])
    dialog = _dialog(qtbot, path)
    choices = [dialog.positive.itemText(i) for i in range(dialog.positive.count())]
    assert choices[1:] == ["ok", "scrap"]
    dialog.positive.setCurrentIndex(2)
    assert dialog.ok_button.isEnabled()
    assert dialog.dataset.mapping_text().startswith("'scrap' -> +1")


def test_the_dialog_reads_the_whole_file_once_however_often_the_choices_change(
        qtbot, tmp_path, temporary_settings, monkeypatch):
    import app.dialogs.import_dialog as module
    reads = []
    read = module.read_table
    monkeypatch.setattr(module, "read_table", lambda path: reads.append(path) or read(path))
    path = _write(tmp_path / "lots.csv", [(1.0 + i / 50, 2.0 + i % 7, "ok" if i % 3 else "scrap")
                                          for i in range(120)])
    dialog = _dialog(qtbot, path)
    for index in (2, 1, 2):
        dialog.positive.setCurrentIndex(index)
    dialog.drop.setChecked(True)
    dialog.label.setCurrentText("flatness [um]")     # a number column: still no new read
    dialog.label.setCurrentText("verdict")
    dialog.positive.setCurrentIndex(2)              # the choices were filled afresh
    assert len(reads) == 1 and dialog.ok_button.isEnabled()
    assert dialog.dataset.mapping_text().startswith("'scrap' -> +1")
