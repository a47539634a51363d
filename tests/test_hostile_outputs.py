"""Outputs that would clobber an input, write nowhere, or half-succeed are refused
before any work (issue 10, classes 2 and 3)."""

import os

import pytest

from hostile_cli import data_csv, experiment, refused, succeeded, write_experiment  # noqa: F401
from solver.files import load_experiment


def test_fit_refuses_to_save_over_the_data_it_reads(capsys, data_csv):
    refused(capsys, ["fit", data_csv, "--positive", "pass", "--save", data_csv], [data_csv],
            r"--save .*data\.csv is the file this command reads")


def test_fit_refuses_a_save_that_reaches_the_data_through_a_symbolic_link(capsys, data_csv):
    link = data_csv.parent / "link.json"
    link.symlink_to(data_csv)
    refused(capsys, ["fit", data_csv, "--positive", "pass", "--save", link], [data_csv],
            r"is the file this command reads")


def test_fit_refuses_a_save_that_is_a_hard_link_to_the_data(capsys, data_csv):
    twin = data_csv.parent / "twin.json"
    os.link(data_csv, twin)
    refused(capsys, ["fit", data_csv, "--positive", "pass", "--save", twin], [data_csv],
            r"is the file this command reads")


@pytest.mark.parametrize("option", ["--points", "--classifier"])
def test_export_refuses_to_write_over_its_experiment(capsys, experiment, option):
    refused(capsys, ["export", experiment, option, experiment], [experiment],
            rf"{option} .*experiment\.json is the file this command reads")


def test_export_refuses_two_outputs_onto_one_path(capsys, experiment, tmp_path):
    out = tmp_path / "both.json"
    refused(capsys, ["export", experiment, "--points", out, "--classifier", out], [experiment],
            r"--points and --classifier both name .*both\.json")
    assert not out.exists()


def test_render_refuses_to_draw_over_its_experiment(capsys, tmp_path):
    source = write_experiment(tmp_path, "figure.svg")     # an experiment, oddly named
    refused(capsys, ["render", source, "-o", source], [source],
            r"-o .*figure\.svg is the file this command reads")


@pytest.mark.parametrize("command", ["render", "fit", "export"])
def test_an_output_in_a_missing_folder_is_refused_before_any_work(capsys, tmp_path, command,
                                                                   data_csv, experiment):
    target = tmp_path / "missing" / "out.svg"
    argv = {"render": ["render", experiment, "-o", target],
            "fit": ["fit", data_csv, "--positive", "pass", "--save", target],
            "export": ["export", experiment, "--points", target]}[command]
    refused(capsys, argv, [data_csv, experiment], r"the folder .*missing.* does not exist")
    assert not target.parent.exists()


@pytest.mark.parametrize("command", ["render", "fit", "export"])
def test_an_output_that_is_a_folder_is_refused(capsys, tmp_path, command, data_csv, experiment):
    folder = tmp_path / "some_dir.svg"
    folder.mkdir()
    argv = {"render": ["render", experiment, "-o", folder],
            "fit": ["fit", data_csv, "--positive", "pass", "--save", folder],
            "export": ["export", experiment, "--classifier", folder]}[command]
    refused(capsys, argv, [data_csv, experiment], r"some_dir\.svg is a folder")
    assert list(folder.iterdir()) == []


def test_an_output_that_is_a_named_pipe_is_refused(capsys, tmp_path, experiment):
    pipe = tmp_path / "out.csv"
    os.mkfifo(pipe)
    refused(capsys, ["export", experiment, "--points", pipe], [experiment],
            r"is not a regular file")


def test_an_output_in_a_folder_that_cannot_be_written_is_refused(capsys, tmp_path, experiment,
                                                                   monkeypatch):
    # the tests may run as root, who writes anywhere: the folder's answer is simulated
    locked = tmp_path / "locked"
    locked.mkdir()
    real_access = os.access
    monkeypatch.setattr(os, "access", lambda path, mode, **kw: False
                        if os.fspath(path) == os.fspath(locked) else real_access(path, mode))
    refused(capsys, ["export", experiment, "--points", locked / "p.csv"], [experiment],
            r"the folder .*locked.* cannot be written \(permission denied\)")


def test_an_empty_output_name_is_refused(capsys, experiment):
    refused(capsys, ["export", experiment, "--points", ""], [experiment], r"needs a file name")


def test_when_the_second_export_fails_the_first_is_not_left_behind(capsys, tmp_path,
                                                                    experiment, monkeypatch):
    import cli.export

    def broken(path, dataset, figures):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(cli.export, "OUTPUTS", tuple(
        row if row[0] != "--classifier" else row[:3] + (broken,) + row[4:]
        for row in cli.export.OUTPUTS))
    points, card = tmp_path / "p.csv", tmp_path / "m.json"
    refused(capsys, ["export", experiment, "--points", points, "--classifier", card], [experiment],
            r"No space left on device; no output was changed")
    assert not points.exists() and not card.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["experiment.json"]


def test_when_the_second_export_fails_an_older_first_output_keeps_its_content(
        capsys, tmp_path, experiment, monkeypatch):
    import cli.export
    points = tmp_path / "p.csv"
    points.write_text("older table\n")
    monkeypatch.setattr(cli.export, "OUTPUTS", tuple(
        row if row[0] != "--classifier" else row[:3] + (_silent_writer,) + row[4:]
        for row in cli.export.OUTPUTS))
    refused(capsys, ["export", experiment, "--points", points, "--classifier", tmp_path / "m.json"],
            [experiment, points], r"nothing was written to .*m\.json")


def _silent_writer(path, dataset, figures):
    """A writer that reports success but writes nothing (as QSvgGenerator can)."""


def test_a_svg_that_could_not_be_written_is_a_failure_not_a_success(tmp_path):
    from app.canvas.figure import save_figure
    from demo_data import pilot_batch
    from solver import fit
    from solver.errors import SlacklineError
    data = pilot_batch()
    result = fit(data.X, data.y)
    with pytest.raises(SlacklineError, match="could not write"):
        save_figure(tmp_path / "missing" / "r.svg", data, result, 200, 150)


def test_render_writes_the_svg_it_reports(capsys, tmp_path, experiment):
    target = tmp_path / "r.svg"
    _, err = succeeded(capsys, ["render", experiment, "-o", target, "--size", "200x150"])
    assert "wrote" in err and target.read_bytes().lstrip().startswith(b"<?xml")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["experiment.json", "r.svg"]


def test_export_writes_both_outputs_together(capsys, tmp_path, experiment):
    points, card = tmp_path / "p.csv", tmp_path / "m.json"
    out, _ = succeeded(capsys, ["export", experiment, "--points", points, "--classifier", card])
    assert points.read_text().startswith("point,line") and card.read_text().startswith("{")
    assert load_experiment(experiment).results is not None


@pytest.mark.parametrize("where, match", [
    ("data", r"-o .*data\.csv is the file this command reads"),
    ("experiment", r"-o .*experiment\.json is the file this command reads"),
    ("missing", r"the folder .*missing.* does not exist"),
    ("folder", r"is a folder"),
])
def test_predict_checks_its_output_before_any_work(capsys, tmp_path, data_csv, experiment,
                                                   where, match):
    (tmp_path / "folder").mkdir()
    target = {"data": data_csv, "experiment": experiment, "missing": tmp_path / "missing" / "o",
              "folder": tmp_path / "folder"}[where]
    refused(capsys, ["predict", experiment, data_csv, "--csv", "-o", target],
            [data_csv, experiment], match)


def test_predict_refuses_a_pipe_as_its_data(capsys, tmp_path, experiment):
    pipe = tmp_path / "rows.csv"
    os.mkfifo(pipe)
    refused(capsys, ["predict", experiment, pipe], [experiment], r"is not a regular file")


def test_predict_json_to_a_file_is_strict_json(capsys, tmp_path, data_csv, experiment):
    import json
    out = tmp_path / "scores.json"
    succeeded(capsys, ["predict", experiment, data_csv, "--json", "-o", out])
    json.loads(out.read_text(), parse_constant=lambda name: 1 / 0)
