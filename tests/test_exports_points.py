"""The per-point CSV table: its columns, its numbers, and no formulas for spreadsheets."""

import csv

import numpy as np
import pytest

from solver import FitConfig, fit
from solver.files.dataset import Dataset
from solver.errors import InputError
from solver.files.experiment import load_experiment, save_experiment
from solver.files.exports import neutralise, points_table, write_points_csv

X = np.array([[-3.5, 0.0], [-1.0, 0.4], [0.2, -0.1], [2.0, 2.5], [3.0, 1.0], [0.1, 0.3]])
Y = np.array([-1, -1, -1, 1, 1, 1])


def read_rows(path):
    with open(path, newline="", encoding="utf-8") as stream:
        return list(csv.reader(stream))


def dataset(labels=("pass", "fail"), names=("bore", "roughness")):
    return Dataset.from_points(X, Y, feature_names=names, units=("um", ""),
                               label_mapping={labels[0]: 1, labels[1]: -1})


@pytest.fixture
def result():
    return fit(X, Y, FitConfig(C=1.0))


def test_the_table_has_one_row_per_point_and_the_documented_columns(tmp_path, result):
    write_points_csv(tmp_path / "p.csv", dataset(), result)
    rows = read_rows(tmp_path / "p.csv")
    assert rows[0] == ["point", "line", "bore [um]", "roughness", "label", "sign", "decision",
                       "functional_margin", "distance", "alpha", "slack", "status"]
    assert len(rows) == 1 + len(X)


def test_the_figures_are_the_fit_results_own(result):
    _, rows = points_table(dataset(), result)
    table = np.array([row[6:11] for row in rows], dtype=float)
    # expected values: the FitResult's own per-point arrays
    np.testing.assert_allclose(table[:, 0], result.decision, rtol=1e-12)
    np.testing.assert_allclose(table[:, 1], result.functional_margin, rtol=1e-12)
    np.testing.assert_allclose(table[:, 2], result.distance, rtol=1e-12)
    np.testing.assert_allclose(table[:, 3], result.alpha, rtol=1e-12)
    np.testing.assert_allclose(table[:, 4], result.slack, rtol=1e-12, atol=1e-15)
    assert [row[11] for row in rows] == result.status.tolist()


def test_stored_figures_give_the_same_table_as_the_result(tmp_path, result):
    save_experiment(tmp_path / "e.json", dataset(), result)
    stored = load_experiment(tmp_path / "e.json")
    assert points_table(stored.dataset, stored.results) == points_table(dataset(), result)


@pytest.mark.parametrize("text", ["=1+2", "+SUM(A1)", "-2+3", "@cmd", "\tlead", "\rlead"])
def test_formula_like_text_is_prefixed_with_a_quote(text):
    # the rule: OWASP "CSV Injection" guidance
    assert neutralise(text) == "'" + text


def test_plain_text_and_numbers_are_left_alone():
    assert (neutralise("pass"), neutralise(-3.5), neutralise(7)) == ("pass", -3.5, 7)


def test_formula_labels_and_feature_names_are_neutralised_in_the_file(tmp_path, result):
    hostile = dataset(labels=("=HYPERLINK(\"http://x\")", "@fail"), names=("+bore", "-ra"))
    write_points_csv(tmp_path / "p.csv", hostile, result)
    rows = read_rows(tmp_path / "p.csv")
    assert rows[0][2:4] == ["'+bore [um]", "'-ra"]
    assert {row[4] for row in rows[1:]} == {"'=HYPERLINK(\"http://x\")", "'@fail"}


def test_a_negative_number_stays_a_number_in_the_file(tmp_path, result):
    write_points_csv(tmp_path / "p.csv", dataset(), result)
    first = read_rows(tmp_path / "p.csv")[1]
    assert first[2] == "-3.5"
    assert float(first[6]) < 0  # the decision value, not quoted


def test_exporting_without_a_fit_says_to_fit_first(tmp_path):
    with pytest.raises(InputError, match="fit the points first"):
        write_points_csv(tmp_path / "p.csv", dataset(), None)
