"""Small output helpers of the evidence commands (predict, fit --test).

CAUTION is the line printed on stderr wherever the tool scores data; a
shared home for it may replace this one.
"""

from __future__ import annotations

import os
from pathlib import Path

from solver import InputError

CAUTION = ("caution: a boundary tuned by eye on training points is not a validated model; "
           "validate on held-out data; where it decides about people, parts or patients, "
           "follow local regulations and licensed practice")


def refuse_overwriting_inputs(output, inputs) -> None:
    """InputError when ``output`` names the same file as one of ``inputs``."""
    out = Path(output)
    for given in inputs:
        source = Path(given)
        same = out.resolve() == source.resolve()
        if not same and out.exists() and source.exists():
            same = os.path.samefile(out, source)
        if same:
            raise InputError(f"the output {output} is the input file {given}; writing it would "
                             "destroy the input — choose another name for -o")
