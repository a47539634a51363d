"""Where a command writes: every output checked before any work, all written or none.

A command names its inputs (the files it reads) and its outputs by option
(``{"--points": args.points, "--classifier": args.classifier}``).
``check_outputs`` refuses, before anything is read or fitted, an output that

    resolves to one of the inputs (also through a symbolic or hard link),
    is a folder or another non-regular file (a pipe, a device),
    lies in a folder that does not exist or cannot be written,
    or is named by two outputs at once.

``write_outputs`` then writes every output to a temporary file beside its
target and swaps them all in at the end (solver.files.atomic.commit): a
failing writer leaves no file changed, and an output that another program
wrote since the check is not replaced.  ``print_json`` is the strict-JSON
printer every ``--json`` goes through.
"""

from __future__ import annotations

import contextlib
import json
import math
import os
import stat
import sys
from dataclasses import dataclass
from pathlib import Path

from solver.errors import InputError
from solver.files.atomic import commit, file_stamp, stage
from solver.messages import path_text


@dataclass(frozen=True)
class Output:
    option: str          # as the user typed it: "--save", "-o", "--points"
    path: Path           # as given
    stamp: object        # solver.files.atomic.file_stamp when checked


def check_outputs(inputs, outputs: dict) -> list[Output]:
    """The outputs that were given (None values skipped), checked; InputError otherwise."""
    read = [(Path(p), _real(p)) for p in inputs if p]
    planned, seen = [], {}
    for option, given in outputs.items():
        if given is None:
            continue
        path = Path(given)
        if not str(given).strip():
            raise InputError(f"{option} needs a file name; got an empty one")
        real = _real(path)
        for source, source_real in read:
            if real == source_real or _same_file(path, source):
                raise InputError(f"{option} {path_text(given)} is the file this command "
                                 f"reads; writing it would destroy the input, so choose "
                                 f"another name")
        if real in seen:
            raise InputError(f"{seen[real]} and {option} both name {path_text(given)}; "
                             f"give each output its own file")
        _check_place(option, path)
        seen[real] = option
        planned.append(Output(option, path, file_stamp(path)))
    return planned


def write_outputs(planned) -> None:
    """``planned``: (Output, writer) pairs; writer(path) writes one whole file to path.

    Every writer writes into a staged temporary file; only when all of them
    succeeded (and wrote something) are the targets replaced, together.
    """
    staged = []
    try:
        for output, writer in planned:
            temporary = stage(output.path)
            staged.append((temporary, output.path))
            try:
                writer(temporary)
            except OSError as exc:
                raise InputError(f"cannot write {output.option} {path_text(output.path)}: "
                                 f"{exc.strerror or exc}; no output was changed") from None
        commit(staged, {output.path: output.stamp for output, _ in planned})
    finally:
        for temporary, _target in staged:
            with contextlib.suppress(OSError):
                os.unlink(temporary)


def _real(path) -> str:
    return os.path.realpath(os.path.abspath(os.fspath(path)))


def _same_file(a: Path, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def _check_place(option: str, path: Path) -> None:
    shown = path_text(path)
    try:
        mode = os.stat(path).st_mode
    except FileNotFoundError:
        mode = None
    except OSError as exc:
        raise InputError(f"{option} {shown} cannot be used: {exc.strerror}") from None
    if mode is not None and stat.S_ISDIR(mode):
        raise InputError(f"{option} {shown} is a folder; give a file name, for example "
                         f"{path_text(path / ('out' + path.suffix))}")
    if mode is not None and not stat.S_ISREG(mode):
        raise InputError(f"{option} {shown} is not a regular file (a pipe or a device); "
                         f"give the name of a file to write")
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"{option} {shown}: the folder {path_text(folder)} does not exist; "
                         f"create it first or choose another place")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise InputError(f"{option} {shown}: the folder {path_text(folder)} cannot be "
                         f"written (permission denied); choose another place")


# -- strict JSON on stdout -----------------------------------------------------------
NON_FINITE_KEY = "non_finite_numbers"


def strict(data):
    """``data`` with every NaN or infinity replaced by null, and what was replaced.

    Returns (clean copy, {JSON pointer: "infinity" | "-infinity" | "not a number"}).
    """
    replaced = {}

    def walk(value, path):
        if isinstance(value, float) and not math.isfinite(value):
            replaced["/" + "/".join(path)] = ("not a number" if value != value else
                                              "infinity" if value > 0 else "-infinity")
            return None
        if isinstance(value, dict):
            return {k: walk(v, path + (str(k),)) for k, v in value.items()}
        if isinstance(value, (list, tuple)):
            return [walk(v, path + (str(i),)) for i, v in enumerate(value)]
        if hasattr(value, "item") and hasattr(value, "dtype"):   # a numpy scalar
            return walk(value.item(), path)
        return value

    return walk(data, ()), replaced


def print_json(data: dict, stream=None) -> None:
    """One strict JSON object on a line; non-finite numbers become null, listed under
    ``non_finite_numbers`` with what they were."""
    clean, replaced = strict(data)
    if replaced:
        clean[NON_FINITE_KEY] = replaced
    stream = stream or sys.stdout
    json.dump(clean, stream, allow_nan=False)
    stream.write("\n")
