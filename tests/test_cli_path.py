"""`slackline path` as a script would call it: the JSON contract, the CSV, bad input.

Reference for the numbers: `slackline fit --json` at the same C (a fresh cvxopt
solve), and the iris data (Fisher 1936, UCI repository, shipped by scikit-learn).
"""

import csv
import io
import json

import numpy as np
import pytest
from sklearn.datasets import load_iris

from cli.main import main
from solver import STATUSES


@pytest.fixture
def iris_csv(tmp_path):
    iris = load_iris()
    keep = iris.target > 0
    rows = ["petal_length,petal_width,species"]
    for (a, b), t in zip(iris.data[keep][:, 2:4], iris.target[keep]):
        rows.append(f"{a},{b},{'virginica' if t == 2 else 'versicolor'}")
    path = tmp_path / "iris.csv"
    path.write_text("\n".join(rows) + "\n")
    return path


def run(argv, capsys):
    status = main(argv)
    out, err = capsys.readouterr()
    return status, out, err


def _strict(text):
    def refuse(name):
        raise ValueError(f"not strict JSON: {name}")
    return json.loads(text, parse_constant=refuse)


def test_json_output_has_exactly_the_contract_shape(iris_csv, capsys):
    status, out, _ = run(["path", str(iris_csv), "--positive", "virginica", "--json",
                          "--at", "0.1,3"], capsys)
    assert status == 0
    data = _strict(out)
    assert set(data) == {"from", "to", "breakpoints", "events", "at", "seconds"}
    assert (data["from"], data["to"]) == (1e-3, 1e4)
    assert data["breakpoints"] == sorted(data["breakpoints"]) and data["breakpoints"]
    for event in data["events"]:
        assert set(event) == {"C", "point", "from", "to"}
        assert event["from"] in STATUSES and event["to"] in STATUSES
        assert 0 <= event["point"] < 100
    assert [entry["C"] for entry in data["at"]] == [0.1, 3.0]
    for entry in data["at"]:
        assert set(entry) == {"C", "b", "w", "alpha", "training_error", "objective"}
        assert len(entry["w"]) == 2 and len(entry["alpha"]) == 100
        assert set(entry["objective"]) == {"primal", "dual"}


def test_values_at_c_agree_with_fit_json(iris_csv, capsys):
    _, out, _ = run(["path", str(iris_csv), "--positive", "virginica", "--json",
                     "--at", "0.37"], capsys)
    at = _strict(out)["at"][0]
    _, out, _ = run(["fit", str(iris_csv), "--positive", "virginica", "--json",
                     "--C", "0.37"], capsys)
    fresh = _strict(out)                       # source: a fresh cvxopt solve
    assert at["objective"]["primal"] == pytest.approx(fresh["objective"]["primal"], rel=1e-7)
    np.testing.assert_allclose(at["w"], fresh["w"], rtol=1e-6)
    assert at["training_error"] == fresh["training_error"]


def test_rbf_json_has_no_w(iris_csv, capsys):
    _, out, _ = run(["path", str(iris_csv), "--positive", "virginica", "--kernel", "rbf",
                     "--scale", "zscore", "--json", "--at", "1"], capsys)
    assert _strict(out)["at"][0]["w"] is None


def test_csv_has_one_row_per_breakpoint_and_per_event(iris_csv, capsys):
    _, out, _ = run(["path", str(iris_csv), "--positive", "virginica", "--json"], capsys)
    data = _strict(out)
    _, out, _ = run(["path", str(iris_csv), "--positive", "virginica", "--csv"], capsys)
    rows = list(csv.DictReader(io.StringIO(out)))
    assert sum(r["kind"] == "breakpoint" for r in rows) == len(data["breakpoints"])
    assert sum(r["kind"] == "event" for r in rows) == len(data["events"])


def test_summary_counts_breakpoints_and_words_the_nearby_events(iris_csv, capsys):
    status, out, _ = run(["path", str(iris_csv), "--positive", "virginica", "--at", "1"],
                         capsys)
    assert status == 0
    assert "breakpoints" in out and "events near C = 1:" in out
    assert "at C = " in out and ", point #" in out and " moves from " in out


@pytest.mark.parametrize("argv, message", [
    (["--at", "x"], "--at takes numbers separated by commas"),
    (["--at", "1e6"], "--at 1e+06 is outside the range"),
    (["--from", "10", "--to", "1"], "must run upwards"),
    (["--from", "-1"], "positive numbers"),
])
def test_bad_path_settings_get_one_line_and_exit_two(iris_csv, capsys, argv, message):
    status, out, err = run(["path", str(iris_csv), "--positive", "virginica", *argv], capsys)
    assert status == 2 and out == ""
    assert message in err and "Traceback" not in err


def test_path_takes_no_c_option(iris_csv, capsys):
    with pytest.raises(SystemExit):
        main(["path", str(iris_csv), "--positive", "virginica", "--C", "2"])
