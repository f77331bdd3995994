"""Live update: slider value change to both plots repainted, the real window against matplotlib.

The window: ``app.main_window.MainWindow`` offscreen on a demo project (:class:`WindowSteps`).
matplotlib: an Agg canvas of the same pixel size with the same two plots (magnitude on log
axes, phase), the same curve family and marker; one step recomputes the design curve with
core and redraws the canvas (:class:`MatplotlibSteps`). It does less than the window's step
(no synthesis, no results). The two take turns in blocks within one process, so a change in
the load of this shared machine falls on both.
"""
from __future__ import annotations

import os
import statistics
import time
from pathlib import Path

import numpy as np

from bench.timing import percentile

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "demo_projects" / "rooftop_air_handler.json"


def _summary(samples_s: list[float]) -> dict:
    ms = [s * 1e3 for s in samples_s]
    return {"median_ms": statistics.median(ms), "p95_ms": percentile(ms, 0.95), "max_ms": max(ms),
            "steps": len(ms)}


def _positions(count: int, steps: int, start: int) -> list[int]:
    """Walk back and forth over the slider range one position at a time (each step a new value)."""
    out, position, direction = [], start, 1
    for _ in range(count):
        if not 0 <= position + direction <= steps:
            direction = -direction
        position += direction
        out.append(position)
    return out


class WindowSteps:
    """The real window, offscreen, on the demo project; :meth:`step` moves one slider one position.

    A step sets the slider to its next position (the model validates and synthesizes, the window
    posts its coalesced redraw), runs the event loop until the redraw has run and the plot
    viewport has painted after it (a synchronous ``repaint()`` is forced if Qt had not painted),
    and returns the seconds taken.
    """

    def __init__(self, slider_name: str = "damping_slider"):
        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
        os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
        from PySide6 import QtCore, QtWidgets
        self.app = QtWidgets.QApplication.instance() or QtWidgets.QApplication([])
        from app.main_window import MainWindow
        window = self.window = MainWindow()
        window.resize(1400, 860)
        window.show()
        assert window.open_file(str(DEMO))
        for _ in range(20):
            self.app.processEvents()
        window.refresh_now()

        class PaintCounter(QtCore.QObject):
            """Counts the viewport's paints and notes the window's redraw count at the last one."""
            count = 0
            after_redraw = -1

            def eventFilter(self, watched, event):  # noqa: N802
                if event.type() == QtCore.QEvent.Type.Paint:
                    PaintCounter.count += 1
                    PaintCounter.after_redraw = window.redraw_count
                return False

        self.painted = PaintCounter
        self.viewport = window.plots.viewport()
        self._counter = PaintCounter()
        self.viewport.installEventFilter(self._counter)
        self.slider = getattr(window.operating, slider_name)
        self._positions = iter(_positions(10 ** 7, self.slider.maximum(), self.slider.value()))
        self.forced = 0

    def step(self) -> float:
        app, window, painted = self.app, self.window, self.painted
        position = next(self._positions)
        start = time.perf_counter()
        before_redraws = window.redraw_count
        self.slider.setValue(position)
        while window.redraw_count == before_redraws:   # the coalesced (posted event) redraw
            app.processEvents()
        if painted.after_redraw != window.redraw_count:
            app.processEvents()                        # the paint Qt scheduled after the redraw, if due
        if painted.after_redraw != window.redraw_count:
            self.viewport.repaint()                    # else force it: synchronous paint of both plots
            self.forced += 1
        assert painted.after_redraw == window.redraw_count
        return time.perf_counter() - start

    def static_repaint_ms(self, count: int = 40) -> float:
        """Median of synchronous plot repaints with nothing changed (diagnosis)."""
        times = []
        for _ in range(count):
            start = time.perf_counter()
            self.viewport.repaint()
            times.append(time.perf_counter() - start)
        return statistics.median(times) * 1e3

    def plot_size(self) -> tuple[int, int]:
        return self.window.plots.width(), self.window.plots.height()

    def close(self) -> None:
        curves = self.window.plots.design_magnitude.getData()
        assert curves[1] is not None and np.all(np.isfinite(curves[1]))
        self.window.model.new()   # leave nothing unsaved behind
        self.window.close()


class MatplotlibSteps:
    """The same two plots in matplotlib's Agg canvas; :meth:`step` redraws them for the next damping."""

    def __init__(self, size_px: tuple[int, int]):
        import matplotlib
        matplotlib.use("Agg")
        from matplotlib.backends.backend_agg import FigureCanvasAgg
        from matplotlib.figure import Figure

        from core.curves import DAMPING_GRID, curve_family, ratio_axis
        from core.project import load_project
        from core.synthesis import synthesize

        project = load_project(DEMO)
        damping = self.damping = project.design.damping
        self.ratio_point = synthesize(project.design).frequency_ratio
        ratio = self.ratio = ratio_axis()
        dpi = 100
        figure = Figure(figsize=(size_px[0] / dpi, size_px[1] / dpi), dpi=dpi)
        self.canvas = FigureCanvasAgg(figure)
        magnitude_axes, phase_axes = figure.subplots(2, 1, sharex=True, height_ratios=(3, 2))
        for curve in curve_family(damping, project.view.reference_damping, ratio)[1:]:
            magnitude_axes.loglog(ratio, curve.magnitude, color="0.7", lw=1)
            phase_axes.semilogx(ratio, curve.phase_deg, color="0.7", lw=1)
        (self.design_magnitude,) = magnitude_axes.loglog(ratio, ratio, lw=2.2)
        (self.design_phase,) = phase_axes.semilogx(ratio, ratio, lw=2.2)
        (self.point_magnitude,) = magnitude_axes.plot([1.0], [1.0], "o")
        (self.point_phase,) = phase_axes.plot([1.0], [1.0], "o")
        magnitude_axes.set_xlim(0.1, 10.0)
        magnitude_axes.set_ylim(1e-3, 2e2)
        phase_axes.set_ylim(-185.0, 5.0)
        magnitude_axes.grid(True, alpha=0.3)
        phase_axes.grid(True, alpha=0.3)
        self.canvas.draw()
        self._grid = DAMPING_GRID
        self._positions = iter(_positions(10 ** 7, DAMPING_GRID.steps, DAMPING_GRID.index(damping.value)))

    def step(self) -> float:
        from core.transmissibility import Damping, frequency_response
        position = next(self._positions)
        start = time.perf_counter()
        value = Damping(self.damping.model, self._grid.value(position))
        response = frequency_response(self.ratio, value)
        self.design_magnitude.set_data(self.ratio, response.magnitude)
        self.design_phase.set_data(self.ratio, response.phase_deg)
        point = frequency_response(np.array([self.ratio_point]), value)
        self.point_magnitude.set_data([self.ratio_point], point.magnitude)
        self.point_phase.set_data([self.ratio_point], point.phase_deg)
        self.canvas.draw()
        return time.perf_counter() - start


#: Warm-up steps left out of the figures.
WINDOW_WARM_UP = 20
MATPLOTLIB_WARM_UP = 5
#: The window and matplotlib take turns in this many blocks, so that both see the same load.
BLOCKS = 10


def live_update(steps: int, matplotlib_steps_count: int) -> dict:
    """Damping-slider steps of the window and matplotlib redraws, in alternating blocks; ratio-slider steps."""
    window = WindowSteps("damping_slider")
    reference = MatplotlibSteps(window.plot_size())
    for _ in range(WINDOW_WARM_UP):
        window.step()
    for _ in range(MATPLOTLIB_WARM_UP):
        reference.step()
    window_samples, reference_samples = [], []
    for block in range(BLOCKS):
        window_samples += [window.step() for _ in range(steps // BLOCKS)]
        reference_samples += [reference.step() for _ in range(max(matplotlib_steps_count // BLOCKS, 1))]
    damping = _summary(window_samples)
    damping.update(forced_repaints=window.forced, static_repaint_ms=window.static_repaint_ms(),
                   plot_size_px=window.plot_size())
    window.close()
    reference = _summary(reference_samples)
    ratio_window = WindowSteps("ratio_slider")
    for _ in range(WINDOW_WARM_UP):
        ratio_window.step()
    ratio = _summary([ratio_window.step() for _ in range(60 if steps <= 500 else steps // 2)])
    ratio_window.close()
    return {
        "live_update_median_ms": damping["median_ms"],
        "live_update_p95_ms": damping["p95_ms"],
        "live_update_max_ms": damping["max_ms"],
        "live_update_steps": damping["steps"],
        "live_update_forced_repaints": damping["forced_repaints"],
        "plots_static_repaint_ms": damping["static_repaint_ms"],
        "live_update_plot_size_px": list(damping["plot_size_px"]),
        "live_update_ratio_slider_median_ms": ratio["median_ms"],
        "live_update_ratio_slider_p95_ms": ratio["p95_ms"],
        "matplotlib_agg_median_ms": reference["median_ms"],
        "matplotlib_agg_p95_ms": reference["p95_ms"],
        "matplotlib_agg_steps": reference["steps"],
        "live_update_blocks": BLOCKS,
        "live_update_speedup_vs_matplotlib": reference["median_ms"] / damping["median_ms"],
    }
