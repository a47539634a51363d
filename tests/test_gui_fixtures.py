"""Shared fixtures of the GUI tests (imported by each tests/test_gui_*.py file).

Every GUI test runs offscreen with QSettings pointed at a temporary folder, so
no test ever reads or writes the user's own settings or recovery file.
"""

import numpy as np
import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QCoreApplication, QSettings  # noqa: E402

from solver.files.dataset import Dataset  # noqa: E402



@pytest.fixture
def temporary_settings(tmp_path, qapp):
    QSettings.setDefaultFormat(QSettings.IniFormat)
    QSettings.setPath(QSettings.IniFormat, QSettings.UserScope, str(tmp_path / "settings"))
    QCoreApplication.setOrganizationName("SlacklineTests")
    QCoreApplication.setApplicationName("SlacklineTests")
    QSettings().clear()
    yield tmp_path / "settings"
    QSettings().clear()


@pytest.fixture
def window(qtbot, temporary_settings):
    from app.window.main_window import MainWindow
    win = MainWindow(quiet=True)
    qtbot.addWidget(win)
    win.resize(1280, 800)
    win.show()
    qtbot.waitExposed(win)
    yield win
    win.recovery.timer.stop()
    win.evidence_actions.evidence.shutdown()     # an influence ranking still under way
    win.canvas.scene_items.shutdown()            # slack segments still being made
    win.document.shutdown()


def gauge_points(n_per_class=12, seed=7, overlap=False):
    """Invented demo data: two gauge readings of a pilot batch, pass (+1) / reject (-1)."""
    rng = np.random.default_rng(seed)
    spread = 1.0 if overlap else 0.45
    good = rng.normal(0, spread, (n_per_class, 2)) + [1.5, 1.5]
    bad = rng.normal(0, spread, (n_per_class, 2)) - [1.5, 1.5]
    X = np.vstack([good, bad])
    y = np.r_[np.ones(n_per_class, int), -np.ones(n_per_class, int)]
    return Dataset.from_points(X, y, feature_names=("bore", "roughness"),
                               label_mapping={"pass": 1, "reject": -1}, label_name="inspection")


def load_points(window, qtbot, dataset, config=None):
    window.document.load(dataset, config)
    window.canvas.fit_view_to_data()
    settle(window, qtbot)


def settle(window, qtbot, timeout=20000):
    """Let the latest solve finish and its answer reach the widgets."""
    assert window.document.wait_for_solve(timeout)
    qtbot.wait(5)
