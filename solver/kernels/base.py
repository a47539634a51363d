"""What a kernel is to the rest of Slackline: one Kernel object in the registry."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np


@dataclass(frozen=True)
class Kernel:
    """A kernel k(x, z) and everything the program needs to know about it.

    ``settings`` is any object with the parameter attributes (a FitConfig or a
    DecisionModel): gamma, degree, offset.
    """

    name: str                              # what users type: --kernel NAME, file key
    title: str                             # what the window shows
    parameters: tuple[str, ...]            # solver.parameters names this kernel reads
    help: str                              # tooltip / --help text
    gram: Callable                         # gram(A, B, settings) -> K (len(A) x len(B))
    formula: str                           # f(x) as written into exported files
    feature_map: Callable | None = None    # phi(X, settings) with phi.phi' = k, or None
    export_terms: Callable | None = None   # export_terms(model dict) -> extra classifier keys
    compiled: str | None = None            # "rbf": solver.qp.smo's compiled pair steps apply

    @property
    def has_feature_map(self) -> bool:
        """Kernels with an exact, finite feature map run in the primal."""
        return self.feature_map is not None

    def features(self, X: np.ndarray, settings) -> np.ndarray:
        return self.feature_map(X, settings)
