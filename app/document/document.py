"""The open document: points, fit settings, the latest result and the undo stack.

Widgets read it and send it commands (app.document.edits); they never talk to each
other.  Every change of points or settings asks the background worker for a
new fit; the answer comes back through ``result_changed``.
"""

from __future__ import annotations

import dataclasses

import numpy as np
from PySide6.QtCore import QObject, Signal
from PySide6.QtGui import QUndoStack

from solver import FitConfig
from solver.files import Dataset

from app.document.worker import SolveController

DEFAULT_MAPPING = {"+1": 1, "-1": -1}


class Document(QObject):
    points_changed = Signal()
    config_changed = Signal()
    result_changed = Signal()        # a new result, or its staleness changed
    solve_failed = Signal(str)
    busy_changed = Signal(bool)
    selection_changed = Signal()
    dirty_changed = Signal(bool)
    pinned_changed = Signal()
    path_changed = Signal()

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
        self._solver = SolveController(self, background=solve_in_background)
        self._solver.solved.connect(self._on_solved)
        self._solver.failed.connect(self._on_failed)
        self._solver.busy_changed.connect(self.busy_changed)

    def _clean_changed(self, clean: bool):
        self.dirty_changed.emit(not clean)

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
        """Replace everything by ``dataset`` (and ``config``); clears the history."""
        self._assign_points(dataset.X, dataset.y, list(dataset.labels))
        self.feature_names = tuple(dataset.feature_names)
        self.label_name = dataset.label_name
        self.label_mapping = dict(dataset.label_mapping)
        self.source = getattr(dataset, "source", None)
        self.sha256 = getattr(dataset, "sha256", None)
        self.units = tuple(getattr(dataset, "units", None) or ("", ""))
        self.note = note
        self.path = path
        if config is not None:
            self._config = config
        self.result = None
        self.result_is_stale = False
        self.pinned = None
        self._selection = set()
        self.undo_stack.clear()
        self.undo_stack.setClean()
        self.points_changed.emit()
        self.config_changed.emit()
        self.selection_changed.emit()
        self.pinned_changed.emit()
        self.result_changed.emit()
        self.path_changed.emit()
        self.dirty_changed.emit(False)
        self.request_solve()

    def new(self):
        empty = Dataset(X=np.zeros((0, 2)), y=np.zeros(0, dtype=int), labels=(),
                        feature_names=("x1", "x2"), label_name="label",
                        label_mapping=dict(DEFAULT_MAPPING))
        self.load(empty, FitConfig())

    def mark_saved(self, path):
        self.path = path
        self.undo_stack.setClean()
        self.path_changed.emit()

    # -- undoable changes --------------------------------------------------
    def set_config(self, config: FitConfig, merge_key=None):
        from app.document.edits import SetConfigCommand
        if config != self._config:
            self.undo_stack.push(SetConfigCommand(self, config, merge_key))

    def set_C(self, value: float, merge_key=None):
        self.set_config(self._config.with_changes(C=float(value), hard_margin=False), merge_key)

    def add_point(self, x: float, y: float, sign: int):
        from app.document.edits import AddPointsCommand
        self.undo_stack.push(AddPointsCommand(self, [[x, y]], [sign]))

    def move_points(self, indices, positions, drag_id=None):
        from app.document.edits import MovePointsCommand
        self.undo_stack.push(MovePointsCommand(self, indices, positions, drag_id))

    def delete_points(self, indices):
        from app.document.edits import DeletePointsCommand
        indices = sorted(set(int(i) for i in indices))
        if indices:
            self.undo_stack.push(DeletePointsCommand(self, indices))

    def relabel(self, indices, sign: int | None):
        """Set the class of ``indices`` to ``sign``, or swap each when ``sign`` is None."""
        from app.document.edits import RelabelCommand
        indices = sorted(set(int(i) for i in indices))
        if indices:
            self.undo_stack.push(RelabelCommand(self, indices, sign))

    def replace_points(self, dataset: Dataset, text="import data"):
        from app.document.edits import ReplacePointsCommand
        self.undo_stack.push(ReplacePointsCommand(self, dataset, text))

    # -- selection and pin (view state, not undoable) ----------------------
    def set_selection(self, indices):
        chosen = {int(i) for i in indices if 0 <= int(i) < len(self._X)}
        if chosen != self._selection:
            self._selection = chosen
            self.selection_changed.emit()

    def pin_current(self):
        if self.result is not None:
            self.pinned = self.result
            self.pinned_changed.emit()

    def clear_pin(self):
        if self.pinned is not None:
            self.pinned = None
            self.pinned_changed.emit()

    # -- used by the undo commands only --------------------------------------
    def _assign_points(self, X, y, labels):
        self._X = np.asarray(X, dtype=float).reshape(-1, 2).copy()
        self._y = np.asarray(y, dtype=int).reshape(-1).copy()
        self._labels = list(labels)
        self._X.setflags(write=False)
        self._y.setflags(write=False)

    def _apply_points(self, X, y, labels, selection=None):
        self._assign_points(X, y, labels)
        if selection is not None:
            self._selection = {i for i in selection if i < len(self._X)}
        else:
            self._selection = {i for i in self._selection if i < len(self._X)}
        self.points_changed.emit()
        self.selection_changed.emit()
        self.request_solve()

    def _apply_config(self, config: FitConfig):
        self._config = config
        self.config_changed.emit()
        self.request_solve()

    def _apply_mapping(self, mapping, feature_names, label_name):
        self.label_mapping = dict(mapping)
        self.feature_names = tuple(feature_names)
        self.label_name = label_name

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
        self.result_changed.emit()

    def _on_failed(self, failure):
        message, best = failure
        self.last_error = message
        if best is not None and self.result is None:
            self.result = best
        self.result_is_stale = self.result is not None
        self.solve_failed.emit(message)
        self.result_changed.emit()

    def shutdown(self):
        self._solver.shutdown()
