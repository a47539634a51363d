"""Crash recovery: a few seconds after an edit, the document is written to a recovery file.

The file is an ordinary experiment file (solver.files.experiment, written
atomically), so recovering is opening it.  A clean save or a clean close
removes it; finding it at start-up means the last session ended with
unsaved edits.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QObject, QSettings, QTimer

from solver import SlacklineError

from app.document.document import CONFIG, DIRTY, METADATA, POINTS

DELAY_MS = 3000
FILE_NAME = "recovery.experiment.json"


def recovery_path() -> Path:
    """Beside the settings file, so a test's temporary settings also move it."""
    folder = Path(QSettings().fileName()).parent
    return folder / FILE_NAME


class RecoveryWriter(QObject):
    def __init__(self, document, parent=None, delay_ms: int = DELAY_MS):
        super().__init__(parent)
        self.document = document
        self.path = recovery_path()
        self.timer = QTimer(self, singleShot=True, interval=delay_ms)
        self.timer.timeout.connect(self.write_now)
        document.changed.connect(self._document_changed)

    def _document_changed(self, changes):
        if DIRTY in changes and not self.document.is_dirty:
            self.timer.stop()
            self.discard()
        elif changes & {POINTS, CONFIG, METADATA} and self.document.is_dirty:
            self.timer.start()

    def write_now(self):
        from solver.files import save_experiment
        doc = self.document
        if not doc.is_dirty or len(doc.X) == 0:
            return
        try:
            self.path.parent.mkdir(parents=True, exist_ok=True)
            save_experiment(self.path, doc.dataset(), None, note=doc.note, config=doc.config)
        except (SlacklineError, OSError):
            return  # recovery is best effort; never interrupt the user for it
        settings = QSettings()
        settings.setValue("recovery/original_path", str(doc.path or ""))

    def discard(self):
        try:
            self.path.unlink()
        except FileNotFoundError:
            pass


def pending_recovery() -> tuple[Path, str] | None:
    """(recovery file, original path or "") when the last session left unsaved edits."""
    path = recovery_path()
    if not path.exists():
        return None
    return path, str(QSettings().value("recovery/original_path", "") or "")
