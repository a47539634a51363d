"""Checking a document against the experiment schema, every problem with its JSON path.

jsonschema finds the problems; this module only words them:
``/points/17/label: expected one of 'pass', 'fail'; got 'maybe'``.
"""

from __future__ import annotations

import json
from functools import lru_cache
from pathlib import Path

from jsonschema import Draft202012Validator

SCHEMA_PATH = Path(__file__).resolve().parent.parent / "resources" / "experiment.schema.json"
MAX_PROBLEMS = 100  # listed one by one; the rest are counted

_JSON_TYPES = {dict: "an object", list: "an array", str: "a string", bool: "true/false",
               int: "a number", float: "a number", type(None): "null"}


@lru_cache(maxsize=1)
def experiment_schema() -> dict:
    with open(SCHEMA_PATH, encoding="utf-8") as stream:
        return json.load(stream)


@lru_cache(maxsize=1)
def _validator() -> Draft202012Validator:
    return Draft202012Validator(experiment_schema())


def pointer(path) -> str:
    """JSON Pointer (RFC 6901) of a path of keys and indices; '' is the whole document."""
    parts = [str(part).replace("~", "~0").replace("/", "~1") for part in path]
    return "/" + "/".join(parts) if parts else "(top level)"


def schema_problems(document) -> list[str]:
    """Every way ``document`` breaks the experiment schema, in document order."""
    errors = sorted(_validator().iter_errors(document),
                    key=lambda e: [(0, p, "") if isinstance(p, int) else (1, 0, str(p))
                                   for p in e.absolute_path])
    return cap([f"{pointer(e.absolute_path)}: {_wording(e)}" for e in errors])


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
