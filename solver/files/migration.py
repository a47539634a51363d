"""Bringing experiment documents of older format versions up to the current one.

Each step takes a document of version k and returns one of version k + 1.

Version 0 (early files, no checksum, no stored results):

    {"format": "slackline-experiment", "version": 0,
     "features": ["bore", "roughness"], "label": "result", "positive": "pass",
     "points": [[x1, x2, label], ...],
     "config": {"C": 1.0 or "hard", "kernel": ..., "gamma": ..., ...},
     "note": "..."}

Version 1 (the first sealed format) named the polynomial kernel "poly", its
offset "coef0" and the scalings "standard" and "minmax".

Version 2 is described by resources/experiment.schema.json: the kernel
"polynomial", its offset "offset", the scalings "zscore" and "range".
"""

from __future__ import annotations

from solver.config import FitConfig
from solver.errors import FileFormatError, InputError

CURRENT_VERSION = 2


def migrate(document: dict, name: str) -> dict:
    """The document at CURRENT_VERSION (unchanged when it is already current)."""
    version = document.get("version")
    if not isinstance(version, int) or isinstance(version, bool):
        return document  # the schema check reports the bad version with its path
    if version > CURRENT_VERSION:
        raise FileFormatError(f"{name} was written in experiment format version {version}, by "
                              f"a newer Slackline; this one reads versions 0 to "
                              f"{CURRENT_VERSION} — update Slackline to open it")
    for step in range(max(version, 0), CURRENT_VERSION):
        try:
            document = MIGRATIONS[step](document)
        except (KeyError, TypeError, ValueError, IndexError, AttributeError) as exc:
            raise FileFormatError(f"{name} is an experiment of format version {step} that "
                                  f"cannot be converted: {exc.__class__.__name__} {exc}") from None
    return document


def v0_to_v1(old: dict) -> dict:
    points = [{"x": [float(p[0]), float(p[1])], "label": p[2]} for p in old["points"]]
    labels = []
    for point in points:
        if point["label"] not in labels:
            labels.append(point["label"])
    if len(labels) != 2:
        raise ValueError(f"the points carry {len(labels)} distinct labels; two are needed")
    positive = old.get("positive", 1 if 1 in labels else labels[0])
    if positive not in labels:
        raise ValueError(f"the positive label {positive!r} is not one of {labels}")
    mapping = [{"label": positive, "sign": 1},
               {"label": next(v for v in labels if v != positive), "sign": -1}]
    features = [{"name": str(n), "unit": ""} for n in old.get("features", ["x1", "x2"])]
    return {
        "format": "slackline-experiment",
        "version": 2,
        "written": {"at": None, "slackline": None, "python": None, "numpy": None,
                    "cvxopt": None, "migrated_from": 0},
        "note": old.get("note"),
        "data": {"features": features, "label_name": str(old.get("label", "class")),
                 "label_mapping": mapping, "source": None},
        "points": points,
        "config": _v0_config(old.get("config", {})),
        "results": None,
    }


def _v0_config(old: dict) -> dict:
    old = _v1_names(dict(old))
    data = FitConfig().to_dict()
    C = old.pop("C", data["C"])
    data["hard_margin"] = C == "hard"          # version 0 wrote a hard margin as C = "hard"
    if C != "hard":
        data["C"] = C
    options = old.pop("options", {}) or {}
    for key, value in old.items():
        if key not in data:
            raise ValueError(f"unknown setting {key!r} in the version 0 config")
        data[key] = value
    data["options"].update(options)
    try:
        return FitConfig.from_dict(data).to_dict()
    except InputError as exc:
        raise ValueError(str(exc)) from None


# version 1 spellings -> version 2 spellings
V1_KERNELS = {"poly": "polynomial"}
V1_SCALINGS = {"standard": "zscore", "minmax": "range"}


def _v1_names(settings: dict) -> dict:
    """A config or model object with the version 1 names replaced (a new dict)."""
    settings = dict(settings)
    if "coef0" in settings:
        settings["offset"] = settings.pop("coef0")
    if isinstance(settings.get("kernel"), str):
        settings["kernel"] = V1_KERNELS.get(settings["kernel"], settings["kernel"])
    if isinstance(settings.get("scaling"), str):
        settings["scaling"] = V1_SCALINGS.get(settings["scaling"], settings["scaling"])
    return settings


def v1_to_v2(old: dict) -> dict:
    new = dict(old)
    new["version"] = 2
    if isinstance(old.get("written"), dict):
        new["written"] = {**old["written"], "migrated_from": old["written"].get("migrated_from", 1)
                          if old["written"].get("migrated_from") is not None else 1}
    if isinstance(old.get("config"), dict):
        new["config"] = _v1_names(old["config"])
    results = old.get("results")
    if isinstance(results, dict) and isinstance(results.get("model"), dict):
        new["results"] = {**results, "model": _v1_names(results["model"])}
    return new


MIGRATIONS = {0: v0_to_v1, 1: v1_to_v2}
