"""Passage view: response envelope of a run-up or coast-down against instantaneous speed.

A standalone widget that draws a :class:`core.passage.PassageResult`: the
displacement envelope (top) and the transmitted-force envelope (bottom), each
with the steady-state amplitude at the same speed (dashed) and a marker at the
peak. Data stay in SI; the axes pick the unit prefix (mm, kN) themselves.
Every number comes from ``core.passage``.
"""
from __future__ import annotations

import PySide6  # noqa: F401  (import before pyqtgraph so it binds to PySide6)
from PySide6 import QtCore, QtWidgets

import pyqtgraph as pg

from app.style import LINE_WIDTH, MARKER_SIZE, PALETTE, caution_label, style_axes
from core.passage import PassageResult

_DIRECTION_TITLES = {"up": "Run-up", "down": "Coast-down"}


class PassageView(QtWidgets.QWidget):
    """Displacement and transmitted-force envelopes of a passage through resonance."""

    def __init__(self, parent: QtWidgets.QWidget | None = None):
        super().__init__(parent)
        self.plots = pg.GraphicsLayoutWidget()
        self.plots.setBackground(PALETTE["background"])
        self.displacement_plot = self.plots.addPlot(row=0, col=0)
        self.force_plot = self.plots.addPlot(row=1, col=0)
        self.force_plot.setXLink(self.displacement_plot)

        self.displacement_curve, self.steady_displacement_curve, self.displacement_peak = \
            self._build_plot(self.displacement_plot, "Displacement amplitude", "m")
        self.force_curve, self.steady_force_curve, self.force_peak = \
            self._build_plot(self.force_plot, "Force into floor", "N")
        self.force_plot.setLabel("bottom", "Instantaneous speed", units="r/min")
        legend = self.displacement_plot.addLegend(offset=(-10, 10), brush=(255, 255, 255, 220),
                                                  labelTextColor=PALETTE["foreground"])
        legend.addItem(self.displacement_curve, "during the passage (envelope)")
        legend.addItem(self.steady_displacement_curve, "steady state at that speed")
        legend.addItem(self.displacement_peak, "peak")

        self.summary_label = QtWidgets.QLabel("No simulation yet")
        self.summary_label.setObjectName("summary")
        self.summary_label.setWordWrap(True)
        self.caution_label = caution_label()
        layout = QtWidgets.QVBoxLayout(self)
        layout.addWidget(self.plots, 1)
        layout.addWidget(self.summary_label)
        layout.addWidget(self.caution_label)

    @staticmethod
    def _build_plot(plot: pg.PlotItem, title: str, unit: str):
        """Axes and the three items of one plot, created once."""
        plot.setMenuEnabled(False)
        plot.hideButtons()
        plot.showGrid(x=True, y=True, alpha=PALETTE["grid_alpha"])
        style_axes(plot, no_prefix=("bottom",))                # r/min takes no prefix
        plot.setLabel("left", title, units=unit)                 # SI prefix chosen by the axis
        envelope = plot.plot(pen=pg.mkPen(PALETTE["design"], width=LINE_WIDTH["design"]))
        steady = plot.plot(pen=pg.mkPen(PALETTE["crossover"], width=LINE_WIDTH["crossover"],
                                        style=QtCore.Qt.PenStyle.DashLine))
        peak = plot.plot(pen=None, symbol="o", symbolSize=MARKER_SIZE, symbolBrush=PALETTE["operating"],
                         symbolPen=pg.mkPen(PALETTE["foreground"], width=1.0))
        envelope.setZValue(5)
        peak.setZValue(10)
        return envelope, steady, peak

    def show_result(self, result: PassageResult) -> None:
        """Draw a run-up or coast-down result."""
        speed = result.displacement_envelope_speed_rpm
        self.displacement_curve.setData(speed, result.displacement_envelope_m)
        self.steady_displacement_curve.setData(speed, result.steady_displacement_envelope_m)
        self.displacement_peak.setData([result.peak_displacement_speed_rpm], [result.peak_displacement_m])
        speed = result.force_envelope_speed_rpm
        self.force_curve.setData(speed, result.force_envelope_n)
        self.steady_force_curve.setData(speed, result.steady_force_envelope_n)
        self.force_peak.setData([result.peak_force_speed_rpm], [result.peak_force_n])
        word = "to" if result.direction == "up" else "from"
        title = (f"{_DIRECTION_TITLES[result.direction]} {word} {result.operating_speed_rpm:.4g} r/min; "
                 f"fn = {result.natural_frequency_hz:.3g} Hz, ζ = {result.damping_ratio:.3g}")
        self.displacement_plot.setTitle(title, color=PALETTE["foreground"])
        for plot in (self.displacement_plot, self.force_plot):
            plot.enableAutoRange()
        self.summary_label.setText(
            f"Peak displacement {pg.siFormat(result.peak_displacement_m, suffix='m')} at "
            f"{result.peak_displacement_speed_rpm:.4g} r/min, {result.displacement_amplification:.3g}× the "
            f"steady amplitude at operating speed; peak force into the floor "
            f"{pg.siFormat(result.peak_force_n, suffix='N')} at {result.peak_force_speed_rpm:.4g} r/min, "
            f"{result.force_amplification:.3g}× the steady force.")
