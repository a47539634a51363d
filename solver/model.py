"""The fitted decision function f, independent of how it was solved.

A DecisionModel is all that is needed to apply the classifier elsewhere:
kernel parameters, scaling parameters and either an explicit weight vector
over the kernel's feature map (linear, polynomial) or support vectors with
their coefficients alpha_j y_j (kernels without a finite map, such as RBF).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver import kernels, scaling

_CHUNK = 20_000  # rows per block when evaluating an RBF expansion


@dataclass(frozen=True)
class DecisionModel:
    kernel: str
    gamma: float
    degree: int
    offset: float
    shift: np.ndarray          # scaling: x_scaled = (x - shift) / scale
    scale: np.ndarray
    b: float
    feature_weights: np.ndarray | None = None   # w over phi(x_scaled)
    support_vectors: np.ndarray | None = None   # scaled coordinates (dual fits)
    coefficients: np.ndarray | None = None      # alpha_j y_j (dual fits)

    def decision_function(self, points) -> np.ndarray:
        """f(x) for each row of ``points`` (original units)."""
        P = np.atleast_2d(np.asarray(points, dtype=float))
        scaled = scaling.apply(P, self.shift, self.scale)
        kernel = kernels.get(self.kernel)
        if self.feature_weights is not None:
            return kernel.features(scaled, self) @ self.feature_weights + self.b
        out = np.empty(len(scaled))
        for start in range(0, len(scaled), _CHUNK):
            block = scaled[start:start + _CHUNK]
            K = kernel.gram(block, self.support_vectors, self)
            out[start:start + _CHUNK] = K @ self.coefficients + self.b
        return out

    def to_dict(self) -> dict:
        """The decision function as experiment files store it (results.model)."""
        return {
            "kernel": self.kernel, "gamma": float(self.gamma), "degree": int(self.degree),
            "offset": float(self.offset), "shift": _floats(self.shift),
            "scale": _floats(self.scale), "b": float(self.b),
            "feature_weights": _floats(self.feature_weights),
            "support_vectors": (None if self.support_vectors is None
                                else np.asarray(self.support_vectors, float).tolist()),
            "coefficients": _floats(self.coefficients),
        }


def _floats(array):
    return None if array is None else [float(v) for v in np.asarray(array, dtype=float).ravel()]
