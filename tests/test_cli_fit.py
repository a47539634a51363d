"""`slackline fit` as a script would call it: output contract and bad input."""

import json

import numpy as np
import pytest
from sklearn.svm import SVC

from cli.main import main

GAUGES = """gauge_a,gauge_b,result
1.0,2.0,pass
2.0,3.0,pass
1.5,2.6,pass
3.0,1.0,fail
4.0,0.5,fail
3.4,0.2,fail
"""


@pytest.fixture
def gauges(tmp_path):
    path = tmp_path / "gauges.csv"
    path.write_text(GAUGES)
    return path


def run(argv, capsys):
    status = main(argv)
    out, err = capsys.readouterr()
    return status, out, err


def test_json_output_is_one_object_with_the_contract_keys(gauges, capsys):
    status, out, err = run(["fit", str(gauges), "--positive", "pass", "--json"], capsys)
    assert status == 0
    data = json.loads(out)
    for key in ("w", "b", "alpha", "slack", "decision", "status", "support", "margin_width",
                "objective", "solver", "model", "functional_margin", "distance"):
        assert key in data
    assert set(data["solver"]) >= {"iterations", "seconds", "converged"}
    assert set(data["objective"]) >= {"primal", "dual"}
    assert len(data["alpha"]) == 6
    assert "'pass' -> +1" in err


def test_json_numbers_match_the_reference_library(gauges, capsys):
    status, out, _ = run(["fit", str(gauges), "--positive", "pass", "--C", "0.5", "--json"],
                         capsys)
    data = json.loads(out)
    raw = np.loadtxt(gauges, delimiter=",", skiprows=1, usecols=(0, 1))
    y = np.array([1, 1, 1, -1, -1, -1])
    svc = SVC(kernel="linear", C=0.5, tol=1e-10).fit(raw, y)   # reference library
    np.testing.assert_allclose(data["w"], svc.coef_[0], atol=1e-5)
    np.testing.assert_allclose(data["decision"], svc.decision_function(raw), atol=1e-5)


def test_summary_names_the_mapping_and_the_figures(gauges, capsys):
    status, out, err = run(["fit", str(gauges), "--positive", "pass"], capsys)
    assert status == 0
    assert "margin width" in out and "support vectors" in out
    assert "labels: 'pass' -> +1, 'fail' -> -1" in err


def test_text_labels_without_positive_exit_2_with_advice(gauges, capsys):
    status, out, err = run(["fit", str(gauges)], capsys)
    assert status == 2
    assert "--positive" in err and out == ""


def test_zero_one_labels_map_one_to_plus_one(tmp_path, capsys):
    path = tmp_path / "binary.csv"
    path.write_text("a,b,ok\n0,0,0\n1,0,0\n0,3,1\n1,3,1\n")
    status, _, err = run(["fit", str(path), "--json"], capsys)
    assert status == 0
    assert "1 -> +1" in err


@pytest.mark.parametrize("argv, message", [
    (["--C", "0"], "C must be a positive number"),
    (["--C", "-1"], "C must be a positive number"),
    (["--kernel", "rbf", "--gamma", "0"], "gamma must be a positive number"),
    (["--kernel", "polynomial", "--degree", "2.5"], "degree must be a whole number"),
    (["--weight", "maybe=2"], "not in the data"),
    (["--features", "gauge_a"], "two column names"),
])
def test_bad_settings_exit_2_with_the_reason(gauges, capsys, argv, message):
    status, _, err = run(["fit", str(gauges), "--positive", "pass", *argv], capsys)
    assert status == 2
    assert message in err


def test_hard_margin_on_overlapping_points_exits_2_and_says_use_a_finite_C(tmp_path, capsys):
    path = tmp_path / "overlap.csv"
    path.write_text("a,b,y\n0,0,1\n1,1,-1\n2,2,1\n3,3,-1\n")
    status, _, err = run(["fit", str(path), "--hard"], capsys)
    assert status == 2
    assert "not linearly separable; use a finite C" in err


def test_one_class_only_exits_2(tmp_path, capsys):
    path = tmp_path / "one.csv"
    path.write_text("a,b,y\n0,0,1\n1,1,1\n2,2,1\n")
    status, _, err = run(["fit", str(path)], capsys)
    assert status == 2
    assert "two distinct" in err or "both classes" in err


def test_nan_in_a_feature_names_the_line(tmp_path, capsys):
    path = tmp_path / "gap.csv"
    path.write_text("a,b,y\n0,0,1\n1,,-1\n2,2,1\n3,1,-1\n")
    status, _, err = run(["fit", str(path)], capsys)
    assert status == 2
    assert "3" in err and "drop-incomplete" in err


def test_a_missing_file_exits_2(tmp_path, capsys):
    status, _, err = run(["fit", str(tmp_path / "nowhere.csv")], capsys)
    assert status == 2
    assert "nowhere.csv" in err
