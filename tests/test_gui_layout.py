"""The workspace at 1280 x 800: columns that keep still, a table without a side scroll."""

from PySide6.QtCore import Qt

from test_gui_fixtures import gauge_points, load_points, settle, temporary_settings, window  # noqa: F401


def test_the_fit_settings_column_keeps_its_width_when_the_kernel_changes(window, qtbot):
    load_points(window, qtbot, gauge_points())
    dock = window.docks["Fit settings"]
    before = dock.width()
    window.controls.kernel.setFocus()
    for _ in range(2):                        # linear -> polynomial -> rbf
        qtbot.keyClick(window.controls.kernel, Qt.Key_Down)
        qtbot.wait(20)
        assert dock.width() == before
    assert window.document.config.kernel == "rbf"


def test_the_canvas_is_the_largest_part_of_the_window(window, qtbot):
    canvas = window.canvas
    area = canvas.width() * canvas.height()
    for dock in window.docks.values():
        if dock.isVisible():
            assert area > dock.width() * dock.height()


def test_the_read_outs_and_the_study_tabs_are_in_sight_at_the_start(window, qtbot):
    for title in ("Fit settings", "Summary", "Studies", "Point"):
        assert window.docks[title].isVisible() and not window.docks[title].isFloating()
    tabs = [window.workspace.studies.tabText(i) for i in range(window.workspace.studies.count())]
    assert tabs[:1] == ["Points"] and "C sweep" in tabs and "Compare" in tabs and "Note" in tabs


def test_the_points_table_shows_every_column_without_scrolling_sideways(window, qtbot):
    load_points(window, qtbot, gauge_points(overlap=True))
    window.points_table.model.flush()
    view = window.points_table.view
    qtbot.wait(20)
    header = view.horizontalHeader()
    assert header.length() <= view.viewport().width()
    assert view.horizontalScrollBar().maximum() == 0
    for column in range(header.count()):
        assert header.sectionSize(column) >= 36 and not header.isSectionHidden(column)


def test_every_points_table_header_explains_itself_in_a_tooltip(window, qtbot):
    model = window.points_table.model
    for column in range(model.columnCount()):
        assert len(model.headerData(column, Qt.Horizontal, Qt.ToolTipRole) or "") > 10


def _show_sweep_tab(window, qtbot):
    tabs = window.workspace.studies
    bar = tabs.tabBar()
    index = next(i for i in range(tabs.count()) if tabs.tabText(i) == "C sweep")
    qtbot.mouseClick(bar, Qt.LeftButton, pos=bar.tabRect(index).center())
    qtbot.wait(50)
    return window.sweep


def test_at_1280_by_800_every_sweep_chart_is_at_least_220_px_tall(window, qtbot):
    panel = _show_sweep_tab(window, qtbot)
    assert panel.isVisible()
    for plot in panel.chart.plots.values():
        assert plot.sceneBoundingRect().height() >= 220


def test_at_1280_by_800_the_first_row_of_sweep_charts_is_fully_in_view(window, qtbot):
    panel = _show_sweep_tab(window, qtbot)
    area = panel.chart_area
    first = next(iter(panel.chart.plots.values()))
    assert first.sceneBoundingRect().bottom() <= area.viewport().height() + 2


def test_on_a_wide_screen_the_four_sweep_charts_sit_in_one_row(window, qtbot):
    window.resize(1920, 1080)
    panel = _show_sweep_tab(window, qtbot)
    qtbot.wait(50)
    tops = {round(plot.sceneBoundingRect().top()) for plot in panel.chart.plots.values()}
    assert len(tops) == 1
    for plot in panel.chart.plots.values():
        assert plot.sceneBoundingRect().height() >= 220


def test_the_compare_tables_show_at_least_six_rows_at_1280_by_800(window, qtbot):
    tabs = window.workspace.studies
    window.workspace.show_study("Compare")
    qtbot.wait(50)
    panel = window.compare
    for table in (panel.table, panel.changes):
        rows = table.viewport().height() // table.verticalHeader().defaultSectionSize()
        assert rows >= 6
    assert tabs.currentWidget() is panel


def test_read_outs_that_grow_with_the_data_wrap_instead_of_losing_their_end(window, qtbot):
    # a 5,000-point kernel fit's solve time ran past the Summary's edge at 1280 x 800
    # ("474.0 ms, 18231 iteration", the last letter cut); a wrapped label shows it all
    load_points(window, qtbot, gauge_points())
    settle(window, qtbot)
    for key, text in (("time", "474.0 ms, 18231 iterations"),
                      ("error", "22.4%  (2241 of 10000)"),
                      ("breakdown", "12001 / 11300 / 11220")):
        label = window.summary.values[key]
        label.setText(text)
        qtbot.wait(20)
        shown = label.fontMetrics().boundingRect(label.contentsRect(), Qt.TextWordWrap, text)
        assert shown.width() <= label.contentsRect().width()
        assert shown.height() <= label.contentsRect().height(), key
