"""Child processes of the benchmark: ``python -m bench.probes MODE [FILE]``.

Modes:

* ``app FILE``   — what ``mountsmith FILE`` runs (``app.cli`` imported first, as the console
  script does, then ``app.cli.main([FILE])``), exiting at the first paint of the plot area;
* ``minimal``    — a minimal pyqtgraph window (PySide6 + numpy + pyqtgraph, one curve),
  exiting at the first paint of its plot area;
* ``rss FILE``   — opens the real window on FILE, moves the damping slider 300 steps, and
  prints the peak resident memory (VmHWM) and the current one (VmRSS), in kB, as JSON.

The first-paint exit watches Paint events of a QGraphicsView viewport (the plot area in both
cases) through an application event filter, so the window itself needs no hook.
"""
from __future__ import annotations

import os
import sys

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")


def _exit_at_first_plot_paint(app) -> None:
    from PySide6 import QtCore, QtWidgets

    class FirstPlotPaint(QtCore.QObject):
        def eventFilter(self, watched, event):
            if event.type() == QtCore.QEvent.Type.Paint and isinstance(watched, QtWidgets.QWidget) \
                    and isinstance(watched.parent(), QtWidgets.QGraphicsView):
                sys.stdout.flush()
                os._exit(0)
            return False

    app._first_paint_filter = FirstPlotPaint()
    app.installEventFilter(app._first_paint_filter)


def app_mode(path: str) -> int:
    from app.cli import main      # first, as the ``mountsmith`` command imports it (Qt not yet)
    from PySide6 import QtWidgets
    app = QtWidgets.QApplication(sys.argv[:1])   # the window's run() reuses this instance
    _exit_at_first_plot_paint(app)
    return main([path])


def minimal_mode() -> int:
    from PySide6 import QtWidgets
    import numpy as np
    import pyqtgraph as pg
    app = QtWidgets.QApplication(sys.argv[:1])
    _exit_at_first_plot_paint(app)
    window = pg.PlotWidget()
    x = np.geomspace(0.05, 100.0, 700)
    window.plot(x, 1.0 / np.abs(1.0 - x * x + 0.1j * x))
    window.resize(1400, 860)
    window.show()
    return app.exec()


def rss_mode(path: str) -> int:
    import json
    from PySide6 import QtWidgets
    app = QtWidgets.QApplication(sys.argv[:1])
    from app.main_window import MainWindow
    from bench.machine import memory_kb
    window = MainWindow()
    window.resize(1400, 860)
    window.show()
    assert window.open_file(path)
    slider = window.operating.damping_slider
    for step in range(300):
        slider.setValue((slider.value() + 1) % (slider.maximum() + 1) if step % 2 == 0 else slider.value() - 1)
        app.processEvents()
    window.refresh_now()
    app.processEvents()
    print(json.dumps({"peak_rss_kb": memory_kb("VmHWM"), "rss_kb": memory_kb("VmRSS")}))
    sys.stdout.flush()
    os._exit(0)


if __name__ == "__main__":
    mode = sys.argv[1]
    if mode == "app":
        sys.exit(app_mode(sys.argv[2]))
    if mode == "minimal":
        sys.exit(minimal_mode())
    if mode == "rss":
        sys.exit(rss_mode(sys.argv[2]))
    sys.exit(f"unknown mode {mode!r}")
