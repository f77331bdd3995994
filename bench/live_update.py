"""Live update: slider value change to both plots repainted, the real window against matplotlib.

The window: ``app.main_window.MainWindow`` offscreen on a demo project. One step sets the
damping slider to its next position (the model validates and synthesizes, the window
coalesces a redraw), runs the event loop until the coalesced redraw has run, then forces a
synchronous repaint of the plot viewport (both plots share it) and checks that it painted.

matplotlib: an Agg canvas of the same pixel size with the same two plots (magnitude on log
axes, phase), the same curve family and marker; one step recomputes the design curve with
core and redraws the canvas. It does less than the window's step (no synthesis, no results).
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


def window_steps(steps: int, slider_name: str = "damping_slider") -> dict:
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
    from PySide6 import QtCore, QtWidgets
    app = QtWidgets.QApplication.instance() or QtWidgets.QApplication([])
    from app.main_window import MainWindow

    class PaintCounter(QtCore.QObject):
        """Counts the viewport's paints and notes the window's redraw count at the last one."""
        count = 0
        after_redraw = -1

        def eventFilter(self, watched, event):
            if event.type() == QtCore.QEvent.Type.Paint:
                PaintCounter.count += 1
                PaintCounter.after_redraw = window.redraw_count
            return False

    def static_repaint_ms(viewport, count=40):
        times = []
        for _ in range(count):
            start = time.perf_counter()
            viewport.repaint()
            times.append(time.perf_counter() - start)
        return statistics.median(times) * 1e3

    window = MainWindow()
    window.resize(1400, 860)
    window.show()
    assert window.open_file(str(DEMO))
    for _ in range(20):
        app.processEvents()
    window.refresh_now()
    viewport = window.plots.viewport()
    counter = PaintCounter()
    viewport.installEventFilter(counter)
    slider = getattr(window.operating, slider_name)
    samples, forced = [], 0
    for position in _positions(steps + 20, slider.maximum(), slider.value()):
        start = time.perf_counter()
        before_redraws = window.redraw_count
        slider.setValue(position)
        while window.redraw_count == before_redraws:   # the coalesced (posted event) redraw
            app.processEvents()
        if PaintCounter.after_redraw != window.redraw_count:
            app.processEvents()                        # the paint Qt scheduled after the redraw, if due
        if PaintCounter.after_redraw != window.redraw_count:
            viewport.repaint()                         # else force it: synchronous paint of both plots
            forced += 1
        assert PaintCounter.after_redraw == window.redraw_count
        samples.append(time.perf_counter() - start)
    samples = samples[20:]                             # warm-up
    static_ms = static_repaint_ms(viewport)
    size = (window.plots.width(), window.plots.height())
    curves = window.plots.design_magnitude.getData()
    assert curves[1] is not None and np.all(np.isfinite(curves[1]))
    window.model.new()   # leave nothing unsaved behind
    window.close()
    result = _summary(samples)
    result.update({"plot_size_px": size, "forced_repaints": forced, "static_repaint_ms": static_ms})
    return result


def matplotlib_steps(steps: int, size_px: tuple[int, int]) -> dict:
    import matplotlib
    matplotlib.use("Agg")
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from core.curves import DAMPING_GRID, curve_family, ratio_axis
    from core.project import load_project
    from core.synthesis import synthesize
    from core.transmissibility import Damping, frequency_response

    project = load_project(DEMO)
    damping = project.design.damping
    ratio_point = synthesize(project.design).frequency_ratio
    ratio = ratio_axis()
    dpi = 100
    figure = Figure(figsize=(size_px[0] / dpi, size_px[1] / dpi), dpi=dpi)
    canvas = FigureCanvasAgg(figure)
    magnitude_axes, phase_axes = figure.subplots(2, 1, sharex=True, height_ratios=(3, 2))
    for curve in curve_family(damping, project.view.reference_damping, ratio)[1:]:
        magnitude_axes.loglog(ratio, curve.magnitude, color="0.7", lw=1)
        phase_axes.semilogx(ratio, curve.phase_deg, color="0.7", lw=1)
    (design_magnitude,) = magnitude_axes.loglog(ratio, ratio, lw=2.2)
    (design_phase,) = phase_axes.semilogx(ratio, ratio, lw=2.2)
    (point_magnitude,) = magnitude_axes.plot([1.0], [1.0], "o")
    (point_phase,) = phase_axes.plot([1.0], [1.0], "o")
    magnitude_axes.set_xlim(0.1, 10.0)
    magnitude_axes.set_ylim(1e-3, 2e2)
    phase_axes.set_ylim(-185.0, 5.0)
    magnitude_axes.grid(True, alpha=0.3)
    phase_axes.grid(True, alpha=0.3)
    canvas.draw()
    samples = []
    for position in _positions(steps + 5, DAMPING_GRID.steps, DAMPING_GRID.index(damping.value)):
        start = time.perf_counter()
        value = Damping(damping.model, DAMPING_GRID.value(position))
        response = frequency_response(ratio, value)
        design_magnitude.set_data(ratio, response.magnitude)
        design_phase.set_data(ratio, response.phase_deg)
        point = frequency_response(np.array([ratio_point]), value)
        point_magnitude.set_data([ratio_point], point.magnitude)
        point_phase.set_data([ratio_point], point.phase_deg)
        canvas.draw()
        samples.append(time.perf_counter() - start)
    return _summary(samples[5:])


def live_update(steps: int, matplotlib_steps_count: int) -> dict:
    damping = window_steps(steps, "damping_slider")
    ratio = window_steps(60 if steps <= 500 else steps // 2, "ratio_slider")
    reference = matplotlib_steps(matplotlib_steps_count, tuple(damping["plot_size_px"]))
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
        "live_update_speedup_vs_matplotlib": reference["median_ms"] / damping["median_ms"],
    }
