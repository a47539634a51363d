"""Invented demo data shared by several tests (no real measurements)."""

import numpy as np

from solver.files.dataset import Dataset


def pilot_batch_points(n=30, seed=3):
    """Two gauge readings on a pilot batch of parts: (X, y), pass (+1) / fail (-1)."""
    rng = np.random.default_rng(seed)
    half = n // 2
    X = np.r_[rng.normal([2.0, 1.0], 0.6, (half, 2)), rng.normal([3.2, 2.0], 0.6, (n - half, 2))]
    return X, np.r_[np.ones(half, int), -np.ones(n - half, int)]


def pilot_batch(n=24, seed=3):
    """The same pilot batch as a Dataset with labels and feature names."""
    X, y = pilot_batch_points(n, seed)
    return Dataset(X=X, y=y, labels=tuple("pass" if s > 0 else "fail" for s in y),
                   feature_names=("bore_mm", "flatness_um"), label_name="verdict",
                   label_mapping={"pass": 1, "fail": -1}, source="pilot_batch.csv")
