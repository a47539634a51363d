"""Parsing JSON that anyone may have written: bounded before anything recurses or converts.

``json.loads`` alone accepts what later steps choke on: 990 nested arrays
(fine for its C scanner, a RecursionError for every recursive walk after
it), a 400-digit integer (an OverflowError when it meets a float), and a key
written twice (``"C": 1000.0, "C": 1.0``), which Python keeps the last of
while other readers keep the first, so two programs would read two
different experiments under one checksum.  ``parse_untrusted`` refuses all
three with a FileFormatError that says where.
"""

from __future__ import annotations

import json
import re

import numpy as np

from solver.errors import FileFormatError
from solver.messages import listing, quote

MAX_DEPTH = 16           # an experiment nests 5 deep; a classifier file 4
MAX_INTEGER_DIGITS = 20  # every integer we write (indices, lines, counts) fits in 20 digits

# a JSON string, unrolled so that a 200 MB string is one fast scan
_STRING = re.compile(r'"[^"\\]*(?:\\.[^"\\]*)*"', re.DOTALL)


_NOT_STRUCTURE = bytes(sorted(set(range(256)) - set(b'"[]{}')))   # bytes a depth scan skips


class _Twice(dict):
    """An object that named a key more than once: (key, first value, last value)."""

    twice: list


def parse_untrusted(text: str, name: str):
    """The parsed document, or FileFormatError (nesting, integer size, duplicate keys)."""
    depth = nesting_depth(text)
    if depth > MAX_DEPTH:
        raise FileFormatError(f"{name} nests arrays and objects {depth} deep; an experiment "
                              f"nests at most {MAX_DEPTH} deep, so this is not one (or it "
                              f"was damaged)")
    found_twice = []
    data = json.loads(text, parse_constant=_reject_constant, parse_int=_bounded_int,
                      object_pairs_hook=lambda pairs: _object(pairs, found_twice))
    if found_twice:
        problems = [f"{path}: the key {quote(key)} is written twice (first {quote(first)}, "
                    f"then {quote(last)}); readers differ on which one counts, so keep one"
                    for path, key, first, last in duplicate_keys(data)]
        raise FileFormatError(f"{name} names a key twice in one object "
                              f"({listing(sorted({k for _p, k, _f, _l in duplicate_keys(data)}))}"
                              f"); fix the file or save the experiment again", problems=problems)
    return data


def nesting_depth(text: str) -> int:
    """How deep arrays and objects nest in ``text``, brackets inside strings not counted.

    Without a backslash every '"' opens or closes a string, so "inside a
    string" is an odd count of quotes so far (one numpy pass); with escapes,
    the strings are first blanked by a regular expression.
    """
    if "\\" in text:
        text = _STRING.sub('""', text)
    structure = text.encode("utf-8", "surrogatepass").translate(None, _NOT_STRUCTURE)
    codes = np.frombuffer(structure, dtype=np.uint8)
    outside = (np.cumsum(codes == ord('"'), dtype=np.int64) & 1) == 0
    step = np.zeros(len(codes), dtype=np.int8)
    step[((codes == ord("[")) | (codes == ord("{"))) & outside] = 1
    step[((codes == ord("]")) | (codes == ord("}"))) & outside] = -1
    return int(np.cumsum(step, dtype=np.int64).max(initial=0))


def duplicate_keys(document, path: str = ""):
    """(JSON pointer, key, first value, last value) of every key written twice.

    Iterative, so it is safe on any depth ``parse_untrusted`` lets through.
    """
    found, stack = [], [(path, document)]
    while stack:
        where, value = stack.pop()
        if isinstance(value, _Twice):
            found += [(where or "(top level)", key, first, last)
                      for key, first, last in value.twice]
        if isinstance(value, dict):
            stack += [(f"{where}/{_escape(k)}", v) for k, v in value.items()
                      if isinstance(v, (dict, list))]
        elif isinstance(value, list):
            stack += [(f"{where}/{i}", v) for i, v in enumerate(value)
                      if isinstance(v, (dict, list))]
    return sorted(found)


def _object(pairs, found_twice):
    obj = dict(pairs)
    if len(obj) == len(pairs):
        return obj
    marked, first = _Twice(), {}
    marked.twice = []
    for key, value in pairs:
        if key in first:
            marked.twice.append((key, first[key], value))
        else:
            first[key] = value
        marked[key] = value
    found_twice.append(marked)
    return marked


def _bounded_int(text: str) -> int:
    digits = len(text.lstrip("-"))
    if digits > MAX_INTEGER_DIGITS:
        raise ValueError(f"a whole number with {digits} digits ({quote(text, 24)}) is larger "
                         f"than any an experiment holds (at most {MAX_INTEGER_DIGITS} digits); "
                         f"write a decimal number such as 1.5e30 instead")
    return int(text)


def _reject_constant(name: str):
    raise ValueError(f"{name} is not a JSON number; write null or a finite number")


def _escape(key) -> str:
    return str(key).replace("~", "~0").replace("/", "~1")
