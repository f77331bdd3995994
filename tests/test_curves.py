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
    DAMPING_GRID, RATIO_GRID, LogGrid, curve_family, curves_csv, frequency_axis, magnitude_on_scale,
    operating_points, ratio_axis, ratio_from_axis, readout)
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
