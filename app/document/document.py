"""The open document: points, fit settings, the latest result and the undo stack.

Widgets read it and send it commands (app.document.edits); they never talk to each
other.  Every change of points or settings asks the background worker for a
new fit; the answer comes back through ``changed``.

Change notices: one signal, ``changed``, carries the frozenset of aspects that
changed (POINTS, CONFIG, RESULT, ...).  Inside ``with document.batch():`` the
notices are collected and emitted once at the end, so a burst of edits (a
load, an import) reaches the views as one notice and one solve request.

Two layers of writing:
- commands (undoable, what widgets call): set_config, set_C, add_point,
  move_points, delete_points, relabel, replace_points;
- edits (not undoable, what the undo commands in app.document.edits call):
  set_points, insert_points, remove_points, place_points, set_classes,
  apply_config, set_metadata.
"""

from __future__ import annotations

import dataclasses
from contextlib import contextmanager

import numpy as np
from PySide6.QtCore import QObject, Signal
from PySide6.QtGui import QUndoStack

from solver import FitConfig
from solver.files import Dataset

from app.document.worker import SolveController

DEFAULT_MAPPING = {"+1": 1, "-1": -1}

# the aspects a change notice names
POINTS = "points"            # coordinates, labels or their number
METADATA = "metadata"        # feature and label names, units, mapping, source, note
CONFIG = "config"            # fit settings
RESULT = "result"            # a new result, or its staleness changed
ERROR = "error"              # the latest solve failed (last_error says why); comes with RESULT
SELECTION = "selection"
PINNED = "pinned"
PATH = "path"                # the experiment file the document belongs to
DIRTY = "dirty"              # unsaved edits appeared or went away (is_dirty)
EVERYTHING = frozenset({POINTS, METADATA, CONFIG, RESULT, SELECTION, PINNED, PATH, DIRTY})
METADATA_FIELDS = ("feature_names", "label_name", "label_mapping", "source", "sha256",
                   "units", "note", "path")


class Document(QObject):
    changed = Signal(object)         # frozenset of the aspects above
    busy_changed = Signal(bool)      # the solver started or stopped working (not a change)

    def __init__(self, parent=None, solve_in_background: bool = True):
        super().__init__(parent)
        self.undo_stack = QUndoStack(self)
        self.undo_stack.cleanChanged.connect(self._clean_changed)
        self._X = np.zeros((0, 2))
        self._y = np.zeros(0, dtype=int)
        self._labels: list = []
        self.feature_names = ("x1", "x2")
        self.label_name = "label"
        self.label_mapping = dict(DEFAULT_MAPPING)
        self.source = None
        self.sha256 = None
        self.units = ("", "")
        self.note = None
        self.path = None              # the experiment file this document was opened from / saved to
        self._config = FitConfig()
        self.result = None
        self.result_is_stale = False
        self.last_error = None
        self.pinned = None
        self._selection: set = set()
        self._batch_depth = 0
        self._pending: set = set()
        self._solve_pending = False
        self._solver = SolveController(self, background=solve_in_background)
        self._solver.solved.connect(self._on_solved)
        self._solver.failed.connect(self._on_failed)
        self._solver.busy_changed.connect(self.busy_changed)

    def _clean_changed(self, clean: bool):
        self._notify(DIRTY)

    # -- change notices ----------------------------------------------------
    @contextmanager
    def batch(self):
        """Collect the change notices (and solve requests) of the block into one."""
        self._batch_depth += 1
        try:
            yield self
        finally:
            self._batch_depth -= 1
            if not self._batch_depth:
                self._flush()

    def _notify(self, *aspects):
        self._pending.update(aspects)
        if not self._batch_depth:
            self._flush()

    def _flush(self):
        if self._solve_pending:
            self._solve_pending = False
            self.request_solve()
        if self._pending:
            aspects = frozenset(self._pending)
            self._pending.clear()
            self.changed.emit(aspects)

    # -- read access -----------------------------------------------------
    @property
    def X(self) -> np.ndarray:
        return self._X

    @property
    def y(self) -> np.ndarray:
        return self._y

    @property
    def labels(self) -> list:
        return self._labels

    @property
    def config(self) -> FitConfig:
        return self._config

    @property
    def selection(self) -> set:
        return set(self._selection)

    @property
    def is_dirty(self) -> bool:
        return not self.undo_stack.isClean()

    @property
    def busy(self) -> bool:
        return self._solver.busy

    def current_result(self):
        """The result if it belongs to exactly the current points and settings, else None."""
        result = self.result
        if (result is None or self.result_is_stale or result.config != self._config
                or len(result.y) != len(self._y) or not np.array_equal(result.X, self._X)
                or not np.array_equal(result.y, self._y)):
            return None
        return result

    def label_for(self, sign: int):
        """The label as the user writes it for class ``sign``."""
        for label, value in self.label_mapping.items():
            if value == sign:
                return label
        return "+1" if sign > 0 else "-1"

    def dataset(self) -> Dataset:
        """A snapshot of the points as a solver Dataset."""
        fields = {f.name for f in dataclasses.fields(Dataset)}
        values = dict(X=self._X.copy(), y=self._y.copy(), labels=tuple(self._labels),
                      feature_names=tuple(self.feature_names), label_name=self.label_name,
                      label_mapping=dict(self.label_mapping), source=self.source,
                      sha256=self.sha256, units=self.units)
        return Dataset(**{k: v for k, v in values.items() if k in fields})

    # -- whole-document changes (not undoable: they start a new history) --
    def load(self, dataset: Dataset, config: FitConfig | None = None, path=None, note=None):
        """Replace everything by ``dataset`` (and ``config``); clears the history.

        One change notice (EVERYTHING) and one solve request."""
        with self.batch():
            self.set_points(dataset.X, dataset.y, list(dataset.labels), selection=set())
            self.set_metadata(**dataset_metadata(dataset), note=note, path=path)
            if config is not None:
                self.apply_config(config)
            self.result = None
            self.result_is_stale = False
            self.last_error = None
            self.pinned = None
            self.undo_stack.clear()
            self.undo_stack.setClean()
            self._notify(*EVERYTHING)

    def new(self):
        empty = Dataset(X=np.zeros((0, 2)), y=np.zeros(0, dtype=int), labels=(),
                        feature_names=("x1", "x2"), label_name="label",
                        label_mapping=dict(DEFAULT_MAPPING))
        self.load(empty, FitConfig())

    def mark_saved(self, path):
        with self.batch():
            self.set_metadata(path=path)
            self.undo_stack.setClean()

    # -- undoable changes --------------------------------------------------
    def undo(self):
        with self.batch():
            self.undo_stack.undo()

    def redo(self):
        with self.batch():
            self.undo_stack.redo()

    def _push(self, command):
        with self.batch():      # the edit and the clean-state change: one notice
            self.undo_stack.push(command)

    def set_config(self, config: FitConfig, merge_key=None):
        from app.document.edits import SetConfigCommand
        if config != self._config:
            self._push(SetConfigCommand(self, config, merge_key))

    def set_C(self, value: float, merge_key=None):
        self.set_config(self._config.with_changes(C=float(value), hard_margin=False), merge_key)

    def add_point(self, x: float, y: float, sign: int):
        from app.document.edits import AddPointsCommand
        self._push(AddPointsCommand(self, [[x, y]], [sign]))

    def move_points(self, indices, positions, drag_id=None):
        from app.document.edits import MovePointsCommand
        self._push(MovePointsCommand(self, indices, positions, drag_id))

    def delete_points(self, indices):
        from app.document.edits import DeletePointsCommand
        indices = sorted(set(int(i) for i in indices))
        if indices:
            self._push(DeletePointsCommand(self, indices))

    def relabel(self, indices, sign: int | None):
        """Set the class of ``indices`` to ``sign``, or swap each when ``sign`` is None."""
        from app.document.edits import RelabelCommand
        indices = sorted(set(int(i) for i in indices))
        if indices:
            self._push(RelabelCommand(self, indices, sign))

    def replace_points(self, dataset: Dataset, text="import data"):
        from app.document.edits import ReplacePointsCommand
        self._push(ReplacePointsCommand(self, dataset, dataset_metadata(dataset), text))

    # -- selection and pin (view state, not undoable) ----------------------
    def set_selection(self, indices):
        chosen = {int(i) for i in indices if 0 <= int(i) < len(self._X)}
        if chosen != self._selection:
            self._selection = chosen
            self._notify(SELECTION)

    def pin_current(self):
        if self.result is not None:
            self.pinned = self.result
            self._notify(PINNED)

    def clear_pin(self):
        if self.pinned is not None:
            self.pinned = None
            self._notify(PINNED)

    # -- edits: what the undo commands call (not undoable themselves) ----------
    def set_points(self, X, y, labels, selection=None):
        """All points at once; ``selection`` (default: the old one, trimmed) is selected."""
        self._X = np.asarray(X, dtype=float).reshape(-1, 2).copy()
        self._y = np.asarray(y, dtype=int).reshape(-1).copy()
        self._labels = list(labels)
        self._X.setflags(write=False)
        self._y.setflags(write=False)
        chosen = self._selection if selection is None else selection
        self._selection = {int(i) for i in chosen if 0 <= int(i) < len(self._X)}
        self._notify(POINTS, SELECTION)
        self._solve_later()

    def insert_points(self, points, signs, labels):
        """Append points of class ``signs``; the new points become the selection."""
        start = len(self._X)
        self.set_points(np.vstack([self._X, np.asarray(points, dtype=float).reshape(-1, 2)]),
                        np.concatenate([self._y, np.asarray(signs, dtype=int)]),
                        self._labels + list(labels),
                        selection=set(range(start, start + len(signs))))

    def remove_points(self, indices):
        keep = np.setdiff1d(np.arange(len(self._X)), np.asarray(indices, dtype=int))
        self.set_points(self._X[keep], self._y[keep], [self._labels[i] for i in keep],
                        selection=set())

    def place_points(self, indices, positions):
        """Move points ``indices`` to ``positions`` (n x 2)."""
        X = self._X.copy()
        X[np.asarray(indices, dtype=int)] = np.asarray(positions, dtype=float).reshape(-1, 2)
        self.set_points(X, self._y, self._labels)

    def set_classes(self, indices, signs, labels):
        """Give points ``indices`` the classes ``signs`` written as ``labels``."""
        y, all_labels = self._y.copy(), list(self._labels)
        for i, sign, label in zip(np.asarray(indices, dtype=int), signs, labels):
            y[i], all_labels[i] = int(sign), label
        self.set_points(self._X, y, all_labels)

    def apply_config(self, config: FitConfig):
        self._config = config
        self._notify(CONFIG)
        self._solve_later()

    def metadata(self) -> dict:
        """The names, units, mapping, source, note and path, as set_metadata takes them."""
        return {name: getattr(self, name) for name in METADATA_FIELDS}

    def set_metadata(self, **fields):
        """Set any of METADATA_FIELDS; names them METADATA (and PATH for ``path``)."""
        unknown = set(fields) - set(METADATA_FIELDS)
        if unknown:
            raise TypeError(f"not document metadata: {sorted(unknown)}")
        for name, value in fields.items():
            if name in ("feature_names", "units"):
                value = tuple(value or ("", ""))
            elif name == "label_mapping":
                value = dict(value)
            setattr(self, name, value)
        self._notify(*(PATH if name == "path" else METADATA for name in fields))

    def _solve_later(self):
        if self._batch_depth:
            self._solve_pending = True
        else:
            self.request_solve()

    # -- solving -------------------------------------------------------------
    def request_solve(self):
        self._solver.request(self._X, self._y, self._config, self.result)

    def wait_for_solve(self, timeout_ms: int = 30000) -> bool:
        """Block until the latest request is answered (tests and headless use only)."""
        return self._solver.wait(timeout_ms)

    def _on_solved(self, result):
        self.result = result
        self.result_is_stale = False
        self.last_error = None
        self._notify(RESULT)

    def _on_failed(self, failure):
        message, best = failure
        self.last_error = message
        if best is not None and self.result is None:
            self.result = best
        self.result_is_stale = self.result is not None
        self._notify(RESULT, ERROR)

    def shutdown(self):
        self._solver.shutdown()


def dataset_metadata(dataset) -> dict:
    """The metadata fields a Dataset carries (path and note belong to the experiment)."""
    return dict(feature_names=tuple(dataset.feature_names), label_name=dataset.label_name,
                label_mapping=dict(dataset.label_mapping),
                source=getattr(dataset, "source", None), sha256=getattr(dataset, "sha256", None),
                units=tuple(getattr(dataset, "units", None) or ("", "")))
