"""Passage view and design map view: shown data equal the core's results; a click reports the point."""
import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import math  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402

pytest.importorskip("PySide6")

from PySide6 import QtCore  # noqa: E402

from app.design_map_view import LEVELS_DB, DesignMapView  # noqa: E402
from app.passage_view import PassageView  # noqa: E402
from core.design_map import MapLimits, design_map  # noqa: E402
from core.passage import simulate_runup  # noqa: E402

pytestmark = pytest.mark.gui


def _original(curve):
    x, y = curve.getOriginalDataset()
    return np.asarray(x), np.asarray(y)


@pytest.fixture(scope="module")
def runup():
    # Invented case: a 420 kg fan set on springs at 4.5 Hz, zeta 0.04, run up to 1450 r/min in 12 s.
    mass = 420.0
    stiffness = mass * (2 * np.pi * 4.5) ** 2
    damping = 2 * 0.04 * np.sqrt(stiffness * mass)
    return simulate_runup(mass, stiffness, damping, 3.5e-3, 1450.0, 12.0, "up")


@pytest.fixture
def passage_view(qtbot):
    widget = PassageView()
    qtbot.addWidget(widget)
    widget.resize(800, 600)
    widget.show()
    return widget


@pytest.fixture
def map_view(qtbot):
    widget = DesignMapView()
    qtbot.addWidget(widget)
    widget.resize(900, 650)
    widget.show()
    qtbot.waitExposed(widget)
    return widget


@pytest.fixture(scope="module")
def limited_map():
    return design_map(1450.0, (1.0, 25.0), (0.005, 0.5), frequency_points=120, damping_points=90, ramp_s=12.0,
                      limits=MapLimits(min_isolation_percent=90.0, max_static_deflection_mm=25.4,
                                       max_passage_amplification=8.0))


def test_passage_view_plots_core_envelopes(passage_view, runup):
    passage_view.show_result(runup)
    pairs = [
        (passage_view.displacement_curve, runup.displacement_envelope_speed_rpm, runup.displacement_envelope_m),
        (passage_view.steady_displacement_curve, runup.displacement_envelope_speed_rpm,
         runup.steady_displacement_envelope_m),
        (passage_view.force_curve, runup.force_envelope_speed_rpm, runup.force_envelope_n),
        (passage_view.steady_force_curve, runup.force_envelope_speed_rpm, runup.steady_force_envelope_n),
    ]
    for curve, speeds, values in pairs:
        x, y = _original(curve)
        assert np.array_equal(x, speeds)
        assert np.array_equal(y, values)
    x, y = _original(passage_view.displacement_peak)
    assert (x[0], y[0]) == (runup.peak_displacement_speed_rpm, runup.peak_displacement_m)
    x, y = _original(passage_view.force_peak)
    assert (x[0], y[0]) == (runup.peak_force_speed_rpm, runup.peak_force_n)
    assert "r/min" in passage_view.force_plot.getAxis("bottom").labelString()
    assert "m)" in passage_view.displacement_plot.getAxis("left").labelString()      # "(mm)" or "(m)"
    assert "N)" in passage_view.force_plot.getAxis("left").labelString()
    assert f"{runup.displacement_amplification:.3g}×" in passage_view.summary_label.text()


def test_map_view_shows_core_fields(map_view, limited_map):
    map_view.show_map(limited_map, (3.2, 0.05))
    assert np.array_equal(map_view.image.image, limited_map.transmissibility_db)
    assert map_view.image.levels == pytest.approx(LEVELS_DB)
    # Pixel (i, j) is centred on (log10 fn_i, log10 zeta_j).
    for i, j in ((0, 0), (37, 61), (119, 89)):
        centre = map_view.image.mapToView(QtCore.QPointF(i + 0.5, j + 0.5))
        assert centre.x() == pytest.approx(math.log10(limited_map.natural_frequency_hz[i]), abs=1e-9)
        assert centre.y() == pytest.approx(math.log10(limited_map.damping_ratio[j]), abs=1e-9)
    # Washed exactly where the core says a limit is missed.
    assert np.array_equal(map_view.wash.image[..., 3] > 0, ~limited_map.feasible)
    x, y = map_view.marker.getData()
    assert (x[0], y[0]) == pytest.approx((math.log10(3.2), math.log10(0.05)))
    for key in ("isolation", "deflection", "passage", "feasible"):
        assert map_view.contours[key].isVisible()


def test_deflection_contour_at_rule_frequency(map_view, limited_map):
    # fn = 15.761 / sqrt(25.4 mm) = 3.127 Hz (common practice; REFERENCES §2): the drawn contour of the
    # core's deflection field sits there, within one grid step.
    map_view.show_map(limited_map, None)
    contour = map_view.contours["deflection"]
    contour.boundingRect()                       # builds the path
    path = contour.path
    xs = [contour.mapToView(path.elementAt(k)).x() for k in range(path.elementCount())]
    step = math.log10(25.0) / 119
    assert len(xs) > 2
    assert max(abs(x - math.log10(3.127)) for x in xs) < step
    assert not map_view.marker.getData()[0].size


def test_contours_hidden_without_limits(map_view):
    map_view.show_map(design_map(1450.0, frequency_points=40, damping_points=30), (5.0, 0.1))
    assert map_view.marker.getData()[0].size == 1
    assert not any(contour.isVisible() for contour in map_view.contours.values())
    assert not map_view.wash.image[..., 3].any()
    map_view.show_map(design_map(1450.0, frequency_points=40, damping_points=30), (0.0, 0.1))
    assert map_view.marker.getData()[0].size == 0          # a log axis cannot show zero: no marker


def test_click_emits_point(map_view, qtbot, limited_map):
    map_view.show_map(limited_map, (3.2, 0.05))
    qtbot.wait(50)
    target = (6.0, 0.08)
    view_box = map_view.plot.getViewBox()
    scene_point = view_box.mapViewToScene(QtCore.QPointF(math.log10(target[0]), math.log10(target[1])))
    widget_point = map_view.plot_widget.mapFromScene(scene_point)
    with qtbot.waitSignal(map_view.pointClicked, timeout=2000) as blocker:
        qtbot.mouseClick(map_view.plot_widget.viewport(), QtCore.Qt.MouseButton.LeftButton, pos=widget_point)
    fn_hz, zeta = blocker.args
    # One screen pixel is about 0.3 % of a decade here; allow 2 %.
    assert fn_hz == pytest.approx(target[0], rel=0.02)
    assert zeta == pytest.approx(target[1], rel=0.02)


def test_click_outside_map_emits_nothing(map_view, qtbot, limited_map):
    map_view.show_map(limited_map)
    received = []
    map_view.pointClicked.connect(lambda *args: received.append(args))
    axis = map_view.plot.getAxis("left")
    outside = map_view.plot_widget.mapFromScene(axis.mapToScene(axis.boundingRect().center()))
    qtbot.mouseClick(map_view.plot_widget.viewport(), QtCore.Qt.MouseButton.LeftButton, pos=outside)
    qtbot.wait(20)
    assert received == []
