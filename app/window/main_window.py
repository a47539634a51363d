"""The workbench window: the canvas in the middle, panels in docks, menus and status bar."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QSettings, Qt
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import QMainWindow, QMenu, QMessageBox

from app.dialogs.about import show_about
from app.dialogs.help_pages import READING, shortcuts_html, show_page
from app.canvas import geometry
from app.canvas.canvas import Canvas
from app.document.document import DIRTY, PATH, Document
from app.window.evidence_actions import install_evidence
from app.window.file_actions import FileActions
from app.document.provenance import provenance
from app.document.recovery import RecoveryWriter, pending_recovery
from app.window.panels import PANELS
from app.window.status import StatusReadouts
from app.window.tooltips import apply_tooltips
from app.window.workspace import Workspace
from solver import kernels


class MainWindow(QMainWindow):
    def __init__(self, document: Document | None = None, quiet: bool = False):
        super().__init__()
        self.quiet = quiet            # tests: no modal prompts
        self.last_import_dialog = None
        self.setObjectName("slackline_main_window")
        self.document = document or Document(self)
        provenance(self.document)     # remembers the points as imported, before any edit
        self.canvas = Canvas(self.document)
        self.setCentralWidget(self.canvas)
        self.workspace = Workspace(self)
        self.docks = self.workspace.docks
        self.panels = {}
        for spec in PANELS:      # declared once, in app/window/panels.py
            panel = spec.build(self.document, self.canvas)
            self.panels[spec.name] = panel
            setattr(self, spec.name, panel)       # window.controls, window.summary, ...
            self.workspace.place(spec, panel)
        self.files = FileActions(self, self.document, self.canvas)
        self.recovery = RecoveryWriter(self.document, self)
        self._build_status_bar()
        self._build_menus()
        self.evidence_actions = install_evidence(self)   # scored rows, held-out, influence
        apply_tooltips(self)
        self.setAcceptDrops(True)
        self.document.changed.connect(self._document_changed)
        self.resize(1280, 800)
        self.workspace.finish(self.inspector)
        self._restore_settings()
        self._update_title()

    # -- layout ------------------------------------------------------------
    def _build_status_bar(self):
        self.status = StatusReadouts(self, self.document, self.canvas)
        self.fit_state, self.busy_indicator = self.status.fit_state, self.status.busy_indicator

    def _action(self, menu, text, slot, shortcut=None, name=None):
        action = QAction(text, self)
        if shortcut is not None:
            action.setShortcut(shortcut)
        action.triggered.connect(slot)
        action.setObjectName(name or text.lower().replace(" ", "_").replace("\u2026", ""))
        menu.addAction(action)
        return action

    def _build_menus(self):
        doc, files, bar = self.document, self.files, self.menuBar()
        file_menu = bar.addMenu("&File")
        self._action(file_menu, "New", files.new, QKeySequence.New)
        self._action(file_menu, "Open\u2026", files.open, QKeySequence.Open)
        self.recent_menu = QMenu("Open recent", self)
        file_menu.addMenu(self.recent_menu)
        files.recent_changed.connect(self._fill_recent)
        self._fill_recent()
        self._action(file_menu, "Import data\u2026", files.import_data, "Ctrl+I")
        file_menu.addSeparator()
        self._action(file_menu, "Save", files.save, QKeySequence.Save)
        self._action(file_menu, "Save as\u2026", files.save_as, QKeySequence.SaveAs)
        file_menu.addSeparator()
        self._action(file_menu, "Export picture\u2026", lambda: files.export_picture(), "Ctrl+E")
        self._action(file_menu, "Export points table\u2026", lambda: files.export_points())
        self._action(file_menu, "Export classifier\u2026", lambda: files.export_classifier())
        file_menu.addSeparator()
        self._action(file_menu, "Quit", self.close, QKeySequence.Quit)

        edit = bar.addMenu("&Edit")
        undo = doc.undo_stack.createUndoAction(self, "Undo")
        undo.setShortcut(QKeySequence.Undo)
        redo = doc.undo_stack.createRedoAction(self, "Redo")
        redo.setShortcut(QKeySequence.Redo)
        # the stack keeps their text and state; a trigger goes through the document,
        # so an undo and its clean-state change reach the views as one notice
        for action, step in ((undo, doc.undo), (redo, doc.redo)):
            action.triggered.disconnect()
            action.triggered.connect(step)
        edit.addActions([undo, redo])
        self.undo_action, self.redo_action = undo, redo
        edit.addSeparator()
        self._action(edit, "Delete selected points",
                     lambda: doc.delete_points(doc.selection),
                     QKeySequence.Delete, name="delete")
        self._action(edit, "Select all", lambda: doc.set_selection(range(len(doc.X))),
                     QKeySequence.SelectAll)
        self._action(edit, "Select none", lambda: doc.set_selection(()), "Esc")
        relabel = edit.addMenu("Relabel selection")
        self._action(relabel, "Swap class", lambda: doc.relabel(doc.selection, None), "Ctrl+R",
                     name="relabel_swap")
        self._action(relabel, "Make +1", lambda: doc.relabel(doc.selection, 1),
                     name="relabel_positive")
        self._action(relabel, "Make \u22121", lambda: doc.relabel(doc.selection, -1),
                     name="relabel_negative")
        edit.addSeparator()
        self._action(edit, "Pin current fit", self.status.pin, "Ctrl+P")
        self._action(edit, "Clear pin", doc.clear_pin)

        view = bar.addMenu("&View")
        self._action(view, "Fit view to data", self.canvas.fit_view_to_data, "Ctrl+0")
        equal = self._action(view, "Equal axis scales", self.canvas.set_equal_axes)
        equal.setCheckable(True)
        equal.setChecked(True)
        self.equal_axes_action = equal
        legend = self._action(view, "Legend", self.canvas.set_legend_visible)
        legend.setCheckable(True)
        legend.setChecked(True)
        view.addSeparator()
        for dock in self.docks.values():
            view.addAction(dock.toggleViewAction())
        help_menu = bar.addMenu("&Help")
        self._action(help_menu, "Keyboard shortcuts", self.show_shortcuts, "F1")
        self._action(help_menu, "Reading the canvas", self.show_reading)
        help_menu.addSeparator()
        self._action(help_menu, "About Slackline", lambda: show_about(self))

    def show_shortcuts(self):
        self.help_page = show_page(self, "Keyboard shortcuts", shortcuts_html(self),
                                   "help_shortcuts")

    def show_reading(self):
        self.help_page = show_page(self, "Reading the canvas", READING, "help_reading")

    def _fill_recent(self):
        self.recent_menu.clear()
        for path in self.files.recent():
            action = self.recent_menu.addAction(path)
            action.triggered.connect(lambda _=False, p=path: self.files.open_path(p))
        self.recent_menu.setEnabled(bool(self.files.recent()))

    # -- document -> window ----------------------------------------------------------
    def _document_changed(self, changes):
        if changes & {DIRTY, PATH}:
            self._update_title()

    def _update_title(self, *_):
        name = Path(self.document.path).name if self.document.path else "untitled"
        self.setWindowTitle(f"{name}[*] \u2014 Slackline")
        self.setWindowModified(self.document.is_dirty)

    # -- session ------------------------------------------------------------------------
    def match_axes_to_data(self):
        """Equal axis scales when the features span similar ranges, else free;
        the View menu's switch overrides it until the next file."""
        equal = geometry.comparable_spans(self.document.X)
        self.equal_axes_action.setChecked(equal)
        self.canvas.set_equal_axes(equal)
        self.canvas.fit_view_to_data()

    def _restore_settings(self):
        settings = QSettings()
        geometry = settings.value("window/geometry")
        state = settings.value("window/state")
        if geometry is not None:
            self.restoreGeometry(geometry)
        else:
            self.workspace.fit_to_screen()
        if state is not None:
            self.restoreState(state)
        else:
            self.workspace.starting_sizes_when_shown()
        equal = settings.value("view/equal_axes", True)
        equal = equal if isinstance(equal, bool) else str(equal).lower() == "true"
        self.equal_axes_action.setChecked(equal)
        self.canvas.set_equal_axes(equal)
        kernel = settings.value("fit/last_kernel")
        if kernel in kernels.names() and not self.document.X.size:
            self.document.set_config(self.document.config.with_changes(kernel=kernel))
            self.document.undo_stack.clear()

    def save_settings(self):
        settings = QSettings()
        settings.setValue("window/geometry", self.saveGeometry())
        settings.setValue("window/state", self.saveState())
        settings.setValue("view/equal_axes", self.equal_axes_action.isChecked())
        settings.setValue("fit/last_kernel", self.document.config.kernel)
        settings.sync()

    def offer_recovery(self) -> bool:
        """At start-up: offer unsaved edits of a session that did not end cleanly."""
        pending = pending_recovery()
        if pending is None:
            return False
        path, original = pending
        answer = QMessageBox.question(
            self, "Recover unsaved edits",
            "The last session ended with unsaved edits"
            f"{' to ' + Path(original).name if original else ''}. Recover them?",
            QMessageBox.Yes | QMessageBox.No, QMessageBox.Yes)
        if answer != QMessageBox.Yes:
            self.recovery.discard()
            return False
        return self.recover_from(path, original)

    def recover_from(self, path, original="") -> bool:
        from solver.files import load_experiment
        try:
            experiment = load_experiment(path)
        except Exception:
            self.recovery.discard()
            return False
        self.document.load(experiment.dataset, experiment.config,
                           path=Path(original) if original else None, note=experiment.note)
        self.document.undo_stack.resetClean()  # recovered edits are unsaved edits
        self._update_title()
        self.match_axes_to_data()     # as opening a file does
        return True

    def closeEvent(self, event):
        if not self.files.confirm_discard():
            event.ignore()
            return
        self.save_settings()
        self.recovery.timer.stop()
        self.recovery.discard()
        self.evidence_actions.evidence.shutdown()
        self.canvas.scene_items.shutdown()
        self.document.shutdown()
        event.accept()

    # -- drag and drop ------------------------------------------------------------------
    def dragEnterEvent(self, event):
        if event.mimeData().hasUrls():
            event.acceptProposedAction()

    def dropEvent(self, event):
        urls = [u for u in event.mimeData().urls() if u.isLocalFile()]
        if urls:
            event.acceptProposedAction()
            self.files.open_path(urls[0].toLocalFile())
