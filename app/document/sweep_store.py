"""The latest C sweep of a document, shared by the panels that read it.

A small model object kept as a child of the Document, so the sweep panel can
publish a sweep and the comparison panel and the report can read it without
the widgets talking to each other.
"""

from __future__ import annotations

from PySide6.QtCore import QObject, Signal


class SweepStore(QObject):
    sweep_changed = Signal()

    def __init__(self, parent=None):
        super().__init__(parent)
        self.sweep = None            # solver.study.sweep_result.SweepResult | None

    def set_sweep(self, sweep) -> None:
        self.sweep = sweep
        self.sweep_changed.emit()

    def current_for(self, X, y, config):
        """The sweep if it was run on these points and settings (any C), else None."""
        if self.sweep is None or len(self.sweep.C) == 0:
            return None
        return self.sweep if self.sweep.matches(X, y, config) else None


def sweep_store(document) -> SweepStore:
    """The document's store, created on first use."""
    store = document.findChild(SweepStore)
    if store is None:
        store = SweepStore(document)
    return store
