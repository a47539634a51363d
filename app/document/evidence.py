"""Evidence beside the fit: scored new rows, held-out points, and each support vector's influence.

The model half of the window's evidence views (canvas layer, tables, summary
and inspector lines).  It follows the document: every new result re-scores
the rows and held-out points (cheap), and the influence of the support
vectors is computed off the GUI thread on request.  Held-out points are not
part of the fit: "Hold out selected points" moves points out of the document
into this set as one undoable edit.
"""

from __future__ import annotations

import numpy as np
from PySide6.QtCore import QObject, Signal
from PySide6.QtGui import QUndoCommand

from solver.files import HeldOutPoints, heldout_from_section, heldout_section, read_new_rows
from solver.study import confusion, influence_of_support_vectors, score

from app.document.background import BackgroundTask
from app.document.document import RESULT


class Evidence(QObject):
    changed = Signal()              # scored rows, held-out points or their figures
    influence_changed = Signal()    # a new ranking, or none
    ghost_changed = Signal()        # the support vector whose leave-out fit is drawn

    def __init__(self, document):
        super().__init__(document)
        self.document = document
        self.rows = None            # NewRows scored with the current fit
        self.scores = None
        self.heldout = None         # HeldOutPoints kept out of the fit
        self.heldout_scores = None
        self.counts = None          # Confusion on the held-out points
        self.influence = None       # Influence of the current result's support vectors
        self.ghost = None           # PointInfluence drawn as a ghost, or None
        self._influence_of = None   # the result the influence belongs to
        self._task = None
        self._tasks = []            # every task still running (waited for at shutdown)
        document.changed.connect(lambda changes: self.refresh() if RESULT in changes else None)

    # -- reading files (solver.files does the reading; errors propagate) ------------
    def score_file(self, path, drop_incomplete=False):
        doc = self.document
        self.rows = read_new_rows(path, doc.feature_names, doc.label_name, doc.label_mapping,
                                  drop_incomplete=drop_incomplete)
        self.refresh()

    def load_heldout(self, path, drop_incomplete=False):
        doc = self.document
        rows = read_new_rows(path, doc.feature_names, doc.label_name, doc.label_mapping,
                             drop_incomplete=drop_incomplete)
        self.set_heldout(HeldOutPoints.from_rows(rows))

    def set_heldout(self, heldout):
        self.heldout = heldout if heldout is not None and len(heldout) else None
        self.refresh()

    def reset(self, stored_heldout=None):
        """A new document: no scored rows; the held-out points an experiment file stored."""
        self.rows = self.scores = None
        self.heldout = None
        if stored_heldout is not None:
            self.heldout = heldout_from_section(stored_heldout, self.document.label_mapping)
        self.refresh()

    def heldout_section(self):
        """The held-out points with the current fit's figures, as experiment files store them."""
        if self.heldout is None or self.counts is None:
            return None
        return heldout_section(self.heldout, self.heldout_scores.decision, self.counts.to_dict())

    def clear_rows(self):
        self.rows = self.scores = None
        self.refresh()

    # -- holding points out ---------------------------------------------------------
    def hold_out_selection(self):
        """Move the selected points out of the fit into the held-out set (undoable)."""
        chosen = sorted(self.document.selection)
        if chosen:
            self.document.undo_stack.push(HoldOutCommand(self, chosen))

    # -- following the fit ----------------------------------------------------------
    def refresh(self):
        result = self.document.current_result()
        mapping = self.document.label_mapping
        self.scores = self.heldout_scores = self.counts = None
        if result is not None and self.rows is not None:
            self.scores = score(result, self.rows.X, mapping)
        if result is not None and self.heldout is not None:
            self.heldout_scores = score(result, self.heldout.X, mapping)
            self.counts = confusion(self.heldout.signs, self.heldout_scores.signs, mapping)
        if self.influence is not None and self._influence_of is not result:
            self.influence, self.ghost = None, None
            self.influence_changed.emit()
            self.ghost_changed.emit()
        self.changed.emit()

    def request_influence(self):
        """Rank the current fit's support vectors in the background (no-op when done)."""
        result = self.document.current_result()
        if result is None or self._influence_of is result and self.influence is not None:
            return
        if self._task is not None and self._task.isRunning():
            self._task.cancel()
        heldout = None if self.heldout is None else self.heldout.X
        task = BackgroundTask(lambda progress, cancel: influence_of_support_vectors(
            result, heldout=heldout, should_stop=cancel.is_set), self)
        task.succeeded.connect(lambda influence: self._influence_ready(result, influence))
        task.finished.connect(lambda: self._tasks.remove(task) if task in self._tasks else None)
        self._task = task
        self._tasks.append(task)
        task.start()

    def wait_for_influence(self, timeout_ms=30000) -> bool:
        """Block until the requested ranking is in (tests only)."""
        return self._task is None or self._task.wait(timeout_ms)

    def _influence_ready(self, result, influence):
        if influence is None or result is not self.document.current_result():
            return                   # the fit moved on while it was computed
        self.influence, self._influence_of = influence, result
        self.ghost = None
        self.influence_changed.emit()
        self.ghost_changed.emit()

    def set_ghost(self, point):
        entry = None if self.influence is None or point is None else self.influence.of(point)
        if entry is not self.ghost:
            self.ghost = entry
            self.ghost_changed.emit()

    def shutdown(self):
        for task in list(self._tasks):
            task.cancel()
            task.wait(30000)


class HoldOutCommand(QUndoCommand):
    """Points leave the fit and join the held-out points; undo brings them back."""

    def __init__(self, evidence, indices):
        super().__init__(f"hold out {len(indices)} point{'s' if len(indices) != 1 else ''}")
        doc = evidence.document
        self.evidence, self.indices = evidence, list(indices)
        self.before = (doc.X.copy(), doc.y.copy(), list(doc.labels), evidence.heldout)
        keep = np.ones(len(doc.X), dtype=bool)
        keep[self.indices] = False
        self.keep = keep

    def redo(self):
        X, y, labels, heldout = self.before
        moved = HeldOutPoints(X=X[self.indices], labels=tuple(labels[i] for i in self.indices),
                              signs=y[self.indices])
        if heldout is not None:
            moved = HeldOutPoints(X=np.vstack([heldout.X, moved.X]),
                                  labels=heldout.labels + moved.labels,
                                  signs=np.r_[heldout.signs, moved.signs])
        self.evidence.heldout = moved
        self.evidence.document.set_points(X[self.keep], y[self.keep],
                                          [lab for lab, k in zip(labels, self.keep) if k],
                                          selection=set())
        self.evidence.refresh()

    def undo(self):
        X, y, labels, heldout = self.before
        self.evidence.heldout = heldout
        self.evidence.document.set_points(X, y, labels, selection=set(self.indices))
        self.evidence.refresh()


def evidence_of(document) -> Evidence:
    """The document's evidence model, created on first use (a child of the Document)."""
    evidence = document.findChild(Evidence)
    if evidence is None:
        evidence = Evidence(document)
    return evidence
