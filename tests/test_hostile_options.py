"""Option values are checked at the door: a refusal in words, never a traceback from the
libraries below (issue 10, class 6), and fuzzed with hypothesis at the CLI boundary."""

import contextlib
import io

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from cli.main import main
from hostile_cli import LINE_LIMIT, data_csv, refused, write_data  # noqa: F401

SWEEP = ["--positive", "pass", "--steps", "2", "--folds", "2"]


@pytest.mark.parametrize("option, value, match", [
    ("--seed", "-1", r"--seed must be a whole number from 0 to 4294967295; got -1"),
    ("--seed", "4294967296", r"--seed must be a whole number from 0 to 4294967295"),
    ("--jobs", "0", r"--jobs must be 1 or more, or -1 for every core; got 0"),
    ("--jobs", "-2", r"--jobs must be 1 or more, or -1 for every core; got -2"),
    ("--jobs", "100000", r"--jobs is at most 256"),
    ("--steps", "1", r"--steps must be a whole number from 2 to 1000; got 1"),
    ("--steps", "1001", r"--steps must be a whole number from 2 to 1000"),
    ("--from", "0", r"--from must be a positive number; got 0"),
    ("--to", "nan", r"--to must be a positive number; got nan"),
    ("--to", "inf", r"--to must be a positive number; got inf"),
    ("--folds", "1", r"folds must be a whole number of at least 2"),
    ("--folds", "abc", r"folds must be a whole number of at least 2, or 'loo'"),
    ("--seed", "1.5", r"--seed must be a whole number; got '1.5'"),
])
def test_a_sweep_option_out_of_range_is_refused_in_words(capsys, data_csv, option, value,
                                                         match):
    refused(capsys, ["sweep", data_csv, *SWEEP, option, value], [data_csv], match)


def test_a_sweep_range_that_runs_downwards_is_refused(capsys, data_csv):
    refused(capsys, ["sweep", data_csv, *SWEEP, "--from", "10", "--to", "1"], [data_csv],
            r"must run upwards")


def test_a_sweep_range_beyond_the_C_limits_is_refused(capsys, data_csv):
    refused(capsys, ["sweep", data_csv, *SWEEP, "--to", "1e300"], [data_csv],
            r"--to must be a positive number from 1e-09 to 1e\+12")


def _run(argv):
    """(status, stdout, stderr) of one command, argparse's exit counted as a status."""
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            status = main([str(a) for a in argv])
        except SystemExit as exc:
            status = exc.code
    return status, out.getvalue(), err.getvalue()


def _answered_cleanly(status, err, before, path):
    assert status in (0, 1, 2), err                       # 3 would be an internal error
    assert "Traceback" not in err
    lines = err.splitlines()
    assert all(len(line) <= LINE_LIMIT for line in lines)
    if status == 2:
        assert len([line for line in lines if line.startswith("slackline")]) == 1, err
    assert path.read_bytes() == before


NUMBERS = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(min_value=-10 ** 30, max_value=10 ** 30).map(str),
    st.sampled_from(["1e308", "-0", "1e-320", "0x10", "1_000", " 3 ", "", "9" * 500]),
    st.text(max_size=40))
FIT_OPTIONS = ["--C", "--gamma", "--degree", "--offset", "--weight", "--features",
               "--positive", "--label", "--kernel", "--scale"]


@pytest.fixture(scope="module")
def fuzz_data(tmp_path_factory):
    return write_data(tmp_path_factory.mktemp("fuzz"), n=16)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(option=st.sampled_from(FIT_OPTIONS), value=NUMBERS,
       kernel=st.sampled_from(["linear", "polynomial", "rbf"]))
def test_fuzzed_fit_options_are_answered_cleanly(fuzz_data, option, value, kernel):
    if option == "--weight":
        value = f"pass={value}"
    before = fuzz_data.read_bytes()
    argv = ["fit", fuzz_data, "--positive", "pass", "--kernel", kernel, option, value]
    if option == "--kernel":
        argv = ["fit", fuzz_data, "--positive", "pass", option, value]
    status, _out, err = _run(argv)
    _answered_cleanly(status, err, before, fuzz_data)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(option=st.sampled_from(["--seed", "--jobs", "--folds", "--from", "--to", "--steps"]),
       value=st.one_of(NUMBERS, st.integers(min_value=-2 ** 70, max_value=2 ** 70).map(str)))
def test_fuzzed_sweep_options_are_answered_cleanly(fuzz_data, option, value):
    try:
        number = float(value)
    except ValueError:
        number = None
    if option == "--jobs" and number is not None and 1 < number <= 256:
        value = "1"                  # a real pool of many workers is not this test's point
    if option == "--steps" and number is not None and 3 < number <= 1000:
        value = "3"                  # keep the grid small; its range is tested above
    before = fuzz_data.read_bytes()
    status, _out, err = _run(["sweep", fuzz_data, "--positive", "pass", "--steps", "2",
                              "--folds", "2", option, value])
    _answered_cleanly(status, err, before, fuzz_data)


@pytest.fixture(scope="module")
def fuzz_experiment(tmp_path_factory):
    from hostile_cli import write_experiment
    return write_experiment(tmp_path_factory.mktemp("fuzz_render"))


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(size=st.one_of(st.text(max_size=20), st.sampled_from(
           ["0x0", "99x100", "8001x100", "100x100", "1e3x1e3", "-5x-5", "9" * 400 + "x1"])),
       name=st.sampled_from(["r.png", "r.svg", "r.gif", "r", ".svg", "r.json"]))
def test_fuzzed_render_sizes_and_names_are_answered_cleanly(fuzz_experiment, size, name):
    out = fuzz_experiment.parent / name
    before = fuzz_experiment.read_bytes()
    status, _out, err = _run(["render", fuzz_experiment, "-o", out, "--size", size])
    _answered_cleanly(status, err, before, fuzz_experiment)
    assert (status == 0) == out.exists()
    out.unlink(missing_ok=True)
