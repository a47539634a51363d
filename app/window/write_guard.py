"""What a window read, so that no save or export replaces it without asking.

The headless commands refuse an output that is one of their inputs
(cli.outputs); the window asks instead, because a person is there to answer.
It remembers the data file the points were imported from and the experiment
the document was opened from or last saved to, with what was on disk then
(solver.files.atomic.file_stamp), so that a save over a file another program
changed since is noticed too.  Quiet windows (tests, scripts) cannot ask and
refuse.
"""

from __future__ import annotations

import os
from pathlib import Path

from PySide6.QtWidgets import QMessageBox

from solver.files.atomic import file_stamp

ANY = object()    # no expectation of what is on disk


def _sha256(path: Path) -> str | None:
    import hashlib
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except OSError:
        return None


def _real(path) -> str:
    return os.path.realpath(os.path.abspath(os.fspath(path)))


class WriteGuard:
    def __init__(self, window):
        self.window = window
        self.data_file: str | None = None       # the imported table, resolved
        self._stamps: dict[str, object] = {}    # resolved path -> file_stamp when read/written

    def remember(self, path, data: bool = False, dataset=None) -> None:
        """``path`` was just read (or written) by this window.

        ``dataset``: the points of an experiment just opened; the table they
        were imported from counts as the data file when it sits beside the
        experiment under its recorded name and still has its recorded SHA-256.
        """
        real = _real(path)
        if data:
            self.data_file = real
        self._stamps[real] = file_stamp(real)
        if dataset is None:
            return
        self.data_file = None          # a newly opened experiment: its own table, if any
        source = getattr(dataset, "source", None)
        if source and getattr(dataset, "sha256", None):
            table = Path(real).parent / Path(source).name
            if table.is_file() and _sha256(table) == dataset.sha256:
                self.data_file = _real(table)

    def expected(self, path):
        """What must still be on disk at ``path`` for a save to replace it silently."""
        return self._stamps.get(_real(path), ANY)

    def allows(self, path, document_path, exporting: bool) -> bool:
        """True unless ``path`` is a file the document was read from and the user says no.

        Saving an experiment back to the experiment it came from is what Save
        is for; exporting over it, or saving over the imported data, is not.
        """
        target = _real(path)
        if self.data_file == target:
            what = "the data file these points were imported from"
        elif exporting and document_path is not None and _real(document_path) == target:
            what = "the experiment this window has open"
        else:
            return True
        return self.confirm(f"{Path(path).name} is {what}. Replace it? Its current content "
                            f"will be lost.", "Replace a file this window read?")

    def confirm(self, question: str, title: str) -> bool:
        if getattr(self.window, "quiet", False):
            self.window.statusBar().showMessage(f"not written: {question.split('.')[0]}", 10000)
            return False
        answer = QMessageBox.question(self.window, title, question,
                                      QMessageBox.Yes | QMessageBox.No, QMessageBox.No)
        return answer == QMessageBox.Yes
