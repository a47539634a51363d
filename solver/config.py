"""The fit configuration: every setting that decides the solution.

Checked once, here, at the door; the rest of ``solver`` trusts it.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field, replace

from solver.errors import InputError
from solver.limits import check_setting

KERNELS = ("linear", "polynomial", "rbf")
SCALINGS = ("none", "zscore", "range")


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
    kernel       "linear", "polynomial" (gamma * x.z + offset) ** degree, or
                 "rbf" exp(-gamma |x - z|^2).
    weight_positive / weight_negative
                 class weights: the penalty of point i is C times the weight
                 of its class.
    scaling      "none", "zscore" (zero mean, unit variance) or "range"
                 (each feature onto [0, 1]); w and b are always reported in
                 the original units.
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
    def uses_feature_map(self) -> bool:
        """Linear and polynomial fits run in the primal on explicit features."""
        return self.kernel in ("linear", "polynomial")

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


def _is_positive_number(value) -> bool:
    try:
        return (isinstance(value, (int, float)) and not isinstance(value, bool)
                and math.isfinite(value) and value > 0)
    except OverflowError:   # an int beyond any float
        return False


def _check_config(config: FitConfig) -> None:
    if not isinstance(config.hard_margin, bool):
        raise InputError(f"hard_margin must be true or false; got {config.hard_margin!r}")
    if not config.hard_margin and not _is_positive_number(config.C):
        raise InputError(f"C must be a positive number or 'hard'; got {config.C!r}")
    if not config.hard_margin:
        check_setting("C", config.C)
    if config.kernel not in KERNELS:
        raise InputError(f"kernel must be one of {', '.join(KERNELS)}; got {config.kernel!r}")
    if config.kernel in ("polynomial", "rbf") and not _is_positive_number(config.gamma):
        raise InputError(f"gamma must be a positive number; got {config.gamma!r}")
    if config.kernel in ("polynomial", "rbf"):
        check_setting("gamma", config.gamma)
    if config.kernel == "polynomial":
        degree = config.degree
        if isinstance(degree, float) and degree.is_integer():
            object.__setattr__(config, "degree", int(degree))
            degree = config.degree
        if not isinstance(degree, int) or isinstance(degree, bool) or not 1 <= degree <= 10:
            raise InputError(f"degree must be a whole number from 1 to 10; got {degree!r}")
        if not (_is_positive_number(config.offset) or config.offset == 0):
            raise InputError(f"offset must be a number >= 0 (so the polynomial kernel is an "
                             f"inner product of real features); got {config.offset!r}")
        check_setting("offset", config.offset)
    for name in ("weight_positive", "weight_negative"):
        value = getattr(config, name)
        if not _is_positive_number(value):
            raise InputError(f"{name} (a class weight) must be a positive number; got {value!r}")
        check_setting("weight", value, f"{name} (a class weight)")
    if config.scaling not in SCALINGS:
        raise InputError(f"scaling must be one of {', '.join(SCALINGS)}; got {config.scaling!r}")
