"""The classifier file: the fitted decision function, ready to apply elsewhere.

Everything needed to classify new readings with numpy alone (the formula is
in the file itself), what the classifier was trained on, and the cautions
that go with it:

    u = (x - scaling.shift) / scaling.scale                 elementwise
    linear:     f(x) = w . x + b                             (original units)
    polynomial: f(x) = b + sum_t coefficients_t * u1**powers_t[0] * u2**powers_t[1]
    rbf:        f(x) = b + sum_j coefficients_j * exp(-gamma * |u - support_vectors_j|^2)
    class:      classes.positive when f(x) >= 0, else classes.negative
"""

from __future__ import annotations

import numpy as np

from solver import kernels
from solver.cautions import CAUTIONS
from solver.files.atomic import atomic_write_text
from solver.files.dataset import Dataset
from solver.files.experiment import json_text, provenance
from solver.files.exports import figures_of

FORMAT_NAME = "slackline-classifier"
FORMAT_VERSION = 1
SCALING_FORMULA = "u = (x - scaling.shift) / scaling.scale, elementwise, x = [feature 1, feature 2]"
CLASS_FORMULA = "class: classes.positive when f(x) >= 0, otherwise classes.negative"


def formula(kernel_name: str) -> list[str]:
    """How to evaluate the classifier, in words and symbols."""
    return [SCALING_FORMULA, kernels.get(kernel_name).formula, CLASS_FORMULA]


def classifier_document(dataset: Dataset, result, cross_validation: dict | None = None) -> dict:
    """The classifier file's content as plain JSON.

    ``cross_validation`` (optional): {"error": e, "standard_error": s, "folds": k,
    "seed": seed} from a sweep of these points at this C.
    """
    figures = figures_of(dataset, result)
    model = _without_zero_terms(figures)
    labels = dataset.labels
    counts = {str(dataset.label_for(sign)): int(np.count_nonzero(dataset.y == sign))
              for sign in (1, -1)}
    document = {
        "format": FORMAT_NAME,
        "version": FORMAT_VERSION,
        "written": provenance(),
        "cautions": list(CAUTIONS),
        "features": [{"name": n, "unit": u} for n, u in zip(dataset.feature_names,
                                                             dataset.units)],
        "label_name": dataset.label_name,
        "classes": {"positive": dataset.label_for(1), "negative": dataset.label_for(-1)},
        "trained_on": {
            "points": len(labels),
            "per_class": counts,
            "source": None if dataset.source is None else str(dataset.source),
            "training_error": figures["training_error"],
            "cross_validated_error": cross_validation,
        },
        "kernel": model["kernel"],
        "scaling": {"shift": model["shift"], "scale": model["scale"]},
    }
    document.update(kernels.get(model["kernel"]).export_terms(model))
    if model["kernel"] == "linear":
        document.update(w=figures["w"], b=figures["b"])
    else:
        document["b"] = model["b"]
    document["formula"] = formula(model["kernel"])
    return document


def write_classifier(path, dataset: Dataset, result, cross_validation: dict | None = None) -> None:
    atomic_write_text(path, json_text(classifier_document(dataset, result, cross_validation)))


def _without_zero_terms(figures: dict) -> dict:
    """The stored model with only the support vectors of the fit's own support set.

    The dual keeps every alpha > 0, some of them too small for the solver's
    accuracy to tell from 0 (1e-13); the fit's status already calls those points
    "outside", so they are not support vectors and do not enter the file.
    """
    model = dict(figures["model"])
    if model.get("support_vectors") is None:
        return model
    alpha = np.asarray(figures["alpha"], dtype=float)
    rows = np.flatnonzero(alpha > 0)                 # the points behind support_vectors
    if len(rows) != len(model["support_vectors"]):
        return model                                 # an older layout: keep it as stored
    keep = np.isin(rows, np.asarray(figures["support"], dtype=int))
    model["support_vectors"] = [sv for sv, k in zip(model["support_vectors"], keep) if k]
    model["coefficients"] = [c for c, k in zip(model["coefficients"], keep) if k]
    return model
