"""Invented demo data shared by the panel tests (no real measurements)."""

import numpy as np

from solver.dataset import Dataset


def pilot_batch(n=24, seed=3):
    """Two gauge readings on a pilot batch of parts, pass (+1) / fail (-1)."""
    rng = np.random.default_rng(seed)
    X = np.r_[rng.normal([2.0, 1.0], 0.6, (n // 2, 2)), rng.normal([3.2, 2.0], 0.6, (n // 2, 2))]
    y = np.r_[np.ones(n // 2, int), -np.ones(n // 2, int)]
    return Dataset(X=X, y=y, labels=tuple("pass" if s > 0 else "fail" for s in y),
                   feature_names=("bore_mm", "flatness_um"), label_name="verdict",
                   label_mapping={"pass": 1, "fail": -1}, source="pilot_batch.csv")
