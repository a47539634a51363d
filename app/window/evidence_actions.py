"""The window's evidence menu entries, panels and canvas layer, installed in one call.

File -> Score data...            new rows with the fit's feature columns, scored and drawn
File -> Load held-out points...  labelled rows kept out of the fit
Edit -> Hold out selected points the selection leaves the fit (undoable)
View -> Influence / Scored rows  the study tabs

Files are read by solver.files (through app.document.evidence); this module
asks for names and reports what the file layer says.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QObject, QSettings
from PySide6.QtWidgets import QFileDialog

from solver import SlacklineError
from solver.files import TABLE_FILTER, write_scored_csv

from app.canvas.evidence_layer import EvidenceLayer
from app.document.evidence import evidence_of


class EvidenceActions(QObject):
    def __init__(self, window):
        super().__init__(window)
        self.window = window
        self.evidence = evidence_of(window.document)
        self.layer = EvidenceLayer(window.canvas, self.evidence)
        self.influence_panel = window.influence_panel      # listed in app/window/panels.py
        self.scored_panel = window.scored_panel
        self.scored_panel.export_button.clicked.connect(lambda: self.export_scored())
        self._menus()
        self.evidence.changed.connect(window.summary.refresh)
        self.evidence.influence_changed.connect(window.inspector.refresh)
        self.evidence.changed.connect(window.compare.refresh)

    def _menus(self):
        window = self.window
        menus = {a.text().replace("&", ""): a.menu() for a in window.menuBar().actions()}
        file_menu, edit, view = menus["File"], menus["Edit"], menus["View"]
        quit_action = next(a for a in file_menu.actions() if a.objectName() == "quit")
        entries = [("Score data\u2026", self.score_data, "score_data"),
                   ("Load held-out points\u2026", self.load_heldout, "load_heldout"),
                   ("Export scored rows\u2026", lambda: self.export_scored(), "export_scored")]
        for text, slot, name in entries:
            action = window._action(file_menu, text, slot, name=name)
            file_menu.insertAction(quit_action, action)
        file_menu.insertSeparator(quit_action)
        edit.addSeparator()
        self.hold_action = window._action(edit, "Hold out selected points",
                                          self.evidence.hold_out_selection, "Ctrl+H",
                                          name="hold_out")
        window._action(edit, "Clear held-out points", lambda: self.evidence.set_heldout(None),
                       name="clear_heldout")
        view.addSeparator()
        for title in ("Influence", "Scored rows"):
            window._action(view, title, lambda _=False, t=title: window.workspace.show_study(t),
                           name=f"show_{title.lower().replace(' ', '_')}")

    # -- prompts ---------------------------------------------------------------
    def _ask(self, title):
        folder = QSettings().value("files/last_folder", str(Path.home()))
        path, _ = QFileDialog.getOpenFileName(self.window, title, folder,
                                              f"{TABLE_FILTER};;All files (*)")
        return path or None

    def score_data(self):
        path = self._ask("Score data")
        if path:
            self.score_path(path)

    def load_heldout(self):
        path = self._ask("Load held-out points")
        if path:
            self.heldout_path(path)

    def score_path(self, path) -> bool:
        try:
            self.evidence.score_file(path)
        except SlacklineError as exc:
            self.window.files._error("Cannot score the rows", exc)
            return False
        self.window.workspace.show_study("Scored rows")
        self.window.statusBar().showMessage(f"scored {len(self.evidence.rows)} rows of "
                                            f"{Path(path).name}", 5000)
        return True

    def heldout_path(self, path) -> bool:
        try:
            self.evidence.load_heldout(path)
        except SlacklineError as exc:
            self.window.files._error("Cannot load held-out points", exc)
            return False
        self.window.statusBar().showMessage(f"{len(self.evidence.heldout)} held-out points "
                                            f"from {Path(path).name}", 5000)
        return True

    def export_scored(self, path=None) -> bool:
        ev = self.evidence
        if ev.rows is None or ev.scores is None:
            return False
        if path is None:
            folder = QSettings().value("files/last_folder", str(Path.home()))
            path, _ = QFileDialog.getSaveFileName(self.window, "Export scored rows",
                                                  str(Path(folder) / "scored.csv"),
                                                  "CSV (*.csv)")
            if not path:
                return False
        try:
            write_scored_csv(path, ev.rows, ev.scores, self.window.document.feature_names)
        except SlacklineError as exc:
            self.window.files._error("Cannot export the scored rows", exc)
            return False
        self.window.statusBar().showMessage(f"wrote {Path(path).name}", 5000)
        return True


def install_evidence(window) -> EvidenceActions:
    return EvidenceActions(window)
