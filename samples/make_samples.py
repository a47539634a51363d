"""Regenerate the invented demo data sets and their experiment files.

    .venv/bin/python samples/make_samples.py

Seeded, so the CSV files come out byte for byte the same every time; the
experiment files differ only in their "written" provenance.  Re-run this
after a solver change that moves the figures (``slackline check`` says so).
"""

from __future__ import annotations

import csv
from pathlib import Path

import numpy as np

from solver import FitConfig, fit
from solver.files.dataset import load_table
from solver.files.experiment import save_experiment

HERE = Path(__file__).resolve().parent


def pilot_batch_gauges(rng) -> tuple[list[str], list[list]]:
    """Linearly separable: two gauge readings on a pilot batch of machined bushings."""
    rows = []
    for _ in range(24):   # parts that passed final inspection
        rows.append([rng.normal(2.0, 2.2), rng.normal(0.55, 0.12), "pass"])
    for _ in range(20):   # oversize bore, rough finish, or both
        bore, ra = rng.normal(10.5, 2.4), rng.normal(1.25, 0.22)
        rows.append([bore, ra, "fail"])
    return ["bore deviation [um]", "roughness Ra [um]", "inspection"], \
        [[round(b, 1), round(r, 2), label] for b, r, label in rows]


def proofing_trials(rng) -> tuple[list[str], list[list]]:
    """Overlapping classes: dough trials in a test bakery, C decides the boundary."""
    rows = []
    for _ in range(60):
        rows.append([rng.normal(25.5, 1.6), rng.normal(72, 14), "rose"])
    for _ in range(60):
        rows.append([rng.normal(28.0, 1.7), rng.normal(98, 16), "collapsed"])
    return ["dough temperature [degC]", "proofing time [min]", "loaf"], \
        [[round(t, 1), round(m), label] for t, m, label in rows]


def hollow_cone_spray(rng) -> tuple[list[str], list[list]]:
    """Needs a kernel: a hollow-cone nozzle puts good droplets on a ring."""
    rows = []
    for _ in range(90):   # inside the pattern: radius about 6 mm
        angle, radius = rng.uniform(0, 2 * np.pi), rng.normal(6.0, 0.7)
        rows.append([radius * np.cos(angle), radius * np.sin(angle), "in pattern"])
    for _ in range(35):   # dribble near the axis
        angle, radius = rng.uniform(0, 2 * np.pi), abs(rng.normal(0.0, 1.6))
        rows.append([radius * np.cos(angle), radius * np.sin(angle), "stray"])
    for _ in range(45):   # overspray beyond the pattern
        angle, radius = rng.uniform(0, 2 * np.pi), rng.uniform(9.0, 12.5)
        rows.append([radius * np.cos(angle), radius * np.sin(angle), "stray"])
    return ["offset x [mm]", "offset y [mm]", "droplet"], \
        [[round(x, 2), round(y, 2), label] for x, y, label in rows]


SAMPLES = [
    ("1-pilot-batch-gauges", pilot_batch_gauges, "pass", FitConfig(C=10.0),
     "Pilot batch of 44 machined bushings: bore deviation from nominal and surface "
     "roughness at final inspection; the two classes separate cleanly."),
    ("2-proofing-trials", proofing_trials, "rose", FitConfig(C=1.0, scaling="zscore"),
     "120 dough trials in a test bakery: dough temperature and proofing time against "
     "whether the loaf rose or collapsed; the classes overlap, so C matters."),
    ("3-hollow-cone-spray", hollow_cone_spray, "in pattern",
     FitConfig(C=10.0, kernel="rbf", gamma=1.0, scaling="zscore"),
     "Droplet landing spots of a hollow-cone spray nozzle on a test plate: good droplets "
     "form a ring around the axis, so a linear boundary cannot separate them."),
]


def main(folder: Path = HERE) -> None:
    """Write every table and its experiment file to ``folder``."""
    folder = Path(folder)
    for index, (name, make, positive, config, note) in enumerate(SAMPLES):
        rng = np.random.default_rng(20240 + index)
        header, rows = make(rng)
        order = rng.permutation(len(rows))
        table = folder / f"{name}.csv"
        with open(table, "w", newline="", encoding="utf-8") as stream:
            writer = csv.writer(stream, lineterminator="\n")
            writer.writerow(header)
            writer.writerows(rows[i] for i in order)
        dataset = load_table(table, positive=positive)
        result = fit(dataset.X, dataset.y, config)
        save_experiment(folder / f"{name}.experiment.json", dataset, result, note=note)
        print(f"{table.name}: {len(dataset)} points, {result.n_support} support vectors, "
              f"training error {result.training_error:.1%}")


if __name__ == "__main__":
    main()
