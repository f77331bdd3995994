"""Shared test fixtures.

Qt runs offscreen (set before any Qt import); QSettings are isolated in a
temporary folder for every test that loads Qt; the ``main_window`` fixture
builds the window, answers its dialogs, and fails the test if a visible
top-level widget leaked.
"""
from __future__ import annotations

import os
import sys
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
# Autosave copies of test windows never go to the user's own recovery folder (subprocesses inherit it).
import tempfile  # noqa: E402
os.environ.setdefault("MOUNTSMITH_RECOVERY_DIR", tempfile.mkdtemp(prefix="mountsmith-test-recovery-"))

import pytest  # noqa: E402
from hypothesis import settings as hypothesis_settings  # noqa: E402

# Property tests draw the same examples in every run (a red CI run is then a bug, never luck;
# two CI runs drew a failing damping of 1e-255 and 2e-311 once each). HYPOTHESIS_PROFILE=explore
# draws new examples, for a search before a change lands.
hypothesis_settings.register_profile("repeatable", derandomize=True, database=None)
hypothesis_settings.register_profile("explore", derandomize=False)
hypothesis_settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "repeatable"))

ROOT = Path(__file__).resolve().parent.parent
DEMO_PROJECTS = sorted((ROOT / "demo_projects").glob("*.json"))


def demo_project_params():
    """pytest params over demo_projects/*.json, with readable ids."""
    return [pytest.param(path, id=path.stem) for path in DEMO_PROJECTS]


@pytest.fixture(autouse=True)
def isolated_qsettings(request):
    """Point QSettings at a temporary folder, when Qt is in use (core-only runs never import Qt)."""
    if "PySide6.QtCore" not in sys.modules:
        yield None
        return
    from PySide6.QtCore import QSettings
    folder = request.getfixturevalue("tmp_path_factory").mktemp("qsettings")  # beside, not inside, tmp_path
    QSettings.setPath(QSettings.Format.IniFormat, QSettings.Scope.UserScope, str(folder))
    yield folder


@pytest.fixture
def main_window(qtbot, isolated_qsettings):
    """A factory for shown main windows; owns their teardown.

    Dialogs are replaced: unsaved-change prompts answer "discard", errors are
    collected in ``window.errors``.
    """
    from PySide6 import QtWidgets
    from app.main_window import MainWindow

    before = {id(w) for w in QtWidgets.QApplication.topLevelWidgets() if w.isVisible()}
    windows = []

    def make(path=None, model=None):
        window = MainWindow(model=model)
        window.errors = []
        window.ask_save_changes = lambda: "discard"
        window.show_error = lambda title, message: window.errors.append(message)
        window.resize(1400, 860)
        window.show()
        qtbot.waitExposed(window)
        if path is not None:
            assert window.open_file(str(path)), window.errors
        window.refresh_now()
        windows.append(window)
        return window

    yield make
    for window in windows:
        window.ask_save_changes = lambda: "discard"
        window.close()
        window.deleteLater()
    QtWidgets.QApplication.processEvents()
    leaked = [w for w in QtWidgets.QApplication.topLevelWidgets()
              if w.isVisible() and id(w) not in before and not isinstance(w, QtWidgets.QMenu)]
    assert not leaked, f"top-level widgets left open: {leaked}"
