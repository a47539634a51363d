"""Saving never leaves a half-written experiment behind, whatever happens mid-write."""

import os
import signal
import subprocess
import sys
import textwrap
import time

import numpy as np
import pytest

from solver import FitConfig, fit
from solver.errors import FileFormatError
from solver.files.atomic import atomic_open
from solver.files.dataset import Dataset
from solver.files.experiment import load_experiment, save_experiment

X = np.array([[0.0, 0.0], [1.0, 0.2], [3.0, 3.1], [4.0, 2.9]])
Y = np.array([-1, -1, 1, 1])


@pytest.fixture
def old_experiment(tmp_path):
    path = tmp_path / "e.json"
    save_experiment(path, Dataset.from_points(X, Y), fit(X, Y, FitConfig()), note="old")
    return path


def test_a_writer_killed_mid_write_leaves_the_old_file_intact(old_experiment):
    before = old_experiment.read_bytes()
    script = textwrap.dedent("""
        import sys, time
        from solver.files.atomic import atomic_open
        with atomic_open(sys.argv[1], "w") as stream:
            stream.write('{"points": [' + '[1.5, 2.5], ' * 200000)
            stream.flush()
            print("half written", flush=True)
            time.sleep(60)
    """)
    writer = subprocess.Popen([sys.executable, "-c", script, str(old_experiment)],
                              stdout=subprocess.PIPE, text=True)
    try:
        assert writer.stdout.readline().strip() == "half written"
        writer.send_signal(signal.SIGKILL)
    finally:
        writer.wait(timeout=30)
        writer.stdout.close()
    assert old_experiment.read_bytes() == before
    assert load_experiment(old_experiment).note == "old"


def test_a_saver_killed_at_any_moment_leaves_a_loadable_experiment(old_experiment):
    script = textwrap.dedent("""
        import sys
        import numpy as np
        from solver import FitConfig, fit
        from solver.files.dataset import Dataset
        from solver.files.experiment import save_experiment
        rng = np.random.default_rng(3)
        X = np.r_[rng.normal(0, 1, (4000, 2)), rng.normal(3, 1, (4000, 2))]
        y = np.r_[-np.ones(4000, int), np.ones(4000, int)]
        data = Dataset.from_points(X, y)
        print("started", flush=True)
        for round in range(1000):
            save_experiment(sys.argv[1], data, None, note=f"round {round}", config=FitConfig())
    """)
    saver = subprocess.Popen([sys.executable, "-c", script, str(old_experiment)],
                             stdout=subprocess.PIPE, text=True)
    try:
        assert saver.stdout.readline().strip() == "started"
        time.sleep(1.5)
        saver.send_signal(signal.SIGKILL)
    finally:
        saver.wait(timeout=30)
        saver.stdout.close()
    note = load_experiment(old_experiment).note
    assert note == "old" or note.startswith("round ")


def test_a_failure_before_the_swap_keeps_the_old_file_and_cleans_up(old_experiment,
                                                                   monkeypatch):
    before = old_experiment.read_bytes()

    def broken_fsync(fd):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "fsync", broken_fsync)
    with pytest.raises(FileFormatError, match="No space left"):
        save_experiment(old_experiment, Dataset.from_points(X, Y), None, note="new",
                        config=FitConfig())
    assert old_experiment.read_bytes() == before
    assert sorted(p.name for p in old_experiment.parent.iterdir()) == ["e.json"]


def test_an_exception_inside_the_block_discards_the_new_content(tmp_path):
    path = tmp_path / "table.csv"
    path.write_text("old\n")
    with pytest.raises(RuntimeError):
        with atomic_open(path) as stream:
            stream.write("new\n")
            raise RuntimeError("interrupted")
    assert path.read_text() == "old\n"


def test_a_replaced_file_keeps_its_permissions(tmp_path):
    path = tmp_path / "shared.json"
    path.write_text("{}")
    os.chmod(path, 0o640)
    with atomic_open(path) as stream:
        stream.write("[]")
    assert (os.stat(path).st_mode & 0o777, path.read_text()) == (0o640, "[]")
