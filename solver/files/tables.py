"""Reading a table file (CSV, TSV, optionally .xlsx) into a pandas frame.

Only the mechanics live here: bytes, encoding, delimiter, header checks and
the source line of every row.  Turning columns into points and labels is
``solver.files.dataset``'s job.

The file is read from disk once; the same bytes give the SHA-256 and the
parsed frame.  Line numbers count the header as line 1 and assume no quoted
field spans several lines.
"""

from __future__ import annotations

import csv
import hashlib
import io
import os
import stat
import warnings
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from solver.errors import FileFormatError
from solver.messages import path_text, quote

TAB_SUFFIXES = (".tsv", ".tab")
EXCEL_SUFFIXES = (".xlsx", ".xlsm")
TABLE_SUFFIXES = (".csv", ".txt") + TAB_SUFFIXES + EXCEL_SUFFIXES   # every table read_table reads
TABLE_FILTER = "Tables (" + " ".join(f"*{suffix}" for suffix in TABLE_SUFFIXES) + ")"
DELIMITERS = (",", ";", "\t")
DELIMITER_NAMES = {",": "comma", ";": "semicolon", "\t": "tab"}
PREVIEW_BYTES = 1 << 20


@dataclass(frozen=True)
class RawTable:
    frame: pd.DataFrame      # one column per header name, pandas' own dtypes
    lines: np.ndarray        # 1-based source line of each frame row
    delimiter: str | None    # None for a workbook
    sha256: str              # of the file's bytes (of the part read, for a preview)
    name: str                # file name shown in messages


@dataclass(frozen=True)
class TablePreview:
    """What an import dialog shows before the user picks columns."""

    columns: tuple[str, ...]
    rows: tuple[tuple, ...]          # first rows, values as pandas read them
    numeric: tuple[bool, ...]        # per column: could serve as a feature
    delimiter: str | None


def require_regular_file(path) -> Path:
    """``path`` if it names a regular file; a pipe, device or folder is refused up
    front (opening a named pipe with no writer would wait for ever)."""
    path = Path(path)
    try:
        mode = os.stat(path).st_mode
    except OSError as exc:
        raise FileFormatError(f"cannot read {path_text(path)}: {exc.strerror or exc}") from None
    if stat.S_ISDIR(mode):
        raise FileFormatError(f"{path_text(path)} is a folder; give the name of a file in it")
    if not stat.S_ISREG(mode):
        raise FileFormatError(f"{path_text(path)} is not a regular file (a pipe, socket or "
                              f"device); save the data to a file and give its name")
    return path


def read_table(path, nrows: int | None = None) -> RawTable:
    """Read ``path`` into a RawTable, or raise FileFormatError saying why not."""
    path = require_regular_file(path)
    if path.suffix.lower() in EXCEL_SUFFIXES:
        return _read_workbook(path, nrows)
    try:
        with open(path, "rb") as stream:
            raw = stream.read() if nrows is None else stream.read(PREVIEW_BYTES)
    except OSError as exc:
        raise FileFormatError(f"cannot read {path}: {exc.strerror or exc}") from None
    name = path.name
    if not raw.strip():
        raise FileFormatError(f"{name} is empty; a table needs a header row and at least one "
                              "row of points")
    if _looks_binary(raw[:8192]):
        raise FileFormatError(f"{name} does not look like a text table (it holds binary "
                              "data); save it as CSV or TSV with a header row")
    text = _decode(raw).replace("\r\n", "\n").replace("\r", "\n")
    if nrows is not None and len(raw) == PREVIEW_BYTES:
        text = text[:text.rfind("\n") + 1] or text  # drop a partial last line
    lead = len(text) - len(text.lstrip("\r\n \t"))
    first_line = 1 + text[:lead].count("\n")
    text = text[lead:]
    delimiter = _delimiter(path, text)
    try:
        header = next(csv.reader(io.StringIO(text.split("\n", 1)[0]), delimiter=delimiter), [])
    except csv.Error as exc:
        raise FileFormatError(f"the header row of {name} cannot be read: {exc}") from None
    names = _column_names(header, name)
    try:
        with warnings.catch_warnings():
            # pandas only warns when rows are longer than the header, and drops the excess
            warnings.simplefilter("error", pd.errors.ParserWarning)
            frame = pd.read_csv(io.StringIO(text), sep=delimiter, header=0, names=names,
                                skip_blank_lines=False, nrows=nrows, index_col=False,
                                skipinitialspace=True, engine="c")
    except pd.errors.ParserWarning:
        raise FileFormatError(f"{name} has rows with more fields than its header has columns "
                              f"({len(names)}); name every column in the header row") from None
    except pd.errors.ParserError as exc:
        raise FileFormatError(f"{name} is not a regular {DELIMITER_NAMES[delimiter]}-separated "
                              f"table: {_first_line_of(exc)}; every row needs as many fields "
                              f"as the header has columns ({len(names)})") from None
    except (ValueError, UnicodeError, csv.Error, OverflowError, IndexError) as exc:
        raise FileFormatError(f"{name} is not a readable table: {_first_line_of(exc)}") from None
    lines = np.arange(len(frame)) + first_line + 1
    return _finish(frame, lines, delimiter, hashlib.sha256(raw).hexdigest(), name)


def preview_table(path, rows: int = 20) -> TablePreview:
    """Columns and first ``rows`` rows of a table, reading at most about 1 MB."""
    if not isinstance(rows, int) or rows < 1:
        raise ValueError(f"rows must be a whole number >= 1; got {rows!r}")
    table = read_table(path, nrows=max(rows, 200))
    frame = table.frame
    numeric = tuple(is_numeric_column(frame[c], table.delimiter) for c in frame.columns)
    head = tuple(tuple(_native(v) for v in row) for row in
                 frame.head(rows).itertuples(index=False, name=None))
    return TablePreview(columns=tuple(frame.columns), rows=head, numeric=numeric,
                        delimiter=table.delimiter)


def column_values(source, column, limit: int = 50) -> tuple[str, ...]:
    """The distinct non-empty values of ``column`` over the whole file (``source``: its
    path, or the RawTable read from it), in order of first appearance, at most ``limit``
    (the import dialog's positive-class choices: a file sorted by label shows one label
    only in its first rows)."""
    frame = (source if isinstance(source, RawTable) else read_table(source)).frame
    if column not in frame.columns:
        return ()
    values = []
    for value in frame[column].dropna().unique():       # in order of first appearance
        value = _native(value)
        if value is not None and str(value) not in values:
            values.append(str(value))
            if len(values) >= limit:
                break
    return tuple(values)


def is_numeric_column(column: pd.Series, delimiter: str | None = None) -> bool:
    """Could serve as a feature: most of its non-empty cells are numbers.

    A few stray words ("n/a", "--") do not disqualify a column; they are
    reported by line when the points are read.
    """
    if pd.api.types.is_bool_dtype(column):
        return False
    if pd.api.types.is_numeric_dtype(column):
        return True
    present = column.notna().to_numpy()
    if not present.any():
        return False
    parsed = np.isfinite(to_numbers(column, delimiter))[present]
    return bool(parsed.mean() >= 0.5)


def to_numbers(column: pd.Series, delimiter: str | None = None) -> np.ndarray:
    """Column as floats; NaN where missing or not a number.

    In a semicolon-separated file a comma may be the decimal mark ("1,5").
    """
    if pd.api.types.is_numeric_dtype(column) and not pd.api.types.is_bool_dtype(column):
        return column.to_numpy(dtype=float, na_value=np.nan)
    text = column.astype("string").str.strip()
    if delimiter == ";":
        text = text.str.replace(",", ".", regex=False)
    return pd.to_numeric(text, errors="coerce").to_numpy(dtype=float, na_value=np.nan)


def _finish(frame, lines, delimiter, sha256, name) -> RawTable:
    blank = frame.isna().all(axis=1).to_numpy()       # empty lines in the file
    frame, lines = frame.loc[~blank].reset_index(drop=True), lines[~blank]
    for column in [c for c in frame.columns if c.startswith("\0")]:
        if frame[column].notna().any():
            position = list(frame.columns).index(column) + 1
            raise FileFormatError(f"column {position} of {name} holds values but has no name in "
                                  "the header row; give it a name")
        frame = frame.drop(columns=column)               # a trailing delimiter
    if len(frame.columns) == 0:
        raise FileFormatError(f"the header row of {name} names no columns")
    if frame.empty:
        raise FileFormatError(f"{name} has a header row but no rows of points below it")
    return RawTable(frame=frame, lines=lines, delimiter=delimiter, sha256=sha256, name=name)


def _column_names(header: list[str], name: str) -> list[str]:
    names, seen = [], {}
    for position, text in enumerate(header, start=1):
        text = text.strip()
        if not text:
            names.append(f"\0{position}")                # checked once the values are known
            continue
        if text in seen:
            raise FileFormatError(f"the header row of {name} names column {quote(text)} twice "
                                  f"(columns {seen[text]} and {position}); give each column "
                                  "its own name")
        seen[text] = position
        names.append(text)
    return names


def _looks_binary(head: bytes) -> bool:
    if b"\0" in head:
        return True
    control = sum(1 for byte in head if byte < 32 and byte not in (9, 10, 13))
    return control > max(2, len(head) // 100)


def _decode(raw: bytes) -> str:
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        return raw.decode("cp1252", errors="replace")   # spreadsheet exports on Windows


def _delimiter(path: Path, text: str) -> str:
    """Tab for .tsv/.tab; otherwise the candidate that splits the first lines evenly."""
    if path.suffix.lower() in TAB_SUFFIXES:
        return "\t"
    sample = "\n".join(text.splitlines()[:20])
    try:
        return csv.Sniffer().sniff(sample, delimiters="".join(DELIMITERS)).delimiter
    except csv.Error:
        header = text.split("\n", 1)[0]
        counts = {d: header.count(d) for d in DELIMITERS}
        best = max(counts, key=counts.get)
        return best if counts[best] else ","


def _read_workbook(path: Path, nrows) -> RawTable:
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise FileFormatError(f"cannot read {path}: {exc.strerror or exc}") from None
    try:
        frame = pd.read_excel(io.BytesIO(raw), engine="openpyxl", header=0, nrows=nrows)
    except ImportError:
        raise FileFormatError("reading .xlsx files needs openpyxl: pip install "
                              "'slackline[xlsx]', or save the sheet as CSV") from None
    except Exception as exc:  # openpyxl raises many kinds on a damaged workbook
        raise FileFormatError(f"{path.name} is not a readable workbook: "
                              f"{_first_line_of(exc)}") from None
    header = [str(c) if not str(c).startswith("Unnamed: ") else "" for c in frame.columns]
    frame.columns = _column_names(header, path.name)
    lines = np.arange(len(frame)) + 2
    return _finish(frame, lines, None, hashlib.sha256(raw).hexdigest(), path.name)


def _first_line_of(exc: BaseException) -> str:
    text = str(exc).strip().splitlines()
    return text[-1] if text else type(exc).__name__


def _native(value):
    """numpy scalars -> Python values; missing -> None."""
    if value is None or value is pd.NA or (isinstance(value, float) and np.isnan(value)):
        return None
    if isinstance(value, np.generic):
        return value.item()
    return value
