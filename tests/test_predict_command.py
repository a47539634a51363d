"""`slackline predict`: a saved classifier applied to rows it was not fitted on.

Data: the iris measurements that scikit-learn ships (Fisher 1936, UCI
repository), versicolor against virginica on petal length and width, split
into alternate rows for fitting and scoring.  Expected decision values come
from scikit-learn's SVC at tol=1e-10 fitted on the same points; the
confusion counts from sklearn.metrics.confusion_matrix.
"""

import csv
import json

import numpy as np
import pytest
from sklearn.datasets import load_iris
from sklearn.metrics import confusion_matrix
from sklearn.svm import SVC

from cli.main import main
from solver import FitConfig, fit

HEADER = "petal length [cm],petal width [cm],species"


def _iris():
    iris = load_iris()
    keep = iris.target > 0
    X = iris.data[keep][:, 2:4]
    labels = np.where(iris.target[keep] == 2, "virginica", "versicolor")
    return X, labels


def _write(path, X, labels=None, header=HEADER):
    lines = [header if labels is not None else header.rsplit(",", 1)[0]]
    for i, row in enumerate(X):
        cells = [repr(float(row[0])), repr(float(row[1]))]
        if labels is not None:
            cells.append(str(labels[i]))
        lines.append(",".join(cells))
    path.write_text("\n".join(lines) + "\n")
    return path


@pytest.fixture
def split(tmp_path):
    X, labels = _iris()
    train = _write(tmp_path / "train.csv", X[::2], labels[::2])
    held = _write(tmp_path / "held.csv", X[1::2], labels[1::2])
    return tmp_path, train, held, X, labels


def _save(tmp_path, train, *options):
    experiment = tmp_path / "iris.experiment.json"
    status = main(["fit", str(train), "--positive", "virginica", *options,
                   "--save", str(experiment)])
    assert status == 0
    return experiment


def _predict_json(capsys, experiment, data, *options):
    capsys.readouterr()
    status = main(["predict", str(experiment), str(data), "--json", *options])
    out, err = capsys.readouterr()
    assert status == 0, err
    return json.loads(out, parse_constant=lambda name: pytest.fail(f"{name} in JSON")), err


# Iris readings are rounded to 0.1 cm, so for some C the linear optimum is not
# unique in b (a whole interval of intercepts has the same objective); C = 0.5
# is one where it is unique (checked against the reference's objective).
@pytest.mark.parametrize("C, options, reference", [
    (0.5, (), dict(kernel="linear")),
    (2.0, ("--kernel", "rbf", "--gamma", "0.7"), dict(kernel="rbf", gamma=0.7)),
    (2.0, ("--kernel", "polynomial", "--gamma", "0.5", "--degree", "3", "--offset", "1"),
     dict(kernel="poly", gamma=0.5, degree=3, coef0=1.0)),
])
def test_predicted_decision_values_match_the_reference_library(split, capsys, C, options,
                                                               reference):
    tmp_path, train, held, X, labels = split
    experiment = _save(tmp_path, train, "--C", str(C), *options)
    data, _ = _predict_json(capsys, experiment, held)
    signs = np.where(labels == "virginica", 1, -1)
    svc = SVC(C=C, tol=1e-10, **reference).fit(X[::2], signs[::2])       # reference library
    expected = svc.decision_function(X[1::2])
    decision = np.array([row["decision"] for row in data["rows"]])
    # within 1e-4 of the largest |f|: the accuracy libsvm reaches at tol=1e-10
    np.testing.assert_allclose(decision, expected, atol=1e-4 * np.abs(expected).max())


def test_predicted_decision_values_are_those_of_the_fitted_model(split, capsys):
    tmp_path, train, held, X, labels = split
    experiment = _save(tmp_path, train, "--scale", "zscore", "--C", "0.5")
    data, _ = _predict_json(capsys, experiment, held)
    signs = np.where(labels == "virginica", 1, -1)
    result = fit(X[::2], signs[::2], FitConfig(C=0.5, scaling="zscore"))
    decision = [row["decision"] for row in data["rows"]]
    np.testing.assert_allclose(decision, result.decision_function(X[1::2]), rtol=1e-9,
                               atol=1e-9)


def test_each_row_carries_its_line_label_distance_and_band_flag(split, capsys):
    tmp_path, train, held, X, labels = split
    experiment = _save(tmp_path, train, "--C", "0.5")
    data, err = _predict_json(capsys, experiment, held)
    svc = SVC(kernel="linear", C=0.5, tol=1e-10).fit(X[::2], np.where(labels[::2] ==
                                                                      "virginica", 1, -1))
    f = svc.decision_function(X[1::2])
    # distance from x to the line w.x + b = 0 is |w.x + b| / |w| (plane geometry)
    expected_distance = np.abs(f) / np.linalg.norm(svc.coef_[0])
    rows = data["rows"]
    assert [row["row"] for row in rows] == list(range(2, 2 + len(rows)))   # header is line 1
    assert [row["label"] for row in rows] == ["virginica" if v >= 0 else "versicolor" for v in f]
    np.testing.assert_allclose([row["distance"] for row in rows], expected_distance, atol=1e-4)
    # support vectors sit on |f| = 1 exactly; compare the flag away from the band edge
    clear = np.abs(np.abs(f) - 1) > 1e-6
    flags = np.array([row["in_band"] for row in rows])
    assert (flags[clear] == (np.abs(f[clear]) < 1)).all()
    assert data["close_calls"] == int(flags.sum())
    assert data["distance_space"] == "data units"
    assert "validate on held-out data" in err and "licensed practice" in err


def test_kernel_distances_are_said_to_be_in_feature_space(split, capsys):
    tmp_path, train, held, _, _ = split
    experiment = _save(tmp_path, train, "--kernel", "rbf")
    data, _ = _predict_json(capsys, experiment, held)
    assert data["distance_space"] == "feature space"


def test_error_and_confusion_counts_match_the_reference_metrics(split, capsys):
    tmp_path, train, held, X, labels = split
    experiment = _save(tmp_path, train, "--C", "0.05")
    data, _ = _predict_json(capsys, experiment, held)
    truth = labels[1::2]
    predicted = [row["label"] for row in data["rows"]]
    # rows: true class, columns: predicted class, in the order given by ``labels``
    (tn, fp), (fn, tp) = confusion_matrix(truth, predicted, labels=["versicolor", "virginica"])
    assert data["confusion"] == {"positive_label": "virginica", "negative_label": "versicolor",
                                 "true_positive": tp, "false_positive": fp,
                                 "true_negative": tn, "false_negative": fn}
    assert data["error"] == pytest.approx((fp + fn) / len(truth))
    assert fp + fn > 0          # a weak C so that the counts are not trivially zero


def test_rows_without_the_label_column_are_scored_without_an_error(split, capsys):
    tmp_path, train, _, X, _ = split
    experiment = _save(tmp_path, train)
    unlabelled = _write(tmp_path / "new.csv", X[1:8:2])
    data, _ = _predict_json(capsys, experiment, unlabelled)
    assert len(data["rows"]) == 4 and "error" not in data and "confusion" not in data


def test_missing_feature_columns_are_all_named(split, capsys):
    tmp_path, train, _, _, _ = split
    experiment = _save(tmp_path, train)
    other = tmp_path / "other.csv"
    other.write_text("sepal length,sepal width\n5.1,3.5\n")
    capsys.readouterr()
    assert main(["predict", str(experiment), str(other)]) == 2
    err = capsys.readouterr().err
    assert "'petal length', 'petal width'" in err and "sepal length" in err
    assert "Traceback" not in err


def test_bad_rows_are_listed_by_line(split, capsys):
    tmp_path, train, _, _, _ = split
    experiment = _save(tmp_path, train)
    bad = tmp_path / "bad.csv"
    bad.write_text(f"{HEADER}\n4.5,1.5,versicolor\nfour,1.2,versicolor\n5.0,1.9,rose\n")
    capsys.readouterr()
    assert main(["predict", str(experiment), str(bad)]) == 2
    err = capsys.readouterr().err
    assert "line 3: petal length [cm] is 'four', not a number" in err
    assert "line 4: species is 'rose', not one of 'virginica', 'versicolor'" in err
    data, err = _predict_json(capsys, experiment, bad, "--drop-incomplete")
    assert [row["row"] for row in data["rows"]] == [2] and data["skipped_lines"] == [3, 4]


def test_output_file_holds_the_table_and_never_replaces_an_input(split, capsys):
    tmp_path, train, held, X, _ = split
    experiment = _save(tmp_path, train)
    out = tmp_path / "scored.csv"
    assert main(["predict", str(experiment), str(held), "--csv", "-o", str(out)]) == 0
    with open(out, newline="") as stream:
        table = list(csv.DictReader(stream))
    assert len(table) == len(X[1::2])
    assert float(table[0]["petal length"]) == X[1, 0]          # numbers stay numbers
    before = held.read_bytes()
    capsys.readouterr()
    assert main(["predict", str(experiment), str(held), "-o", str(held)]) == 2
    assert "destroy the input" in capsys.readouterr().err
    assert held.read_bytes() == before
