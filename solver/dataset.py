"""Labelled two-feature data sets read from CSV / TSV (pandas).

A Dataset keeps the labels as the user wrote them and the mapping of those
labels onto the signs +1 / -1 the solver uses.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from .errors import FileFormatError, InputError


@dataclass(frozen=True)
class Dataset:
    X: np.ndarray                     # n x 2, feature values
    y: np.ndarray                     # n, signs +1 / -1
    labels: tuple                     # n, labels as written in the file
    feature_names: tuple[str, str]
    label_name: str
    label_mapping: dict               # label as written -> +1 / -1
    source: str | None = None         # file name, when imported
    sha256: str | None = None         # of the source file's bytes
    rows: tuple = ()                  # 1-based line numbers of the points in the file
    skipped: tuple = field(default=())  # line numbers skipped (--drop-incomplete)

    def mapping_text(self) -> str:
        return ", ".join(f"{label!r} -> {sign:+d}" for label, sign in
                         sorted(self.label_mapping.items(), key=lambda kv: -kv[1]))


def sign_mapping(values, positive=None) -> dict:
    """Map exactly two distinct label values onto +1 / -1.

    {-1, 1} and {0, 1} map 1 to +1; any other pair needs ``positive``.
    """
    distinct = sorted(set(values), key=str)
    if len(distinct) != 2:
        counts = pd.Series(list(values)).value_counts()
        found = ", ".join(f"{k!r} ({v})" for k, v in counts.items())
        raise InputError(f"the label column must hold exactly two distinct values; "
                         f"found {len(distinct)}: {found or 'none'}")
    if positive is not None:
        matches = [v for v in distinct if str(v) == str(positive)
                   or _same_number(v, positive)]
        if not matches:
            raise InputError(f"--positive {positive!r} is not one of the labels "
                             f"{distinct[0]!r}, {distinct[1]!r}")
        pos = matches[0]
        return {v: (1 if v == pos else -1) for v in distinct}
    numeric = {_as_number(v) for v in distinct}
    if numeric in ({-1.0, 1.0}, {0.0, 1.0}):
        return {v: (1 if _as_number(v) == 1.0 else -1) for v in distinct}
    raise InputError(f"the labels are {distinct[0]!r} and {distinct[1]!r}; say which one is "
                     f"the positive class with --positive")


def _as_number(value):
    try:
        return float(value)
    except (TypeError, ValueError):
        return None


def _same_number(a, b) -> bool:
    x, y = _as_number(a), _as_number(b)
    return x is not None and x == y


def load_table(path, features=None, label=None, positive=None,
               drop_incomplete=False) -> Dataset:
    """Read a CSV or TSV with a header row (minimal first version)."""
    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise FileFormatError(f"cannot read {path}: {exc.strerror}") from None
    sep = "\t" if path.suffix.lower() in (".tsv", ".tab") else ","
    import io
    try:
        frame = pd.read_csv(io.BytesIO(raw), sep=sep)
    except (pd.errors.ParserError, pd.errors.EmptyDataError, UnicodeDecodeError) as exc:
        raise FileFormatError(f"{path.name} is not a readable table: {exc}") from None
    columns = list(frame.columns)
    label = label or columns[-1]
    if features is None:
        numeric = [c for c in columns if c != label and pd.api.types.is_numeric_dtype(frame[c])]
        if len(numeric) < 2:
            raise InputError(f"{path.name} needs two numeric feature columns; found "
                             f"{numeric or 'none'} — name them with --features A,B")
        features = numeric[:2]
    for name in [*features, label]:
        if name not in columns:
            raise InputError(f"no column {name!r} in {path.name}; columns are {columns}")
    values = frame[list(features)].apply(pd.to_numeric, errors="coerce")
    bad = values.isna().any(axis=1) | frame[label].isna()
    lines = np.arange(len(frame)) + 2  # header is line 1
    if bad.any() and not drop_incomplete:
        listed = ", ".join(str(n) for n in lines[bad.to_numpy()][:20])
        raise InputError(f"rows with a missing or non-numeric feature or label at line(s) "
                         f"{listed}; fix them or pass --drop-incomplete to skip them")
    keep = ~bad.to_numpy()
    labels = tuple(frame[label][keep].tolist())
    mapping = sign_mapping(labels, positive)
    y = np.array([mapping[v] for v in labels], dtype=int)
    return Dataset(X=values.to_numpy(dtype=float)[keep], y=y, labels=labels,
                   feature_names=(str(features[0]), str(features[1])), label_name=str(label),
                   label_mapping=mapping, source=path.name,
                   sha256=hashlib.sha256(raw).hexdigest(), rows=tuple(lines[keep].tolist()),
                   skipped=tuple(lines[~keep].tolist()))
