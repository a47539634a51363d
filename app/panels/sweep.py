"""The C sweep panel: run a sweep in the background, chart it, pick C from it.

Reads the Document and sends it commands (set_C); the sweep itself is
solver.study.sweep.run_sweep, run on a BackgroundTask thread.
"""

from __future__ import annotations

from PySide6.QtWidgets import (QCheckBox, QDoubleSpinBox, QFormLayout, QHBoxLayout, QLabel,
                               QProgressBar, QPushButton, QSpinBox, QVBoxLayout, QWidget)

from solver.study import LEAVE_ONE_OUT
from solver import SlacklineError
from solver.study import SweepSettings, run_sweep

from app.document.background import BackgroundTask
from app.document.document import CONFIG, POINTS
from app.panels.study_layout import ChartArea, side_column
from app.panels.sweep_chart import SweepChart
from app.document.sweep_store import sweep_store

SIDE_WIDTH = 270            # px: the settings, buttons and the suggestion beside the charts
PARALLEL_FROM_POINTS = 200   # below this, process start-up costs more than it saves
SUGGESTION_NOTE = ("Suggestion only, from cross-validation on these points — not a "
                   "validated model. In an SVM a smaller C is the more regularised, "
                   "simpler model; a larger C bends more to the training points.")


class SweepPanel(QWidget):
    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.store = sweep_store(document)
        self.task = None
        self._drawn = None                 # (sweep id, stale) last drawn
        self.chart = SweepChart(self)
        self._build()
        self.chart.C_clicked.connect(self._on_chart_click)
        document.changed.connect(self._document_changed)
        self.store.sweep_changed.connect(self._show_sweep)
        self._on_config_changed()
        self._show_sweep()

    # -- layout ---------------------------------------------------------------
    def _build(self):
        self.c_from = _log_spin(1e-3)
        self.c_to = _log_spin(1e4)
        self.steps = QSpinBox(minimum=2, maximum=400, value=40)
        self.folds = QSpinBox(minimum=2, maximum=50, value=5)
        self.leave_one_out = QCheckBox("leave-one-out")
        self.leave_one_out.toggled.connect(lambda on: self.folds.setEnabled(not on))
        self.seed = QSpinBox(minimum=0, maximum=2 ** 31 - 1, value=0)
        form = QFormLayout()
        form.addRow("C from", self.c_from)
        form.addRow("C to", self.c_to)
        form.addRow("values of C", self.steps)
        folds_row = QHBoxLayout()
        folds_row.addWidget(self.folds)
        folds_row.addWidget(self.leave_one_out)
        form.addRow("folds", folds_row)
        form.addRow("seed", self.seed)
        self.run_button = QPushButton("Run sweep")
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setEnabled(False)
        self.run_button.clicked.connect(self.start_sweep)
        self.cancel_button.clicked.connect(self.cancel_sweep)
        self.progress = QProgressBar()
        self.progress.setFormat("%v of %m fits")
        buttons = QHBoxLayout()
        for widget in (self.run_button, self.cancel_button):
            buttons.addWidget(widget)
        self.status = QLabel("No sweep yet: press Run sweep.")
        self.status.setWordWrap(True)
        self.suggestion = QLabel("")
        self.suggestion.setWordWrap(True)
        self.use_best = QPushButton("Use lowest-error C")
        self.use_largest = QPushButton("Use largest C within 1 SE")
        self.use_smallest = QPushButton("Use smallest C within 1 SE")
        picks = QVBoxLayout()
        for button, field in ((self.use_best, "best_C"),
                              (self.use_largest, "largest_C_within_one_se"),
                              (self.use_smallest, "smallest_C_within_one_se")):
            button.clicked.connect(lambda _=False, f=field: self._use_suggestion(f))
            button.setEnabled(False)
            picks.addWidget(button)
        # settings and words in a column on the left, the charts on the right: the
        # study area is wide and short, and each chart keeps >= 220 px of height
        self.side = side_column((form, buttons, self.progress, self.status, self.suggestion,
                                 picks), SIDE_WIDTH)
        self.chart_area = ChartArea(self.chart)
        layout = QHBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.addWidget(self.side)
        layout.addWidget(self.chart_area, stretch=1)

    # -- running ----------------------------------------------------------------
    def settings(self) -> SweepSettings:
        folds = LEAVE_ONE_OUT if self.leave_one_out.isChecked() else self.folds.value()
        return SweepSettings(c_from=self.c_from.value(), c_to=self.c_to.value(),
                             steps=self.steps.value(), folds=folds, seed=self.seed.value())

    def start_sweep(self) -> None:
        if self.task is not None:
            return
        document = self.document
        X, y, config = document.X.copy(), document.y.copy(), document.config
        try:
            settings = self.settings()
        except SlacklineError as exc:
            self.status.setText(f"Cannot sweep: {exc}")
            return
        n_jobs = -1 if len(y) >= PARALLEL_FROM_POINTS else None

        def work(progress, cancel):
            return run_sweep(X, y, config, settings, progress=progress, cancel=cancel,
                             n_jobs=n_jobs)

        self.task = BackgroundTask(work, self)
        self.task.progressed.connect(self._on_progress)
        self.task.succeeded.connect(self._on_done)
        self.task.failed.connect(self._on_failed)
        self.task.finished.connect(self._on_thread_finished)
        self.run_button.setEnabled(False)
        self.cancel_button.setEnabled(True)
        self.progress.setRange(0, settings.steps * (self._fold_count(settings, y) + 1))
        self.progress.setValue(0)
        self.status.setText("Sweeping C ...")
        self.task.start()

    @staticmethod
    def _fold_count(settings, y) -> int:
        return len(y) if settings.folds == LEAVE_ONE_OUT else int(settings.folds)

    def cancel_sweep(self) -> None:
        if self.task is not None:
            self.task.cancel()
            self.status.setText("Cancelling after the fits under way ...")

    def wait(self, timeout_ms: int = 60000) -> bool:
        """Block until the running sweep ends (tests only)."""
        task = self.task
        return True if task is None else task.wait(timeout_ms)

    def _on_progress(self, done, total):
        self.progress.setRange(0, total)
        self.progress.setValue(done)

    def _on_done(self, sweep):
        self.store.set_sweep(sweep)

    def _on_failed(self, message):
        self.status.setText(f"The sweep failed: {message}")

    def _on_thread_finished(self):
        self.task.deleteLater()
        self.task = None
        self.run_button.setEnabled(True)
        self.cancel_button.setEnabled(False)

    # -- showing ----------------------------------------------------------------
    def is_stale(self) -> bool:
        sweep = self.store.sweep
        return sweep is not None and self.store.current_for(
            self.document.X, self.document.y, self.document.config) is None

    def _show_sweep(self):
        self._drawn = None
        if self.store.sweep is None:
            self.chart.show_sweep(None)
        self._refresh_staleness()
        if self.store.sweep is None:
            self._show_suggestion()

    def _refresh_staleness(self):
        sweep = self.store.sweep
        if sweep is None:
            return
        stale = self.is_stale()
        if self._drawn != (id(sweep), stale):      # redraw only when the look changes
            self.chart.show_sweep(sweep, stale=stale)
            self._drawn = (id(sweep), stale)
        if stale:
            self.status.setText(self._stale_reason() + " — run again")
        else:
            done = f"{len(sweep.C)} values of C"
            if sweep.cancelled:
                done += f" (cancelled; {sweep.planned_steps} planned)"
            failed = f", {len(sweep.failures)} fits failed" if sweep.failures else ""
            self.status.setText(f"Sweep of {done} on {sweep.n_points} points, "
                                f"{self._fold_text(sweep)}{failed}; {sweep.seconds:.1f} s. "
                                f"Click the chart to set C.")
        for button in (self.use_best, self.use_largest, self.use_smallest):
            button.setEnabled(sweep.suggestion is not None and not stale)
        # a suggestion from other points or settings is no suggestion for these
        if stale:
            self.suggestion.clear()
        else:
            self._show_suggestion()

    def _stale_reason(self) -> str:
        from solver.study import points_fingerprint
        sweep = self.store.sweep
        if points_fingerprint(self.document.X, self.document.y) != sweep.fingerprint:
            return "points changed since this sweep"
        return "settings other than C changed since this sweep"

    @staticmethod
    def _fold_text(sweep) -> str:
        if sweep.folds == LEAVE_ONE_OUT:
            return "leave-one-out"
        return f"{sweep.folds}-fold cross-validation (seed {sweep.seed})"

    def _show_suggestion(self):
        sweep = self.store.sweep
        suggestion = None if sweep is None else sweep.suggestion
        if suggestion is None:
            self.suggestion.setText("" if sweep is None else
                                    "No suggestion: no C had every fold fit succeed.")
            return
        self.suggestion.setText(
            f"<b>Suggestion</b> — lowest cross-validated error "
            f"{suggestion.best_error:.1%} (standard error {suggestion.best_standard_error:.1%}) "
            f"at C = {suggestion.best_C:.4g}. Within one standard error of it "
            f"(one-standard-error rule): largest C = {suggestion.largest_C_within_one_se:.4g} "
            f"(less regularised), smallest C = {suggestion.smallest_C_within_one_se:.4g} "
            f"(more regularised, simpler).<br><i>{SUGGESTION_NOTE}</i>")

    # -- commands to the document -----------------------------------------------
    def _document_changed(self, changes):
        if CONFIG in changes:
            self._on_config_changed()
        elif POINTS in changes:
            self._refresh_staleness()

    def _on_config_changed(self):
        config = self.document.config
        self.chart.set_marker(None if config.hard_margin else config.C)
        self._refresh_staleness()

    def _on_chart_click(self, C):
        sweep = self.store.sweep
        if sweep is not None and len(sweep.C):
            C = sweep.nearest_C(C)   # a swept C, so its cross-validated error is known
        self.document.set_C(C)

    def _use_suggestion(self, field):
        sweep = self.store.sweep
        if sweep is not None and sweep.suggestion is not None:
            self.document.set_C(getattr(sweep.suggestion, field))


def _log_spin(value: float) -> QDoubleSpinBox:
    spin = QDoubleSpinBox(decimals=6, minimum=1e-6, maximum=1e9, value=value)
    spin.setStepType(QDoubleSpinBox.AdaptiveDecimalStepType)
    return spin
