"""Design map view: transmissibility heat map over natural frequency x damping ratio.

A standalone widget that draws a :class:`core.design_map.DesignMap`: the
transmissibility at operating speed in dB as a heat map on log axes, a dark wash
over the points that miss a limit, a contour for each limit given, the boundary
of the feasible region, and the design point. A click on the map emits the
natural frequency and damping ratio under the mouse.

Both axes are logarithmic and the map's grid is log-spaced, so the image is
placed in log10 coordinates (pixel i of n centred on log10 of the i-th grid
value) and the axes label ticks with 10**x. Contours are pyqtgraph isocurves of
the core's fields, children of the wash image so they share the map's placement.
Every number comes from ``core.design_map``.
"""
from __future__ import annotations

import math

import PySide6  # noqa: F401  (import before pyqtgraph so it binds to PySide6)
from PySide6 import QtCore, QtWidgets

import numpy as np
import pyqtgraph as pg

from app.style import PALETTE, caution_label, style_axes
from core.design_map import DesignMap

#: Colour scale of the heat map, dB of transmissibility (fixed, so maps compare).
LEVELS_DB = (-40.0, 40.0)
#: RGBA of the wash over points that miss a limit.
INFEASIBLE_WASH = (0, 0, 0, 95)
#: Contour styles: white lines told apart by dash pattern (readable on the dark and the
#: light end of the map, and in greyscale); the feasible boundary thick orange.
CONTOUR_STYLES = {
    "isolation": ("minimum isolation", "#ffffff", 2.0, QtCore.Qt.PenStyle.SolidLine),
    "deflection": ("maximum static deflection", "#ffffff", 2.0, QtCore.Qt.PenStyle.DashLine),
    "passage": ("maximum passage amplification", "#ffffff", 2.0, QtCore.Qt.PenStyle.DotLine),
    "feasible": ("feasible region boundary", PALETTE["operating"], 3.0, QtCore.Qt.PenStyle.SolidLine),
}


def _colour_map() -> pg.ColorMap:
    """Cividis (colour-blind safe, lightness rising monotonically); our own blue-to-yellow ramp if absent."""
    try:
        return pg.colormap.get("cividis")
    except (FileNotFoundError, KeyError, ValueError):
        return pg.ColorMap([0.0, 0.5, 1.0], [(0, 32, 77), (124, 123, 120), (255, 234, 70)])


class DesignMapView(QtWidgets.QWidget):
    """Heat map of transmissibility with limit contours and the design point.

    Signals
    -------
    pointClicked(float, float)
        Natural frequency (Hz) and damping ratio under a left click inside the map.
    """

    pointClicked = QtCore.Signal(float, float)

    def __init__(self, parent: QtWidgets.QWidget | None = None):
        super().__init__(parent)
        self.map_result: DesignMap | None = None
        self._extent = None      # (x0, x1, y0, y1) of the image in log10 coordinates

        self.plot_widget = pg.PlotWidget(background=PALETTE["background"])
        self.plot = self.plot_widget.getPlotItem()
        self.plot.setMenuEnabled(False)
        self.plot.hideButtons()
        self.plot.getViewBox().setMouseEnabled(x=False, y=False)
        style_axes(self.plot)
        for name, label, unit in (("bottom", "Natural frequency on the mounts", "Hz"),
                                  ("left", "Damping ratio ζ", None)):
            self.plot.getAxis(name).setLogMode(True)
            self.plot.setLabel(name, label, units=unit)

        colours = _colour_map()
        self.image = pg.ImageItem(axisOrder="col-major")
        self.image.setColorMap(colours)
        self.plot.addItem(self.image)
        self.wash = pg.ImageItem(axisOrder="col-major")
        self.wash.setZValue(1)
        self.plot.addItem(self.wash)
        self.colour_bar = pg.ColorBarItem(values=LEVELS_DB, colorMap=colours, interactive=False)
        self.colour_bar.setImageItem(self.image, insert_in=self.plot)
        self.colour_bar.axis.setPen(PALETTE["foreground"])
        self.colour_bar.axis.setTextPen(PALETTE["foreground"])
        self.colour_bar.axis.setLabel("Transmissibility at operating speed (dB)", color=PALETTE["foreground"])

        self.contours = {}
        legend = pg.LegendItem(offset=(-10, -10), brush=(255, 255, 255, 225), pen=PALETTE["foreground"],
                               labelTextColor=PALETTE["foreground"])
        legend.setParentItem(self.plot.getViewBox())
        swatch_pens = {}
        for key, (label, colour, width, style) in CONTOUR_STYLES.items():
            pen = pg.mkPen(colour, width=width, style=style)
            contour = pg.IsocurveItem(pen=pen, axisOrder="col-major")
            contour.setParentItem(self.wash)        # same placement as the image, drawn above the wash
            self.contours[key] = contour
            # the legend shows white lines on white poorly: its swatches use the dark foreground
            swatch_pens[key] = pg.mkPen(PALETTE["foreground"] if colour == "#ffffff" else colour,
                                        width=width, style=style)
            legend.addItem(pg.PlotDataItem(pen=swatch_pens[key]), label)
        self.legend = legend

        self.marker = pg.ScatterPlotItem(symbol="star", size=18, brush=pg.mkBrush("#ffffff"),
                                         pen=pg.mkPen(PALETTE["foreground"], width=1.5))
        self.marker.setZValue(10)
        self.plot.addItem(self.marker)
        legend.addItem(self.marker, "design point")

        self.caution_label = caution_label()
        layout = QtWidgets.QVBoxLayout(self)
        layout.addWidget(self.plot_widget, 1)
        layout.addWidget(self.caution_label)

        self.plot.scene().sigMouseClicked.connect(self._on_click)

    # ---- drawing ------------------------------------------------------------------------
    def show_map(self, map_result: DesignMap, design_point: tuple[float, float] | None = None) -> None:
        """Draw a map and, if given, the design point ``(natural_frequency_hz, damping_ratio)``."""
        self.map_result = map_result
        x = np.log10(map_result.natural_frequency_hz)
        y = np.log10(map_result.damping_ratio)
        dx = (x[-1] - x[0]) / (x.size - 1)
        dy = (y[-1] - y[0]) / (y.size - 1)
        rect = QtCore.QRectF(x[0] - dx / 2, y[0] - dy / 2, dx * x.size, dy * y.size)
        self._extent = (rect.left(), rect.right(), rect.top(), rect.bottom())

        self.image.setImage(map_result.transmissibility_db, autoLevels=False, levels=LEVELS_DB)
        self.image.setRect(rect)
        wash = np.zeros(map_result.feasible.shape + (4,), dtype=np.ubyte)
        wash[~map_result.feasible] = INFEASIBLE_WASH
        self.wash.setImage(wash, autoLevels=False, levels=(0, 255))
        self.wash.setRect(rect)

        limits = map_result.limits
        fields = {
            "isolation": (map_result.isolation_percent, limits.min_isolation_percent),
            "deflection": (map_result.static_deflection_mm, limits.max_static_deflection_mm),
            "passage": (map_result.passage_amplification, limits.max_passage_amplification),
            "feasible": (map_result.feasible.astype(float), 0.5),
        }
        any_limit = any(level is not None for _, level in list(fields.values())[:3])
        for key, (values, level) in fields.items():
            shown = level is not None and (key != "feasible" or any_limit)
            self.contours[key].setData(values if shown else None, level if shown else 0.0)
            self.contours[key].setVisible(shown)

        if design_point is not None and all(math.isfinite(v) and v > 0.0 for v in design_point):
            fn_hz, zeta = design_point
            self.marker.setData([math.log10(fn_hz)], [math.log10(zeta)])
        else:                                   # no design point, or none a log axis can show
            self.marker.setData([], [])
        self.plot.setTitle(f"Operating speed {map_result.speed_rpm:.5g} r/min, run-up {map_result.ramp_s:.3g} s",
                           color=PALETTE["foreground"])
        self.plot.getViewBox().setRange(rect=rect, padding=0.0)

    # ---- interaction ------------------------------------------------------------------------
    def _on_click(self, event) -> None:
        """Emit pointClicked for a left click inside the map."""
        if self._extent is None or event.button() != QtCore.Qt.MouseButton.LeftButton:
            return
        point = self.plot.getViewBox().mapSceneToView(event.scenePos())
        x0, x1, y0, y1 = self._extent
        if x0 <= point.x() <= x1 and y0 <= point.y() <= y1:
            event.accept()
            self.pointClicked.emit(10.0 ** point.x(), 10.0 ** point.y())
