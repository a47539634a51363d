"""Experiment files: points, fit configuration and figures in one checked JSON document.

The format is described by resources/experiment.schema.json (version 2; older
versions are migrated by solver.files.migration).
Every load validates the document against it and lists every problem with
its JSON path; a SHA-256 over the canonical content (sorted keys, compact
separators, UTF-8, without the "checksum" key) catches edited or damaged
files.  Writes are atomic (solver.files.atomic).
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import platform
import sys
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from solver.files.atomic import atomic_write_text
from solver.config import FitConfig
from solver.files.dataset import Dataset
from solver.errors import FileFormatError, InputError
from solver.files.migration import CURRENT_VERSION, migrate
from solver.files.consistency import consistency_problems, label_key as _key
from solver.files.schema_check import cap, non_finite_paths, schema_problems, short
from solver.files.tables import require_regular_file
from solver.files.untrusted import parse_untrusted

FORMAT_NAME = "slackline-experiment"
FORMAT_VERSION = CURRENT_VERSION


@dataclass(frozen=True)
class Experiment:
    dataset: Dataset
    config: FitConfig
    results: dict | None         # the stored figures (FitResult.to_dict), None if unfitted
    note: str | None
    written: dict                # provenance: at, slackline, python, numpy, cvxopt, platform
    format_version: int = FORMAT_VERSION   # as found in the file, before migration
    checksum: str | None = None
    heldout: dict | None = None  # the stored held-out section (heldout_points), if any


# -- writing -------------------------------------------------------------------
def experiment_to_dict(dataset: Dataset, config: FitConfig, result=None, note=None,
                       heldout=None) -> dict:
    """The complete document (checksum included) for ``dataset`` fitted with ``config``."""
    if not isinstance(dataset, Dataset):
        raise InputError(f"dataset must be a Dataset; got {type(dataset).__name__}")
    if not isinstance(config, FitConfig):
        raise InputError(f"config must be a FitConfig; got {type(config).__name__}")
    if note is not None and not isinstance(note, str):
        raise InputError(f"the note must be text or None; got {type(note).__name__}")
    if result is not None:
        if result.config != config:
            raise InputError("the result was fitted with a different configuration than the "
                             "one given; save the result's own configuration or refit first")
        if len(result.y) != len(dataset) or not np.array_equal(result.X, dataset.X):
            raise InputError(f"the result belongs to other points ({len(result.y)} points) "
                             f"than the data set ({len(dataset)} points); refit first")
    rows = tuple(dataset.rows)
    points = []
    for i in range(len(dataset)):
        point = {"x": [float(dataset.X[i, 0]), float(dataset.X[i, 1])],
                 "label": _label(dataset.labels[i])}
        if len(rows) == len(dataset):
            point["line"] = int(rows[i])
        points.append(point)
    source = None
    if dataset.source is not None and dataset.sha256 is not None:
        source = {"file": str(dataset.source), "sha256": str(dataset.sha256),
                  "skipped_lines": [int(n) for n in dataset.skipped]}
    document = {
        "format": FORMAT_NAME,
        "version": FORMAT_VERSION,
        "written": provenance(),
        "note": note,
        "data": {
            "features": [{"name": str(n), "unit": str(u)}
                         for n, u in zip(dataset.feature_names, dataset.units)],
            "label_name": str(dataset.label_name),
            "label_mapping": [{"label": _label(label), "sign": int(sign)} for label, sign in
                              sorted(dataset.label_mapping.items(), key=lambda kv: -kv[1])],
            "source": source,
        },
        "points": points,
        "config": config.to_dict(),
        "results": None if result is None else result.to_dict(),
    }
    if heldout is not None:          # a heldout_points.heldout_section(...)
        document["heldout"] = heldout
    document["checksum"] = {"algorithm": "sha256", "value": content_checksum(document)}
    return document


def save_experiment(path, dataset: Dataset, result, note=None, config=None,
                    heldout=None, **write_options) -> Path:
    """Write ``dataset`` with ``result`` (or, unfitted, with ``config``) to ``path`` atomically.

    ``heldout``: a held-out section (solver.files.heldout_points), stored beside the fit.
    ``write_options`` go to atomic_write_text (``expect``: what must still be on disk).
    """
    if config is None:
        config = result.config if result is not None else FitConfig()
    document = experiment_to_dict(dataset, config, result, note=note, heldout=heldout)
    atomic_write_text(path, json_text(document), **write_options)
    return Path(path)


def json_text(document: dict) -> str:
    """Readable JSON: sections indented, each point and each number list on one line."""
    return _pretty(document, 0) + "\n"


def canonical_bytes(document: dict) -> bytes:
    content = {k: v for k, v in document.items() if k != "checksum"}
    return json.dumps(content, sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False).encode("utf-8")


def content_checksum(document: dict) -> str:
    return hashlib.sha256(canonical_bytes(document)).hexdigest()


# -- reading -------------------------------------------------------------------
def load_experiment(path) -> Experiment:
    """Read, migrate, validate and check an experiment file; FileFormatError otherwise."""
    path = require_regular_file(path)
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise FileFormatError(f"cannot read {path}: {exc.strerror or exc}") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise FileFormatError(f"{path.name} is not an experiment file: byte {exc.start} is "
                              "not UTF-8 text") from None
    if not text.strip():
        raise FileFormatError(f"{path.name} is empty; an experiment file holds one JSON object")
    try:
        data = parse_untrusted(text, path.name)
    except FileFormatError:
        raise
    except json.JSONDecodeError as exc:
        hint = " (the file looks cut short)" if exc.pos >= len(text.rstrip()) else ""
        raise FileFormatError(f"{path.name} is not valid JSON: {exc.msg} at line {exc.lineno}, "
                              f"column {exc.colno}{hint}") from None
    except (ValueError, RecursionError) as exc:
        raise FileFormatError(f"{path.name} is not valid JSON: {exc}") from None
    return experiment_from_dict(data, name=path.name)


def experiment_from_dict(data, name: str = "the experiment") -> Experiment:
    """Validate a parsed document (any supported version) and build the Experiment."""
    if not isinstance(data, dict):
        raise FileFormatError(f"{name} is not an experiment: expected a JSON object at the top "
                              f"level; got {short(data)}")
    if "format" in data and data["format"] != FORMAT_NAME:
        raise FileFormatError(f"{name} is not a Slackline experiment: its format is "
                              f"{short(data.get('format'))}, expected {FORMAT_NAME!r}")
    found_version = data.get("version")
    sealed_problems = _sealed_checksum_problems(data)
    if sealed_problems:
        raise FileFormatError(f"{name} is not a valid experiment file (1 problem); "
                              f"fix the file or save the experiment again",
                              problems=sealed_problems)
    migrated = migrate(data, name)
    if migrated is not data:
        try:
            migrated["checksum"] = {"algorithm": "sha256", "value": content_checksum(migrated)}
        except ValueError:
            pass  # a non-finite number, reported with its path below
    try:
        problems = schema_problems(migrated) or cap(non_finite_paths(migrated))
    except RecursionError:
        raise FileFormatError(f"{name} is nested too deeply to be an experiment") from None
    if not problems:
        problems = consistency_problems(migrated)
    if not problems:
        problems = _checksum_problems(migrated)
    if problems:
        raise FileFormatError(f"{name} is not a valid experiment file ({_count(problems)}); "
                              f"fix the file or save the experiment again", problems=problems)
    return _build(migrated, found_version)


def _build(document: dict, found_version) -> Experiment:
    data, points = document["data"], document["points"]
    mapping = {_key(m["label"]): m["sign"] for m in data["label_mapping"]}
    labels = tuple(_key(p["label"]) for p in points)
    lines = tuple(p["line"] for p in points) if all("line" in p for p in points) else ()
    source = data["source"] or {}
    dataset = Dataset(
        X=np.array([p["x"] for p in points], dtype=float).reshape(-1, 2),
        y=np.array([mapping[label] for label in labels], dtype=int),
        labels=labels,
        feature_names=tuple(f["name"] for f in data["features"]),
        label_name=data["label_name"], label_mapping=mapping,
        source=source.get("file"), sha256=source.get("sha256"), rows=lines,
        skipped=tuple(source.get("skipped_lines", ())),
        units=tuple(f["unit"] for f in data["features"]))
    return Experiment(dataset=dataset, config=FitConfig.from_dict(document["config"]),
                      results=document["results"], note=document.get("note"),
                      written=dict(document["written"]),
                      format_version=found_version if isinstance(found_version, int)
                      else FORMAT_VERSION,
                      checksum=document["checksum"]["value"],
                      heldout=document.get("heldout"))


def _sealed_checksum_problems(document: dict) -> list[str]:
    """An older sealed file (version 1 on) must match its own checksum before it is
    migrated: the migrated copy is sealed anew, which would hide an edit."""
    version, seal = document.get("version"), document.get("checksum")
    if (not isinstance(version, int) or isinstance(version, bool) or not
            1 <= version < FORMAT_VERSION or not isinstance(seal, dict)
            or not isinstance(seal.get("value"), str)):
        return []
    try:
        return _checksum_problems(document)
    except (TypeError, ValueError):
        return []  # unserialisable content: the schema check names it after migration


def _checksum_problems(document: dict) -> list[str]:
    stored = document["checksum"]["value"]
    computed = content_checksum(document)
    if stored == computed:
        return []
    return [f"/checksum/value: the content does not match its checksum, so the file was "
            f"edited or damaged after it was written (stored {stored[:12]}..., content gives "
            f"{computed[:12]}...)"]


# -- helpers -------------------------------------------------------------------
def provenance() -> dict:
    import cvxopt

    from solver import __version__
    return {"at": _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds"),
            "slackline": __version__, "python": platform.python_version(),
            "numpy": np.__version__, "cvxopt": getattr(cvxopt, "__version__", "unknown"),
            "platform": f"{platform.system()} {platform.machine()}".strip() or sys.platform}


def _label(value):
    """A label as a JSON scalar (numpy scalars become Python values)."""
    if isinstance(value, np.generic):
        value = value.item()
    if isinstance(value, (str, bool, int)) or (isinstance(value, float) and math.isfinite(value)):
        return value
    raise InputError(f"labels must be text, numbers or true/false to be saved; got {value!r}")


def _count(problems: list[str]) -> str:
    return "1 problem" if len(problems) == 1 else f"{len(problems)} problems"


_LINE = json.JSONEncoder(ensure_ascii=False, allow_nan=False, separators=(", ", ": "))


def _pretty(value, depth: int) -> str:
    pad, inner = "  " * depth, "  " * (depth + 1)
    if isinstance(value, dict) and value and (depth < 2 or len(_LINE.encode(value)) > 100):
        items = [f"{inner}{_LINE.encode(k)}: {_pretty(v, depth + 1)}" for k, v in value.items()]
        return "{\n" + ",\n".join(items) + "\n" + pad + "}"
    if isinstance(value, list) and len(value) > 3 and isinstance(value[0], (dict, list)):
        return "[\n" + ",\n".join(inner + _LINE.encode(v) for v in value) + "\n" + pad + "]"
    return _LINE.encode(value)
