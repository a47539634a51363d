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

BLOCK_ENTRIES = 1 << 21   # kernel values per block when evaluating an RBF expansion (16 MB):
                           # the window's 120 x 120 lattice on 3,453 support vectors in one
                           # 400 MB block took 0.34 s, in blocks of this size 0.085 s


def _rows_per_block(support_vectors) -> int:
    return max(1, BLOCK_ENTRIES // max(1, len(support_vectors)))


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
        for part, block, K in self._kernel_blocks(scaled, kernel):
            out[part] = K @ self.coefficients + self.b
        return out

    def grid_values(self, xs, ys) -> np.ndarray:
        """f on the lattice xs x ys (original units), as values[iy, ix].

        A Gaussian expansion in two features factors along the axes (z-scoring scales
        each axis alone): exp(-gamma |s - s_j|^2) = exp(-gamma (u - u_j)^2) exp(-gamma
        (v - v_j)^2), so the lattice is (E_v diag(c)) E_u' with one exponential per
        lattice column or row and support vector, and one matrix product, where point by
        point it takes one per lattice point and support vector (the window's 120 x 120
        lattice on 700 support vectors: 20 ms -> about 1).  Other models: f point by point.
        """
        xs, ys = np.asarray(xs, dtype=float), np.asarray(ys, dtype=float)
        if not self.has_gradient or self.support_vectors.shape[1] != 2:
            gx, gy = np.meshgrid(xs, ys)
            points = np.column_stack([gx.ravel(), gy.ravel()])
            return self.decision_function(points).reshape(len(ys), len(xs))
        u = (xs - self.shift[0]) / self.scale[0]
        v = (ys - self.shift[1]) / self.scale[1]
        S, c = self.support_vectors, self.coefficients
        out = np.full((len(ys), len(xs)), float(self.b))
        step = max(1, BLOCK_ENTRIES // max(1, len(xs) + len(ys)))
        with np.errstate(over="ignore", under="ignore"):   # a far lattice: its k is 0
            for start in range(0, len(S), step):
                part = slice(start, start + step)
                along_u = np.exp(-self.gamma * (u[:, None] - S[None, part, 0]) ** 2)
                along_v = np.exp(-self.gamma * (v[:, None] - S[None, part, 1]) ** 2)
                out += (along_v * c[part]) @ along_u.T
        return out

    def _kernel_blocks(self, scaled, kernel):
        """(rows, their points, their kernel block against the support vectors), a block
        of at most BLOCK_ENTRIES values at a time."""
        rows = _rows_per_block(self.support_vectors)
        for start in range(0, len(scaled), rows):
            block = scaled[start:start + rows]
            yield slice(start, start + rows), block, kernel.gram(block, self.support_vectors,
                                                                 self)

    @property
    def has_gradient(self) -> bool:
        """Whether ``gradient`` is exact: Gaussian (RBF) expansions over support vectors."""
        return self.kernel == "rbf" and self.support_vectors is not None

    def gradient(self, points) -> np.ndarray:
        """grad f(x) for each row of ``points`` (original units), for Gaussian (RBF) fits.

        f(x) = sum_j c_j exp(-gamma |s - s_j|^2) + b with s = (x - shift) / scale, so
        grad_s f = -2 gamma sum_j c_j k_j (s - s_j) = -2 gamma (s (Kc) - K (c s_j)), one
        kernel block for both components (central differences take four), and
        grad_x f = grad_s f / scale."""
        return self.value_and_gradient(points)[1]

    def value_and_gradient(self, points) -> tuple[np.ndarray, np.ndarray]:
        """(f(x), grad f(x)) for each row of ``points``, Gaussian (RBF) fits: one kernel
        block for both, since K c is part of the gradient (f = K c + b)."""
        if not self.has_gradient:
            raise ValueError(f"no exact gradient for the {self.kernel} kernel")
        P = np.atleast_2d(np.asarray(points, dtype=float))
        scaled = scaling.apply(P, self.shift, self.scale)
        weighted = self.coefficients[:, None] * self.support_vectors
        values = np.empty(len(scaled))
        out = np.empty((len(scaled), scaled.shape[1]))
        for part, block, K in self._kernel_blocks(scaled, kernels.get(self.kernel)):
            Kc = K @ self.coefficients
            values[part] = Kc + self.b
            out[part] = -2.0 * self.gamma * (block * Kc[:, None] - K @ weighted)
        return values, out / self.scale

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
