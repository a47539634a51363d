"""Whether the points are still the ones imported from their source file.

The experiment file and the report quote the source file's SHA-256; that
checksum describes the points as imported, not points edited since.  This
tracker remembers a fingerprint of the points as they came in (a newly
opened file, or an import) and answers whether the current points differ.
"""

from __future__ import annotations

from PySide6.QtCore import QObject

from solver.study.crossval import points_fingerprint

from app.document.document import PATH, POINTS


class ProvenanceTracker(QObject):
    def __init__(self, document):
        super().__init__(document)
        self.document = document
        self._source = None
        self._baseline = None
        document.changed.connect(self._document_changed)
        self._remember()

    def _document_changed(self, changes):
        if POINTS in changes:
            self._points_changed()
        if PATH in changes:
            self._path_changed()

    def _remember(self):
        doc = self.document
        self._source = (doc.source, doc.sha256)
        self._baseline = points_fingerprint(doc.X, doc.y)

    def _points_changed(self):
        # an import brings a new source: its points are the new baseline
        if (self.document.source, self.document.sha256) != self._source:
            self._remember()

    def _path_changed(self):
        # a newly opened file starts with an empty history (a save keeps its history)
        if self.document.undo_stack.count() == 0:
            self._remember()

    def edited_since_import(self) -> bool:
        """True when the points came from a file and no longer equal what was read."""
        doc = self.document
        if doc.source is None:
            return False
        return points_fingerprint(doc.X, doc.y) != self._baseline


def provenance(document) -> ProvenanceTracker:
    """The document's tracker, created on first use (create it before any edit)."""
    tracker = document.findChild(ProvenanceTracker)
    if tracker is None:
        tracker = ProvenanceTracker(document)
    return tracker
