"""Output guard of ``slackline predict``: never write over an input file."""

from __future__ import annotations

import os
from pathlib import Path

from solver import InputError

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
