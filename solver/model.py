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
        """Plain JSON-ready description (the model card's core)."""
        data = {
            "kernel": self.kernel,
            "scaling": {"shift": self.shift.tolist(), "scale": self.scale.tolist()},
            "b": self.b,
        }
        if self.kernel == "linear":
            w, b = scaling.weights_in_original_units(self.feature_weights, self.b,
                                                     self.shift, self.scale)
            data["w_original_units"] = w.tolist()
            data["b_original_units"] = b
        for name in kernels.get(self.kernel).parameters:
            data[name] = getattr(self, name)
        if self.feature_weights is not None:
            data["feature_weights"] = self.feature_weights.tolist()
        else:
            data["support_vectors"] = self.support_vectors.tolist()
            data["coefficients"] = self.coefficients.tolist()
        return data
