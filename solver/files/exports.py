"""Exports for use outside Slackline: a per-point CSV table and a JSON model card.

Both take a Dataset and either a FitResult or the stored figures of an
experiment (``Experiment.results``), so the window and the headless
``slackline export`` write the same files.

Model card: everything needed to apply the classifier elsewhere, with numpy
alone (the formula is in the card itself):

    u = (x - scaling.shift) / scaling.scale                 elementwise
    linear: f(x) = w . x + b                                 (original units)
    polynomial: f(x) = b + sum_t coefficients_t * u1**powers_t[0] * u2**powers_t[1]
    rbf:    f(x) = b + sum_j coefficients_j * exp(-gamma * |u - support_vectors_j|^2)
    class:  classes.positive when f(x) >= 0, else classes.negative
"""

from __future__ import annotations

import csv
import numpy as np

from solver.files.atomic import atomic_open, atomic_write_text
from solver.files.dataset import Dataset
from solver.errors import InputError
from solver.files.experiment import json_text, provenance, results_to_dict
from solver import kernels

# OWASP, "CSV Injection": cells starting with these characters are read as
# formulas by spreadsheets; prefixing a single quote makes them plain text.
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")

POINT_COLUMNS = ("point", "line", "{0}", "{1}", "label", "sign", "decision",
                 "functional_margin", "distance", "alpha", "slack", "status")

SCALING_FORMULA = "u = (x - scaling.shift) / scaling.scale, elementwise, x = [feature 1, feature 2]"
CLASS_FORMULA = "class:  classes.positive when f(x) >= 0, otherwise classes.negative"


def formula(kernel_name: str) -> list[str]:
    """How to evaluate the exported classifier, in words and symbols."""
    return [SCALING_FORMULA, kernels.get(kernel_name).formula, CLASS_FORMULA]


def neutralise(cell):
    """A text cell that a spreadsheet would run as a formula, made plain text."""
    if isinstance(cell, str) and cell.startswith(FORMULA_STARTS):
        return "'" + cell
    return cell


# -- per-point table -----------------------------------------------------------
def points_table(dataset: Dataset, result) -> tuple[list[str], list[list]]:
    """Header and rows of the per-point table (values not yet neutralised)."""
    figures = _figures(dataset, result)
    n = len(dataset)
    decision = np.asarray(figures["decision"], dtype=float)
    functional = dataset.y * decision                        # y_i f(x_i)
    distance = functional / figures["weight_norm"]           # y_i f(x_i) / |w|
    names = [_with_unit(name, unit) for name, unit in zip(dataset.feature_names, dataset.units)]
    header = [c.format(*names) for c in POINT_COLUMNS]
    lines = list(dataset.rows) if len(dataset.rows) == n else [""] * n
    rows = []
    for i in range(n):
        rows.append([i, lines[i], float(dataset.X[i, 0]), float(dataset.X[i, 1]),
                     dataset.labels[i], int(dataset.y[i]), float(decision[i]),
                     float(functional[i]), float(distance[i]), float(figures["alpha"][i]),
                     float(figures["slack"][i]), figures["status"][i]])
    return header, rows


def write_points_csv(path, dataset: Dataset, result) -> None:
    """The per-point table as CSV, formula-like text neutralised, written atomically."""
    header, rows = points_table(dataset, result)
    with atomic_open(path, "w", newline="") as stream:
        writer = csv.writer(stream)
        writer.writerow([neutralise(cell) for cell in header])
        for row in rows:
            writer.writerow([neutralise(cell) for cell in row])


# -- model card ----------------------------------------------------------------
def model_card(dataset: Dataset, result) -> dict:
    """What it takes to apply the fitted classifier anywhere, as plain JSON."""
    figures = _figures(dataset, result)
    model = figures["model"]
    card = {
        "format": "slackline-model-card",
        "version": 1,
        "written": provenance(),
        "features": [{"name": n, "unit": u} for n, u in zip(dataset.feature_names,
                                                             dataset.units)],
        "label_name": dataset.label_name,
        "classes": {"positive": dataset.label_for(1), "negative": dataset.label_for(-1)},
        "kernel": model["kernel"],
        "scaling": {"shift": model["shift"], "scale": model["scale"]},
    }
    card.update(kernels.get(model["kernel"]).export_terms(model))
    if model["kernel"] == "linear":
        card.update(w=figures["w"], b=figures["b"])
    else:
        card["b"] = model["b"]
    card["formula"] = formula(model["kernel"])
    return card


def write_model_card(path, dataset: Dataset, result) -> None:
    atomic_write_text(path, json_text(model_card(dataset, result)))


# -- helpers -------------------------------------------------------------------
def _figures(dataset: Dataset, result) -> dict:
    if result is None:
        raise InputError("there is no fit to export yet; fit the points first")
    figures = result if isinstance(result, dict) else results_to_dict(result)
    if len(figures["decision"]) != len(dataset):
        raise InputError(f"the figures cover {len(figures['decision'])} points but the data "
                         f"set has {len(dataset)}; refit before exporting")
    return figures


def _with_unit(name: str, unit: str) -> str:
    return f"{name} [{unit}]" if unit else name
