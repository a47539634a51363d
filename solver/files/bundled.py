"""The files that ship with Slackline: the experiment schema, the palette, the samples.

They are package data of ``solver`` (``solver/resources`` and ``solver/samples``
link to the top-level folders of a checkout, and a wheel carries copies), so
importlib.resources finds them in a checkout and in an installed wheel alike.
"""

from __future__ import annotations

import json
from functools import lru_cache
from importlib import resources
from importlib.resources.abc import Traversable

SAMPLE_TABLE_SUFFIXES = (".csv", ".tsv")


def resource(name: str) -> Traversable:
    """A file of the bundled resources folder, for example ``experiment.schema.json``."""
    return resources.files("solver") / "resources" / name


@lru_cache(maxsize=None)
def resource_json(name: str):
    """A bundled JSON resource, parsed once."""
    return json.loads(resource(name).read_text(encoding="utf-8"))


def samples() -> Traversable:
    """The bundled samples folder."""
    return resources.files("solver") / "samples"


def sample(name: str) -> Traversable:
    return samples() / name


def first_sample():
    """The first sample experiment in sorted order (or else the first sample table)."""
    folder = samples()
    if not folder.is_dir():
        return None
    names = sorted(entry.name for entry in folder.iterdir())
    for name in names:
        if name.endswith(".experiment.json"):
            return folder / name
    for name in names:
        if name.lower().endswith(SAMPLE_TABLE_SUFFIXES):
            return folder / name
    return None
