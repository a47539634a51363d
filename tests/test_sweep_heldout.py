"""`slackline sweep ... --test HELDOUT.csv`: a fixed validation set beside cross-validation.

Data: scikit-learn's make_blobs (continuous readings, so every C has one
optimum; rounded readings such as iris's leave b free in an interval at some
C, and with it the predictions of rows near the boundary).  Expected: the
error of scikit-learn's SVC at tol=1e-10 fitted at the same C, on the same
held-out rows.
"""

import json

import numpy as np
import pytest
from sklearn.datasets import make_blobs
from sklearn.svm import SVC

from cli.main import main


@pytest.fixture
def iris_split(tmp_path):
    X, classes = make_blobs(n_samples=100, centers=[[0, 0], [2, 1.5]], cluster_std=1.0,
                            random_state=11)
    labels = np.where(classes == 1, "virginica", "versicolor")
    paths = []
    for name, rows in (("train.csv", slice(0, None, 2)), ("held.csv", slice(1, None, 2))):
        path = tmp_path / name
        path.write_text("petal length [cm],petal width [cm],species\n" + "".join(
            f"{a!r},{b!r},{c}\n" for (a, b), c in zip(X[rows].tolist(), labels[rows])))
        paths.append(path)
    return paths, X, np.where(labels == "virginica", 1, -1)


def test_held_out_error_at_each_C_matches_the_reference_library(iris_split, capsys):
    (train, held), X, y = iris_split
    assert main(["sweep", str(train), "--positive", "virginica", "--from", "0.01", "--to",
                 "100", "--steps", "5", "--folds", "3", "--test", str(held), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["heldout"]["rows"] == len(X[1::2])
    for step in data["steps"]:
        C, error = step["C"], step["heldout_error"]
        svc = SVC(kernel="linear", C=C, tol=1e-10).fit(X[::2], y[::2])   # reference library
        f = svc.decision_function(X[1::2])
        clear = np.abs(f) > 1e-4          # within the reference's accuracy of f = 0: either way
        expected = np.mean(np.where(f >= 0, 1, -1)[clear] != y[1::2][clear])
        assert error == pytest.approx(expected, abs=(~clear).sum() / len(f) + 1e-12)


def test_the_table_lists_the_held_out_error_beside_the_sweep(iris_split, capsys):
    (train, held), _, _ = iris_split
    assert main(["sweep", str(train), "--positive", "virginica", "--steps", "3", "--folds",
                 "3", "--test", str(held)]) == 0
    out = capsys.readouterr().out
    assert "CV err" in out and "held-out error on 50 rows of held.csv" in out
