"""The per-point table (CSV) for use outside Slackline.

It takes a Dataset and either a FitResult or the stored figures of an
experiment (``Experiment.results``), so the window and the headless
``slackline export`` write the same file.  The classifier file is
solver.files.classifier.
"""

from __future__ import annotations

import csv
import numpy as np

from solver.files.atomic import atomic_open
from solver.files.dataset import Dataset
from solver.errors import InputError
from solver.result import weights_cancel

# OWASP, "CSV Injection": cells starting with these characters are read as
# formulas by spreadsheets; prefixing a single quote makes them plain text.
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")

POINT_COLUMNS = ("point", "line", "{0}", "{1}", "label", "sign", "decision",
                 "functional_margin", "distance", "alpha", "slack", "status")

def neutralise(cell):
    """A text cell that a spreadsheet would run as a formula, made plain text."""
    if isinstance(cell, str) and cell.startswith(FORMULA_STARTS):
        return "'" + cell
    return cell


# -- per-point table -----------------------------------------------------------
def points_table(dataset: Dataset, result) -> tuple[list[str], list[list]]:
    """Header and rows of the per-point table (values not yet neutralised)."""
    figures = figures_of(dataset, result)
    n = len(dataset)
    decision = np.asarray(figures["decision"], dtype=float)
    functional = dataset.y * decision                        # y_i f(x_i)
    model = figures["model"]
    if figures["weight_norm"] > 0 and not weights_cancel(
            model["feature_weights"], figures["alpha"], dataset.X, model["shift"],
            model["scale"]):
        distance = functional / figures["weight_norm"]       # y_i f(x_i) / |w|
    else:                              # w = 0 (to rounding): no boundary, no distance (nan)
        distance = np.full(n, np.nan)
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


# -- helpers -------------------------------------------------------------------
def figures_of(dataset: Dataset, result) -> dict:
    """The stored-figures dict of ``result`` (a FitResult or such a dict), checked against the data."""
    if result is None:
        raise InputError("there is no fit to export yet; fit the points first")
    figures = result if isinstance(result, dict) else result.to_dict()
    if len(figures["decision"]) != len(dataset):
        raise InputError(f"the figures cover {len(figures['decision'])} points but the data "
                         f"set has {len(dataset)}; refit before exporting")
    return figures


def _with_unit(name: str, unit: str) -> str:
    return f"{name} [{unit}]" if unit else name
