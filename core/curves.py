"""Frequency grids, slider value grids and the curve families the plots draw.

Qt-free: the window and the exports draw what these functions return, and
the CSV export of plotted curves is built here.
"""
from __future__ import annotations

import csv
import functools
import io
import math
from dataclasses import dataclass

import numpy as np

from core.transmissibility import (
    Damping, frequency_response, transmissibility_db, transmissibility_peak)


@dataclass(frozen=True)
class LogGrid:
    """Integer positions 0..steps mapped onto logarithmically spaced values.

    Position 0 is exactly ``low`` and position ``steps`` exactly ``high``.

    Examples
    --------
    >>> grid = LogGrid(0.1, 10.0, 200)
    >>> grid.value(0), grid.value(200), round(grid.value(100), 12)
    (0.1, 10.0, 1.0)
    >>> grid.index(1.0)
    100
    """

    low: float
    high: float
    steps: int

    def __post_init__(self):
        if not (0.0 < self.low < self.high and self.steps >= 1):
            raise ValueError("LogGrid needs 0 < low < high and steps >= 1")

    def value(self, index: int) -> float:
        """Value at integer position ``index`` (clamped to the grid)."""
        index = min(max(int(index), 0), self.steps)
        if index == 0:
            return float(self.low)
        if index == self.steps:
            return float(self.high)
        span = math.log(self.high / self.low)
        return float(self.low * math.exp(span * index / self.steps))

    def index(self, value: float) -> int:
        """Nearest integer position of ``value`` (clamped to the ends; non-positive goes to 0)."""
        if math.isnan(value) or value <= self.low:
            return 0
        if value >= self.high:
            return self.steps
        fraction = math.log(value / self.low) / math.log(self.high / self.low)
        return int(round(fraction * self.steps))


#: Damping-ratio / loss-factor slider grid.
DAMPING_GRID = LogGrid(0.005, 1.0, 460)
#: Frequency-ratio slider grid (r = omega / omega_n).
RATIO_GRID = LogGrid(0.1, 10.0, 400)

#: Plotted frequency ratio range; the default view is 0.1 to 10.
PLOT_RATIO_RANGE = (0.05, 100.0)
#: Points of the shared grid (CSV export, comparisons).
PLOT_POINTS = 700
#: Points of the even part of a drawn curve's grid over PLOT_RATIO_RANGE (about 4 px apart
#: over the default two visible decades of a 600 px plot).
DRAWN_POINTS = 200
#: Extra points of a drawn curve across its resonance.
RESONANCE_POINTS = 80
#: Half-width of the dense resonance band in units of the equivalent damping ratio
#: (zeta, or eta / 2): the half-power band is about +-1 of them.
RESONANCE_HALF_WIDTH = 12.0


def ratio_axis(low: float = PLOT_RATIO_RANGE[0], high: float = PLOT_RATIO_RANGE[1],
               points: int = PLOT_POINTS) -> np.ndarray:
    """Strictly positive, log-spaced frequency ratios for plotting.

    An even number of points keeps r = 1 off the grid, so undamped curves stay finite.
    """
    points = points + (points % 2)
    return np.geomspace(low, high, points)


def resonance_ratio_axis(damping: Damping, low: float = PLOT_RATIO_RANGE[0],
                         high: float = PLOT_RATIO_RANGE[1], points: int = DRAWN_POINTS,
                         resonance_points: int = RESONANCE_POINTS) -> np.ndarray:
    """Sorted frequency ratios for drawing one damping's curve: even on a log scale, dense
    across its resonance, with the exact peak of abs T on the grid.

    The dense band spans ``r_peak / (1 + w)`` to ``r_peak * (1 + w)`` with
    ``w = RESONANCE_HALF_WIDTH * zeta_equivalent``, so even zeta = 0.005 (peak half-power
    width about 0.01 in r) gets tens of points across its peak, where an even 700-point grid
    has one. Without damping the band is left out and the grid keeps off r = 1.
    """
    grid = _even_grid(low, high, points)
    if damping.value <= 0.0:
        return grid.copy()
    equivalent = damping.value if damping.model == "viscous" else damping.value / 2.0
    peak = transmissibility_peak(damping).ratio
    # An odd count of points symmetric on a log scale: the middle one is the peak itself.
    band = peak * (1.0 + RESONANCE_HALF_WIDTH * equivalent) ** _unit_band(resonance_points | 1)
    band[len(band) // 2] = peak
    band = band[(band >= low) & (band <= high)]
    # Three sorted pieces, no sort: the even points below the band, the band, those above it.
    below = grid[:np.searchsorted(grid, band[0], side="left")] if band.size else grid
    above = grid[np.searchsorted(grid, band[-1], side="right"):] if band.size else grid[:0]
    return np.concatenate((below, band, above))


@functools.lru_cache(maxsize=8)
def _even_grid(low: float, high: float, points: int) -> np.ndarray:
    grid = ratio_axis(low, high, points)
    grid.flags.writeable = False
    return grid


@functools.lru_cache(maxsize=8)
def _unit_band(points: int) -> np.ndarray:
    """Exponents from -1 to 1 (``points`` of them, odd): the band's log-spaced offsets."""
    unit = np.linspace(-1.0, 1.0, points)
    unit.flags.writeable = False
    return unit


@dataclass(frozen=True)
class Curve:
    """One transmissibility curve.

    Attributes
    ----------
    label : str
        E.g. ``"ζ = 0.05"``.
    damping : Damping
    ratio : ndarray
        omega / omega_n.
    magnitude : ndarray
        abs T.
    phase_deg : ndarray
        Phase of T in degrees (lag negative).
    current : bool
        True for the design's own damping.
    """

    label: str
    damping: Damping
    ratio: np.ndarray
    magnitude: np.ndarray
    phase_deg: np.ndarray
    current: bool = False


def _members(damping: Damping, reference_values) -> list[tuple[Damping, bool]]:
    """The current damping first (True), then each reference value in the same model (False)."""
    return [(Damping(damping.model, damping.value), True)] + [
        (Damping(damping.model, float(v)), False) for v in reference_values]


def _curve(damping: Damping, ratio: np.ndarray, current: bool) -> Curve:
    response = frequency_response(ratio, damping)
    return Curve(damping.label, damping, ratio, response.magnitude, response.phase_deg, current)


def curve_family(damping: Damping, reference_values=(), ratio=None) -> tuple[Curve, ...]:
    """The current curve first, then one reference curve per value, all on one ``ratio`` grid."""
    ratio = ratio_axis() if ratio is None else np.asarray(ratio, dtype=float)
    return tuple(_curve(this, ratio, current) for this, current in _members(damping, reference_values))


def drawn_curve_family(damping: Damping, reference_values=()) -> tuple[Curve, ...]:
    """As :func:`curve_family`, each curve on its own :func:`resonance_ratio_axis` (for drawing)."""
    return tuple(_curve(this, resonance_ratio_axis(this), current)
                 for this, current in _members(damping, reference_values))


def magnitude_on_scale(magnitude, scale: str):
    """abs T as drawn: the ratio itself (``"ratio"``) or 20 log10 abs T (``"db"``)."""
    if scale == "db":
        return transmissibility_db(magnitude)
    return np.asarray(magnitude, dtype=float)


def frequency_axis(ratio, x_axis: str, natural_frequency_hz: float | None):
    """x values: the ratio itself, or absolute frequency in Hz or r/min given the natural frequency."""
    ratio = np.asarray(ratio, dtype=float)
    if x_axis == "ratio" or natural_frequency_hz is None:
        return ratio
    if x_axis == "hz":
        return ratio * natural_frequency_hz
    return ratio * natural_frequency_hz * 60.0


def ratio_from_axis(x, x_axis: str, natural_frequency_hz: float | None) -> float:
    """Inverse of :func:`frequency_axis` for one value."""
    if x_axis == "ratio" or natural_frequency_hz is None:
        return float(x)
    if x_axis == "hz":
        return float(x) / natural_frequency_hz
    return float(x) / (natural_frequency_hz * 60.0)


X_AXIS_LABELS = {"ratio": ("Frequency ratio ω/ωn", ""), "hz": ("Frequency", "Hz"),
                 "rpm": ("Speed", "r/min")}


@dataclass(frozen=True)
class Readout:
    """Response at one frequency ratio (for the crosshair)."""

    ratio: float
    magnitude: float
    magnitude_db: float
    phase_deg: float


def readout(ratio: float, damping: Damping) -> Readout | None:
    """abs T, its dB level and phase at ``ratio``; None for a non-positive or non-finite ratio."""
    if not math.isfinite(ratio) or ratio <= 0.0:
        return None
    response = frequency_response(np.array([ratio]), damping)
    magnitude = float(response.magnitude[0])
    return Readout(float(ratio), magnitude, float(transmissibility_db(magnitude)), float(response.phase_deg[0]))


@dataclass(frozen=True)
class OperatingPoints:
    """Design point(s) on the curves: the lowest speed, and the highest when a range is given."""

    ratio: np.ndarray
    magnitude: np.ndarray
    phase_deg: np.ndarray
    band: tuple[float, float] | None


def operating_points(ratio_low: float, ratio_high: float, damping: Damping) -> OperatingPoints:
    """Markers at the operating ratio(s) and the band between them (None for one speed)."""
    ratios = np.array([ratio_low] if ratio_high <= ratio_low else [ratio_low, ratio_high], dtype=float)
    response = frequency_response(ratios, damping)
    band = None if len(ratios) == 1 else (float(ratio_low), float(ratio_high))
    return OperatingPoints(ratios, response.magnitude, response.phase_deg, band)


def curves_csv(curves, header_lines=()) -> str:
    """CSV text of curves sharing one ratio grid: r, then abs T and phase per curve.

    ``header_lines`` are written first as ``# ...`` comment lines.
    """
    buffer = io.StringIO()
    for line in header_lines:
        buffer.write(f"# {line}\n")
    writer = csv.writer(buffer, lineterminator="\n")
    columns = ["frequency_ratio"]
    for curve in curves:
        tag = curve.label + (" (design)" if curve.current else "")
        columns += [f"transmissibility {tag}", f"phase_deg {tag}"]
    writer.writerow(columns)
    if curves:
        ratio = curves[0].ratio
        for curve in curves[1:]:
            if curve.ratio.shape != ratio.shape or not np.array_equal(curve.ratio, ratio):
                raise ValueError("curves must share one frequency-ratio grid")
        for i, r in enumerate(ratio):
            row = [f"{r:.12g}"]
            for curve in curves:
                row += [f"{curve.magnitude[i]:.10g}", f"{curve.phase_deg[i]:.8g}"]
            writer.writerow(row)
    return buffer.getvalue()
