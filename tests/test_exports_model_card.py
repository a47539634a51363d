"""The model card applies with numpy alone and gives the solver's own decision values."""

import json

import numpy as np
import pytest

from solver import FitConfig, fit
from solver.files.dataset import Dataset
from solver.files.exports import model_card, write_model_card

rng = np.random.default_rng(7)
X = np.r_[rng.normal([20.0, 300.0], [2.0, 40.0], (30, 2)),
          rng.normal([25.0, 380.0], [2.0, 40.0], (30, 2))]
Y = np.r_[-np.ones(30, int), np.ones(30, int)]
GRID = np.column_stack([rng.uniform(14, 31, 200), rng.uniform(180, 500, 200)])


def apply_card(card, points):
    """The formula from the card (and the README), numpy only."""
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
def test_the_card_applied_with_numpy_matches_the_decision_function(tmp_path, config):
    result = fit(X, Y, config)
    write_model_card(tmp_path / "card.json", data(), result)
    card = json.loads((tmp_path / "card.json").read_text(encoding="utf-8"))
    # expected values: the solver's own DecisionModel.decision_function on the same points
    np.testing.assert_allclose(apply_card(card, GRID), result.decision_function(GRID),
                               rtol=1e-9, atol=1e-9)


def test_the_card_names_the_classes_features_and_units():
    card = model_card(data(), fit(X, Y, FitConfig()))
    assert card["classes"] == {"positive": "leak", "negative": "tight"}
    assert card["features"] == [{"name": "temperature", "unit": "degC"},
                                {"name": "pressure", "unit": "kPa"}]


def test_the_card_carries_its_own_formula():
    card = model_card(data(), fit(X, Y, FitConfig(kernel="rbf")))
    assert any(line.startswith("rbf:") for line in card["formula"])
