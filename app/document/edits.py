"""Undoable edits of a Document (QUndoStack commands).

Each command stores what it needs to go both ways and applies it through the
Document's public edit API (set_points, insert_points, place_points, ...),
which notifies the views and asks for a fresh fit.  Consecutive steps of one gesture (a
dragged point, a dragged C slider) merge into one undo step.
"""

from __future__ import annotations

import numpy as np
from PySide6.QtGui import QUndoCommand

_MOVE_ID = 1001
_CONFIG_ID = 1002


class AddPointsCommand(QUndoCommand):
    def __init__(self, document, points, signs):
        count = len(signs)
        super().__init__("add point" if count == 1 else f"add {count} points")
        self._doc = document
        self._points = np.asarray(points, dtype=float).reshape(-1, 2)
        self._signs = np.asarray(signs, dtype=int)
        self._labels = [document.label_for(int(s)) for s in self._signs]

    def redo(self):
        self._doc.insert_points(self._points, self._signs, self._labels)

    def undo(self):
        count = len(self._doc.X)
        self._doc.remove_points(range(count - len(self._signs), count))


class DeletePointsCommand(QUndoCommand):
    def __init__(self, document, indices):
        count = len(indices)
        super().__init__("delete point" if count == 1 else f"delete {count} points")
        self._doc = document
        self._indices = np.asarray(indices, dtype=int)
        self._before = (document.X.copy(), document.y.copy(), list(document.labels))

    def redo(self):
        self._doc.remove_points(self._indices)

    def undo(self):
        X, y, labels = self._before
        self._doc.set_points(X, y, labels, selection=set(self._indices.tolist()))


class MovePointsCommand(QUndoCommand):
    """Move points; steps of one drag (same ``drag_id``) merge into one undo step."""

    def __init__(self, document, indices, positions, drag_id=None):
        count = len(indices)
        super().__init__("move point" if count == 1 else f"move {count} points")
        self._doc = document
        self._indices = np.asarray(indices, dtype=int)
        self._old = document.X[self._indices].copy()
        self._new = np.asarray(positions, dtype=float).reshape(-1, 2)
        self._drag_id = drag_id

    def id(self):
        return _MOVE_ID if self._drag_id is not None else -1

    def mergeWith(self, other):
        if (other._drag_id != self._drag_id
                or not np.array_equal(other._indices, self._indices)):
            return False
        self._new = other._new
        return True

    def redo(self):
        self._doc.place_points(self._indices, self._new)

    def undo(self):
        self._doc.place_points(self._indices, self._old)


class RelabelCommand(QUndoCommand):
    """Give points the class ``sign``, or swap each point's class when sign is None."""

    def __init__(self, document, indices, sign):
        count = len(indices)
        super().__init__("relabel point" if count == 1 else f"relabel {count} points")
        self._doc = document
        self._indices = np.asarray(indices, dtype=int)
        self._old_y = document.y[self._indices].copy()
        self._old_labels = [document.labels[i] for i in self._indices]
        new_y = -self._old_y if sign is None else np.full(len(self._indices), int(sign))
        self._new_y = new_y
        self._new_labels = [document.label_for(int(s)) for s in new_y]

    def redo(self):
        self._doc.set_classes(self._indices, self._new_y, self._new_labels)

    def undo(self):
        self._doc.set_classes(self._indices, self._old_y, self._old_labels)


class ReplacePointsCommand(QUndoCommand):
    """Swap in a whole new set of points (import), keeping the fit settings.

    The points bring their own names, units, mapping and source; the note and
    the experiment path belonged to the old points, so the imported ones
    start without them (a save asks for a new name)."""

    def __init__(self, document, dataset, metadata, text="import data"):
        super().__init__(text)
        self._doc = document
        self._old = (document.X.copy(), document.y.copy(), list(document.labels),
                     document.metadata())
        self._new = (np.asarray(dataset.X, dtype=float), np.asarray(dataset.y, dtype=int),
                     list(dataset.labels), dict(metadata, note=None, path=None))

    def _put(self, state):
        X, y, labels, metadata = state
        with self._doc.batch():
            self._doc.set_metadata(**metadata)
            self._doc.set_points(X, y, labels, selection=set())

    def redo(self):
        self._put(self._new)

    def undo(self):
        self._put(self._old)


class SetConfigCommand(QUndoCommand):
    """Change fit settings; steps with the same ``merge_key`` merge (one slider drag)."""

    def __init__(self, document, config, merge_key=None):
        super().__init__("change fit settings")
        self._doc = document
        self._old = document.config
        self._new = config
        self._merge_key = merge_key

    def id(self):
        return _CONFIG_ID if self._merge_key is not None else -1

    def mergeWith(self, other):
        if other._merge_key != self._merge_key:
            return False
        self._new = other._new
        return True

    def redo(self):
        self._doc.apply_config(self._new)

    def undo(self):
        self._doc.apply_config(self._old)
