"""Slider grids, plot grids, curve families, readout and CSV (core/curves.py, Qt-free).

Reference values: REFERENCES.md §1 (viscous abs T table, Vigran *Building Acoustics*
eq. 2.33; phase lags, Rao, from memory; hysteretic, Snowdon NBS Handbook 128) and
§8 (scipy.signal.freqresp of T(s) = (2ζωn s + ωn²)/(s² + 2ζωn s + ωn²)).
"""
from __future__ import annotations

import csv
import io
import math

import numpy as np
import pytest
import scipy.signal

from core.curves import (
    DAMPING_GRID, RATIO_GRID, LogGrid, curve_family, curves_csv, drawn_curve_family, frequency_axis,
    magnitude_on_scale, operating_points, ratio_axis, ratio_from_axis, readout, resonance_ratio_axis)
from core.transmissibility import Damping


@pytest.mark.parametrize("grid, low, high", [(DAMPING_GRID, 0.005, 1.0), (RATIO_GRID, 0.1, 10.0)])
def test_slider_grids_reach_both_ends_exactly(grid, low, high):
    assert grid.value(0) == low and grid.value(grid.steps) == high
    assert grid.index(low) == 0 and grid.index(high) == grid.steps
    assert grid.index(low / 10) == 0 and grid.index(high * 10) == grid.steps  # clamped
    assert grid.value(-5) == low and grid.value(grid.steps + 5) == high
    values = np.array([grid.value(i) for i in range(grid.steps + 1)])
    assert np.all(np.diff(values) > 0)
    # log spacing: equal ratios between neighbours
    np.testing.assert_allclose(values[1:] / values[:-1], (high / low) ** (1 / grid.steps), rtol=1e-12)
    assert all(grid.index(grid.value(i)) == i for i in range(grid.steps + 1))
    assert grid.index(float("nan")) == 0


def test_log_grid_midpoint_and_validation():
    grid = LogGrid(0.1, 10.0, 200)
    assert grid.value(100) == pytest.approx(1.0, rel=1e-15)
    with pytest.raises(ValueError):
        LogGrid(0.0, 1.0, 10)


def test_ratio_axis_is_positive_and_avoids_resonance():
    r = ratio_axis()
    assert np.all(r > 0) and np.all(np.diff(r) > 0)
    assert not np.any(np.isclose(r, 1.0, rtol=1e-9, atol=0))
    undamped = curve_family(Damping("viscous", 0.0), (), r)[0]
    assert np.all(np.isfinite(undamped.magnitude))


@pytest.mark.parametrize("zeta, row", [
    (0.01, (1.333, 50.01, 0.8001, 0.3336, 0.04187)),
    (0.1, (1.328, 5.099, 0.8122, 0.3559, 0.05887)),
    (0.3, (1.292, 1.944, 0.8734, 0.4834, 0.1307)),
    (0.5, (1.240, 1.414, 0.9233, 0.6202, 0.2080)),
])
def test_curve_family_matches_published_table(zeta, row):
    r = np.array([0.5, 1.0, 1.5, 2.0, 5.0])
    curves = curve_family(Damping("viscous", zeta), (0.05, 0.2), r)
    assert curves[0].current and not curves[1].current and len(curves) == 3
    assert [f"{m:.4g}" for m in curves[0].magnitude] == [f"{v:.4g}" for v in row]
    assert curves[1].damping == Damping("viscous", 0.05) and curves[2].label == "ζ = 0.2"


def test_curve_phase_against_scipy_freqresp():
    """T(s) = (2ζωn s + ωn²)/(s² + 2ζωn s + ωn²), REFERENCES.md §8; ζ = 0.1, ωn = 2π·5."""
    zeta, wn = 0.1, 2 * math.pi * 5
    r = np.geomspace(0.1, 10, 50)
    _, h = scipy.signal.freqresp(([2 * zeta * wn, wn ** 2], [1, 2 * zeta * wn, wn ** 2]), r * wn)
    curve = curve_family(Damping("viscous", zeta), (), r)[0]
    np.testing.assert_allclose(curve.magnitude, np.abs(h), rtol=1e-10)
    np.testing.assert_allclose(curve.phase_deg, np.degrees(np.angle(h)), atol=1e-8)
    # Check value of REFERENCES.md §8: abs T = 0.35586 and phase -150.60° at ω = 2ωn.
    value = readout(2.0, Damping("viscous", zeta))
    assert f"{value.magnitude:.5g}" == "0.35586" and f"{value.phase_deg:.5g}" == "-150.6"


@pytest.mark.parametrize("zeta, r, lag", [(0.05, 0.5, 0.9517), (0.05, 1.0, 84.29), (0.05, 2.0, 164.9),
                                          (0.2, 0.5, 3.621), (0.2, 1.0, 68.20), (0.2, 2.0, 126.4)])
def test_readout_phase_matches_published_lags(zeta, r, lag):
    value = readout(r, Damping("viscous", zeta))
    assert -value.phase_deg == pytest.approx(lag, abs=0.006 * max(1, lag / 10))
    assert value.magnitude_db == pytest.approx(20 * math.log10(value.magnitude), rel=1e-12)


@pytest.mark.parametrize("eta, r, expected", [(0.05, 1.0, "20.02"), (0.05, 2.0, "0.3337"),
                                              (0.5, 1.0, "2.236"), (0.5, 5.0, "0.04657")])
def test_hysteretic_readout_matches_published_values(eta, r, expected):
    assert f"{readout(r, Damping('hysteretic', eta)).magnitude:.4g}" == expected


def test_readout_refuses_non_positive_ratio():
    assert readout(0.0, Damping("viscous", 0.1)) is None
    assert readout(float("nan"), Damping("viscous", 0.1)) is None


def test_scales_and_axes():
    np.testing.assert_allclose(magnitude_on_scale(np.array([1.0, 0.1, 10.0]), "db"), [0.0, -20.0, 20.0])
    assert frequency_axis(2.0, "hz", 5.0) == 10.0 and frequency_axis(2.0, "rpm", 5.0) == 600.0
    assert frequency_axis(2.0, "rpm", None) == 2.0
    for axis in ("ratio", "hz", "rpm"):
        assert ratio_from_axis(float(frequency_axis(3.0, axis, 4.0)), axis, 4.0) == pytest.approx(3.0)


def test_operating_points_single_and_range():
    single = operating_points(3.0, 3.0, Damping("viscous", 0.1))
    assert single.band is None and single.ratio.tolist() == [3.0]
    ranged = operating_points(2.0, 4.0, Damping("viscous", 0.1))
    assert ranged.band == (2.0, 4.0)
    assert f"{ranged.magnitude[0]:.4g}" == "0.3559"  # REFERENCES.md §1, ζ = 0.1, r = 2


def test_csv_columns_rows_and_header():
    r = np.array([0.5, 2.0])
    text = curves_csv(curve_family(Damping("viscous", 0.1), (0.3,), r), ["Project X", "caution"])
    lines = text.splitlines()
    assert lines[:2] == ["# Project X", "# caution"]
    rows = list(csv.reader(io.StringIO("\n".join(lines[2:]))))
    assert rows[0] == ["frequency_ratio", "transmissibility ζ = 0.1 (design)", "phase_deg ζ = 0.1 (design)",
                       "transmissibility ζ = 0.3", "phase_deg ζ = 0.3"]
    assert [f"{float(v):.4g}" for v in (rows[1][1], rows[2][1], rows[1][3], rows[2][3])] == \
        ["1.328", "0.3559", "1.292", "0.4834"]  # REFERENCES.md §1 table
    with pytest.raises(ValueError):
        a = curve_family(Damping("viscous", 0.1), (), r)[0]
        b = curve_family(Damping("viscous", 0.1), (), np.array([1.5, 3.0]))[0]
        curves_csv((a, b))


def _closed_form(ratio, model, value):
    """abs T and phase (deg), written out here: viscous (1 + (2ζr)²)/((1 - r²)² + (2ζr)²) under a
    square root, phase -atan2(2ζr³, 1 - r² + (2ζr)²) (Rao, from memory); hysteretic
    sqrt((1 + η²)/((1 - r²)² + η²)), phase -atan2(η r², 1 - r² + η²) (Snowdon)."""
    r = np.asarray(ratio, dtype=float)
    loss = 2.0 * value * r if model == "viscous" else np.full_like(r, value)
    magnitude = np.sqrt((1.0 + loss ** 2) / ((1.0 - r * r) ** 2 + loss ** 2))
    phase = -np.degrees(np.arctan2(loss * r * r, 1.0 - r * r + loss ** 2))
    return magnitude, phase


@pytest.mark.parametrize("model, value", [("viscous", 0.005), ("viscous", 0.02), ("viscous", 0.2),
                                          ("viscous", 1.0), ("hysteretic", 0.01), ("hysteretic", 0.3)])
def test_drawn_curve_holds_the_exact_resonance_peak(model, value):
    # Peak of abs T: viscous at r = sqrt(sqrt(1 + 8ζ²) - 1)/(2ζ) (Den Hartog, Mechanical
    # Vibrations, from memory), hysteretic sqrt(1 + η²)/η at r = 1 (Snowdon).
    if model == "viscous":
        r_peak = math.sqrt(math.sqrt(1.0 + 8.0 * value ** 2) - 1.0) / (2.0 * value)
    else:
        r_peak = 1.0
    peak = float(_closed_form(np.array([r_peak]), model, value)[0][0])
    (curve,) = drawn_curve_family(Damping(model, value))
    assert np.all(np.diff(curve.ratio) > 0)
    assert curve.magnitude.max() == pytest.approx(peak, rel=1e-12)
    assert curve.ratio[curve.magnitude.argmax()] == pytest.approx(r_peak, rel=1e-9)
    np.testing.assert_allclose(curve.magnitude, _closed_form(curve.ratio, model, value)[0], rtol=1e-12)
    if value <= 0.01:   # the even plotting grid alone misses so sharp a peak by over 10 %
        even = _closed_form(ratio_axis(), model, value)[0].max()
        assert even < 0.9 * peak


def _largest_gap_px(x_px, y_px, fine_x_px, fine_y_px):
    """Largest distance (px) from points of the true curve to the drawn polyline's segment below them."""
    segment = np.clip(np.searchsorted(x_px, fine_x_px) - 1, 0, len(x_px) - 2)
    x0, y0, x1, y1 = x_px[segment], y_px[segment], x_px[segment + 1], y_px[segment + 1]
    dx, dy = x1 - x0, y1 - y0
    t = np.clip(((fine_x_px - x0) * dx + (fine_y_px - y0) * dy) / (dx * dx + dy * dy), 0.0, 1.0)
    return float(np.hypot(x0 + t * dx - fine_x_px, y0 + t * dy - fine_y_px).max())


@pytest.mark.parametrize("model", ["viscous", "hysteretic"])
@pytest.mark.parametrize("value", [0.005, 0.01, 0.05, 0.2, 1.0])
def test_drawn_curve_stays_within_half_a_pixel_of_the_true_curve(model, value):
    # Scales of the window's plots at their default size: 300 px per decade of r, 85 px per
    # decade of abs T, 1.6 px per degree of phase. The true curve comes from the closed form
    # at 40 000 ratios over the default view 0.1 to 10.
    (curve,) = drawn_curve_family(Damping(model, value))
    shown = (curve.ratio >= 0.09) & (curve.ratio <= 11.0)
    fine = np.geomspace(0.1, 10.0, 40_000)
    fine_magnitude, fine_phase = _closed_form(fine, model, value)
    x_px, fine_x_px = 300.0 * np.log10(curve.ratio[shown]), 300.0 * np.log10(fine)
    magnitude_gap = _largest_gap_px(x_px, 85.0 * np.log10(curve.magnitude[shown]), fine_x_px,
                                    85.0 * np.log10(fine_magnitude))
    phase_gap = _largest_gap_px(x_px, 1.6 * curve.phase_deg[shown], fine_x_px, 1.6 * fine_phase)
    assert magnitude_gap < 0.5 and phase_gap < 0.5, (magnitude_gap, phase_gap)


def test_resonance_grid_without_damping_keeps_off_r_equal_one():
    grid = resonance_ratio_axis(Damping("viscous", 0.0))
    assert not np.any(grid == 1.0) and np.all(np.isfinite(_closed_form(grid, "viscous", 0.0)[0]))
