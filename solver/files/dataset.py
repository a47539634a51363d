"""Labelled two-feature data sets, read from CSV / TSV (pandas) or made from points.

A Dataset keeps the labels as the user wrote them and the mapping of those
labels onto the signs +1 / -1 the solver uses.  A header such as
``bore deviation [um]`` gives the feature name ``bore deviation`` and the
unit ``um``.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from solver.errors import FileFormatError, InputError
from solver.messages import clip, listing, quote
from solver.files.tables import is_numeric_column, preview_table, read_table, to_numbers  # noqa: F401

_UNIT = re.compile(r"^(?P<name>.*\S)\s*\[(?P<unit>[^\[\]]*)\]$")
_LISTED = 20  # line numbers quoted in a message; every one goes into ``problems``


@dataclass(frozen=True, eq=False)
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
    units: tuple[str, str] = ("", "")   # of the two features; "" when unknown

    def __post_init__(self):
        for name in ("X", "y"):
            array = np.array(getattr(self, name), copy=True)
            array.setflags(write=False)
            object.__setattr__(self, name, array)

    def __eq__(self, other):
        if not isinstance(other, Dataset):
            return NotImplemented
        return (np.array_equal(self.X, other.X) and np.array_equal(self.y, other.y)
                and self.labels == other.labels and self.feature_names == other.feature_names
                and self.label_name == other.label_name
                and self.label_mapping == other.label_mapping and self.source == other.source
                and self.sha256 == other.sha256 and tuple(self.rows) == tuple(other.rows)
                and tuple(self.skipped) == tuple(other.skipped)
                and tuple(self.units) == tuple(other.units))

    __hash__ = None

    def __len__(self) -> int:
        return len(self.y)

    def label_for(self, sign: int):
        """The label as written that maps to ``sign``."""
        return next(label for label, s in self.label_mapping.items() if s == sign)

    def mapping_text(self) -> str:
        return ", ".join(f"{quote(label)} -> {sign:+d}" for label, sign in
                         sorted(self.label_mapping.items(), key=lambda kv: -kv[1]))

    @classmethod
    def from_points(cls, X, y, feature_names=("x1", "x2"), units=("", ""),
                    label_mapping=None, label_name="class") -> "Dataset":
        """Points placed by hand: signs ``y`` in {-1, +1}.

        ``label_mapping`` (label -> sign) names the classes; by default the
        labels are the signs themselves.
        """
        X = np.asarray(X, dtype=float).reshape(-1, 2)
        y = np.asarray(y, dtype=int).reshape(-1)
        if len(X) != len(y):
            raise InputError(f"there must be one label per point: {len(X)} points, "
                             f"{len(y)} labels")
        if not np.isin(y, (-1, 1)).all():
            raise InputError(f"signs must be +1 or -1; found {sorted(set(y.tolist()) - {-1, 1})}")
        mapping = dict(label_mapping) if label_mapping else {1: 1, -1: -1}
        if sorted(mapping.values()) != [-1, 1]:
            raise InputError(f"label_mapping must map one label to +1 and one to -1; "
                             f"got {mapping!r}")
        by_sign = {s: label for label, s in mapping.items()}
        return cls(X=X, y=y, labels=tuple(by_sign[int(s)] for s in y),
                   feature_names=(str(feature_names[0]), str(feature_names[1])),
                   label_name=str(label_name), label_mapping=mapping,
                   units=(str(units[0]), str(units[1])))


def sign_mapping(values, positive=None) -> dict:
    """Map exactly two distinct label values onto +1 / -1.

    {-1, 1} and {0, 1} map 1 to +1; any other pair needs ``positive``.
    """
    values = list(values)
    distinct = sorted(set(values), key=lambda v: (str(type(v)), str(v)))
    if len(distinct) != 2:
        counts = pd.Series(values, dtype=object).value_counts()
        found = listing(counts.items(), 5,
                        render=lambda kv, limit: f"{quote(kv[0], limit)} ({kv[1]} rows)")
        raise InputError(f"the label column must hold exactly two distinct values; "
                         f"found {len(distinct)}: {found or 'none'}")
    if positive is not None:
        matches = [v for v in distinct if str(v) == str(positive)
                   or _same_number(v, positive)]
        if not matches:
            raise InputError(f"--positive {quote(positive)} is not one of the labels "
                             f"{quote(distinct[0])}, {quote(distinct[1])}")
        pos = matches[0]
        return {v: (1 if v == pos else -1) for v in distinct}
    numeric = {_as_number(v) for v in distinct}
    if numeric in ({-1.0, 1.0}, {0.0, 1.0}):
        return {v: (1 if _as_number(v) == 1.0 else -1) for v in distinct}
    raise InputError(f"the labels are {quote(distinct[0])} and {quote(distinct[1])}; say which "
                     f"one is the positive class with --positive")


def split_unit(header: str) -> tuple[str, str]:
    """'bore deviation [um]' -> ('bore deviation', 'um'); no brackets -> (header, '')."""
    match = _UNIT.match(str(header).strip())
    if not match:
        return str(header).strip(), ""
    return match["name"], match["unit"].strip()


def load_table(path, features=None, label=None, positive=None,
               drop_incomplete=False, table=None) -> Dataset:
    """Read a CSV, TSV (or .xlsx) file with a header row into a Dataset.

    ``features``: two column names (default: the first two numeric columns
    other than the label); ``label``: the label column (default: the last).
    Rows with a missing or non-numeric feature or a missing label are listed
    by line; they are skipped only with ``drop_incomplete``.  ``table``: the file as
    ``read_table(path)`` already read it (the import dialog reads it once).
    """
    table = read_table(path) if table is None else table
    frame, name = table.frame, table.name
    columns = list(frame.columns)
    label = _column(label, columns, name, "label") if label is not None else columns[-1]
    if features is None:
        numeric = [c for c in columns if c != label and is_numeric_column(frame[c], table.delimiter)]
        if len(numeric) < 2:
            raise InputError(f"{name} needs two numeric feature columns besides the label "
                             f"{quote(label)}; found {listing(numeric) or 'none'} among "
                             f"{len(columns)} columns ({listing(columns, 5, 30)}) — name "
                             f"them with --features A,B")
        features = numeric[:2]
    else:
        features = [_column(f, columns, name, "feature") for f in features]
        if len(features) != 2 or features[0] == features[1]:
            raise InputError(f"give two different feature columns; got {listing(features)}")
    if label in features:
        raise InputError(f"the column {quote(label)} cannot be both a feature and the label")

    values = np.column_stack([to_numbers(frame[f], table.delimiter) for f in features])
    missing_label = frame[label].isna().to_numpy()
    bad = ~np.isfinite(values).all(axis=1) | missing_label
    if bad.all():
        raise FileFormatError(f"no row of {name} has two numeric features and a label",
                              problems=_row_problems(frame, values, missing_label, bad,
                                                     table.lines, features, label))
    if bad.any() and not drop_incomplete:
        problems = _row_problems(frame, values, missing_label, bad, table.lines, features, label)
        listed = ", ".join(str(n) for n in table.lines[bad][:_LISTED])
        more = f" and {bad.sum() - _LISTED} more" if bad.sum() > _LISTED else ""
        raise FileFormatError(f"{bad.sum()} row(s) of {name} have a missing or non-numeric "
                              f"feature or a missing label (line {listed}{more}); fix them or "
                              f"skip them with --drop-incomplete", problems=problems)
    keep = ~bad
    labels = _labels(frame[label][keep])
    mapping = sign_mapping(labels, positive)
    y = np.array([mapping[v] for v in labels], dtype=int)
    (name0, unit0), (name1, unit1) = split_unit(features[0]), split_unit(features[1])
    return Dataset(X=values[keep], y=y, labels=tuple(labels), feature_names=(name0, name1),
                   label_name=str(label), label_mapping=mapping, source=name,
                   sha256=table.sha256, rows=tuple(table.lines[keep].tolist()),
                   skipped=tuple(table.lines[bad].tolist()), units=(unit0, unit1))


def _column(wanted, columns, name, role) -> str:
    """A column by its header, or by its name without the [unit] suffix."""
    wanted = str(wanted).strip()
    if wanted in columns:
        return wanted
    for column in columns:
        if split_unit(column)[0] == wanted:
            return column
    raise InputError(f"no {role} column {quote(wanted)} in {name}; its columns are "
                     f"[{listing(columns, 10, 30)}]")


def _labels(column: pd.Series) -> list:
    """Labels as Python values; 0.0 / 1.0 (ints made float by a gap) become 0 / 1."""
    labels = [v.item() if isinstance(v, np.generic) else v for v in column.tolist()]
    if labels and all(isinstance(v, float) and v.is_integer() for v in labels):
        labels = [int(v) for v in labels]
    if labels and all(isinstance(v, str) for v in labels):
        labels = [v.strip() for v in labels]
    return labels


def _row_problems(frame, values, missing_label, bad, lines, features, label) -> list[str]:
    problems = []
    for index in np.flatnonzero(bad):
        reasons = []
        for k, feature in enumerate(features):
            if not np.isfinite(values[index, k]):
                raw = frame[feature].iloc[index]
                reasons.append(f"{feature} is missing" if pd.isna(raw)
                               else f"{clip(feature, 30)} is {quote(str(raw))}, not a number")
        if missing_label[index]:
            reasons.append(f"{label} is missing")
        problems.append(f"line {lines[index]}: {'; '.join(reasons)}")
    return problems


def _as_number(value):
    try:
        return float(value)
    except (TypeError, ValueError):
        return None


def _same_number(a, b) -> bool:
    x, y = _as_number(a), _as_number(b)
    return x is not None and x == y
