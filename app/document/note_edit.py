"""The experiment note as an undoable edit.

The note is free text saved in the experiment file ("note") and printed in
the report.  Typing in one stretch (one visit to the note editor) is one
undo step; ``NoteChannel.changed`` tells the editor when the note changed
under it (undo, redo, a newly opened file).
"""

from __future__ import annotations

from PySide6.QtCore import QObject, Signal
from PySide6.QtGui import QUndoCommand

from app.document.document import METADATA, PATH

_NOTE_ID = 1003


class NoteChannel(QObject):
    changed = Signal()

    def document_changed(self, changes):
        if changes & {METADATA, PATH}:       # an edit, undo or redo; a file opened or saved
            self.changed.emit()


def note_channel(document) -> NoteChannel:
    """The document's note channel, created on first use."""
    channel = document.findChild(NoteChannel)
    if channel is None:
        channel = NoteChannel(document)
        document.changed.connect(channel.document_changed)
    return channel


class SetNoteCommand(QUndoCommand):
    """Replace the note; steps of one editing stretch (same ``stretch``) merge."""

    def __init__(self, document, text, stretch=None):
        super().__init__("edit the note")
        self._doc = document
        self._old = document.note
        self._new = text if text else None
        self._stretch = stretch

    def id(self):
        return _NOTE_ID if self._stretch is not None else -1

    def mergeWith(self, other):
        if other._stretch != self._stretch:
            return False
        self._new = other._new
        return True

    def _put(self, text):
        note_channel(self._doc)                      # listening before the first change
        self._doc.set_metadata(note=text)

    def redo(self):
        self._put(self._new)

    def undo(self):
        self._put(self._old)


def set_note(document, text: str, stretch=None):
    """Push the edit when the note really changes."""
    text = text if text else None
    if text != document.note:
        with document.batch():
            document.undo_stack.push(SetNoteCommand(document, text, stretch))
