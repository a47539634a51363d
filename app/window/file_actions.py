"""New, Open, Import, Save, Save As, exports and recent files for one window.

Every file is read and written by the file layer (solver.files.experiment,
solver.files.dataset, solver.files.exports); this module asks for names and reports
what the file layer says.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QObject, QSettings, Signal
from PySide6.QtWidgets import QFileDialog, QMessageBox

from solver import SlacklineError
from solver.files.atomic import FileChangedError
from app.window.write_guard import ANY, WriteGuard
from solver.files import TABLE_FILTER, TABLE_SUFFIXES

from app.document.evidence import evidence_of

EXPERIMENT_FILTER = "Slackline experiments (*.json)"
MAX_RECENT = 8


class FileActions(QObject):
    recent_changed = Signal()

    def __init__(self, window, document, canvas):
        super().__init__(window)
        self.window, self.document, self.canvas = window, document, canvas
        self.guard = WriteGuard(window)

    # -- prompts -----------------------------------------------------------
    def _error(self, title, exc):
        problems = getattr(exc, "problems", []) or []
        text = str(exc) + ("\n\n" + "\n".join(f"\u2022 {p}" for p in problems[:10])
                           if problems else "")
        self.window.statusBar().showMessage(str(exc), 10000)
        if not getattr(self.window, "quiet", False):
            QMessageBox.warning(self.window, title, text)

    def confirm_discard(self) -> bool:
        """True when there are no unsaved edits, or the user saved or dropped them."""
        if not self.document.is_dirty or getattr(self.window, "quiet", False):
            return True
        answer = QMessageBox.question(
            self.window, "Unsaved changes",
            "This experiment has unsaved changes. Save them first?",
            QMessageBox.Save | QMessageBox.Discard | QMessageBox.Cancel, QMessageBox.Save)
        if answer == QMessageBox.Save:
            return self.save()
        return answer == QMessageBox.Discard

    def _ask_open(self, title, filters):
        folder = QSettings().value("files/last_folder", str(Path.home()))
        path, _ = QFileDialog.getOpenFileName(self.window, title, folder, filters)
        return path or None

    def _ask_save(self, title, filters, suggestion):
        folder = QSettings().value("files/last_folder", str(Path.home()))
        path, _ = QFileDialog.getSaveFileName(self.window, title,
                                              str(Path(folder) / suggestion), filters)
        return path or None

    def _remember_folder(self, path):
        QSettings().setValue("files/last_folder", str(Path(path).parent))

    # -- opening ---------------------------------------------------------------
    def new(self):
        if self.confirm_discard():
            self.document.new()
            evidence_of(self.document).reset()
            self.canvas.fit_view_to_data()

    def open(self):
        if not self.confirm_discard():
            return
        path = self._ask_open("Open experiment", f"{EXPERIMENT_FILTER};;All files (*)")
        if path:
            self.open_path(path, confirmed=True)

    def open_path(self, path, confirmed=False) -> bool:
        """Open an experiment file, or import a table (dropped files come here)."""
        path = Path(path)
        if path.suffix.lower() in TABLE_SUFFIXES:
            return self.import_path(path)
        if not confirmed and not self.confirm_discard():
            return False
        from solver.files import load_experiment
        try:
            experiment = load_experiment(path)
        except SlacklineError as exc:
            self._error("Cannot open the experiment", exc)
            return False
        self.document.load(experiment.dataset, experiment.config, path=path,
                           note=experiment.note)
        self.guard.remember(path, dataset=experiment.dataset)
        evidence_of(self.document).reset(experiment.heldout)
        self.window.match_axes_to_data()
        self._add_recent(path)
        self._remember_folder(path)
        self.window.statusBar().showMessage(f"opened {path.name}", 5000)
        return True

    def import_data(self):
        path = self._ask_open("Import data", f"{TABLE_FILTER};;All files (*)")
        if path:
            self.import_path(path)

    def import_path(self, path) -> bool:
        from app.dialogs.import_dialog import ImportDialog
        dialog = ImportDialog(str(path), self.window)
        self.window.last_import_dialog = dialog
        if dialog.exec() != ImportDialog.Accepted or dialog.dataset is None:
            return False
        self.document.replace_points(dialog.dataset, f"import {Path(path).name}")
        self.guard.remember(path, data=True)
        self.window.match_axes_to_data()
        self._remember_folder(path)
        return True

    # -- saving ------------------------------------------------------------------
    def save(self) -> bool:
        if self.document.path is None or not str(self.document.path).endswith(".json"):
            return self.save_as()
        return self.save_to(self.document.path)

    def save_as(self) -> bool:
        name = Path(self.document.path).name if self.document.path else \
            f"{self._stem()}.experiment.json"
        path = self._ask_save("Save experiment as", EXPERIMENT_FILTER, name)
        return self.save_to(path) if path else False

    def save_to(self, path) -> bool:
        from solver.files import save_experiment
        doc = self.document
        doc.wait_for_solve(10000)  # save the figures of these very points when they are ready
        result = doc.current_result()
        if not self.guard.allows(path, doc.path, exporting=False):
            return False
        expected = self.guard.expected(path)
        try:
            heldout = evidence_of(doc).heldout_section() if result else None
            try:
                save_experiment(path, doc.dataset(), result, note=doc.note, config=doc.config,
                                heldout=heldout,
                                **({} if expected is ANY else {"expect": expected}))
            except FileChangedError:
                if not self.guard.confirm(f"{Path(path).name} was changed by another program "
                                          "since this window read it. Replace it anyway?",
                                          "File changed on disk"):
                    raise
                save_experiment(path, doc.dataset(), result, note=doc.note, config=doc.config,
                                heldout=heldout)
        except SlacklineError as exc:
            self._error("Cannot save the experiment", exc)
            return False
        self.guard.remember(path)
        doc.mark_saved(Path(path))
        self._add_recent(path)
        self._remember_folder(path)
        self.window.statusBar().showMessage(f"saved {Path(path).name}", 5000)
        return True

    # -- exports -------------------------------------------------------------------
    def _stem(self):
        """The experiment's name, else the imported table's, else "untitled"."""
        named = self.document.path or self.document.source
        return Path(str(named)).name.split(".")[0] if named else "untitled"

    def export_picture(self, path=None) -> bool:
        path = path or self._ask_save("Export picture", "PNG picture (*.png);;SVG drawing (*.svg)",
                                      f"{self._stem()}.png")
        if not path:
            return False
        if not Path(path).suffix:
            path = f"{path}.png"
        if not self.guard.allows(path, self.document.path, exporting=True):
            return False
        from app.window.picture import write_picture
        try:
            write_picture(self.canvas, path)
        except SlacklineError as exc:
            self._error("Cannot export the picture", exc)
            return False
        self.window.statusBar().showMessage(f"wrote {Path(path).name}", 5000)
        return True

    def _fitted(self, what):
        doc = self.document
        doc.wait_for_solve(10000)
        if doc.current_result() is None:
            self.window.statusBar().showMessage(
                f"nothing to export: {what} needs a fit of the current points", 8000)
        return doc.current_result()

    def export_points(self, path=None) -> bool:
        result = self._fitted("the points table")
        path = result is not None and (path or self._ask_save(
            "Export points table", "CSV table (*.csv)", f"{self._stem()}.points.csv"))
        if not path:
            return False
        from solver.files import write_points_csv
        return self._write(write_points_csv, path, result)

    def export_classifier(self, path=None) -> bool:
        result = self._fitted("the classifier")
        path = result is not None and (path or self._ask_save(
            "Export classifier", "Classifier file (*.json)", f"{self._stem()}.classifier.json"))
        if not path:
            return False
        from solver.files import write_classifier
        cross_validation = self._cross_validation(result)
        return self._write(lambda p, data, fitted: write_classifier(p, data, fitted,
                                                                    cross_validation),
                           path, result)

    def _cross_validation(self, result) -> dict | None:
        """The sweep's cross-validated error at this C, when a sweep of these points exists."""
        from app.document.sweep_store import sweep_store
        sweep = sweep_store(self.document).current_for(result.X, result.y, result.config)
        estimate = None if sweep is None or result.config.hard_margin else \
            sweep.cv_at(result.config.C)
        if estimate is None:
            return None
        return {"error": estimate.error, "standard_error": estimate.standard_error,
                "folds": sweep.folds, "seed": sweep.seed}

    def _write(self, writer, path, result) -> bool:
        if not self.guard.allows(path, self.document.path, exporting=True):
            return False
        try:
            writer(path, self.document.dataset(), result)
        except (SlacklineError, OSError) as exc:
            self._error("Cannot export", exc)
            return False
        self.window.statusBar().showMessage(f"wrote {Path(path).name}", 5000)
        return True

    # -- recent files ------------------------------------------------------------------
    def recent(self) -> list[str]:
        value = QSettings().value("files/recent", []) or []
        return [value] if isinstance(value, str) else list(value)

    def _add_recent(self, path):
        path = str(Path(path).resolve())
        items = [path] + [p for p in self.recent() if p != path]
        QSettings().setValue("files/recent", items[:MAX_RECENT])
        self.recent_changed.emit()
