"""The transmissibility plots: magnitude and phase over a shared log frequency axis.

Every plot item is created once in ``__init__``; :meth:`TransmissibilityPlots.show_design`
only calls ``setData``/``setValue`` on them. Axis ranges are set explicitly
(never auto-ranged), so a slider drag does not make the axes jump. All
numbers come from :mod:`core.curves` and :mod:`core.transmissibility`.

pyqtgraph log axes take log10 coordinates for every item other than
PlotDataItem (lines, regions, text), so those positions go through ``_lx``/``_ly``.

Layered painting (interactive plots only): a slider drag changes only the design curves,
markers and crosshair. Everything else (grid, axes, reference family, regions, lines, labels)
is rendered into one pixmap when it changes, and the legend into a small pixmap of its own.
Each paint draws the background pixmap, paints the live items over it (their own ``paint``,
clipped to their view box, bottom to top) and puts the legend on top, without Qt's walk over
the whole scene. The grid and axes therefore lie under the curves in the window (pyqtgraph
stacks them above). Exports (``interactive=False``) paint every item in pyqtgraph's own order.
"""
from __future__ import annotations

import math
import os
import typing

os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
from PySide6 import QtCore, QtGui, QtWidgets  # noqa: E402  (PySide6 before pyqtgraph)
import numpy as np  # noqa: E402
import pyqtgraph as pg  # noqa: E402
from pyqtgraph.graphicsItems.ScatterPlotItem import Symbols as SYMBOLS  # noqa: E402

from app.style import FONT_POINTS, LINE_WIDTH, MARKER_SIZE, PALETTE, style_axes  # noqa: E402
from core.curves import (  # noqa: E402
    X_AXIS_LABELS, drawn_curve_family, frequency_axis, magnitude_on_scale, operating_points,
    ratio_axis, ratio_from_axis, readout)
from core.design import MAX_DUTY_SPEEDS, DesignInputs  # noqa: E402
from core.design_model import Evaluation  # noqa: E402
from core.project import ViewSettings  # noqa: E402
from core.transmissibility import CROSSOVER_RATIO, transmissibility_db  # noqa: E402

pg.setConfigOptions(background=PALETTE["background"], foreground=PALETTE["foreground"],
                    antialias=True, useOpenGL=False)

_INTERSECT_CLIP = QtCore.Qt.ClipOperation.IntersectClip

#: Most reference curves drawn (ViewSettings allows up to 20).
MAX_REFERENCE_CURVES = 20
#: Fixed axis ranges.
MAGNITUDE_RANGE = (1e-3, 2e2)
MAGNITUDE_DB_RANGE = (-60.0, 46.0)
PHASE_RANGE = (-192.0, 12.0)   # headroom: the 0 and -180 labels stay inside at any plot height
RATIO_VIEW = (0.1, 10.0)
RATIO_VIEW_WIDE = (0.1, 100.0)


def _lx(value: float) -> float:
    """Position on a log10 axis."""
    return math.log10(value)


class DrawnCurve(QtWidgets.QGraphicsPathItem):
    """A curve of core's drawn-curve grid on the log-x plots, as a plain Qt path item.

    The data is mapped (log10 x, and log10 y on a log axis) and clipped to the visible x range
    here, one point beyond each end, and drawn by Qt alone: a pyqtgraph curve item re-maps,
    re-checks and re-clips its data at every ``setData`` (0.24 ms a curve when the grid changes
    with the damping) and computes its bounds and path in Python at every paint (about 0.5 ms
    a slider step for the two design curves, measured). Core's drawn curves are sorted and
    finite (tested), which is all this item assumes.
    """

    def __init__(self, pen: QtGui.QPen):
        super().__init__()
        self.setPen(pen)
        self._original = (None, None)
        self._shown = (np.empty(0), np.empty(0))
        self._x_range = None

    def set_curve(self, x, y, log_y: bool, x_range: tuple[float, float]) -> None:
        """Draw ``y`` over ``x`` (data units; x > 0, y > 0 when ``log_y``) inside ``x_range``."""
        x = np.asarray(x, dtype=float)
        y = np.asarray(y, dtype=float)
        shown_x, shown_y = self._original
        if shown_x is not None and x_range == self._x_range and np.array_equal(shown_x, x) \
                and np.array_equal(shown_y, y):
            return                          # a ratio-slider step leaves the curves as they are
        self._original = (x, y)
        self._x_range = x_range
        if x.size < 2:
            self._shown = (np.empty(0), np.empty(0))
            self.setPath(QtGui.QPainterPath())
            return
        log_x = np.log10(x)
        low = max(int(np.searchsorted(log_x, math.log10(x_range[0]))) - 1, 0)
        high = int(np.searchsorted(log_x, math.log10(x_range[1]))) + 1
        self._shown = (log_x[low:high], np.log10(y[low:high]) if log_y else y[low:high])
        self.setPath(pg.arrayToQPath(*self._shown, connect="all", finiteCheck=False))

    def getOriginalDataset(self):  # noqa: N802 (as pyqtgraph's items)
        """The curve as given, in data units, all points (x, y)."""
        return self._original

    def getData(self):  # noqa: N802
        """The points drawn, in the plot's (log10) coordinates (x, y)."""
        return self._shown


class PointMarkers:
    """Up to ``count`` symbols on one plot, plain Qt items of a fixed pixel size.

    Round (``symbol="o"``, ellipse items) or another pyqtgraph symbol by name (path items).

    Each sits at its point (log10 where the axis is) and ignores the view's scaling, so Qt
    moves and paints it alone: a pyqtgraph scatter item re-renders its symbols for new data
    (about 0.25 ms an item) and computes its bounds in Python at every paint (measured).

    Attributes
    ----------
    items : list of QGraphicsEllipseItem
    sample : pg.PlotDataItem
        Not drawn: the legend's picture of the symbol.
    """

    def __init__(self, plot: pg.PlotItem, count: int, z: float, size: float, brush, pen: QtGui.QPen,
                 symbol: str = "o"):
        self.items = []
        for _ in range(count):
            if symbol == "o":
                item = QtWidgets.QGraphicsEllipseItem(-size / 2.0, -size / 2.0, size, size)
            else:   # pyqtgraph's symbol of that name (a unit path), at this size
                item = QtWidgets.QGraphicsPathItem(QtGui.QTransform.fromScale(size, size).map(SYMBOLS[symbol]))
            item.setBrush(pg.mkBrush(brush))
            item.setPen(pen)
            item.setFlag(QtWidgets.QGraphicsItem.GraphicsItemFlag.ItemIgnoresTransformations)
            item.setZValue(z)
            item.setVisible(False)
            plot.addItem(item, ignoreBounds=True)
            self.items.append(item)
        self.sample = pg.PlotDataItem([0.0], [0.0], pen=None, symbol=symbol, symbolSize=size, symbolBrush=brush,
                                      symbolPen=pen)   # with a point: the legend reads its symbol's style
        self._points = (np.empty(0), np.empty(0))

    def set_points(self, x, y, log_y: bool) -> None:
        """Show markers at data points ``x``, ``y`` (x on a log axis; y on one when ``log_y``).

        Points beyond ``count``, or not finite and positive where the axis is logarithmic, are
        not drawn.
        """
        x = np.asarray(x, dtype=float)
        y = np.asarray(y, dtype=float)
        shown_x, shown_y = [], []
        for i, item in enumerate(self.items):
            ok = bool(i < len(x) and math.isfinite(x[i]) and x[i] > 0.0 and math.isfinite(y[i]) and (
                y[i] > 0.0 or not log_y))
            if ok:
                item.setPos(math.log10(x[i]), math.log10(y[i]) if log_y else float(y[i]))
                shown_x.append(float(x[i]))
                shown_y.append(float(y[i]))
            if item.isVisible() != ok:
                item.setVisible(ok)
        self._points = (np.array(shown_x), np.array(shown_y))

    def points(self) -> tuple[np.ndarray, np.ndarray]:
        """The shown points in data units (x, y), as given to :meth:`set_points`."""
        return self._points


class _Layers(typing.NamedTuple):
    """The rendered layers of an interactive plot widget and what they were rendered for."""

    key: tuple                  # TransmissibilityPlots._layer_key() at the render
    background: QtGui.QPixmap   # the static items, the whole viewport
    legend_at: QtCore.QPoint    # where the legend pixmap goes (viewport pixels)
    legend: QtGui.QPixmap       # the legend, transparent around it
    paint_list: list            # (clip QRect, items bottom to top) of each view box


class TransmissibilityPlots(pg.GraphicsLayoutWidget):
    """Magnitude and phase of transmissibility with the design point.

    Parameters
    ----------
    scale : float
        Multiplies line widths, marker and font sizes (exports draw larger).
    interactive : bool
        Crosshair readout under the mouse (off for exports).

    Signals
    -------
    readout_changed(object)
        A :class:`core.curves.Readout` under the mouse, or None when it leaves the plots.
    """

    readout_changed = QtCore.Signal(object)

    def __init__(self, parent=None, scale: float = 1.0, interactive: bool = True):
        super().__init__(parent)
        self.scale = float(scale)
        self.ratio = ratio_axis()
        self._x_axis = None
        self._x_range = None
        self._magnitude_scale = None
        self._damping = None
        self._natural_frequency_hz = None
        self._reference_key = None
        self._duty_in_legend = False
        # pyqtgraph's own items switch antialiasing on as they paint; the plain Qt items here
        # (design curves, markers) take the view's hint.
        self.setRenderHint(QtGui.QPainter.RenderHint.Antialiasing, True)
        self.ci.layout.setContentsMargins(*(4 * self.scale,) * 4)
        self.ci.layout.setVerticalSpacing(6 * self.scale)

        self.magnitude_plot = self.addPlot(row=0, col=0, enableMenu=False)
        self.phase_plot = self.addPlot(row=1, col=0, enableMenu=False)
        self.ci.layout.setRowStretchFactor(0, 3)
        self.ci.layout.setRowStretchFactor(1, 2)
        self.phase_plot.setXLink(self.magnitude_plot)
        for plot in (self.magnitude_plot, self.phase_plot):
            plot.setMenuEnabled(False)
            plot.hideButtons()
            plot.getViewBox().setMouseEnabled(x=False, y=False)
            plot.getViewBox().disableAutoRange()
            plot.showGrid(x=True, y=True, alpha=PALETTE["grid_alpha"])
            style_axes(plot)
            # The view (regions, curves, markers) above the axes and their grid lines, in the
            # window and in exports alike: no grid line crosses a marker or the design curve.
            plot.getViewBox().setZValue(max(plot.getAxis(name).zValue() for name in ("left", "bottom")) + 1)
        self._style_axes()

        # ---- fixed items: isolation region, crossover lines, speed band, target line
        self.isolation_regions = []
        self.crossover_lines = []
        self.speed_bands = []
        for plot in (self.magnitude_plot, self.phase_plot):
            for items, fill, depth in ((self.isolation_regions, "isolation_fill", -20),
                                       (self.speed_bands, "operating_band", -15)):
                region = pg.LinearRegionItem(values=(0.0, 1.0), movable=False,
                                             brush=pg.mkBrush(*PALETTE[fill]), pen=pg.mkPen(None))
                region.setZValue(depth)
                plot.addItem(region, ignoreBounds=True)
                items.append(region)
            line = pg.InfiniteLine(angle=90, movable=False,
                                   pen=self._pen("crossover", QtCore.Qt.PenStyle.DashLine))
            line.setZValue(-10)
            plot.addItem(line, ignoreBounds=True)
            self.crossover_lines.append(line)
        self.crossover_label = pg.TextItem("√2", color=PALETTE["crossover"], anchor=(0.0, 1.0))
        self.crossover_label.setFont(self._font(0.9))
        self.magnitude_plot.addItem(self.crossover_label, ignoreBounds=True)
        self.isolation_label = pg.TextItem("isolation region (r > √2)", color=PALETTE["isolation_text"],
                                           anchor=(0.0, 1.0))
        self.isolation_label.setFont(self._font(0.9))
        self.magnitude_plot.addItem(self.isolation_label, ignoreBounds=True)
        self.target_line = pg.InfiniteLine(angle=0, movable=False,
                                           pen=self._pen("target", QtCore.Qt.PenStyle.DashDotLine))
        self.target_line.setZValue(-5)
        self.magnitude_plot.addItem(self.target_line, ignoreBounds=True)
        self.target_label = pg.TextItem("", color=PALETTE["target"], anchor=(1.0, 1.0))
        self.target_label.setFont(self._font(0.9))
        self.magnitude_plot.addItem(self.target_label, ignoreBounds=True)

        # ---- curves: reference family (faint), then the design curve (bold) on top
        self.reference_magnitude = []
        self.reference_phase = []
        self.reference_labels = []
        self._add_reference_items(1)   # the legend's sample; more as the family needs them
        self.design_magnitude = DrawnCurve(self._pen("design"))
        self.design_phase = DrawnCurve(self._pen("design"))
        for plot, item in ((self.magnitude_plot, self.design_magnitude), (self.phase_plot, self.design_phase)):
            item.setZValue(10)
            plot.addItem(item, ignoreBounds=True)   # the phase range follows the reference family
        marker = dict(size=MARKER_SIZE * self.scale, brush=PALETTE["operating"],
                      pen=pg.mkPen(PALETTE["foreground"], width=1.0 * self.scale))
        # One marker at the lowest operating speed, a second at the highest of a range.
        self.operating_magnitude = PointMarkers(self.magnitude_plot, 2, 20, **marker)
        self.operating_phase = PointMarkers(self.phase_plot, 2, 20, **marker)
        duty = dict(size=MARKER_SIZE * self.scale, brush=PALETTE["background"],
                    pen=pg.mkPen(PALETTE["operating"], width=2.0 * self.scale), symbol="d")
        self.duty_magnitude = PointMarkers(self.magnitude_plot, MAX_DUTY_SPEEDS, 19, **duty)
        self.duty_phase = PointMarkers(self.phase_plot, MAX_DUTY_SPEEDS, 19, **duty)

        self.legend = pg.LegendItem(offset=(-8 * self.scale, 8 * self.scale),
                                    labelTextSize=f"{round(FONT_POINTS * 0.95 * self.scale)}pt",
                                    brush=pg.mkBrush(255, 255, 255, 220),
                                    pen=pg.mkPen(PALETTE["reference"]))
        self.legend.setParentItem(self.magnitude_plot.getViewBox())
        self._design_sample = pg.PlotDataItem(pen=self._pen("design"))   # the legend's picture
        self.legend.addItem(self._design_sample, "design")
        self.legend.addItem(self.reference_magnitude[0], "reference")
        self.legend.addItem(self.operating_magnitude.sample, "operating point")
        self.legend.addItem(pg.PlotDataItem(pen=self._pen("target", QtCore.Qt.PenStyle.DashDotLine)), "target")
        self._legend_texts = {}

        # ---- crosshair
        self.crosshair_lines = []
        if interactive:
            for plot in (self.magnitude_plot, self.phase_plot):
                line = pg.InfiniteLine(angle=90, movable=False, pen=self._pen("crosshair"))
                line.setVisible(False)
                line.setZValue(30)
                plot.addItem(line, ignoreBounds=True)
                self.crosshair_lines.append(line)
            self.scene().sigMouseMoved.connect(self._mouse_moved)
        self.phase_plot.getAxis("left").setTicks(
            [[(v, f"{v:g}") for v in (0, -45, -90, -135, -180)], []])
        self.phase_plot.setYRange(*PHASE_RANGE, padding=0)

        self._layered = interactive
        self._views = (self.magnitude_plot.getViewBox(), self.phase_plot.getViewBox())
        self._static_key = None
        self._layers = None            # a _Layers once rendered
        self.layer_renders = 0
        if self._layered:
            self.setCacheMode(QtWidgets.QGraphicsView.CacheModeFlag.CacheNone)  # the layers are the cache
            # Every paint draws the whole viewport, and the methods that change live items ask
            # for it (``_repaint``): Qt's scene learns that a full update it asked for was done
            # only when Qt paints its items, which this view does not, so it stops passing
            # item changes on to the view.
            self.setViewportUpdateMode(QtWidgets.QGraphicsView.ViewportUpdateMode.FullViewportUpdate)
            self._paint_option = QtWidgets.QStyleOptionGraphicsItem()

    def _add_reference_items(self, count: int) -> None:
        """Have at least ``count`` (at most MAX_REFERENCE_CURVES) reference curves and labels."""
        while len(self.reference_magnitude) < min(count, MAX_REFERENCE_CURVES):
            self.reference_magnitude.append(self.magnitude_plot.plot(pen=self._pen("reference")))
            self.reference_phase.append(self.phase_plot.plot(pen=self._pen("reference")))
            label = pg.TextItem("", color=PALETTE["reference"], anchor=(0.0, 0.5))
            label.setFont(self._font(0.8))
            self.magnitude_plot.addItem(label, ignoreBounds=True)
            self.reference_labels.append(label)

    # ------------------------------------------------------------------ layered painting
    def _live_items(self) -> list:
        """Items that change during a slider drag; painted at every frame over the static layer."""
        items = [self.design_magnitude, self.design_phase, *self.operating_magnitude.items,
                 *self.operating_phase.items, *self.duty_magnitude.items, *self.duty_phase.items,
                 *self.crosshair_lines]
        if getattr(self, "comparison_magnitude", None) is not None:
            items += [self.comparison_magnitude, self.comparison_phase]
        return items

    def _layer_key(self):
        """What the layers show: static key, viewport, each view box's mapping, the legend.

        A view box's mapping is its child group's scene transform (its range and place) and its
        size, read from Qt: pyqtgraph's own bounds and ranges are computed in Python.
        """
        def placed(item, size: QtCore.QSizeF):
            t = item.sceneTransform()
            return (round(t.m11(), 9), round(t.m22(), 9), round(t.dx(), 6), round(t.dy(), 6),
                    round(size.width(), 6), round(size.height(), 6))

        views = tuple(placed(view.childGroup, view.geometry().size()) for view in self._views)
        legend = (tuple(label.text for _sample, label in self.legend.items),
                  placed(self.legend, self.legend.geometry().size()))   # (LegendItem.size is not Qt's)
        live = getattr(self, "comparison_magnitude", None) is not None   # the live items' paint list
        viewport = self.viewport()
        return (self._static_key, viewport.width(), viewport.height(), viewport.devicePixelRatioF(), views,
                legend, live)

    def _render_layers(self, key) -> None:
        """Render the static items into the background pixmap and the legend into its own.

        Each render shows one part of the scene: every item outside it is marked as having no
        contents for the render (its children still draw). The live items' paint list, with the
        clip rectangle of their view box, is made here too.
        """
        scene = self.scene()
        live = self._live_items()
        live_set = set(live)
        part_of = {}
        for item in scene.items():
            parent = item
            while parent is not None and parent not in live_set and parent is not self.legend:
                parent = parent.parentItem()
            part_of[item] = "static" if parent is None else "legend" if parent is self.legend else "live"
        no_contents = QtWidgets.QGraphicsItem.GraphicsItemFlag.ItemHasNoContents
        own = {item: bool(item.flags() & no_contents) for item in part_of}
        viewport_rect = self.viewport().rect()
        legend_rect = self.mapFromScene(self.legend.sceneBoundingRect()).boundingRect() \
            .adjusted(-1, -1, 1, 1).intersected(viewport_rect)

        def render(part: str, rect: QtCore.QRect, fill: QtGui.QColor) -> QtGui.QPixmap:
            for item, item_part in part_of.items():
                item.setFlag(no_contents, own[item] or item_part != part)
            ratio = self.viewport().devicePixelRatioF()
            pixmap = QtGui.QPixmap(max(round(rect.width() * ratio), 1), max(round(rect.height() * ratio), 1))
            pixmap.setDevicePixelRatio(ratio)
            pixmap.fill(fill)
            painter = QtGui.QPainter(pixmap)
            try:
                painter.setRenderHints(self.renderHints())
                source = self.viewportTransform().inverted()[0].mapRect(QtCore.QRectF(rect))
                scene.render(painter, QtCore.QRectF(0.0, 0.0, rect.width(), rect.height()), source,
                             QtCore.Qt.AspectRatioMode.IgnoreAspectRatio)
            finally:
                painter.end()
            return pixmap

        try:
            background = render("static", viewport_rect, self.backgroundBrush().color())
            legend = render("legend", legend_rect, QtGui.QColor(0, 0, 0, 0))
        finally:
            for item in part_of:
                item.setFlag(no_contents, own[item])
        paint_list = []
        for view in self._views:
            clip = self.mapFromScene(view.sceneBoundingRect()).boundingRect()
            ordered = sorted((item for item in live if view.isAncestorOf(item)), key=lambda item: item.zValue())
            drawn = []
            for item in ordered:        # an item, then its children in stacking order
                drawn += [item] + sorted(item.childItems(), key=lambda child: child.zValue())
            # pyqtgraph items compute what they draw in boundingRect and may change the painter
            paint_list.append((clip, [(item, isinstance(item, pg.GraphicsItem)) for item in drawn if not own[item]]))
        self._layers = _Layers(key, background, legend_rect.topLeft(), legend, paint_list)
        self.layer_renders += 1

    def paintEvent(self, event):
        if not self._layered:
            return super().paintEvent(event)
        # Only the view boxes need preparing for the live items (their transforms); pyqtgraph's
        # scene-wide prepareForPaint also makes every static text item recompute its transform,
        # which the layer render (scene.render) does anyway.
        for view in self._views:
            view.prepareForPaint()
        key = self._layer_key()
        if self._layers is None or self._layers.key != key:
            self._render_layers(key)
            if event.rect() != self.viewport().rect():
                self.viewport().update()   # the rest of the viewport shows the old layers
        self._paint_live(event.region())

    def _paint_live(self, region: QtGui.QRegion) -> None:
        """The background layer, the live items (each in its view box) and the legend on top.

        Qt's own scene painting would visit every item of the scene at every frame (about 130,
        with pyqtgraph's bounds computed in Python); only the dozen live ones change.
        """
        layers = self._layers
        viewport = self.viewport()
        view_transform = self.viewportTransform()
        option = self._paint_option
        painter = QtGui.QPainter(viewport)
        try:   # a painter left active on the viewport after an error would crash Qt
            painter.setClipRegion(region)
            painter.drawPixmap(0, 0, layers.background)
            painter.setRenderHints(self.renderHints())
            for clip, items in layers.paint_list:
                painter.save()
                painter.setClipRect(clip, _INTERSECT_CLIP)
                for item, foreign in items:
                    if not item.isVisible():
                        continue
                    if foreign:
                        item.boundingRect()
                        painter.save()
                    painter.setTransform(item.deviceTransform(view_transform))
                    item.paint(painter, option, viewport)
                    if foreign:
                        painter.restore()
                painter.restore()
            painter.drawPixmap(layers.legend_at, layers.legend)
        finally:
            painter.end()

    def _repaint(self) -> None:
        """Interactive plots: paint the viewport at the next event loop pass (live items changed)."""
        if self._layered:
            self.viewport().update()

    def _static_changed(self, key) -> None:
        """The static layers show ``key``; a new key re-renders them at the next paint."""
        if key != self._static_key:
            self._static_key = key
            self._repaint()

    # ------------------------------------------------------------------ styling
    def _pen(self, role: str, style=QtCore.Qt.PenStyle.SolidLine) -> QtGui.QPen:
        colour = PALETTE[role] if role != "crosshair" else PALETTE["crosshair"]
        pen = pg.mkPen(colour, width=LINE_WIDTH[role] * self.scale)
        pen.setStyle(style)
        pen.setCapStyle(QtCore.Qt.PenCapStyle.RoundCap)
        return pen

    def _font(self, factor: float = 1.0) -> QtGui.QFont:
        font = QtGui.QFont()
        font.setPixelSize(max(6, round(FONT_POINTS * 1.3 * factor * self.scale)))
        return font

    def _style_axes(self) -> None:
        font = self._font(0.95)
        for plot in (self.magnitude_plot, self.phase_plot):
            for name in ("left", "bottom"):
                axis = plot.getAxis(name)
                axis.setStyle(tickFont=font, tickLength=round(-6 * self.scale),
                              tickTextOffset=round(4 * self.scale))
                axis.setPen(pg.mkPen(PALETTE["foreground"], width=max(1.0, self.scale)))
            plot.getAxis("left").setWidth(round(62 * self.scale))
        self.magnitude_plot.getAxis("bottom").setStyle(showValues=False)
        self.magnitude_plot.getAxis("bottom").setHeight(round(4 * self.scale))

    def _label_style(self) -> dict:
        return {"font-size": f"{round(FONT_POINTS * 1.3 * self.scale)}px", "color": PALETTE["foreground"]}

    # ------------------------------------------------------------------ state
    def show_design(self, design: DesignInputs, evaluation: Evaluation, view: ViewSettings) -> None:
        """Draw the curves, design point and lines for a valid design and its synthesis."""
        result = evaluation.result
        damping = design.damping
        natural_hz = result.natural_frequency_hz if result is not None else None
        x_axis = view.x_axis if natural_hz is not None else "ratio"
        self._damping = damping
        self._natural_frequency_hz = natural_hz
        self._set_axes(x_axis, view.magnitude_scale, design, result)

        def x_of(ratio):
            return frequency_axis(ratio, x_axis, natural_hz)

        def y_of(magnitude):
            return magnitude_on_scale(magnitude, view.magnitude_scale)

        # The reference family only changes with the damping model, its values and the axes.
        reference_key = (damping.model, view.reference_damping, x_axis, view.magnitude_scale,
                         None if x_axis == "ratio" else natural_hz)
        same_references = reference_key == self._reference_key
        self._reference_key = reference_key
        curves = drawn_curve_family(damping, () if same_references else view.reference_damping)
        design_curve = curves[0]
        x = x_of(design_curve.ratio)
        log_y = view.magnitude_scale == "ratio"
        self.design_magnitude.set_curve(x, y_of(design_curve.magnitude), log_y, self._x_range)
        self.design_phase.set_curve(x, design_curve.phase_deg, False, self._x_range)
        references = curves[1:]
        if not same_references:
            self._add_reference_items(len(references))
        for i in range(len(self.reference_magnitude) if not same_references else 0):
            visible = i < len(references)
            for item in (self.reference_magnitude[i], self.reference_phase[i], self.reference_labels[i]):
                item.setVisible(visible)
            if not visible:
                continue
            curve = references[i]
            curve_x = x_of(curve.ratio)
            self.reference_magnitude[i].setData(curve_x, y_of(curve.magnitude))
            self.reference_phase[i].setData(curve_x, curve.phase_deg)
            top = int(curve.magnitude.argmax())
            peak_y = float(y_of(curve.magnitude[top]))
            self._set_text(self.reference_labels[i], curve.label, _lx(float(curve_x[top]) * 1.06),
                           _lx(peak_y) if view.magnitude_scale == "ratio" else peak_y)

        crossover = float(x_of(CROSSOVER_RATIO))
        right = _lx(float(x_of(self.ratio[-1])))
        for region in self.isolation_regions:
            region.setRegion((_lx(crossover), right))
        for line in self.crossover_lines:
            line.setValue(_lx(crossover))
        y_label = self._y_pos(1.0 if view.magnitude_scale == "ratio" else 0.0, view.magnitude_scale, top=True)
        self.crossover_label.setPos(_lx(crossover) + 0.01, y_label)
        bottom = _lx(MAGNITUDE_RANGE[0]) + 0.05 if view.magnitude_scale == "ratio" else MAGNITUDE_DB_RANGE[0] + 1.0
        self.isolation_label.setPos(_lx(crossover) + 0.03, bottom)

        target = 1.0 - design.isolation_percent / 100.0
        target_y = float(transmissibility_db(target)) if view.magnitude_scale == "db" else _lx(target)
        self.target_line.setValue(target_y)
        self.target_label.setText(f"target {design.isolation_percent:g} %")
        self.target_label.setPos(_lx(self._x_range[1]) - 0.02, target_y)

        if result is not None:
            points = operating_points(result.frequency_ratio, result.frequency_ratio_max, damping)
            px = x_of(points.ratio)
            self.operating_magnitude.set_points(px, y_of(points.magnitude), view.magnitude_scale == "ratio")
            self.operating_phase.set_points(px, points.phase_deg, False)
            for band in self.speed_bands:
                if points.band is None:
                    band.setVisible(False)
                else:
                    band.setRegion((_lx(float(px[0])), _lx(float(px[-1]))))
                    band.setVisible(True)
            duty = result.duty_points
            dx = x_of(np.array([point.frequency_ratio for point in duty], dtype=float))
            self.duty_magnitude.set_points(dx, y_of(np.array([point.transmissibility for point in duty], dtype=float)),
                                           log_y)
            self.duty_phase.set_points(dx, np.array([point.phase_deg for point in duty], dtype=float), False)
            self._show_duty_in_legend(bool(duty))
        else:
            for markers in (self.operating_magnitude, self.operating_phase, self.duty_magnitude, self.duty_phase):
                markers.set_points((), (), False)
            for band in self.speed_bands:
                band.setVisible(False)
            self._show_duty_in_legend(False)
        # Exports name the design's damping; the window's legend says "design" and leaves the
        # value to the slider box beside it (a new legend text per slider step costs 0.4 ms).
        self._set_legend(0, "design" if self._layered else f"{design_curve.label} (design)")
        symbol = "ζ" if damping.model == "viscous" else "η"
        self._set_legend(1, f"reference {symbol}")
        self._set_legend(3, f"target {design.isolation_percent:g} %")
        bands = tuple(region for region in (tuple(band.getRegion()) for band in self.speed_bands if band.isVisible())
                      if region[1] - region[0] > 1e-9)   # a single speed's band has no width: nothing drawn
        self._static_changed((reference_key, self._x_range, design.isolation_percent, bands))
        self._repaint()

    def _show_duty_in_legend(self, shown: bool) -> None:
        if shown != self._duty_in_legend:
            self._duty_in_legend = shown
            if shown:
                self.legend.addItem(self.duty_magnitude.sample, "duty speeds")
            else:
                self.legend.removeItem(self.duty_magnitude.sample)
            self.legend.layout.activate()   # rows in place now, for the legend layer

    def _set_text(self, item: pg.TextItem, text: str, x: float, y: float) -> None:
        if item.toPlainText() != text:
            item.setText(text)
        item.setPos(x, y)

    def _set_legend(self, index: int, text: str) -> None:
        if self._legend_texts.get(index) != text:
            self._legend_texts[index] = text
            self.legend.items[index][1].setText(text)
            self.legend.layout.activate()   # resize now: a posted layout request costs a second paint

    def _y_pos(self, value, scale: str, top: bool = False) -> float:
        """y position of a label: a value, or near the top of the axis."""
        if value is None:
            return _lx(MAGNITUDE_RANGE[1]) - 0.05 if scale == "ratio" else MAGNITUDE_DB_RANGE[1] - 1.0
        return _lx(value) if scale == "ratio" else float(value)

    def _set_axes(self, x_axis: str, scale: str, design: DesignInputs, result) -> None:
        """Set log modes, labels and fixed ranges, only when they change."""
        if x_axis == "ratio":
            high = RATIO_VIEW_WIDE if result is not None and result.frequency_ratio_max > 8.0 else RATIO_VIEW
            x_range = high
        else:
            low_speed, high_speed = design.speed_range_rpm
            factor = 1.0 if x_axis == "rpm" else 1.0 / 60.0
            x_range = (low_speed * factor / 20.0, high_speed * factor * 2.0)
        if x_axis != self._x_axis or scale != self._magnitude_scale:
            self._x_axis = x_axis
            self._magnitude_scale = scale
            self.magnitude_plot.setLogMode(x=True, y=scale == "ratio")
            self.phase_plot.setLogMode(x=True, y=False)
            self.phase_plot.setYRange(*PHASE_RANGE, padding=0)   # fixed: setLogMode turned auto-range on
            text, units = X_AXIS_LABELS[x_axis]
            self.phase_plot.setLabel("bottom", text, units=units or None, **self._label_style())
            self.magnitude_plot.setLabel("left", "Transmissibility" + (" (dB)" if scale == "db" else ""),
                                         **self._label_style())
            self.phase_plot.setLabel("left", "Phase (°)", **self._label_style())
            if scale == "ratio":
                self.magnitude_plot.setYRange(_lx(MAGNITUDE_RANGE[0]), _lx(MAGNITUDE_RANGE[1]), padding=0)
            else:
                self.magnitude_plot.setYRange(*MAGNITUDE_DB_RANGE, padding=0)
            self._x_range = None
        if x_range != self._x_range:
            self._x_range = x_range
            self.magnitude_plot.setXRange(_lx(x_range[0]), _lx(x_range[1]), padding=0)
            self._set_ticks(x_axis, scale)

    def _set_ticks(self, x_axis: str, scale: str) -> None:
        """Decade ticks with 2 and 5 between them on log axes (pyqtgraph's own for absolute frequency)."""
        low, high = self._x_range
        decades = range(math.floor(math.log10(low)) - 1, math.ceil(math.log10(high)) + 1)
        major = [(_lx(m * 10.0 ** e), f"{m * 10.0 ** e:g}") for e in decades for m in (1, 2, 5)]
        minor = [(_lx(m * 10.0 ** e), "") for e in decades for m in (3, 4, 6, 7, 8, 9)]
        for plot in (self.magnitude_plot, self.phase_plot):
            plot.getAxis("bottom").setTicks([major, minor])
        left = self.magnitude_plot.getAxis("left")
        if scale == "ratio":
            left.setTicks([[(_lx(v), f"{v:g}") for v in (0.001, 0.01, 0.1, 1, 10, 100)],
                           [(_lx(m * 10.0 ** e), "") for e in range(-3, 2) for m in (2, 5)]])
        else:
            left.setTicks([[(v, f"{v:g}") for v in range(-60, 41, 20)], []])

    def show_comparison(self, curve) -> None:
        """Draw a :class:`core.curves.Curve` dashed beside the design (None hides it).

        Call after :meth:`show_design`: it uses the axes set there. The items are made on first use.
        """
        if getattr(self, "comparison_magnitude", None) is None:
            if curve is None:
                return
            pen = self._pen("design", QtCore.Qt.PenStyle.DashLine)
            pen.setColor(QtGui.QColor(PALETTE["target"]))
            self.comparison_magnitude = DrawnCurve(pen)
            self.comparison_phase = DrawnCurve(pen)
            for plot, item in ((self.magnitude_plot, self.comparison_magnitude),
                               (self.phase_plot, self.comparison_phase)):
                item.setZValue(9)
                plot.addItem(item, ignoreBounds=True)
            self._comparison_sample = pg.PlotDataItem(pen=pen)
            self._comparison_label = None
        if curve is None:
            for item in (self.comparison_magnitude, self.comparison_phase):
                item.set_curve((), (), False, self._x_range or RATIO_VIEW)
            if self._comparison_label is not None:
                self.legend.removeItem(self._comparison_sample)
                self.legend.layout.activate()
                self._comparison_label = None
            self._repaint()
            return
        x = frequency_axis(curve.ratio, self._x_axis or "ratio", self._natural_frequency_hz)
        scale = self._magnitude_scale or "ratio"
        x_range = self._x_range or RATIO_VIEW
        self.comparison_magnitude.set_curve(x, magnitude_on_scale(curve.magnitude, scale), scale == "ratio", x_range)
        self.comparison_phase.set_curve(x, curve.phase_deg, False, x_range)
        label = f"{curve.label} (equal peak)"
        if label != self._comparison_label:
            if self._comparison_label is not None:
                self.legend.removeItem(self._comparison_sample)
            self.legend.addItem(self._comparison_sample, label)
            self.legend.layout.activate()
            self._comparison_label = label
        self._repaint()

    # ------------------------------------------------------------------ crosshair
    def _mouse_moved(self, position) -> None:
        inside = None
        for plot in (self.magnitude_plot, self.phase_plot):
            if plot.sceneBoundingRect().contains(position):
                inside = plot
        if inside is None or self._damping is None:
            for line in self.crosshair_lines:
                line.setVisible(False)
            self._repaint()
            self.readout_changed.emit(None)
            return
        x_log = inside.getViewBox().mapSceneToView(position).x()
        self.show_crosshair_at(x_log)

    def show_crosshair_at(self, x_log: float):
        """Put the crosshair at a log10 x position and emit the readout there (from core)."""
        x_axis = self._x_axis or "ratio"
        ratio = ratio_from_axis(10.0 ** x_log, x_axis, self._natural_frequency_hz)
        value = readout(ratio, self._damping)
        for line in self.crosshair_lines:
            line.setValue(x_log)
            line.setVisible(value is not None)
        self._repaint()
        self.readout_changed.emit(value)
        return value

    # ------------------------------------------------------------------ data for tests and CSV
    def visible_reference_count(self) -> int:
        return sum(1 for item in self.reference_magnitude if item.isVisible())
