"""Experiment files of format version 1 (the samples as the first release wrote
them, kept in tests/fixtures/v1) still load, migrate and pass `slackline check`."""

import shutil
from pathlib import Path

import pytest

from cli.main import main
from solver.files.experiment import load_experiment

V1_FILES = sorted((Path(__file__).parent / "fixtures" / "v1").glob("*.experiment.json"))


@pytest.mark.parametrize("path", V1_FILES, ids=lambda p: p.name)
def test_a_version_1_file_passes_check_unchanged(path, tmp_path, capsys):
    copy = tmp_path / path.name
    shutil.copy(path, copy)
    assert main(["check", str(copy)]) == 0
    assert copy.read_bytes() == path.read_bytes()


@pytest.mark.parametrize("path", V1_FILES, ids=lambda p: p.name)
def test_a_version_1_file_reads_with_the_new_names(path):
    experiment = load_experiment(path)
    assert experiment.format_version == 1
    assert experiment.config.kernel in ("linear", "polynomial", "rbf")
    assert experiment.config.scaling in ("none", "zscore", "range")


def test_an_edited_version_1_file_is_refused_before_migration(tmp_path):
    # the migrated copy is sealed anew, so the old seal must be checked first
    path = V1_FILES[0]
    copy = tmp_path / path.name
    copy.write_text(path.read_text(encoding="utf-8").replace('"C": 10.0', '"C": 11.0', 1),
                    encoding="utf-8")
    assert main(["check", str(copy)]) == 2
