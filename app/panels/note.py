"""The experiment note: free text saved in the file and printed in the report."""

from __future__ import annotations

import itertools

from PySide6.QtWidgets import QLabel, QPlainTextEdit, QVBoxLayout, QWidget

from app.document.note_edit import note_channel, set_note

_stretches = itertools.count(1)


class _NoteText(QPlainTextEdit):
    """Each visit (focus in) starts a new editing stretch: one undo step."""

    def __init__(self, editor):
        super().__init__()
        self._editor = editor

    def focusInEvent(self, event):
        self._editor.stretch = next(_stretches)
        super().focusInEvent(event)


class NoteEditor(QWidget):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.stretch = next(_stretches)
        self._showing = False
        self.text = _NoteText(self)
        self.text.setObjectName("note_text")
        self.text.setPlaceholderText("What this experiment is for, where the data came from, "
                                     "what you decided and why\u2026")
        self.text.setToolTip("the experiment's note: saved in the experiment file and "
                             "printed in the report; Ctrl+Z undoes a stretch of typing")
        hint = QLabel("Saved with the experiment (File \u2192 Save) and shown in the report.")
        hint.setWordWrap(True)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        layout.addWidget(self.text, 1)
        layout.addWidget(hint)
        self.text.textChanged.connect(self._typed)
        note_channel(document).changed.connect(self.show_note)
        self.show_note()

    def _typed(self):
        if not self._showing:
            set_note(self.document, self.text.toPlainText(), self.stretch)

    def show_note(self):
        text = self.document.note or ""
        if text == self.text.toPlainText():
            return
        self._showing = True
        try:
            self.text.setPlainText(text)
        finally:
            self._showing = False
