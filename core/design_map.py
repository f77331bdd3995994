"""Design map: every (natural frequency, damping ratio) pair at one operating speed.

Over a log-spaced grid of natural frequency fn on the mounts (Hz) and viscous
damping ratio zeta, the map holds the transmissibility at the operating speed and
the fields the limits act on:

* isolation (1 - |T|) 100 % (negative where the mounts amplify);
* static deflection, g / omega_n**2 times the dynamic-to-static stiffness ratio,
  in mm: the natural frequency follows the dynamic stiffness, the sag under the
  machine's weight follows the static stiffness (an elastomer is stiffer
  dynamically, ratio >= 1; steel springs 1);
* passage amplification, the estimate of :func:`core.passage.passage_amplification_estimate`
  for a run-up of the given duration;
* a feasibility mask for the user limits.

Arrays are indexed ``[i_frequency, i_damping]``: axis 0 follows
``natural_frequency_hz``, axis 1 follows ``damping_ratio``.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from core.design import check_range
from core.errors import InputError
from core.floor import static_deflection_m
from core.passage import passage_amplification_estimate
from core.transmissibility import MAX_DAMPING, isolation_percent, transmissibility_db, viscous_transmissibility

#: Natural-frequency range the map accepts, Hz.
FREQUENCY_LIMITS_HZ = (0.1, 1000.0)
#: Damping-ratio range the map accepts (log axis: strictly positive).
DAMPING_LIMITS = (1e-4, MAX_DAMPING)
#: Grid points per axis the map accepts.
POINT_LIMITS = (2, 2000)


@dataclass(frozen=True)
class MapLimits:
    """User limits on the map; ``None`` leaves a limit out.

    Attributes
    ----------
    min_isolation_percent : float or None
        Least isolation at operating speed, % (0.1 to 99.99).
    max_static_deflection_mm : float or None
        Largest static deflection under the machine's weight, mm.
    max_passage_amplification : float or None
        Largest estimated peak displacement at start and stop over the steady amplitude (>= 1).
    """

    min_isolation_percent: float | None = None
    max_static_deflection_mm: float | None = None
    max_passage_amplification: float | None = None

    def validate(self) -> None:
        """Raise InputError naming the first limit out of range."""
        if self.min_isolation_percent is not None:
            check_range("tuning.isolation_percent", self.min_isolation_percent, "%")
        if self.max_static_deflection_mm is not None:
            check_range("limits.max_static_deflection_mm", self.max_static_deflection_mm, "mm")
        if self.max_passage_amplification is not None:
            check_range("limits.max_passage_amplification", self.max_passage_amplification)


@dataclass(frozen=True)
class DesignMap:
    """Transmissibility and limit fields over natural frequency x damping ratio.

    Attributes
    ----------
    speed_rpm : float
        Operating speed, r/min.
    ramp_s : float
        Run-up duration used for the passage estimate, s.
    dynamic_to_static_ratio : float
        Dynamic over static mount stiffness.
    limits : MapLimits
    natural_frequency_hz : ndarray, shape (n_f,)
        Log-spaced natural frequencies, Hz.
    damping_ratio : ndarray, shape (n_z,)
        Log-spaced damping ratios.
    frequency_ratio : ndarray, shape (n_f,)
        r = operating frequency / fn.
    transmissibility : ndarray, shape (n_f, n_z)
        |T| at operating speed.
    transmissibility_db : ndarray, shape (n_f, n_z)
        20 log10 |T|, dB (negative = reduction).
    isolation_percent : ndarray, shape (n_f, n_z)
        (1 - |T|) 100, %.
    static_deflection_mm : ndarray, shape (n_f, n_z)
        Static deflection, mm (depends on fn only; repeated along axis 1).
    passage_amplification : ndarray, shape (n_f, n_z)
        Estimated run-up peak over steady displacement at speed (>= 1).
    meets_isolation, meets_static_deflection, meets_passage : ndarray of bool, shape (n_f, n_z)
        Each limit met (all True where the limit is ``None``).
    feasible : ndarray of bool, shape (n_f, n_z)
        Every limit met.
    """

    speed_rpm: float
    ramp_s: float
    dynamic_to_static_ratio: float
    limits: MapLimits
    natural_frequency_hz: np.ndarray
    damping_ratio: np.ndarray
    frequency_ratio: np.ndarray
    transmissibility: np.ndarray
    transmissibility_db: np.ndarray
    isolation_percent: np.ndarray
    static_deflection_mm: np.ndarray
    passage_amplification: np.ndarray
    meets_isolation: np.ndarray
    meets_static_deflection: np.ndarray
    meets_passage: np.ndarray
    feasible: np.ndarray


def static_deflection_mm(natural_frequency_hz, dynamic_to_static_ratio=1.0):
    """Static deflection (mm) of mounts giving natural frequency fn (Hz) on their dynamic stiffness.

    delta = g / (2 pi fn)**2 * K_dynamic / K_static. Broadcasts.
    """
    return static_deflection_m(natural_frequency_hz) * np.asarray(dynamic_to_static_ratio, dtype=float) * 1e3


def _check_span(name: str, span, allowed: tuple[float, float], unit: str) -> tuple[float, float]:
    """Validate a (low, high) pair inside ``allowed``."""
    low_allowed, high_allowed = allowed
    reason = f"must be two numbers low < high from {low_allowed:g} to {high_allowed:g}{' ' + unit if unit else ''}"
    try:
        low, high = (float(v) for v in span)
    except (TypeError, ValueError):
        raise InputError(name, reason, span) from None
    if not (np.isfinite(low) and np.isfinite(high) and low_allowed <= low < high <= high_allowed):
        raise InputError(name, reason, span)
    return low, high


def _limit_mask(values: np.ndarray, limit: float | None, upper: bool) -> np.ndarray:
    """True where ``values`` meet a limit (<= limit when ``upper``, >= limit otherwise)."""
    if limit is None:
        return np.ones(values.shape, dtype=bool)
    return values <= limit if upper else values >= limit


def design_map(speed_rpm: float,
               natural_frequency_range_hz: tuple[float, float] = (1.0, 30.0),
               damping_ratio_range: tuple[float, float] = (0.005, 0.5),
               frequency_points: int = 300,
               damping_points: int = 300,
               dynamic_to_static_ratio: float = 1.0,
               ramp_s: float = 10.0,
               limits: MapLimits = MapLimits()) -> DesignMap:
    """Map transmissibility and limit fields over natural frequency x damping ratio.

    Parameters
    ----------
    speed_rpm : float
        Operating speed, r/min.
    natural_frequency_range_hz : (float, float)
        Lowest and highest natural frequency on the mounts, Hz (0.1 to 1000).
    damping_ratio_range : (float, float)
        Lowest and highest viscous damping ratio (1e-4 to 2).
    frequency_points, damping_points : int
        Grid points per axis (2 to 2000), log-spaced.
    dynamic_to_static_ratio : float
        Dynamic over static stiffness of the mounts (1 to 10; 1 for steel springs).
    ramp_s : float
        Run-up (or coast-down) time for the passage estimate, s (> 0).
    limits : MapLimits

    Returns
    -------
    DesignMap
    """
    speed = check_range("machine.speed_rpm", speed_rpm, "r/min")
    f_low, f_high = _check_span("natural_frequency_range_hz", natural_frequency_range_hz,
                                FREQUENCY_LIMITS_HZ, "Hz")
    z_low, z_high = _check_span("damping_ratio_range", damping_ratio_range, DAMPING_LIMITS, "")
    counts = []
    for name, count in (("frequency_points", frequency_points), ("damping_points", damping_points)):
        if isinstance(count, bool) or not isinstance(count, (int, np.integer)) \
                or not POINT_LIMITS[0] <= count <= POINT_LIMITS[1]:
            raise InputError(name, f"must be a whole number from {POINT_LIMITS[0]} to {POINT_LIMITS[1]}", count)
        counts.append(int(count))
    ratio = check_range("damping.dynamic_stiffness_ratio", dynamic_to_static_ratio)
    if isinstance(ramp_s, bool) or not isinstance(ramp_s, (int, float)) or not np.isfinite(ramp_s) \
            or not ramp_s > 0.0:
        raise InputError("ramp_s", "must be a finite number > 0 s", ramp_s)
    if not isinstance(limits, MapLimits):
        raise InputError("limits", "must be a MapLimits", limits)
    limits.validate()

    fn = np.geomspace(f_low, f_high, counts[0])
    zeta = np.geomspace(z_low, z_high, counts[1])
    fn_grid = fn[:, None]
    zeta_grid = zeta[None, :]
    r = speed / 60.0 / fn
    magnitude = np.abs(viscous_transmissibility(r[:, None], zeta_grid))
    isolation = isolation_percent(magnitude)
    deflection = np.broadcast_to(static_deflection_mm(fn_grid, ratio), magnitude.shape).copy()
    passage = passage_amplification_estimate(fn_grid, zeta_grid, speed, float(ramp_s))
    meets_isolation = _limit_mask(isolation, limits.min_isolation_percent, upper=False)
    meets_deflection = _limit_mask(deflection, limits.max_static_deflection_mm, upper=True)
    meets_passage = _limit_mask(passage, limits.max_passage_amplification, upper=True)
    return DesignMap(
        speed_rpm=speed,
        ramp_s=float(ramp_s),
        dynamic_to_static_ratio=ratio,
        limits=limits,
        natural_frequency_hz=fn,
        damping_ratio=zeta,
        frequency_ratio=r,
        transmissibility=magnitude,
        transmissibility_db=transmissibility_db(magnitude),
        isolation_percent=isolation,
        static_deflection_mm=deflection,
        passage_amplification=passage,
        meets_isolation=meets_isolation,
        meets_static_deflection=meets_deflection,
        meets_passage=meets_passage,
        feasible=meets_isolation & meets_deflection & meets_passage,
    )
