"""Older experiment formats still open: a hand-made version 0 file."""

import json

import pytest

from solver.errors import FileFormatError
from solver.files.experiment import load_experiment

# Written by hand in the version 0 layout (see solver/experiment_migrate.py).
VERSION_0 = {
    "format": "slackline-experiment",
    "version": 0,
    "features": ["bore", "roughness"],
    "label": "inspection",
    "positive": "pass",
    "points": [[1.0, 0.5, "pass"], [2.0, 0.6, "pass"], [8.0, 1.3, "fail"], [9.0, 1.1, "fail"]],
    "config": {"C": "hard", "kernel": "linear"},
    "note": "typed in before the format had a checksum",
}


@pytest.fixture
def old_file(tmp_path):
    path = tmp_path / "old.json"
    path.write_text(json.dumps(VERSION_0), encoding="utf-8")
    return path


def test_a_version_0_file_loads_its_points_and_labels(old_file):
    experiment = load_experiment(old_file)
    assert experiment.dataset.X.tolist() == [[1.0, 0.5], [2.0, 0.6], [8.0, 1.3], [9.0, 1.1]]
    assert experiment.dataset.labels == ("pass", "pass", "fail", "fail")
    assert experiment.dataset.label_mapping == {"pass": 1, "fail": -1}


def test_a_version_0_hard_margin_written_as_c_hard_becomes_hard_margin(old_file):
    assert load_experiment(old_file).config.hard_margin is True


def test_a_version_0_file_says_which_version_it_came_from(old_file):
    experiment = load_experiment(old_file)
    assert experiment.format_version == 0
    assert experiment.written["migrated_from"] == 0


def test_a_version_0_file_has_no_results_and_keeps_its_note(old_file):
    experiment = load_experiment(old_file)
    assert experiment.results is None
    assert experiment.note == VERSION_0["note"]


def test_a_version_0_file_with_three_labels_says_it_cannot_be_converted(tmp_path):
    broken = dict(VERSION_0, points=VERSION_0["points"] + [[3.0, 3.0, "rework"]])
    path = tmp_path / "old.json"
    path.write_text(json.dumps(broken), encoding="utf-8")
    with pytest.raises(FileFormatError, match="format version 0 that cannot be converted"):
        load_experiment(path)
