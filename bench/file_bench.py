"""File layer timings: table import, experiment save / load, exports.

    .venv/bin/python -m bench file_bench

Targets (from the import and experiment requirements): a table of thousands
of rows loads in well under a second; saving and loading an experiment of
that size stays interactive.
"""

from __future__ import annotations

import statistics
import tempfile
import time
from pathlib import Path

import numpy as np

from solver import FitConfig, fit
from solver.files.dataset import load_table
from solver.files.experiment import load_experiment, save_experiment
from solver.files import write_classifier, write_points_csv


def _median_ms(action, repeats: int = 5) -> float:
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        action()
        times.append(time.perf_counter() - start)
    return 1e3 * statistics.median(times)


def main() -> None:
    rng = np.random.default_rng(11)
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        for n in (1_000, 10_000, 100_000):
            X = np.r_[rng.normal(0, 1, (n // 2, 2)), rng.normal(2, 1, (n - n // 2, 2))]
            labels = np.where(np.arange(n) < n // 2, "fail", "pass")
            table = folder / f"t{n}.csv"
            with open(table, "w", encoding="utf-8") as stream:
                stream.write("bore [um],roughness [um],inspection\n")
                stream.writelines(f"{a:.6f},{b:.6f},{c}\n" for (a, b), c in zip(X, labels))
            load_ms = _median_ms(lambda: load_table(table, positive="pass"))
            data = load_table(table, positive="pass")
            result = fit(data.X, data.y, FitConfig(C=1.0))
            experiment = folder / f"e{n}.json"
            save_ms = _median_ms(lambda: save_experiment(experiment, data, result), 3)
            open_ms = _median_ms(lambda: load_experiment(experiment), 3)
            points_ms = _median_ms(lambda: write_points_csv(folder / "p.csv", data, result), 3)
            card_ms = _median_ms(lambda: write_classifier(folder / "m.json", data, result), 3)
            size_mb = experiment.stat().st_size / 1e6
            print(f"n = {n:>7,}: import {load_ms:8.1f} ms | experiment save {save_ms:8.1f} ms, "
                  f"load+validate {open_ms:8.1f} ms ({size_mb:.1f} MB) | points CSV "
                  f"{points_ms:7.1f} ms | classifier {card_ms:5.1f} ms", flush=True)


if __name__ == "__main__":
    main()
