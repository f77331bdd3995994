"""The window's plots as painted: curve, markers, legend and crosshair pixels (offscreen).

The interactive plots paint their live items themselves over a cached layer of the static
ones, so these tests look at the pixels of the grabbed viewport, at positions computed here
from the closed form of |T| (REFERENCES.md §1: Vigran eq. 2.33), not from the curve data.
"""
from __future__ import annotations

import math

import pytest
from PySide6 import QtCore, QtGui

from app.style import MARKER_SIZE, PALETTE
from tests.conftest import ROOT
from tests.qt_events import EventCounter
from tests.test_window import settle

pytestmark = pytest.mark.gui

DEMO = ROOT / "demo_projects" / "rooftop_air_handler.json"


def _viscous_magnitude(r: float, zeta: float) -> float:
    """|T| = sqrt((1 + (2ζr)²) / ((1 − r²)² + (2ζr)²)), Vigran eq. 2.33."""
    a = 2.0 * zeta * r
    return math.sqrt((1.0 + a * a) / ((1.0 - r * r) ** 2 + a * a))


def _pixel_of(plots, plot, x_log: float, y: float) -> QtCore.QPoint:
    """Viewport pixel of a point in a plot's view coordinates (log10 x)."""
    scene = plot.getViewBox().mapViewToScene(QtCore.QPointF(x_log, y))
    return plots.mapFromScene(scene)


def _difference(pixel: QtGui.QColor, colour: str) -> int:
    """Largest channel difference (0..255) between ``pixel`` and ``colour``."""
    target = QtGui.QColor(colour)
    return max(abs(pixel.red() - target.red()), abs(pixel.green() - target.green()),
               abs(pixel.blue() - target.blue()))


def _distance(image: QtGui.QImage, at: QtCore.QPoint, colour: str, reach: int = 1) -> int:
    """Smallest largest-channel difference to ``colour`` within ``reach`` pixels of ``at``."""
    return min(_difference(image.pixelColor(at.x() + dx, at.y() + dy), colour)
               for dx in range(-reach, reach + 1) for dy in range(-reach, reach + 1))


def _grab(plots) -> QtGui.QImage:
    return plots.viewport().grab().toImage()


def test_the_design_curve_and_marker_are_painted_where_the_closed_form_puts_them(main_window, qtbot):
    window = main_window(DEMO)
    window.operating.damping_spin.setValue(0.1)
    settle(qtbot, window)
    plots = window.plots
    image = _grab(plots)
    for r in (0.5, 2.0, 3.0, 6.0):   # |T| 1.319, 0.3998, 0.1809, 0.0587 at ζ = 0.1 (Vigran table)
        at = _pixel_of(plots, plots.magnitude_plot, math.log10(r), math.log10(_viscous_magnitude(r, 0.1)))
        assert _distance(image, at, PALETTE["design"]) < 40, r
    ratio = window.model.result.frequency_ratio
    at = _pixel_of(plots, plots.magnitude_plot, math.log10(ratio), math.log10(_viscous_magnitude(ratio, 0.1)))
    assert _distance(image, at, PALETTE["operating"], reach=0) < 40   # the marker's centre


def test_a_slider_step_repaints_the_plots_by_itself(main_window, qtbot):
    window = main_window(DEMO)
    qtbot.waitUntil(lambda: window.plots.layer_renders > 0, timeout=2000)   # the first paint
    paints = EventCounter(QtCore.QEvent.Type.Paint)
    window.plots.viewport().installEventFilter(paints)
    renders = window.plots.layer_renders
    for step in range(1, 6):
        before = paints.count
        window.operating.damping_slider.setValue(window.operating.damping_slider.value() + 1)
        qtbot.waitUntil(lambda: paints.count > before, timeout=2000)   # no forced repaint
    assert window.plots.layer_renders == renders      # the static layer is kept during a drag
    image = _grab(window.plots)
    zeta = window.model.design.damping.value
    at = _pixel_of(window.plots, window.plots.magnitude_plot, math.log10(3.0),
                   math.log10(_viscous_magnitude(3.0, zeta)))
    assert _distance(image, at, PALETTE["design"]) < 40   # the curve of the last step
    window.view_actions[("magnitude_scale", "db")].trigger()
    settle(qtbot, window)
    qtbot.waitUntil(lambda: window.plots.layer_renders > renders, timeout=2000)   # new axes: a new layer


def test_the_legend_is_painted_over_the_plot(main_window, qtbot):
    window = main_window(DEMO)
    plots = window.plots
    image = _grab(plots)
    legend = plots.mapFromScene(plots.legend.sceneBoundingRect()).boundingRect()
    assert legend.width() > 40 and legend.height() > 40
    inside = [image.pixelColor(x, y) for x in range(legend.left() + 2, legend.right() - 1)
              for y in range(legend.top() + 2, legend.bottom() - 1)]

    def near(colour, name):
        return _difference(colour, PALETTE[name]) < 40

    assert any(near(c, "design") for c in inside)       # the design sample line
    assert any(near(c, "operating") for c in inside)    # the operating-point symbol
    # the target sample, a thin dash-dot line: purple, if not at full strength
    assert any(c.red() - c.green() > 40 and c.blue() - c.green() > 60 for c in inside)
    # Its box is near white even over the tinted isolation region it sits in.
    corner = image.pixelColor(legend.right() - 4, legend.bottom() - 4)
    assert min(corner.red(), corner.green(), corner.blue()) > 235


def test_the_crosshair_is_painted_and_taken_away(main_window, qtbot):
    window = main_window(DEMO)
    plots = window.plots
    x_log = math.log10(0.3)
    top, bottom = plots.magnitude_plot.getViewBox().viewRange()[1]
    at = _pixel_of(plots, plots.magnitude_plot, x_log, bottom + 0.15 * (top - bottom))   # far below the curve
    assert _distance(_grab(plots), at, PALETTE["crosshair"]) > 60
    assert plots.show_crosshair_at(x_log) is not None
    assert _distance(_grab(plots), at, PALETTE["crosshair"]) < 60
    plots._mouse_moved(QtCore.QPointF(-50.0, -50.0))     # the mouse leaves the plots
    assert _distance(_grab(plots), at, PALETTE["crosshair"]) > 60


def test_duty_speed_diamonds_are_painted_at_their_ratio(main_window, qtbot):
    from tests.test_window import paste_into
    window = main_window(DEMO)
    window.operating.damping_spin.setValue(0.1)
    paste_into(qtbot, window.design_panel.fields["duty_speeds"].row.editor, "1500")
    settle(qtbot, window)
    plots = window.plots
    ratio = window.model.result.duty_points[0].frequency_ratio
    assert 1.0 < ratio < 10.0                         # inside the plot
    # The diamond is hollow: its outline, 0.4 marker sizes to the left of the point, is orange.
    at = _pixel_of(plots, plots.magnitude_plot, math.log10(ratio), math.log10(_viscous_magnitude(ratio, 0.1)))
    image = _grab(plots)
    left = QtCore.QPoint(at.x() - round(0.4 * MARKER_SIZE), at.y())
    assert _distance(image, left, PALETTE["operating"], reach=1) < 60
    assert sum(item.isVisible() for item in plots.duty_magnitude.items) == 1


def test_an_error_in_a_live_item_paint_is_reported_not_a_crash(main_window, qtbot):
    window = main_window(DEMO)
    plots = window.plots
    _grab(plots)                                       # layers and paint list made

    def broken(*_args):
        raise RuntimeError("paint failed on purpose")

    plots.design_magnitude.paint = broken
    paints = EventCounter(QtCore.QEvent.Type.Paint)
    plots.viewport().installEventFilter(paints)
    with qtbot.capture_exceptions() as caught:
        plots.viewport().update()                      # painted by the event loop, as in use
        qtbot.waitUntil(lambda: paints.count > 0, timeout=2000)
        with pytest.raises(RuntimeError, match="paint failed on purpose"):
            _grab(plots)                               # a painter left open here crashed Qt
    assert any("paint failed on purpose" in str(error[1]) for error in caught)
    del plots.design_magnitude.paint
    image = _grab(plots)
    at = _pixel_of(plots, plots.magnitude_plot, math.log10(3.0),
                   math.log10(_viscous_magnitude(3.0, window.model.design.damping.value)))
    assert _distance(image, at, PALETTE["design"]) < 40   # painted again once the item is fixed
