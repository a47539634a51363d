"""The classifier file applies with numpy alone, gives the solver's own decision
values, lists only the fit's support vectors and carries the cautions."""

import json

import numpy as np
import pytest

from solver import CAUTIONS, FitConfig, fit
from solver.files import Dataset, classifier_document, write_classifier

rng = np.random.default_rng(7)
X = np.r_[rng.normal([20.0, 300.0], [2.0, 40.0], (30, 2)),
          rng.normal([25.0, 380.0], [2.0, 40.0], (30, 2))]
Y = np.r_[-np.ones(30, int), np.ones(30, int)]
GRID = np.column_stack([rng.uniform(14, 31, 200), rng.uniform(180, 500, 200)])


def apply_card(card, points):
    """The formula from the classifier file (and the README), numpy only."""
    x = np.atleast_2d(np.asarray(points, dtype=float))
    if card["kernel"] == "linear":
        return x @ np.array(card["w"]) + card["b"]
    u = (x - np.array(card["scaling"]["shift"])) / np.array(card["scaling"]["scale"])
    if card["kernel"] == "polynomial":
        terms = [c * u[:, 0] ** i * u[:, 1] ** j
                 for (i, j), c in zip(card["powers"], card["coefficients"])]
        return card["b"] + np.sum(terms, axis=0)
    sv = np.array(card["support_vectors"])
    d2 = ((u[:, None, :] - sv[None, :, :]) ** 2).sum(axis=2)
    return np.exp(-card["gamma"] * d2) @ np.array(card["coefficients"]) + card["b"]


def data():
    return Dataset.from_points(X, Y, feature_names=("temperature", "pressure"),
                               units=("degC", "kPa"), label_mapping={"leak": 1, "tight": -1})


@pytest.mark.parametrize("config", [
    FitConfig(C=1.0),
    FitConfig(C=1.0, scaling="zscore"),
    FitConfig(C=1.0, kernel="polynomial", degree=3, gamma=0.5, offset=1.0, scaling="zscore"),
    FitConfig(C=1.0, kernel="polynomial", degree=2, gamma=1.0, offset=0.0, scaling="range"),
    FitConfig(C=5.0, kernel="rbf", gamma=0.8, scaling="zscore"),
], ids=["linear", "linear-scaled", "poly3", "poly2-homogeneous", "rbf"])
def test_the_classifier_applied_with_numpy_matches_the_decision_function(tmp_path, config):
    result = fit(X, Y, config)
    write_classifier(tmp_path / "card.json", data(), result)
    card = json.loads((tmp_path / "card.json").read_text(encoding="utf-8"))
    # expected values: the solver's own DecisionModel.decision_function on the same points
    np.testing.assert_allclose(apply_card(card, GRID), result.decision_function(GRID),
                               rtol=1e-9, atol=1e-9)


def test_the_classifier_names_the_classes_features_and_units():
    card = classifier_document(data(), fit(X, Y, FitConfig()))
    assert card["classes"] == {"positive": "leak", "negative": "tight"}
    assert card["features"] == [{"name": "temperature", "unit": "degC"},
                                {"name": "pressure", "unit": "kPa"}]


def test_the_classifier_carries_its_own_formula():
    card = classifier_document(data(), fit(X, Y, FitConfig(kernel="rbf")))
    assert any(line.startswith("rbf:") for line in card["formula"])


def test_the_classifier_carries_the_cautions_and_what_it_was_trained_on():
    result = fit(X, Y, FitConfig())
    card = classifier_document(data(), result, {"error": 0.1, "standard_error": 0.02,
                                                "folds": 5, "seed": 0})
    assert card["cautions"] == list(CAUTIONS)
    assert card["trained_on"]["points"] == 60
    assert card["trained_on"]["per_class"] == {"leak": 30, "tight": 30}
    assert card["trained_on"]["training_error"] == pytest.approx(result.training_error)
    assert card["trained_on"]["cross_validated_error"]["error"] == 0.1


def test_only_the_fits_support_vectors_enter_the_classifier():
    result = fit(X, Y, FitConfig(C=5.0, kernel="rbf", gamma=0.8, scaling="zscore"))
    card = classifier_document(data(), result)
    # the fit's own support set (points whose status is not "outside"); the
    # dual may keep alphas the solver cannot tell from 0, which must not count
    assert len(card["support_vectors"]) == result.n_support
    assert all(c != 0 for c in card["coefficients"])
