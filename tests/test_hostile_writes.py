"""Killed writers leave nothing behind for long, and a save never silently replaces a
file another writer saved meanwhile (issue 10, class 7)."""

import os
import signal
import subprocess
import sys
import textwrap
import threading
import time

import pytest

from hostile_cli import data_csv, refused  # noqa: F401
from solver.files.atomic import (STALE_SECONDS, FileChangedError, atomic_write_text,
                                 file_stamp, remove_stale_temporaries)


def _kill_a_writer_mid_write(target):
    script = textwrap.dedent("""
        import sys, time
        from solver.files.atomic import atomic_open
        with atomic_open(sys.argv[1], "w") as stream:
            stream.write("half")
            stream.flush()
            print("opened", flush=True)
            time.sleep(60)
    """)
    writer = subprocess.Popen([sys.executable, "-c", script, str(target)],
                              stdout=subprocess.PIPE, text=True,
                              cwd=os.path.dirname(os.path.dirname(__file__)))
    try:
        assert writer.stdout.readline().strip() == "opened"
        writer.send_signal(signal.SIGKILL)
    finally:
        writer.wait(timeout=30)
        writer.stdout.close()


def _strays(folder, name):
    return sorted(p.name for p in folder.iterdir() if p.name.startswith(f".{name}."))


def _age(path, seconds):
    old = time.time() - seconds
    os.utime(path, (old, old))


def test_the_next_write_removes_the_temporary_file_of_a_killed_writer(tmp_path):
    target = tmp_path / "e.json"
    target.write_text("old")
    _kill_a_writer_mid_write(target)
    strays = _strays(tmp_path, "e.json")
    assert len(strays) == 1 and target.read_text() == "old"
    _age(tmp_path / strays[0], STALE_SECONDS + 5)
    atomic_write_text(target, "new")
    assert _strays(tmp_path, "e.json") == [] and target.read_text() == "new"


def test_a_fresh_temporary_file_of_a_live_writer_is_left_alone(tmp_path):
    live = tmp_path / ".e.json.abc123.tmp"
    live.write_text("being written")
    atomic_write_text(tmp_path / "e.json", "mine")
    assert live.exists()


def test_only_temporaries_of_the_same_target_are_cleaned(tmp_path):
    other = tmp_path / ".f.json.abc123.tmp"
    other.write_text("x")
    _age(other, STALE_SECONDS * 10)
    assert remove_stale_temporaries(tmp_path / "e.json") == 0 and other.exists()


def test_a_save_over_a_file_written_since_it_was_read_is_refused(tmp_path):
    target = tmp_path / "e.json"
    target.write_text("read by us")
    stamp = file_stamp(target)
    time.sleep(0.01)
    target.write_text("saved by another program in the meantime")
    with pytest.raises(FileChangedError, match="changed by another program"):
        atomic_write_text(target, "ours", expect=stamp)
    assert target.read_text() == "saved by another program in the meantime"
    assert _strays(tmp_path, "e.json") == []


def test_two_saves_that_overlap_do_not_both_succeed(tmp_path):
    target = tmp_path / "e.json"
    both_checked = threading.Barrier(2)
    outcomes = {}

    def save(name):
        stamp = file_stamp(target)            # what each saver saw: nothing yet
        both_checked.wait()
        try:
            atomic_write_text(target, name, expect=stamp)
            outcomes[name] = "saved"
        except FileChangedError:
            outcomes[name] = "refused"

    threads = [threading.Thread(target=save, args=(n,)) for n in ("first", "second")]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join()
    assert sorted(outcomes.values()) == ["refused", "saved"]
    winner = next(n for n, outcome in outcomes.items() if outcome == "saved")
    assert target.read_text() == winner


def test_fit_save_refuses_to_replace_an_experiment_another_process_saved_meanwhile(
        capsys, data_csv, monkeypatch):
    import cli.fit
    target = data_csv.parent / "e.json"
    real_fit = cli.fit.fit

    def fit_while_another_saves(*args, **kwargs):
        target.write_text("the other process's experiment")
        return real_fit(*args, **kwargs)

    monkeypatch.setattr(cli.fit, "fit", fit_while_another_saves)
    refused(capsys, ["fit", data_csv, "--positive", "pass", "--save", target], [data_csv],
            r"e\.json was changed by another program while this one was writing it; nothing "
            r"was replaced")
    assert target.read_text() == "the other process's experiment"
    assert _strays(data_csv.parent, "e.json") == []


def test_a_full_disk_is_reported_in_one_line_and_leaves_nothing(capsys, data_csv,
                                                              monkeypatch):
    def full(fd):
        raise OSError(28, "No space left on device")
    target = data_csv.parent / "e.json"
    monkeypatch.setattr(os, "fsync", full)
    refused(capsys, ["fit", data_csv, "--positive", "pass", "--save", target], [data_csv],
            r"No space left on device")
    assert not target.exists() and _strays(data_csv.parent, "e.json") == []


def test_two_processes_saving_one_experiment_at_once_never_lose_one_silently(tmp_path):
    # overlap is up to the scheduler: whatever it does, each run either saved or said
    # that the other one got there first; the file is a whole experiment; nothing stray
    from hostile_cli import write_data
    from solver.files import load_experiment
    data = write_data(tmp_path, "data.csv", n=400)
    target = tmp_path / "e.json"
    root = os.path.dirname(os.path.dirname(__file__))
    for _round in range(2):
        target.unlink(missing_ok=True)
        runs = [subprocess.Popen([sys.executable, "-m", "cli.main", "fit", str(data),
                                  "--positive", "pass", "--C", str(c), "--save", str(target)],
                                 cwd=root, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE,
                                 text=True) for c in (0.5, 2.0)]
        results = [(run.wait(timeout=120), run.stderr.read()) for run in runs]
        for run in runs:
            run.stderr.close()
        assert all(code in (0, 2) for code, _ in results), results
        assert any(code == 0 for code, _ in results)
        for code, err in results:
            if code == 2:
                assert "was changed by another program" in err.splitlines()[-1]
        assert load_experiment(target).config.C in (0.5, 2.0)
        assert _strays(tmp_path, "e.json") == []
