"""Rows to score: a table read by the feature names of an experiment, labels optional.

The table mechanics (bytes, delimiter, line numbers) are
``solver.files.tables``'s and the column and label conventions are
``solver.files.dataset``'s; this module only asks for *named* columns: the
two features the model was fitted on and, if the file has it, the label
column.  A label column lets the caller measure an error on these rows.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.errors import FileFormatError, InputError
from solver.files.dataset import _labels, _row_problems, split_unit
from solver.files.tables import read_table, to_numbers

_LISTED = 20  # line numbers quoted in a message; every one goes into ``problems``


@dataclass(frozen=True, eq=False)
class NewRows:
    X: np.ndarray                # n x 2, in the order of the experiment's features
    lines: tuple                 # 1-based line of each row in the file
    labels: tuple | None         # labels as written, when the file has the label column
    signs: np.ndarray | None     # +1 / -1 by the experiment's mapping, with ``labels``
    source: str                  # file name
    sha256: str
    skipped: tuple = ()          # lines left out (drop_incomplete)

    def __len__(self) -> int:
        return len(self.X)


def read_new_rows(path, feature_names, label_name, label_mapping,
                  drop_incomplete: bool = False) -> NewRows:
    """Read the rows of ``path`` that the model with these names can score.

    Columns are found by header or by header without its ``[unit]``.  Missing
    feature columns are all named at once; rows whose features are not numbers
    (or, with a label column, whose label is missing or not one of the
    mapping's) are listed by line, and skipped only with ``drop_incomplete``.
    """
    table = read_table(path)
    frame, name = table.frame, table.name
    columns = list(frame.columns)
    found = {wanted: _find(wanted, columns) for wanted in (*feature_names, label_name)}
    missing = [wanted for wanted in feature_names if found[wanted] is None]
    if missing:
        raise InputError(f"{name} lacks the feature column(s) "
                         f"{', '.join(repr(m) for m in missing)} that the model was fitted "
                         f"on; its columns are {columns} — rename the columns to match")
    features = [found[f] for f in feature_names]
    label = found[label_name] if found[label_name] not in features else None

    values = np.column_stack([to_numbers(frame[f], table.delimiter) for f in features])
    bad = ~np.isfinite(values).all(axis=1)
    missing_label = np.zeros(len(frame), dtype=bool)
    unknown = np.zeros(len(frame), dtype=bool)
    signs = None
    if label is not None:
        missing_label = frame[label].isna().to_numpy()
        present = _labels(frame[label])
        signs = np.array([_sign(v, label_mapping) if not m else 0
                          for v, m in zip(present, missing_label)], dtype=int)
        unknown = ~missing_label & (signs == 0)
        bad |= missing_label | unknown
    if bad.any():
        problems = _row_problems(frame, values, missing_label, bad & ~unknown, table.lines,
                                 features, label)
        problems += [f"line {table.lines[i]}: {label} is {frame[label].iloc[i]!r}, not one of "
                     f"{', '.join(repr(k) for k in label_mapping)}"
                     for i in np.flatnonzero(unknown)]
        problems.sort(key=lambda text: int(text.split(":")[0].split()[1]))
        if bad.all():
            raise FileFormatError(f"no row of {name} can be scored: every row has a missing "
                                  f"or non-numeric feature or an unknown label",
                                  problems=problems)
        if not drop_incomplete:
            listed = ", ".join(str(n) for n in table.lines[bad][:_LISTED])
            more = f" and {bad.sum() - _LISTED} more" if bad.sum() > _LISTED else ""
            raise FileFormatError(f"{bad.sum()} row(s) of {name} cannot be scored (line "
                                  f"{listed}{more}); fix them or skip them with "
                                  f"--drop-incomplete", problems=problems)
    keep = ~bad
    labels = None
    if label is not None:
        labels = tuple(_as_written(v, label_mapping)
                       for v in _labels(frame[label][keep]))
        signs = signs[keep]
    return NewRows(X=values[keep], lines=tuple(table.lines[keep].tolist()), labels=labels,
                   signs=signs, source=name, sha256=table.sha256,
                   skipped=tuple(table.lines[bad].tolist()))


def _find(wanted: str, columns: list) -> str | None:
    """The column named ``wanted``, by full header or by header without the [unit]."""
    if wanted in columns:
        return wanted
    return next((c for c in columns if split_unit(c)[0] == wanted), None)


def _sign(value, mapping) -> int:
    """+1 / -1 for a label as found in the file, 0 when it is not one of the mapping's."""
    written = _as_written(value, mapping)
    return mapping.get(written, 0) if written is not None else 0


def _as_written(value, mapping):
    """The mapping's own spelling of ``value`` (1, 1.0 and "1" match label 1), or None."""
    for label in mapping:
        if value == label or str(value).strip() == str(label):
            return label
        try:
            if float(value) == float(label):
                return label
        except (TypeError, ValueError):
            pass
    return None
