"""Products with Q = diag(y) K diag(y) for the C path, two ways.

``FeatureGram``: an explicit feature map phi (linear, polynomial), K = phi phi'.
Every product goes through the weight vector, so memory is O(n m) and the
sum over the points held at their bound is an m-vector.

``KernelGram``: a kernel without a finite feature map (RBF) as a full matrix (n up to ``KERNEL_LIMIT``);
the sum over held points is an n-vector kept up to date one column at a time.

Both keep ``held`` = sum over L of w_j y_j k(., x_j) (w_j = C_j / C, the class
weight), so the decision function on a segment is

    f(C) = sum_E alpha_j y_j k(., x_j) + C * held + b.
"""

from __future__ import annotations

import numpy as np

KERNEL_LIMIT = 5000     # n x n floats: 200 MB at this size


class FeatureGram:
    def __init__(self, phi: np.ndarray, y: np.ndarray):
        self.phi = np.ascontiguousarray(phi)
        self.y = y.astype(float)
        self.z = self.phi * self.y[:, None]          # z_j = y_j phi_j, Q = z z'
        self._held = np.zeros(phi.shape[1])          # sum_L w_j z_j

    def q_diagonal(self) -> np.ndarray:
        return np.einsum("ij,ij->i", self.z, self.z)

    def q_block(self, I, J) -> np.ndarray:
        return self.z[I] @ self.z[J].T

    def reset_held(self, held: np.ndarray, weights: np.ndarray) -> None:
        self._held = self.z[held].T @ weights[held]

    def change_held(self, j: int, weight: float) -> None:
        """Add (weight > 0) or remove (weight < 0) point j's term from the held sum."""
        self._held = self._held + weight * self.z[j]

    def held_margin(self, I=None) -> np.ndarray:
        """y_i * held(x_i): the held points' share of y f, per unit of C."""
        z = self.z if I is None else self.z[I]
        return z @ self._held

    def margin_slope(self, E, slope_E, slope_b, I=None) -> np.ndarray:
        """d(y_i f_i)/dC for every point (or those in I):
        y_i (sum_E d_j y_j k_ij + held_i + db)."""
        v = self._held + (self.z[E].T @ slope_E if len(E) else 0.0)
        if I is None:
            return self.z @ v + self.y * slope_b
        return self.z[I] @ v + self.y[I] * slope_b

    def margin_part(self, coefficients: np.ndarray, I) -> np.ndarray:
        """y_i sum_j c_j y_j k(x_i, x_j) for i in I (no held state involved)."""
        return self.z[I] @ (self.z.T @ coefficients)

    def margin(self, alpha: np.ndarray, b: float) -> np.ndarray:
        """y_i f(x_i) for a full alpha and b."""
        return self.z @ (self.z.T @ alpha) + self.y * b

    def weights(self, alpha: np.ndarray) -> np.ndarray:
        """w over the feature map: sum_j alpha_j y_j phi_j."""
        return self.z.T @ alpha

    def decision(self, alpha, b) -> np.ndarray:
        return self.phi @ self.weights(alpha) + b


class KernelGram:
    def __init__(self, K: np.ndarray, y: np.ndarray):
        self.K = K
        self.y = y.astype(float)
        self._held = np.zeros(len(y))                # sum_L w_j y_j K[:, j]

    def q_diagonal(self) -> np.ndarray:
        return np.diagonal(self.K).copy()

    def q_block(self, I, J) -> np.ndarray:
        return self.K[np.ix_(I, J)] * np.outer(self.y[I], self.y[J])

    def reset_held(self, held: np.ndarray, weights: np.ndarray) -> None:
        # one dense product beats gathering the held columns (K is symmetric)
        self._held = self.K @ np.where(held, weights * self.y, 0.0)

    def change_held(self, j: int, weight: float) -> None:
        self._held = self._held + (weight * self.y[j]) * self.K[j]

    def held_margin(self, I=None) -> np.ndarray:
        if I is None:
            return self.y * self._held
        return self.y[I] * self._held[I]

    def margin_slope(self, E, slope_E, slope_b, I=None) -> np.ndarray:
        if I is None:
            f = self._held + slope_b
            if len(E):
                f = f + (slope_E * self.y[E]) @ self.K[E]
            return self.y * f
        f = self._held[I] + slope_b
        if len(E):
            f = f + (slope_E * self.y[E]) @ self.K[np.ix_(E, I)]
        return self.y[I] * f

    def margin_part(self, coefficients: np.ndarray, I) -> np.ndarray:
        return self.y[I] * (self.K[I] @ (coefficients * self.y))

    def margin(self, alpha, b) -> np.ndarray:
        return self.y * self.decision(alpha, b)

    def decision(self, alpha, b) -> np.ndarray:
        return self.K @ (alpha * self.y) + b
