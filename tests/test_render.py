"""`slackline render` and draw_result: the canvas picture without a window."""

import subprocess
import sys

import pytest
from PySide6.QtGui import QImage

from app.canvas import figure
from cli import render
from app.display import XCB_FIX, display_problem
from app.window.launch import first_sample
from solver.errors import InputError
from solver.fit import fit

from test_gui_fixtures import gauge_points

SAMPLE = first_sample()
needs_sample = pytest.mark.skipif(SAMPLE is None or not SAMPLE.name.endswith(".json"),
                                  reason="no sample experiment in samples/")


def _args(experiment, output, size="640x480"):
    class Args:
        pass
    args = Args()
    args.experiment, args.output, args.size = str(experiment), str(output), size
    return args


def test_draw_result_returns_an_image_of_the_asked_size(qapp):
    data = gauge_points()
    image = figure.draw_result(data, fit(data.X, data.y), 500, 350)
    assert isinstance(image, QImage) and (image.width(), image.height()) == (500, 350)


@needs_sample
def test_render_writes_a_png_of_the_requested_size(qapp, tmp_path):
    out = tmp_path / "figure.png"
    assert render.run(_args(SAMPLE, out, "640x480")) == 0
    image = QImage(str(out))
    assert (image.width(), image.height()) == (640, 480)


@needs_sample
def test_render_writes_an_svg_when_the_name_ends_in_svg(qapp, tmp_path):
    out = tmp_path / "figure.svg"
    assert render.run(_args(SAMPLE, out)) == 0
    assert "<svg" in out.read_text()


def test_a_malformed_size_is_refused_with_an_example():
    with pytest.raises(InputError, match="for example 1200x800"):
        figure.parse_size("big")


def test_an_unknown_picture_type_is_refused(tmp_path):
    with pytest.raises(InputError, match=".png or .svg"):
        render.run(_args(tmp_path / "x.json", tmp_path / "figure.gif"))


def test_no_display_on_linux_points_to_render():
    message = display_problem(environ={}, platform="linux")
    assert "slackline render" in message and "\n" not in message


def test_missing_xcb_libraries_name_the_install_command():
    def missing(name):
        raise OSError(name)
    message = display_problem(environ={"DISPLAY": ":0"}, platform="linux", load=missing)
    assert XCB_FIX in message


def test_an_offscreen_platform_needs_no_display_check():
    assert display_problem(environ={"QT_QPA_PLATFORM": "offscreen"}, platform="linux") is None


def test_slackline_without_a_display_says_so_in_one_line_and_exits():
    env = {"PATH": "/usr/bin:/bin", "HOME": "/tmp"}
    proc = subprocess.run([sys.executable, "-m", "cli.main"], env=env, capture_output=True,
                          text=True, timeout=60)
    assert proc.returncode == 2
    assert proc.stderr.count("\n") == 1 and "slackline render" in proc.stderr
