"""Checking a document against the experiment schema, every problem with its JSON path.

jsonschema finds the problems; this module only words them:
``/points/17/label: expected one of 'pass', 'fail'; got 'maybe'``.
"""

from __future__ import annotations

import copy
import json
from functools import lru_cache

from jsonschema import Draft202012Validator

from solver import kernels
from solver.result import STATUSES
from solver.files.bundled import resource_json

MAX_PROBLEMS = 100  # listed one by one; the rest are counted

_JSON_TYPES = {dict: "an object", list: "an array", str: "a string", bool: "true/false",
               int: "a number", float: "a number", type(None): "null"}


def experiment_schema() -> dict:
    """The experiment schema, its kernel enumerations read from the kernel registry."""
    return _schema_for(kernels.names())


@lru_cache(maxsize=4)
def _schema_for(kernel_names: tuple[str, ...]) -> dict:
    schema = copy.deepcopy(resource_json("experiment.schema.json"))
    for where in (schema["properties"]["config"], schema["$defs"]["model"]):
        where["properties"]["kernel"]["enum"] = list(kernel_names)
    schema["$defs"]["results"]["properties"]["status"]["items"]["enum"] = list(STATUSES)
    return schema


def _validator() -> Draft202012Validator:
    return _validator_for(kernels.names())


@lru_cache(maxsize=4)
def _validator_for(kernel_names: tuple[str, ...]) -> Draft202012Validator:
    return Draft202012Validator(_schema_for(kernel_names))


def pointer(path) -> str:
    """JSON Pointer (RFC 6901) of a path of keys and indices; '' is the whole document."""
    parts = [str(part).replace("~", "~0").replace("/", "~1") for part in path]
    return "/" + "/".join(parts) if parts else "(top level)"


def schema_problems(document) -> list[str]:
    """Every way ``document`` breaks the experiment schema, in document order.

    The long per-point arrays are first checked by a plain loop that is at
    least as strict as the schema; when it finds them clean, jsonschema sees
    only their first entry (validating 100,000 points one by one through
    jsonschema takes seconds).  Any doubt and jsonschema sees everything.
    """
    errors = sorted(_validator().iter_errors(_trimmed(document)),
                    key=lambda e: [(0, p, "") if isinstance(p, int) else (1, 0, str(p))
                                   for p in e.absolute_path])
    return cap([f"{pointer(e.absolute_path)}: {_wording(e)}" for e in errors])


_NUMBER = (int, float)
_LABEL = (str, int, float, bool)
_STATUS = frozenset(STATUSES)


def _trimmed(document):
    """``document`` with clean long arrays cut to their first entry (a shallow copy)."""
    if not isinstance(document, dict):
        return document
    trimmed = dict(document)
    points = document.get("points")
    if isinstance(points, list) and len(points) > 1 and all(map(_plain_point, points)):
        trimmed["points"] = points[:1]
    results = document.get("results")
    if isinstance(results, dict):
        results = dict(results)
        for key, clean in (("alpha", _plain_number), ("slack", _plain_number),
                           ("decision", _plain_number), ("status", _STATUS.__contains__),
                           ("support", _plain_index)):
            values = results.get(key)
            if isinstance(values, list) and len(values) > 1 and _all(clean, values):
                results[key] = values[:1]
        trimmed["results"] = results
    return trimmed


def _all(clean, values) -> bool:
    try:
        return all(map(clean, values))
    except TypeError:          # unhashable entries in a status list
        return False


def _plain_number(value) -> bool:
    return type(value) in _NUMBER


def _plain_index(value) -> bool:
    return type(value) is int and value >= 0


def _plain_point(point) -> bool:
    if type(point) is not dict or not 2 <= len(point) <= 3:
        return False
    x, label = point.get("x"), point.get("label", None)
    if type(x) is not list or len(x) != 2 or type(x[0]) not in _NUMBER \
            or type(x[1]) not in _NUMBER or type(label) not in _LABEL:
        return False
    if len(point) == 3:
        line = point.get("line")
        return type(line) is int and line >= 1
    return True


def non_finite_paths(value, path=()) -> list[str]:
    """JSON pointers of every infinite or NaN number (JSON has no such numbers)."""
    if isinstance(value, float):
        return [] if value == value and value not in (float("inf"), float("-inf")) \
            else [f"{pointer(path)}: expected a finite number; got {value!r}"]
    found = []
    if isinstance(value, dict):
        for key, item in value.items():
            found += non_finite_paths(item, path + (key,))
    elif isinstance(value, list):
        for index, item in enumerate(value):
            found += non_finite_paths(item, path + (index,))
    return found


def cap(problems: list[str]) -> list[str]:
    if len(problems) <= MAX_PROBLEMS:
        return problems
    return problems[:MAX_PROBLEMS] + [f"... and {len(problems) - MAX_PROBLEMS} more problems"]


def short(value, limit: int = 60) -> str:
    text = json.dumps(value, ensure_ascii=False, default=str)
    return text if len(text) <= limit else text[:limit - 3] + "..."


def _wording(error) -> str:
    kind, detail, value = error.validator, error.validator_value, error.instance
    if kind == "required":
        missing = [key for key in detail if isinstance(value, dict) and key not in value]
        return "missing the required key " + ", ".join(repr(key) for key in missing)
    if kind == "enum":
        return (f"expected one of {', '.join(short(v) for v in detail)}; "
                f"got {short(value)}")
    if kind == "const":
        return f"expected {short(detail)}; got {short(value)}"
    if kind == "type":
        wanted = detail if isinstance(detail, list) else [detail]
        got = "null" if value is None else f"{_JSON_TYPES.get(type(value), 'a value')} " \
                                           f"{short(value)}"
        return f"expected {' or '.join(_type_word(t) for t in wanted)}; got {got}"
    if kind == "additionalProperties":
        known = set(error.schema.get("properties", {}))
        extra = [key for key in value if key not in known]
        return (f"unexpected key {', '.join(repr(k) for k in extra)}; "
                f"the known keys are {', '.join(sorted(known))}")
    if kind in ("minItems", "maxItems"):
        return f"expected {_count_phrase(kind, detail)} entries; got {len(value)}"
    if kind in ("minimum", "exclusiveMinimum", "maximum"):
        relation = {"minimum": ">=", "exclusiveMinimum": ">", "maximum": "<="}[kind]
        return f"expected a number {relation} {detail}; got {short(value)}"
    if kind == "pattern":
        return f"expected 64 lowercase hex digits; got {short(value)}"
    return error.message


def _type_word(name: str) -> str:
    return {"object": "an object", "array": "an array", "string": "a string",
            "number": "a number", "integer": "a whole number", "boolean": "true/false",
            "null": "null"}.get(name, name)


def _count_phrase(kind: str, n: int) -> str:
    return f"at least {n}" if kind == "minItems" else f"at most {n}"
