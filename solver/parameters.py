"""Every fit setting a user can type, declared once.

Config validation (solver.config), the command line (cli.common) and the
window's controls (app.panels.controls) all read this table, so a range, a
default or a help text is written in one place.
"""

from __future__ import annotations

import math
from dataclasses import dataclass


@dataclass(frozen=True)
class Parameter:
    """One numeric setting: its type, range, default and what it means."""

    name: str                  # FitConfig field and command-line option (--name)
    kind: type                 # float or int
    default: float
    low: float                 # smallest allowed value ...
    high: float                # ... and largest
    low_open: bool = False     # True: low itself is not allowed (a positive number)
    label: str = ""            # the window's row label
    help: str = ""             # tooltip and --help text
    step: float = 0.1          # spin-box step in the window
    decimals: int = 4          # spin-box decimals in the window

    def problem(self, value, also: str = "") -> str | None:
        """Why ``value`` is not allowed, in one sentence, or None when it is.

        ``also`` is appended to the allowed range: " or 'hard'" for C.
        """
        number = isinstance(value, (int, float)) and not isinstance(value, bool)
        if number and isinstance(value, int) and abs(value) > 1e300:
            number = False     # an int beyond any float (math.isfinite would overflow)
        if self.kind is int:
            if number and float(value).is_integer() and self.low <= value <= self.high:
                return None
            return (f"{self.name} must be a whole number from {self.low:g} to {self.high:g}"
                    f"{also}; got {value!r}")
        if number and math.isfinite(value) and (value > self.low if self.low_open
                                                else value >= self.low) and value <= self.high:
            return None
        return f"{self.name} must be {self.describe()}{also}; got {value!r}"

    def describe(self) -> str:
        if not self.low_open and math.isfinite(self.high):
            kind = "a positive number" if self.low > 0 else "a number"
            return f"{kind} from {self.low:g} to {self.high:g}"
        if self.low_open and self.low == 0:
            lower = "a positive number"
        else:
            lower = f"a number {'>' if self.low_open else '>='} {self.low:g}"
        return lower if math.isinf(self.high) else f"{lower} up to {self.high:g}"


PARAMETERS: dict[str, Parameter] = {p.name: p for p in (
    # ranges of C, gamma, offset and the weights: solver.limits says where they come from
    Parameter("C", float, 1.0, 1e-9, 1e12, label="C",
              help="regularisation strength: the price of one unit of slack. A smaller C "
                   "allows more slack and gives a wider, simpler margin"),
    Parameter("gamma", float, 0.5, 1e-9, 1e9, label="gamma",
              help="kernel width: a larger gamma makes each point's influence more local "
                   "(polynomial: the scale of x.x' inside the kernel)", step=0.1),
    Parameter("degree", int, 3, 1, 10, label="degree",
              help="polynomial degree d in (gamma x.x' + offset)^d, a whole number 1..10",
              step=1, decimals=0),
    Parameter("offset", float, 1.0, 0.0, 1e9, label="offset",
              help="the polynomial offset r in (gamma x.x' + r)^d, >= 0; with 0 only the "
                   "terms of exactly degree d remain", step=0.5, decimals=3),
    Parameter("weight_positive", float, 1.0, 1e-6, 1e6,
              label="+1 weight", help="class weight of the +1 class: its points' penalty is "
                                      "C times this factor", decimals=3),
    Parameter("weight_negative", float, 1.0, 1e-6, 1e6,
              label="\u22121 weight", help="class weight of the \u22121 class: its points' "
                                           "penalty is C times this factor", decimals=3),
)}
