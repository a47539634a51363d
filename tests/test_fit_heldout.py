"""`slackline fit DATA --test HELDOUT.csv`: held-out error, confusion counts, stored and re-checked.

Data: the iris measurements that scikit-learn ships (Fisher 1936, UCI
repository), versicolor against virginica on petal length and width, the
even rows fitted and the odd rows held out.  Expected counts come from
sklearn.metrics.confusion_matrix on the same predictions.
"""

import json
from pathlib import Path

import numpy as np
import pytest
from sklearn.datasets import load_iris
from sklearn.metrics import confusion_matrix

from cli.main import main
from solver import FitConfig, fit
from solver.files.experiment import content_checksum, load_experiment

V1_FILES = sorted((Path(__file__).parent / "fixtures" / "v1").glob("*.experiment.json"))


def _write(path, X, labels):
    rows = ["petal length [cm],petal width [cm],species"]
    rows += [f"{x[0]!r},{x[1]!r},{label}" for x, label in zip(X.tolist(), labels)]
    path.write_text("\n".join(rows) + "\n")
    return path


@pytest.fixture
def iris_split(tmp_path):
    iris = load_iris()
    keep = iris.target > 0
    X = iris.data[keep][:, 2:4]
    labels = np.where(iris.target[keep] == 2, "virginica", "versicolor")
    return (tmp_path, _write(tmp_path / "train.csv", X[::2], labels[::2]),
            _write(tmp_path / "held.csv", X[1::2], labels[1::2]), X, labels)


def _fit_json(capsys, *argv):
    capsys.readouterr()
    status = main(["fit", *argv, "--json"])
    out, err = capsys.readouterr()
    assert status == 0, err
    return json.loads(out, parse_constant=lambda name: pytest.fail(f"{name} in JSON")), err


@pytest.mark.parametrize("C", [0.05, 0.5, 10.0])
def test_held_out_error_and_counts_match_the_reference_metrics(iris_split, capsys, C):
    tmp_path, train, held, X, labels = iris_split
    data, err = _fit_json(capsys, str(train), "--positive", "virginica", "--C", str(C),
                          "--test", str(held))
    signs = np.where(labels == "virginica", 1, -1)
    predicted = fit(X[::2], signs[::2], FitConfig(C=C)).predict(X[1::2])
    # rows: true class, columns: predicted class, in the order of ``labels``
    (tn, fp), (fn, tp) = confusion_matrix(signs[1::2], predicted, labels=[-1, 1])
    test = data["test"]
    assert test["rows"] == len(X[1::2])
    assert test["confusion"] == {"positive_label": "virginica", "negative_label": "versicolor",
                                 "true_positive": tp, "false_positive": fp,
                                 "true_negative": tn, "false_negative": fn}
    assert test["error"] == pytest.approx((fp + fn) / len(predicted))
    assert "validate on held-out data" in err


def test_summary_shows_held_out_error_beside_training_error(iris_split, capsys):
    tmp_path, train, held, _, _ = iris_split
    capsys.readouterr()
    assert main(["fit", str(train), "--positive", "virginica", "--test", str(held)]) == 0
    out = capsys.readouterr().out
    assert "training error" in out and "held-out error" in out
    assert "false positive (versicolor predicted virginica)" in out
    assert "close calls" in out


def test_a_held_out_file_without_the_label_column_is_refused_by_name(iris_split, capsys):
    tmp_path, train, _, X, _ = iris_split
    unlabelled = tmp_path / "new.csv"
    unlabelled.write_text("petal length,petal width\n4.5,1.5\n")
    capsys.readouterr()
    assert main(["fit", str(train), "--positive", "virginica", "--test", str(unlabelled)]) == 2
    err = capsys.readouterr().err
    assert "new.csv has no label column" in err and "Traceback" not in err


def test_saved_held_out_points_are_reverified_by_check(iris_split, capsys):
    tmp_path, train, held, X, _ = iris_split
    saved = tmp_path / "iris.experiment.json"
    assert main(["fit", str(train), "--positive", "virginica", "--C", "0.05", "--test",
                 str(held), "--save", str(saved)]) == 0
    experiment = load_experiment(saved)
    assert len(experiment.heldout["points"]) == len(X[1::2])
    assert experiment.heldout["source"]["file"] == "held.csv"
    capsys.readouterr()
    assert main(["check", str(saved)]) == 0
    assert "held-out decision" in capsys.readouterr().out


def test_check_reports_drift_in_stored_held_out_figures(iris_split, capsys):
    tmp_path, train, held, _, _ = iris_split
    saved = tmp_path / "iris.experiment.json"
    main(["fit", str(train), "--positive", "virginica", "--C", "0.05", "--test", str(held),
          "--save", str(saved)])
    document = json.loads(saved.read_text())
    counts = document["heldout"]["confusion"]
    counts["true_positive"], counts["false_negative"] = (counts["true_positive"] + 1,
                                                         counts["false_negative"] - 1)
    document["heldout"]["decision"][0] += 0.5
    document["checksum"]["value"] = content_checksum(document)      # a consistent forgery
    saved.write_text(json.dumps(document))
    capsys.readouterr()
    assert main(["check", str(saved)]) == 1
    out = capsys.readouterr().out
    assert "DRIFT in held-out decision, held-out confusion" in out


def test_a_held_out_label_outside_the_mapping_is_named_with_its_path(iris_split, capsys):
    tmp_path, train, held, _, _ = iris_split
    saved = tmp_path / "iris.experiment.json"
    main(["fit", str(train), "--positive", "virginica", "--test", str(held), "--save",
          str(saved)])
    document = json.loads(saved.read_text())
    document["heldout"]["points"][3]["label"] = "setosa"
    document["checksum"]["value"] = content_checksum(document)
    saved.write_text(json.dumps(document))
    capsys.readouterr()
    assert main(["check", str(saved)]) == 2
    assert "/heldout/points/3/label" in capsys.readouterr().err


@pytest.mark.parametrize("path", V1_FILES, ids=lambda p: p.name)
def test_a_version_1_file_migrates_to_no_held_out_points(path):
    assert load_experiment(path).heldout is None


def test_a_file_saved_without_held_out_points_has_no_such_section(iris_split, tmp_path):
    _, train, _, _, _ = iris_split
    saved = tmp_path / "plain.experiment.json"
    assert main(["fit", str(train), "--positive", "virginica", "--save", str(saved)]) == 0
    assert "heldout" not in json.loads(saved.read_text())
    assert load_experiment(saved).heldout is None
