"""Shared by the tests/test_hostile_*.py modules: run a command as a hostile user would,
and check the three promises: the exit code, one bounded line that says why, and
input files left exactly as they were."""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest

from cli.main import main
from solver import FitConfig, fit
from solver.files import save_experiment
from demo_data import pilot_batch

LINE_LIMIT = 300


def refused(capsys, argv, inputs=(), match="", code=2, problems=False):
    """Run ``argv``; assert it exits ``code`` with one message line matching ``match``,
    every stderr line bounded, no traceback, and ``inputs`` byte for byte unchanged.
    Returns the message line."""
    before = {Path(p): Path(p).read_bytes() for p in inputs}
    try:
        status = main([str(a) for a in argv])
    except SystemExit as exc:          # argparse refuses an option by exiting
        status = exc.code
    out, err = capsys.readouterr()
    assert "Traceback" not in err
    assert status == code, err
    lines = err.splitlines()
    assert all(len(line) <= LINE_LIMIT for line in lines), max(map(len, lines))
    messages = [line for line in lines if line.startswith("slackline")]
    assert len(messages) == 1, err
    if not problems:
        assert lines[-1] == messages[0], err    # nothing after the message but problems
    assert re.search(match, messages[0]), messages[0]
    for path, content in before.items():
        assert path.read_bytes() == content, f"{path} was changed"
    return messages[0]


def resealed(path, edit):
    """The experiment at ``path`` edited by ``edit(document)`` and sealed again (a careful
    forger's file: its checksum matches, only its content disagrees with itself)."""
    import json
    from solver.files import content_checksum
    from solver.files.experiment import json_text
    document = json.loads(Path(path).read_text())
    edit(document)
    document["checksum"]["value"] = content_checksum(document)
    Path(path).write_text(json_text(document))
    return path


def succeeded(capsys, argv):
    status = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    assert status == 0, err
    return out, err


def write_data(folder: Path, name="data.csv", n=24) -> Path:
    """The invented pilot batch (tests/demo_data.py) as a CSV file."""
    data = pilot_batch(n)
    rows = ["bore_mm,flatness_um,verdict"] + [f"{x:.6f},{z:.6f},{label}" for (x, z), label
                                              in zip(data.X, data.labels)]
    path = folder / name
    path.write_text("\n".join(rows) + "\n")
    return path


def write_experiment(folder: Path, name="experiment.json", **config) -> Path:
    data = pilot_batch()
    path = folder / name
    save_experiment(path, data, fit(data.X, data.y, FitConfig(**config)))
    return path


def scaled_csv(folder: Path, name: str, scale: float, shift: float = 0.0) -> Path:
    """The pilot batch with every coordinate times ``scale`` plus ``shift``."""
    data = pilot_batch()
    X = shift + scale * np.asarray(data.X)
    rows = ["a,b,verdict"] + [f"{float(x)!r},{float(z)!r},{label}"
                              for (x, z), label in zip(X, data.labels)]
    path = folder / name
    path.write_text("\n".join(rows) + "\n")
    return path


@pytest.fixture
def data_csv(tmp_path):
    return write_data(tmp_path)


@pytest.fixture
def experiment(tmp_path):
    return write_experiment(tmp_path)
