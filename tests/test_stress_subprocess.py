"""Stress: thousands of slider moves and plot updates in a fresh process, then a clean exit.

Runs in a subprocess because the failure it guards against (PySide6 6.12.0 on
Python 3.11 corrupting the refcount of True/None after about a hundred plot
updates) aborts the interpreter (exit 134) instead of failing a test.
"""
from __future__ import annotations

import os
import subprocess
import sys
import textwrap

import pytest

from tests.conftest import ROOT

pytestmark = [pytest.mark.gui, pytest.mark.slow]

MOVES = 5000

SCRIPT = textwrap.dedent(f"""
    import os, sys
    os.environ["QT_QPA_PLATFORM"] = "offscreen"
    os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
    from PySide6 import QtCore, QtWidgets
    QtCore.QSettings.setPath(QtCore.QSettings.Format.IniFormat, QtCore.QSettings.Scope.UserScope,
                             sys.argv[1])
    app = QtWidgets.QApplication(["stress"])
    from app.main_window import MainWindow
    from core.curves import DAMPING_GRID, RATIO_GRID
    window = MainWindow()
    window.ask_save_changes = lambda: "discard"
    window.resize(900, 600)
    window.show()
    damping, ratio = window.operating.damping_slider, window.operating.ratio_slider
    start = window.redraw_count
    for i in range({MOVES}):
        if i % 2:
            ratio.setValue((i * 37) % (RATIO_GRID.steps + 1))
        else:
            damping.setValue((i * 53) % (DAMPING_GRID.steps + 1))
        window.refresh_now()          # one plot update per move, as the coalescing timer would
        if i % 25 == 0:
            app.processEvents()       # paint now and then
    redraws = window.redraw_count - start
    x, y = window.plots.design_magnitude.getOriginalDataset()
    ok = redraws >= {MOVES} and len(x) == len(y) > 0 and window.model.can_undo
    print("moves", {MOVES}, "redraws", redraws, "ok", ok, flush=True)
    window.close()
    app.processEvents()
    sys.exit(0 if ok else 1)
""")


def test_many_slider_moves_then_clean_exit(tmp_path):
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen")
    done = subprocess.run([sys.executable, "-c", SCRIPT, str(tmp_path)], cwd=ROOT, env=env,
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, (done.returncode, done.stdout, done.stderr[-2000:])
    assert f"moves {MOVES} redraws" in done.stdout and "ok True" in done.stdout
