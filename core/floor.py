"""Sensitive equipment on a vibrating floor: one-third-octave spectra and criteria.

The floor moves; the equipment sits on isolators of natural frequency ``fn``
and follows the floor through the motion transmissibility of
:mod:`core.transmissibility`. This module

* lists the one-third-octave bands of IEC 61260-1 (base-10 system),
* holds the generic vibration criteria (VC-A to VC-G) and the ISO 2631-2
  (1989) building lines as one-third-octave RMS velocity limits,
* reads a floor spectrum (per-band RMS velocity) from numbers or CSV text,
* predicts the equipment spectrum and the mount stroke for an isolator,
* checks the prediction against a criterion (margin in dB per band), and
* finds the highest isolator natural frequency that meets a criterion.

Metric: every spectrum and limit is the RMS velocity in each one-third-octave
band, in m/s internally (µm/s only at the edges: CSV text and the window).
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Literal, Sequence

import numpy as np
#: Trapezoid rule (numpy >= 2 renamed np.trapz; scipy.integrate costs ~0.4 s to import).
_trapezoid = getattr(np, "trapezoid", None) or np.trapz

from core.constants import STANDARD_GRAVITY
from core.errors import InputError, TargetUnreachable, finite_number
from core.transmissibility import Damping, motion_transmissibility, stroke_ratio

BandRule = Literal["centre", "band-average"]

# --------------------------------------------------------------------------- bands

#: Nominal labels of one decade of one-third-octave centres (IEC 61260-1, Annex E).
NOMINAL_MANTISSAS = (1.0, 1.25, 1.6, 2.0, 2.5, 3.15, 4.0, 5.0, 6.3, 8.0)
#: Band indices offered: n = -10 (0.1 Hz) to 43 (20 kHz); exact centre 10**(n/10) Hz.
MIN_BAND_INDEX, MAX_BAND_INDEX = -10, 43
#: Half-width of a one-third-octave band on a log10 scale (edges at fm * 10**(±1/20)).
_HALF_BAND_LOG10 = 1.0 / 20.0
#: How far (in tenths of a decade) a given frequency may lie from an exact centre.
_BAND_MATCH_TOLERANCE = 0.1
#: Points per band for the band-average rule.
_BAND_AVERAGE_POINTS = 129
#: Relative tolerance of the pass rule: predicted <= limit * (1 + this) passes.
PASS_RELATIVE_TOLERANCE = 1e-9
#: Largest floor velocity accepted, m/s (1 m/s is far beyond any building floor).
MAX_FLOOR_VELOCITY_M_S = 1.0
#: Natural frequencies accepted by the prediction, Hz.
NATURAL_FREQUENCY_RANGE_HZ = (0.01, 1e4)

_M_S_PER_UM_S = 1e-6


def exact_centre_hz(band_index):
    """Exact base-10 centre frequency 10**(n/10) Hz of band index ``n`` (IEC 61260-1)."""
    return 10.0 ** (np.asarray(band_index, dtype=float) / 10.0)


def nominal_centre_hz(band_index):
    """Nominal label (1, 1.25, 1.6, ..., 6.3, 8 per decade) of band index ``n``, Hz."""
    index = np.asarray(band_index, dtype=int)
    decade, step = np.divmod(index, 10)
    labels = np.asarray(NOMINAL_MANTISSAS)[step] * 10.0 ** decade.astype(float)
    return np.round(labels, 6)


def band_index(frequency_hz: float, field: str = "band_hz") -> int:
    """Index ``n`` of the one-third-octave band centred at ``frequency_hz``.

    Accepts the exact centre or the nominal label (within a tenth of a decade
    step, about 2 %).

    Raises
    ------
    InputError
        If the frequency is not a number, outside 0.1 Hz to 20 kHz, or not a
        band centre.
    """
    low, high = nominal_centre_hz(MIN_BAND_INDEX), nominal_centre_hz(MAX_BAND_INDEX)
    reason = (f"must be a one-third-octave band centre from {low:g} to {high:g} Hz "
              "(1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8 and their decades)")
    value = finite_number(field, frequency_hz, reason)
    if value <= 0.0:
        raise InputError(field, reason, frequency_hz)
    position = 10.0 * math.log10(value)
    index = round(position)
    if not MIN_BAND_INDEX <= index <= MAX_BAND_INDEX:
        raise InputError(field, reason, frequency_hz)
    if abs(position - index) > _BAND_MATCH_TOLERANCE:
        nearest = float(nominal_centre_hz(index))
        raise InputError(field, f"{reason}; nearest centre is {nearest:g} Hz", frequency_hz)
    return int(index)


@dataclass(frozen=True)
class ThirdOctaveBands:
    """A run of one-third-octave bands (IEC 61260-1, base-10, b = 3).

    Attributes
    ----------
    index : ndarray of int
        Band index n; exact centre 10**(n/10) Hz.
    centre_hz : ndarray
        Exact centre frequencies (Hz).
    nominal_hz : ndarray
        Nominal labels (Hz).
    lower_hz, upper_hz : ndarray
        Band edges fm * 10**(-1/20) and fm * 10**(1/20) (Hz).
    """

    index: np.ndarray
    centre_hz: np.ndarray
    nominal_hz: np.ndarray
    lower_hz: np.ndarray
    upper_hz: np.ndarray


def bands_from_indices(index) -> ThirdOctaveBands:
    """Bands for the given indices (kept in the given order)."""
    index = np.asarray(index, dtype=int)
    centre = exact_centre_hz(index)
    return ThirdOctaveBands(index, centre, nominal_centre_hz(index),
                            centre * 10.0 ** -_HALF_BAND_LOG10, centre * 10.0 ** _HALF_BAND_LOG10)


def third_octave_bands(low_hz: float = 1.0, high_hz: float = 80.0) -> ThirdOctaveBands:
    """One-third-octave bands from ``low_hz`` to ``high_hz`` inclusive.

    Parameters
    ----------
    low_hz, high_hz : float
        Band centres (exact or nominal), e.g. 1 and 80, or 1 and 200 Hz.
    """
    first = band_index(low_hz, "low_hz")
    last = band_index(high_hz, "high_hz")
    if last < first:
        raise InputError("high_hz", f"must be at or above low_hz = {low_hz:g} Hz", high_hz)
    return bands_from_indices(np.arange(first, last + 1))


# --------------------------------------------------------------------------- criteria

_VC_SOURCE = ("generic vibration criteria, one-third-octave RMS velocity, metric definition, "
              "constant 1-80 Hz (B. Davis 2008 note; ASHRAE TC 2.6 table; IEST-RP-CC012)")
_ISO_SOURCE = ("ISO 2631-2 (1989) building line as listed in the ASHRAE TC 2.6 table, "
               "one-third-octave RMS velocity; value and the constant-velocity range "
               "8-80 Hz from memory")


@dataclass(frozen=True)
class VibrationCriterion:
    """A constant one-third-octave RMS velocity limit over a band range.

    Attributes
    ----------
    name : str
        E.g. ``"VC-C"``.
    velocity_limit_m_s : float
        Limit on the RMS velocity in every one-third-octave band of the range (m/s).
    low_hz, high_hz : float
        Nominal centres of the first and last band the criterion defines (Hz).
        Bands outside are not assessed.
    source : str
        Where the value comes from.
    """

    name: str
    velocity_limit_m_s: float
    low_hz: float
    high_hz: float
    source: str

    def covers(self, band_hz):
        """True for each band centre (exact or nominal, Hz) inside the defined range."""
        index = np.round(10.0 * np.log10(np.asarray(band_hz, dtype=float)))
        return (index >= band_index(self.low_hz)) & (index <= band_index(self.high_hz))


def _vc(name: str, limit_um_s: float) -> VibrationCriterion:
    return VibrationCriterion(name, limit_um_s * _M_S_PER_UM_S, 1.0, 80.0, _VC_SOURCE)


def _iso(name: str, limit_um_s: float) -> VibrationCriterion:
    return VibrationCriterion(name, limit_um_s * _M_S_PER_UM_S, 8.0, 80.0, _ISO_SOURCE)


#: Every criterion offered. The VC curves use only their constant-velocity
#: definition over 1-80 Hz (B. Davis 2008 note; ASHRAE TC 2.6 table). From memory, the original curves
#: (Ungar & Gordon, 1983) gave some criteria a constant-acceleration part
#: below 8 Hz; that older form is not modelled, and bands outside 1-80 Hz are
#: not assessed;
#: the ISO lines only their constant-velocity part, 8-80 Hz (below 8 Hz the
#: ISO base curve allows more, so those bands are not assessed).
CRITERIA: tuple[VibrationCriterion, ...] = (
    _vc("VC-A", 50.0), _vc("VC-B", 25.0), _vc("VC-C", 12.5), _vc("VC-D", 6.25),
    _vc("VC-E", 3.12), _vc("VC-F", 1.56), _vc("VC-G", 0.78),
    _iso("ISO 2631-2 operating theatre", 100.0), _iso("ISO 2631-2 residential (day)", 200.0),
    _iso("ISO 2631-2 office", 400.0), _iso("ISO 2631-2 workshop", 800.0),
)


def criterion_by_name(name: str) -> VibrationCriterion:
    """The criterion called ``name`` (case-insensitive), e.g. ``"VC-C"``."""
    for criterion in CRITERIA:
        if criterion.name.lower() == str(name).strip().lower():
            return criterion
    names = ", ".join(c.name for c in CRITERIA)
    raise InputError("criterion", f"must be one of {names}", name)


def _criterion(criterion: VibrationCriterion | str) -> VibrationCriterion:
    return criterion if isinstance(criterion, VibrationCriterion) else criterion_by_name(criterion)


# --------------------------------------------------------------------------- floor spectrum


@dataclass(frozen=True)
class FloorSpectrum:
    """RMS floor velocity in one-third-octave bands, ascending.

    Attributes
    ----------
    band_hz : ndarray
        Exact band centres 10**(n/10) (Hz).
    nominal_hz : ndarray
        Nominal band labels (Hz).
    velocity_m_s : ndarray
        RMS velocity in each band (m/s), > 0.
    """

    band_hz: np.ndarray
    nominal_hz: np.ndarray
    velocity_m_s: np.ndarray

    @property
    def velocity_um_s(self) -> np.ndarray:
        """RMS velocity in each band (µm/s)."""
        return self.velocity_m_s / _M_S_PER_UM_S


def _velocity_reason(unit: str) -> str:
    if unit == "um/s":
        return f"must be a number > 0 and at most {MAX_FLOOR_VELOCITY_M_S / _M_S_PER_UM_S:g} µm/s"
    return f"must be a number > 0 and at most {MAX_FLOOR_VELOCITY_M_S:g} m/s"


def floor_spectrum(band_hz, velocity_m_s, field: str = "floor") -> FloorSpectrum:
    """Floor spectrum from band centres (exact or nominal, Hz) and RMS velocities (m/s).

    Each frequency is mapped onto its band centre; bands are sorted ascending.

    Raises
    ------
    InputError
        Unequal lengths, no band, a frequency that is not a band centre, a
        band given twice, or a velocity not in (0, 1] m/s.
    """
    bands = np.atleast_1d(np.asarray(band_hz, dtype=object))
    velocities = np.atleast_1d(np.asarray(velocity_m_s, dtype=object))
    if bands.ndim != 1 or velocities.ndim != 1 or bands.size != velocities.size:
        raise InputError(field, "needs one velocity per band (two equal-length lists)",
                         (bands.size, velocities.size))
    if bands.size == 0:
        raise InputError(field, "needs at least one band")
    indices = [band_index(f, f"{field}.band_hz[{i}]") for i, f in enumerate(bands)]
    values = [_checked_velocity(v, 1.0, f"{field}.velocity_m_s[{i}]", "m/s")
              for i, v in enumerate(velocities)]
    return _spectrum(indices, values, [f"{field}.band_hz[{i}]" for i in range(len(indices))])


def _checked_velocity(value, scale: float, field: str, unit: str) -> float:
    """``value * scale`` (m/s) if ``value`` is a number giving (0, MAX] m/s."""
    speed = finite_number(field, value, _velocity_reason(unit)) * scale
    if not 0.0 < speed <= MAX_FLOOR_VELOCITY_M_S * (1 + 1e-12):
        raise InputError(field, _velocity_reason(unit), value)
    return speed


def _spectrum(indices: list[int], values: list[float], fields: list[str]) -> FloorSpectrum:
    seen: dict[int, int] = {}
    for position, index in enumerate(indices):
        if index in seen:
            raise InputError(fields[position], f"band {nominal_centre_hz(index):g} Hz is given "
                             f"twice (also {fields[seen[index]]})")
        seen[index] = position
    order = np.argsort(indices)
    index = np.asarray(indices, dtype=int)[order]
    return FloorSpectrum(exact_centre_hz(index), nominal_centre_hz(index),
                         np.asarray(values, dtype=float)[order])


def flat_floor_spectrum(velocity_m_s: float, low_hz: float = 1.0,
                        high_hz: float = 80.0) -> FloorSpectrum:
    """The same RMS velocity (m/s) in every one-third-octave band from ``low_hz`` to ``high_hz``."""
    bands = third_octave_bands(low_hz, high_hz)
    level = _checked_velocity(velocity_m_s, 1.0, "floor.velocity_m_s", "m/s")
    return FloorSpectrum(bands.centre_hz, bands.nominal_hz, np.full(bands.index.size, level))


def parse_floor_rows(rows: Sequence[Sequence[str]], *, field: str = "floor table",
                     row_word: str = "row", row_numbers: Sequence[int] | None = None
                     ) -> FloorSpectrum:
    """Floor spectrum from rows of text cells ``(band Hz, velocity µm/s)``.

    Used by the window's band table and by :func:`parse_floor_csv`.

    Parameters
    ----------
    rows : sequence of sequence of str
        Each row: band centre in Hz (exact or nominal) and RMS velocity in µm/s.
        Empty trailing cells are ignored.
    field, row_word : str
        Used in messages: ``"floor table row 3, velocity (µm/s): ..."``.
    row_numbers : sequence of int, optional
        Number shown for each row (default 1, 2, ...).

    Raises
    ------
    InputError
        Naming the row and the cell, for a row without two cells, a band that
        is not a one-third-octave centre, a band given twice, or a velocity
        outside (0, 1e6] µm/s; or when there is no row at all.
    """
    numbers = list(row_numbers) if row_numbers is not None else list(range(1, len(rows) + 1))
    indices: list[int] = []
    values: list[float] = []
    fields: list[str] = []
    for number, row in zip(numbers, rows):
        cells = [str(cell).strip() for cell in row]
        while cells and not cells[-1]:
            cells.pop()
        where = f"{field} {row_word} {number}"
        if len(cells) != 2:
            raise InputError(where, "needs two values: band (Hz), velocity (µm/s)", ", ".join(cells))
        indices.append(band_index(cells[0], f"{where}, band (Hz)"))
        values.append(_checked_velocity(cells[1], _M_S_PER_UM_S, f"{where}, velocity (µm/s)",
                                        "um/s"))
        fields.append(f"{row_word} {number}")
    if not indices:
        raise InputError(field, "needs at least one row: band (Hz), velocity (µm/s)")
    try:
        return _spectrum(indices, values, fields)
    except InputError as error:
        raise InputError(f"{field} {error.field}", error.reason, error.value) from None


_CELL_SEPARATOR = re.compile(r"[,;\t]")


def _is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


def parse_floor_csv(text: str, field: str = "floor CSV") -> FloorSpectrum:
    """Floor spectrum from CSV text: band (Hz), RMS velocity (µm/s), one band a line.

    Cells are separated by a comma, semicolon or tab (or, if there is none on
    a line, by spaces); the decimal mark is a point. Blank lines and lines
    starting with ``#`` are skipped. The first remaining line is a header if
    its first cell is not a number.

    Raises
    ------
    InputError
        Naming the line (counted from 1 in the text) and the cell.
    """
    rows: list[list[str]] = []
    numbers: list[int] = []
    header_possible = True
    for number, line in enumerate(str(text).splitlines(), start=1):
        stripped = line.strip()
        if not stripped or stripped.startswith("#"):
            continue
        cells = _CELL_SEPARATOR.split(stripped) if _CELL_SEPARATOR.search(stripped) else stripped.split()
        if header_possible and not _is_number(cells[0].strip()):
            header_possible = False
            continue
        header_possible = False
        rows.append(cells)
        numbers.append(number)
    return parse_floor_rows(rows, field=field, row_word="line", row_numbers=numbers)


# --------------------------------------------------------------------------- prediction


@dataclass(frozen=True)
class EquipmentPrediction:
    """Equipment velocity and mount stroke per band for one isolator.

    Attributes
    ----------
    band_hz, nominal_hz : ndarray
        Band centres, exact and nominal (Hz).
    floor_velocity_m_s : ndarray
        Floor RMS velocity per band (m/s).
    transmissibility : ndarray
        Motion transmissibility magnitude used for each band (dimensionless).
    equipment_velocity_m_s : ndarray
        Predicted equipment RMS velocity per band (m/s).
    stroke_rms_m : ndarray
        RMS relative deflection of the mount per band (m).
    stroke_total_rms_m : float
        RMS stroke over all bands, sqrt of the sum of squares (bands taken as
        uncorrelated) (m).
    natural_frequency_hz : float
    damping : Damping
    band_rule : {"centre", "band-average"}
    """

    band_hz: np.ndarray
    nominal_hz: np.ndarray
    floor_velocity_m_s: np.ndarray
    transmissibility: np.ndarray
    equipment_velocity_m_s: np.ndarray
    stroke_rms_m: np.ndarray
    stroke_total_rms_m: float
    natural_frequency_hz: float
    damping: Damping
    band_rule: str


def isolator_damping(damping_ratio: float | None = None,
                     loss_factor: float | None = None) -> Damping:
    """Damping from exactly one of ``damping_ratio`` (viscous) or ``loss_factor`` (hysteretic).

    Zero damping is refused here: a floor band at the natural frequency would
    see an infinite response.
    """
    if (damping_ratio is None) == (loss_factor is None):
        raise InputError("damping", "give exactly one of damping_ratio or loss_factor",
                         (damping_ratio, loss_factor))
    damping = (Damping("viscous", damping_ratio) if damping_ratio is not None
               else Damping("hysteretic", loss_factor))
    if damping.value <= 0.0:
        name = "damping.damping_ratio" if damping.model == "viscous" else "damping.loss_factor"
        raise InputError(name, "must be > 0 (an undamped mount responds without bound at "
                         "resonance) and at most 2", damping.value)
    return damping


def _natural_frequency(value: float, field: str = "natural_frequency_hz") -> float:
    low, high = NATURAL_FREQUENCY_RANGE_HZ
    return finite_number(field, value, f"must be a number from {low:g} to {high:g} Hz", low, high)


def _band_factors(band_hz, natural_frequency_hz: float, damping: Damping,
                  band_rule: str) -> tuple[np.ndarray, np.ndarray]:
    """Per-band |T| and |Z/Y| / omega (s) under the chosen band rule."""
    centre = np.asarray(band_hz, dtype=float)
    if band_rule == "centre":
        frequency = centre
    elif band_rule == "band-average":
        spread = np.linspace(-_HALF_BAND_LOG10, _HALF_BAND_LOG10, 2)
        lower, upper = (centre[:, None] * 10.0 ** spread).T
        frequency = np.linspace(lower, upper, _BAND_AVERAGE_POINTS, axis=-1)
    else:
        raise InputError("band_rule", "must be 'centre' or 'band-average'", band_rule)
    ratio = frequency / natural_frequency_hz
    transmissibility = np.abs(motion_transmissibility(ratio, damping))
    stroke_per_velocity = np.abs(stroke_ratio(ratio, damping)) / (2.0 * np.pi * frequency)
    if band_rule == "centre":
        return transmissibility, stroke_per_velocity
    width = frequency[:, -1] - frequency[:, 0]

    def band_rms(values):
        return np.sqrt(_trapezoid(values * values, frequency, axis=-1) / width)

    return band_rms(transmissibility), band_rms(stroke_per_velocity)


def predict_equipment_spectrum(floor: FloorSpectrum, natural_frequency_hz: float, *,
                               damping_ratio: float | None = None,
                               loss_factor: float | None = None,
                               band_rule: BandRule = "centre") -> EquipmentPrediction:
    """Equipment velocity and mount stroke per band on an isolator of natural frequency fn.

    Band rule ``"centre"`` (default): each band's floor velocity is multiplied
    by |T| evaluated at the band's exact centre frequency fc, r = fc / fn.
    Band rule ``"band-average"``: by the RMS of |T| over the band edges,
    sqrt(mean of |T(f)|**2 for f from fc 10**(-1/20) to fc 10**(1/20)), i.e.
    assuming the floor velocity spectral density is flat across each band.

    Stroke (relative deflection) per band: floor displacement v / omega times
    |Z/Y| = r**2 / |1 - r**2 + j 2 zeta r| (or ``+ j eta``), RMS; the
    band-average rule averages (|Z/Y| / omega)**2 the same way.

    Parameters
    ----------
    floor : FloorSpectrum
    natural_frequency_hz : float
        Isolator natural frequency fn (Hz), 0.01 to 1e4.
    damping_ratio, loss_factor : float
        Exactly one: viscous damping ratio or hysteretic loss factor, > 0 and <= 2.
    band_rule : {"centre", "band-average"}
    """
    fn = _natural_frequency(natural_frequency_hz)
    damping = isolator_damping(damping_ratio, loss_factor)
    transmissibility, stroke_per_velocity = _band_factors(floor.band_hz, fn, damping, band_rule)
    stroke = floor.velocity_m_s * stroke_per_velocity
    return EquipmentPrediction(
        floor.band_hz, floor.nominal_hz, floor.velocity_m_s, transmissibility,
        floor.velocity_m_s * transmissibility, stroke, float(np.sqrt(np.sum(stroke * stroke))),
        fn, damping, band_rule)


# --------------------------------------------------------------------------- criterion check


@dataclass(frozen=True)
class CriterionCheck:
    """Predicted equipment spectrum against a criterion, band by band.

    Arrays cover the assessed bands: the floor bands inside the criterion's range.

    Attributes
    ----------
    criterion : str
        Criterion name.
    criterion_source : str
    band_hz, nominal_hz : ndarray
        Assessed band centres, exact and nominal (Hz).
    floor_velocity_m_s, predicted_velocity_m_s, limit_m_s : ndarray
        Floor, predicted equipment and limit RMS velocity per band (m/s).
    margin_db : ndarray
        20 log10(limit / predicted) per band (dB); positive = below the limit.
    worst_band_hz, worst_band_nominal_hz : float
        Band of the smallest margin, exact and nominal (Hz).
    worst_margin_db : float
    worst_predicted_velocity_m_s : float
        Predicted RMS velocity in the worst band (m/s).
    passed : bool
        True when every assessed band is at or below its limit. A value equal
        to the limit passes (relative tolerance 1e-9 for rounding).
    unassessed_band_hz : tuple of float
        Nominal centres of floor bands outside the criterion's range (Hz).
    prediction : EquipmentPrediction
        The full prediction over every floor band (stroke included).
    """

    criterion: str
    criterion_source: str
    band_hz: np.ndarray
    nominal_hz: np.ndarray
    floor_velocity_m_s: np.ndarray
    predicted_velocity_m_s: np.ndarray
    limit_m_s: np.ndarray
    margin_db: np.ndarray
    worst_band_hz: float
    worst_band_nominal_hz: float
    worst_margin_db: float
    worst_predicted_velocity_m_s: float
    passed: bool
    unassessed_band_hz: tuple[float, ...]
    prediction: EquipmentPrediction


def assess_prediction(prediction: EquipmentPrediction,
                      criterion: VibrationCriterion | str) -> CriterionCheck:
    """Check an :class:`EquipmentPrediction` against a criterion (see :func:`check_criterion`)."""
    criterion = _criterion(criterion)
    inside = criterion.covers(prediction.band_hz)
    if not np.any(inside):
        raise InputError("floor", f"has no band inside the range of {criterion.name}, "
                         f"{criterion.low_hz:g} to {criterion.high_hz:g} Hz")
    predicted = prediction.equipment_velocity_m_s[inside]
    limit = np.full(predicted.shape, criterion.velocity_limit_m_s)
    margin = 20.0 * np.log10(limit / predicted)
    worst = int(np.argmin(margin))
    passed = bool(np.all(predicted <= limit * (1.0 + PASS_RELATIVE_TOLERANCE)))
    return CriterionCheck(
        criterion.name, criterion.source, prediction.band_hz[inside], prediction.nominal_hz[inside],
        prediction.floor_velocity_m_s[inside], predicted, limit, margin,
        float(prediction.band_hz[inside][worst]), float(prediction.nominal_hz[inside][worst]),
        float(margin[worst]), float(predicted[worst]), passed,
        tuple(float(f) for f in prediction.nominal_hz[~inside]), prediction)


def check_criterion(floor: FloorSpectrum, criterion: VibrationCriterion | str,
                    natural_frequency_hz: float, *, damping_ratio: float | None = None,
                    loss_factor: float | None = None,
                    band_rule: BandRule = "centre") -> CriterionCheck:
    """Predict the equipment spectrum (:func:`predict_equipment_spectrum`) and check it.

    Margin per band is 20 log10(limit / predicted) dB, positive below the
    limit. The check passes when no assessed band exceeds its limit; a value
    equal to the limit passes. Floor bands outside the criterion's range are
    listed in ``unassessed_band_hz``, not checked.
    """
    prediction = predict_equipment_spectrum(floor, natural_frequency_hz,
                                            damping_ratio=damping_ratio, loss_factor=loss_factor,
                                            band_rule=band_rule)
    return assess_prediction(prediction, criterion)


# --------------------------------------------------------------------------- inverse design


@dataclass(frozen=True)
class NaturalFrequencyLimit:
    """Highest isolator natural frequency meeting a criterion in every band.

    Attributes
    ----------
    criterion : str
    natural_frequency_hz : float
        Highest natural frequency found that meets the criterion (Hz).
    static_deflection_m : float
        Static deflection for it, g / (2 pi fn)**2 (m; common practice relation,
        exact for a linear spring under its own load).
    bound : {"criterion", "search range"}
        ``"criterion"``: a slightly higher fn fails. ``"search range"``: the
        criterion is still met at the top of the search range.
    every_frequency_passes : bool
        True when every scanned natural frequency in the range met the criterion.
    search_range_hz : (float, float)
    check : CriterionCheck
        The check at ``natural_frequency_hz``.
    """

    criterion: str
    natural_frequency_hz: float
    static_deflection_m: float
    bound: str
    every_frequency_passes: bool
    search_range_hz: tuple[float, float]
    check: CriterionCheck

    @property
    def static_deflection_mm(self) -> float:
        """Static deflection in mm."""
        return self.static_deflection_m * 1e3


def static_deflection_m(natural_frequency_hz):
    """Static deflection g / (2 pi fn)**2 (m) of a linear mount with natural frequency fn (Hz)."""
    omega = 2.0 * np.pi * np.asarray(natural_frequency_hz, dtype=float)
    return STANDARD_GRAVITY / (omega * omega)


def _last_passing(slack, passing_hz: float, failing_hz: float, relative_tolerance: float = 1e-13) -> float:
    """Bisection for the sign change of ``slack`` between a passing (> 0) and a failing (<= 0) fn.

    Returns the passing end of the final bracket, narrower than ``relative_tolerance`` of it,
    so the frequency returned always meets the criterion. (A bisection rather than
    scipy.optimize.brentq: the window's first floor study would import scipy.optimize,
    about 0.3 s, measured; about 40 evaluations of the vectorised slack here.)
    """
    while failing_hz - passing_hz > relative_tolerance * passing_hz:
        middle = 0.5 * (passing_hz + failing_hz)
        if middle in (passing_hz, failing_hz):
            break
        if slack(middle) > 0.0:
            passing_hz = middle
        else:
            failing_hz = middle
    return passing_hz


def max_natural_frequency_for_criterion(
        floor: FloorSpectrum, criterion: VibrationCriterion | str, *,
        damping_ratio: float | None = None, loss_factor: float | None = None,
        band_rule: BandRule = "centre", min_hz: float = 0.5, max_hz: float = 500.0,
        points_per_decade: int = 200) -> NaturalFrequencyLimit:
    """Highest isolator natural frequency (Hz) whose prediction meets the criterion.

    The worst-band margin is scanned over ``points_per_decade`` log-spaced
    natural frequencies from ``min_hz`` to ``max_hz``; the highest passing scan
    point is refined with Brent's method against its failing neighbour above.
    The passing set need not be one interval (a resonance can fail in a middle
    band while a stiffer mount passes again); the highest passing frequency is
    returned, and a passing window narrower than the scan step can be missed.

    Raises
    ------
    TargetUnreachable
        When no natural frequency in the range meets the criterion.
    InputError
        For a bad range, damping or band rule.
    """
    criterion = _criterion(criterion)
    damping = isolator_damping(damping_ratio, loss_factor)
    low = _natural_frequency(min_hz, "min_hz")
    high = _natural_frequency(max_hz, "max_hz")
    if not high > low:
        raise InputError("max_hz", f"must be above min_hz = {low:g} Hz", max_hz)
    if isinstance(points_per_decade, bool) or not isinstance(points_per_decade, int) \
            or not 10 <= points_per_decade <= 10000:
        raise InputError("points_per_decade", "must be a whole number from 10 to 10000",
                         points_per_decade)
    inside = criterion.covers(floor.band_hz)
    if not np.any(inside):
        raise InputError("floor", f"has no band inside the range of {criterion.name}, "
                         f"{criterion.low_hz:g} to {criterion.high_hz:g} Hz")
    band = floor.band_hz[inside]
    allowed = criterion.velocity_limit_m_s / floor.velocity_m_s[inside]
    tolerance = math.log1p(PASS_RELATIVE_TOLERANCE)

    def slack(fn: float) -> float:
        """Worst-band log(limit / predicted); the check passes when it is >= -tolerance."""
        transmissibility, _ = _band_factors(band, fn, damping, band_rule)
        return float(np.min(np.log(allowed / transmissibility)))

    count = max(2, int(math.ceil(points_per_decade * math.log10(high / low))) + 1)
    grid = np.geomspace(low, high, count)
    values = np.array([slack(fn) for fn in grid])
    passing = np.flatnonzero(values >= -tolerance)
    if passing.size == 0:
        best = int(np.argmax(values))
        best_check = assess_prediction(predict_equipment_spectrum(
            floor, grid[best], damping_ratio=damping_ratio, loss_factor=loss_factor,
            band_rule=band_rule), criterion)
        raise TargetUnreachable(
            "criterion", f"{criterion.name} is not met in every band by any natural frequency "
            f"from {low:g} to {high:g} Hz with {damping.label}; the best is fn = "
            f"{grid[best]:.3g} Hz, {-best_check.worst_margin_db:.1f} dB over the limit at "
            f"{best_check.worst_band_nominal_hz:g} Hz")
    top = int(passing[-1])
    if top == grid.size - 1:
        fn, bound = float(grid[top]), "search range"
    elif values[top] <= 0.0:
        fn, bound = float(grid[top]), "criterion"
    else:
        fn, bound = _last_passing(slack, float(grid[top]), float(grid[top + 1])), "criterion"
    check = assess_prediction(predict_equipment_spectrum(
        floor, fn, damping_ratio=damping_ratio, loss_factor=loss_factor, band_rule=band_rule),
        criterion)
    return NaturalFrequencyLimit(criterion.name, fn, float(static_deflection_m(fn)), bound,
                                 bool(passing.size == grid.size), (low, high), check)
