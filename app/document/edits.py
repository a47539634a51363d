"""Undoable edits of a Document (QUndoStack commands).

Each command stores what it needs to go both ways; the Document applies the
new state and asks for a fresh fit.  Consecutive steps of one gesture (a
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
        doc = self._doc
        start = len(doc.X)
        doc._apply_points(np.vstack([doc.X, self._points]), np.concatenate([doc.y, self._signs]),
                          doc.labels + self._labels,
                          selection=set(range(start, start + len(self._signs))))

    def undo(self):
        doc = self._doc
        keep = len(doc.X) - len(self._signs)
        doc._apply_points(doc.X[:keep], doc.y[:keep], doc.labels[:keep], selection=set())


class DeletePointsCommand(QUndoCommand):
    def __init__(self, document, indices):
        count = len(indices)
        super().__init__("delete point" if count == 1 else f"delete {count} points")
        self._doc = document
        self._indices = np.asarray(indices, dtype=int)
        self._before = (document.X.copy(), document.y.copy(), list(document.labels))

    def redo(self):
        X, y, labels = self._before
        keep = np.setdiff1d(np.arange(len(X)), self._indices)
        self._doc._apply_points(X[keep], y[keep], [labels[i] for i in keep], selection=set())

    def undo(self):
        X, y, labels = self._before
        self._doc._apply_points(X, y, labels, selection=set(self._indices.tolist()))


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

    def _place(self, positions):
        doc = self._doc
        X = doc.X.copy()
        X[self._indices] = positions
        doc._apply_points(X, doc.y, doc.labels)

    def redo(self):
        self._place(self._new)

    def undo(self):
        self._place(self._old)


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

    def _set(self, signs, labels):
        doc = self._doc
        y = doc.y.copy()
        y[self._indices] = signs
        all_labels = list(doc.labels)
        for i, label in zip(self._indices, labels):
            all_labels[i] = label
        doc._apply_points(doc.X, y, all_labels)

    def redo(self):
        self._set(self._new_y, self._new_labels)

    def undo(self):
        self._set(self._old_y, self._old_labels)


class ReplacePointsCommand(QUndoCommand):
    """Swap in a whole new set of points (import), keeping the fit settings."""

    def __init__(self, document, dataset, text="import data"):
        super().__init__(text)
        self._doc = document
        self._old = (document.X.copy(), document.y.copy(), list(document.labels),
                     dict(document.label_mapping), tuple(document.feature_names),
                     document.label_name, document.source, document.sha256)
        self._new = (np.asarray(dataset.X, dtype=float), np.asarray(dataset.y, dtype=int),
                     list(dataset.labels), dict(dataset.label_mapping),
                     tuple(dataset.feature_names), dataset.label_name,
                     getattr(dataset, "source", None), getattr(dataset, "sha256", None))

    def _put(self, state):
        X, y, labels, mapping, names, label_name, source, sha256 = state
        doc = self._doc
        doc._apply_mapping(mapping, names, label_name)
        doc.source, doc.sha256 = source, sha256
        doc._apply_points(X, y, labels, selection=set())

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
        self._doc._apply_config(self._new)

    def undo(self):
        self._doc._apply_config(self._old)
