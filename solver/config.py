"""The fit configuration: every setting that decides the solution.

Checked once, here, at the door; the rest of ``solver`` trusts it.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field, replace

from solver import kernels
from solver.errors import InputError
from solver.parameters import PARAMETERS
from solver.scaling import METHODS as SCALINGS


@dataclass(frozen=True)
class SolverOptions:
    """Tolerances handed to cvxopt's interior-point method."""

    reltol: float = 1e-10
    abstol: float = 1e-12
    feastol: float = 1e-10
    max_iterations: int = 100

    def to_dict(self) -> dict:
        return asdict(self)


@dataclass(frozen=True)
class FitConfig:
    """What to fit.

    C            regularisation strength, a positive float; ignored when
                 ``hard_margin`` is set (C = infinity: no slack allowed).
    kernel       a name in the kernel registry (solver.kernels): "linear",
                 "polynomial" (gamma * x.z + offset) ** degree, or "rbf"
                 exp(-gamma |x - z|^2).
    weight_positive / weight_negative
                 class weights: the penalty of point i is C times the weight
                 of its class.
    scaling      "none", "zscore" (zero mean, unit variance) or "range"
                 (each feature onto [0, 1]); w and b are always reported in
                 the original units.

    Ranges, defaults and help texts of the numeric settings are declared once,
    in solver.parameters.
    """

    C: float = 1.0
    hard_margin: bool = False
    kernel: str = "linear"
    gamma: float = 0.5
    degree: int = 3
    offset: float = 1.0
    weight_positive: float = 1.0
    weight_negative: float = 1.0
    scaling: str = "none"
    options: SolverOptions = field(default_factory=SolverOptions)

    def __post_init__(self):
        _check_config(self)

    @property
    def kernel_spec(self) -> kernels.Kernel:
        """The registry's description of this config's kernel."""
        return kernels.get(self.kernel)

    @property
    def uses_feature_map(self) -> bool:
        """Kernels with an exact feature map (linear, polynomial) run in the primal."""
        return self.kernel_spec.has_feature_map

    def penalty(self, sign: int) -> float:
        """C_i for a point of class ``sign`` (+1 or -1); inf for hard margin."""
        if self.hard_margin:
            return math.inf
        weight = self.weight_positive if sign > 0 else self.weight_negative
        return self.C * weight

    def with_changes(self, **changes) -> "FitConfig":
        return replace(self, **changes)

    def to_dict(self) -> dict:
        data = asdict(self)
        data["options"] = self.options.to_dict()
        return data

    @classmethod
    def from_dict(cls, data: dict) -> "FitConfig":
        data = dict(data)
        options = data.pop("options", None) or {}
        unknown = set(data) - set(cls.__dataclass_fields__)
        if unknown:
            raise InputError(f"unknown fit settings {sorted(unknown)}; "
                             f"known ones are {sorted(cls.__dataclass_fields__)}")
        return cls(options=SolverOptions(**options), **data)


def _check_config(config: FitConfig) -> None:
    if not isinstance(config.hard_margin, bool):
        raise InputError(f"hard_margin must be true or false; got {config.hard_margin!r}")
    if not config.hard_margin:
        _check("C", config.C, " or 'hard'")
    if not isinstance(config.kernel, str) or config.kernel not in kernels.REGISTRY:
        raise InputError(f"kernel must be one of {', '.join(kernels.names())}; "
                         f"got {config.kernel!r}")
    for name in config.kernel_spec.parameters:
        _check(name, getattr(config, name))
    if isinstance(config.degree, float) and config.degree.is_integer():
        object.__setattr__(config, "degree", int(config.degree))
    for name in ("weight_positive", "weight_negative"):
        _check(name, getattr(config, name))
    if config.scaling not in SCALINGS:
        raise InputError(f"scaling must be one of {', '.join(SCALINGS)}; got {config.scaling!r}")


def _check(name: str, value, also: str = "") -> None:
    problem = PARAMETERS[name].problem(value, also)
    if problem is not None:
        raise InputError(problem)
