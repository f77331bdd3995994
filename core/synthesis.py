"""Design synthesis: from an operating point to catalog-neutral values per mount.

:func:`synthesize` takes validated :class:`~core.design.DesignInputs` and
returns a :class:`DesignResult`: natural frequency, stiffness and damping per
mount, static deflection, loads, transmissibility at speed and over the range,
the resonance peak, the machine's motion under an excitation, and warnings as
plain sentences. Everything is SI; :meth:`DesignResult.to_json_dict` gives the
keys of ``mountsmith evaluate --json`` with the unit in each name.
"""
from __future__ import annotations

from dataclasses import asdict, dataclass, replace

import numpy as np

from core.design import DesignInputs
from core.errors import InputError
from core.excitation import rad_s_to_rpm, rpm_to_rad_s
from core.transmissibility import (
    CROSSOVER_RATIO, force_transmissibility, isolation_db, isolation_percent,
    receptance, required_ratio, transmissibility_peak)

#: Below this frequency ratio isolation is thin (r of 3 or more is common practice).
PRACTICAL_RATIO = 3.0
#: Band around resonance (as a share of the natural frequency) that running speed should avoid.
RESONANCE_BAND = 0.2
#: Largest |T| at a running speed that gives a result. ζ = 0.005 at resonance gives 100; beyond
#: a million the "design" is a machine parked on its resonance with next to no damping, and
#: derived figures (isolation %, forces) overflow or lose meaning.
MAX_OPERATING_TRANSMISSIBILITY = 1e6


@dataclass(frozen=True)
class DutyPoint:
    """Performance at one duty speed.

    Attributes
    ----------
    speed_rpm : float
    frequency_ratio : float
    transmissibility : float
        |T| at this speed.
    isolation_percent : float
    phase_deg : float
        Lag negative.
    """

    speed_rpm: float
    frequency_ratio: float
    transmissibility: float
    isolation_percent: float
    phase_deg: float


@dataclass(frozen=True)
class DesignResult:
    """Outcome of :func:`synthesize` (SI units unless the name says otherwise).

    Amplitudes are 0-to-peak; phase is the output's lag in degrees (negative).
    Quantities "at speed" are at the lowest operating speed, the design point.
    """

    natural_frequency_hz: float
    natural_frequency_rpm: float
    speeds_rpm: tuple[float, float]
    frequency_ratio: float
    frequency_ratio_max: float
    static_deflection_m: float
    stiffness_total_n_per_m: float
    stiffness_per_mount_n_per_m: tuple[float, ...]
    static_stiffness_total_n_per_m: float
    damping_total_n_s_per_m: float
    damping_per_mount_n_s_per_m: tuple[float, ...]
    damping_is_equivalent: bool
    load_per_mount_n: tuple[float, ...]
    transmissibility: float
    isolation_percent: float
    isolation_db: float
    phase_deg: float
    peak_transmissibility: float
    peak_frequency_ratio: float
    worst_transmissibility: float
    worst_speed_rpm: float
    duty_points: tuple[DutyPoint, ...]
    excitation_force_n: float | None
    transmitted_force_n: float | None
    transmitted_force_per_mount_n: tuple[float, ...] | None
    machine_displacement_m: float | None
    machine_velocity_m_s: float | None
    warnings: tuple[str, ...]

    def to_json_dict(self) -> dict:
        """Keys of ``mountsmith evaluate --json`` (unit in each name)."""
        out = {
            "natural_frequency_hz": self.natural_frequency_hz,
            "natural_frequency_rpm": self.natural_frequency_rpm,
            "speed_rpm": self.speeds_rpm[0],
            "speed_max_rpm": self.speeds_rpm[1],
            "frequency_ratio": self.frequency_ratio,
            "frequency_ratio_max": self.frequency_ratio_max,
            "static_deflection_mm": self.static_deflection_m * 1e3,
            "transmissibility": self.transmissibility,
            "isolation_percent": self.isolation_percent,
            "isolation_db": self.isolation_db,
            "phase_deg": self.phase_deg,
            "stiffness_total_n_per_m": self.stiffness_total_n_per_m,
            "stiffness_per_mount_n_per_m": list(self.stiffness_per_mount_n_per_m),
            "stiffness_per_mount_n_per_mm": [k * 1e-3 for k in self.stiffness_per_mount_n_per_m],
            "static_stiffness_total_n_per_m": self.static_stiffness_total_n_per_m,
            "damping_total_n_s_per_m": self.damping_total_n_s_per_m,
            "damping_per_mount_n_s_per_m": list(self.damping_per_mount_n_s_per_m),
            "damping_is_equivalent_viscous": self.damping_is_equivalent,
            "load_per_mount_n": list(self.load_per_mount_n),
            # JSON has no infinity: an undamped (unbounded) peak is null.
            "peak_transmissibility": (self.peak_transmissibility if np.isfinite(self.peak_transmissibility)
                                      else None),
            "peak_frequency_ratio": self.peak_frequency_ratio,
            "worst_transmissibility": self.worst_transmissibility,
            "worst_speed_rpm": self.worst_speed_rpm,
            "duty_points": [asdict(point) for point in self.duty_points],
            "warnings": list(self.warnings),
        }
        if self.excitation_force_n is not None:
            velocity = self.machine_velocity_m_s
            out.update({
                "excitation_force_n": self.excitation_force_n,
                "transmitted_force_n": self.transmitted_force_n,
                "transmitted_force_per_mount_n": list(self.transmitted_force_per_mount_n),
                "machine_displacement_mm": self.machine_displacement_m * 1e3,
                "machine_velocity_mm_s": velocity * 1e3,
                "machine_velocity_rms_mm_s": velocity * 1e3 / np.sqrt(2.0),
            })
        return out


def rectangular_mount_positions(count: int, span_m: tuple[float, float]) -> np.ndarray:
    """Plan positions (m) of ``count`` mounts in two rows, centred on the origin.

    The rows lie at y = ±span_y/2; each holds count/2 mounts equally spaced
    from x = -span_x/2 to +span_x/2. Returns an array of shape (count, 2).
    """
    per_row = count // 2
    xs = np.linspace(-span_m[0] / 2.0, span_m[0] / 2.0, per_row)
    ys = np.array([-span_m[1] / 2.0, span_m[1] / 2.0])
    return np.array([(x, y) for y in ys for x in xs])


def offset_cg_loads(weight_n: float, positions_m: np.ndarray, cg_offset_m) -> np.ndarray:
    """Static load per mount (N) of a rigid body with its weight at ``cg_offset_m``.

    Elastic statics with equal mount stiffness over a layout centred on the
    origin and symmetric in x and y: R_i = W (1/N + e_x x_i / sum x**2 + e_y y_i / sum y**2).
    """
    xs, ys = positions_m[:, 0], positions_m[:, 1]
    count = len(positions_m)
    ex, ey = cg_offset_m
    return weight_n * (1.0 / count + ex * xs / np.sum(xs * xs) + ey * ys / np.sum(ys * ys))


def mount_loads(design: DesignInputs) -> np.ndarray:
    """Static load per mount (N) for the design's load layout."""
    if design.load_layout == "per_mount":
        return np.asarray(design.loads_n, dtype=float)
    if design.load_layout == "cg_offset":
        positions = rectangular_mount_positions(design.mount_count, design.span_m)
        return offset_cg_loads(design.weight_n, positions, design.cg_offset_m)
    return np.full(design.mount_count, design.weight_n / design.mount_count)


def design_frequency_ratio(design: DesignInputs) -> float:
    """Frequency ratio at the lowest speed: chosen, from a chosen natural frequency, or needed for the target."""
    if design.tuning == "frequency_ratio":
        return float(design.frequency_ratio)
    if design.tuning == "natural_frequency":
        return float(rpm_to_rad_s(design.speed_rpm)) / (2.0 * np.pi * design.natural_frequency_hz)
    target = 1.0 - design.isolation_percent / 100.0
    return required_ratio(target, design.damping, field="tuning.isolation_percent")


def _worst_over_range(design: DesignInputs, omega_n: float, r_low: float, r_high: float, peak):
    """Largest |T| over the speed range and duty speeds, and the speed (r/min) where it occurs.

    ``peak`` is the design damping's :func:`core.transmissibility.transmissibility_peak`.
    """
    candidates = [r_low, r_high] + [float(rpm_to_rad_s(s)) / omega_n for s in design.duty_speeds_rpm]
    if r_low < peak.ratio < r_high:
        candidates.append(peak.ratio)
    values = np.abs(force_transmissibility(np.array(candidates), design.damping))
    worst = int(np.argmax(values))
    return float(values[worst]), float(rad_s_to_rpm(candidates[worst] * omega_n))


def _duty_points(design: DesignInputs, omega_n: float) -> tuple[DutyPoint, ...]:
    """Performance at each listed duty speed, in the order given."""
    if not design.duty_speeds_rpm:
        return ()
    speeds = np.asarray(design.duty_speeds_rpm, dtype=float)
    ratios = rpm_to_rad_s(speeds) / omega_n
    response = force_transmissibility(ratios, design.damping)
    magnitudes = np.abs(response)
    return tuple(DutyPoint(float(s), float(r), float(t), float(isolation_percent(t)), float(p))
                 for s, r, t, p in zip(speeds, ratios, magnitudes, np.degrees(np.angle(response))))


def synthesize(design: DesignInputs) -> DesignResult:
    """Turn validated design inputs into mount values and predicted performance.

    Raises
    ------
    InputError
        A field is out of range.
    TargetUnreachable
        The target isolation needs a frequency ratio beyond the supported range.
    """
    design.validate()
    speed_low, speed_high = design.speed_range_rpm
    omega_low = float(rpm_to_rad_s(speed_low))
    ratio = design_frequency_ratio(design)
    omega_n = omega_low / ratio
    ratio_high = float(rpm_to_rad_s(speed_high)) / omega_n
    mass = design.mass_kg
    stiffness = mass * omega_n * omega_n
    static_stiffness = stiffness / design.dynamic_stiffness_ratio
    if design.damping.model == "viscous":
        damping_total = 2.0 * design.damping.value * np.sqrt(stiffness * mass)
    else:
        damping_total = design.damping.value * stiffness / omega_low
    loads = mount_loads(design)
    if np.min(loads) <= 0.0:
        lifted = int(np.argmin(loads)) + 1
        raise InputError("mounts.cg_offset_m",
                         f"puts mount {lifted} in tension ({loads.min():.4g} N): every mount must carry load; "
                         "move the centre of gravity towards the layout centre or widen the span", None)
    shares = loads / loads.sum()

    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):  # (near-)undamped at resonance: refused below
        response = complex(force_transmissibility(ratio, design.damping))
        magnitude = abs(response)
        peak = transmissibility_peak(design.damping)
        worst, worst_speed = _worst_over_range(design, omega_n, ratio, ratio_high, peak)
    field = "damping.damping_ratio" if design.damping.model == "viscous" else "damping.loss_factor"
    if not (np.isfinite(worst) and np.isfinite(magnitude)):
        raise InputError(field, "must be > 0 when a running speed is at resonance (frequency ratio 1): "
                         "the undamped response there is unbounded", design.damping.value)
    if max(worst, magnitude) > MAX_OPERATING_TRANSMISSIBILITY:
        raise InputError(field, f"is too small for a running speed this close to resonance: |T| reaches "
                         f"{max(worst, magnitude):.3g} there (more than {MAX_OPERATING_TRANSMISSIBILITY:g}); "
                         "raise the damping or move the natural frequency away from the running speeds",
                         design.damping.value)
    static_deflection = design.weight_n / static_stiffness
    duty_points = _duty_points(design, omega_n)

    force = transmitted = per_mount = displacement = velocity = None
    if design.excitation.kind != "none":
        force = float(design.excitation.force_amplitude_n(speed_low, speed_high))
        transmitted = force * magnitude
        per_mount = tuple(float(v) for v in transmitted * shares)
        displacement = force / stiffness * float(np.abs(receptance(ratio, design.damping)))
        velocity = displacement * omega_low

    result = DesignResult(
        natural_frequency_hz=omega_n / (2.0 * np.pi),
        natural_frequency_rpm=float(rad_s_to_rpm(omega_n)),
        speeds_rpm=(speed_low, speed_high),
        frequency_ratio=ratio,
        frequency_ratio_max=ratio_high,
        static_deflection_m=static_deflection,
        stiffness_total_n_per_m=stiffness,
        stiffness_per_mount_n_per_m=tuple(float(v) for v in stiffness * shares),
        static_stiffness_total_n_per_m=static_stiffness,
        damping_total_n_s_per_m=float(damping_total),
        damping_per_mount_n_s_per_m=tuple(float(v) for v in damping_total * shares),
        damping_is_equivalent=design.damping.model == "hysteretic",
        load_per_mount_n=tuple(float(v) for v in loads),
        transmissibility=magnitude,
        isolation_percent=float(isolation_percent(magnitude)),
        isolation_db=float(isolation_db(magnitude)),
        phase_deg=float(np.degrees(np.angle(response))),
        peak_transmissibility=peak.magnitude,
        peak_frequency_ratio=peak.ratio,
        worst_transmissibility=worst,
        worst_speed_rpm=worst_speed,
        duty_points=duty_points,
        excitation_force_n=force,
        transmitted_force_n=transmitted,
        transmitted_force_per_mount_n=per_mount,
        machine_displacement_m=displacement,
        machine_velocity_m_s=velocity,
        warnings=(),
    )
    return _with_warnings(result, design, loads)


def _with_warnings(result: DesignResult, design: DesignInputs, loads: np.ndarray) -> DesignResult:
    """Attach the design warnings (plain sentences) to ``result``."""
    warnings = []
    low, high = result.frequency_ratio, result.frequency_ratio_max
    if low <= CROSSOVER_RATIO:
        warnings.append(
            f"Frequency ratio {low:.3g} at {result.speeds_rpm[0]:.6g} r/min is not above √2: "
            "the mounts amplify instead of isolating there.")
    elif low < PRACTICAL_RATIO:
        warnings.append(
            f"Frequency ratio {low:.3g} is below 3 (common practice asks for about 3 or more).")
    if low < 1.0 + RESONANCE_BAND and high > 1.0 - RESONANCE_BAND:
        warnings.append(
            f"Operating speed range comes within ±{RESONANCE_BAND:.0%} of the natural frequency "
            f"({result.natural_frequency_rpm:.5g} r/min): it runs at or near resonance.")
    for point in result.duty_points:
        if point.frequency_ratio <= CROSSOVER_RATIO:
            warnings.append(
                f"Duty speed {point.speed_rpm:.6g} r/min gives frequency ratio {point.frequency_ratio:.3g}, "
                "not above √2: the mounts amplify there.")
        if abs(point.frequency_ratio - 1.0) <= RESONANCE_BAND:
            warnings.append(
                f"Duty speed {point.speed_rpm:.6g} r/min is within ±{RESONANCE_BAND:.0%} of the natural "
                "frequency: it runs at resonance.")
    deflection_mm = result.static_deflection_m * 1e3
    if deflection_mm > design.limits.max_static_deflection_mm:
        warnings.append(
            f"Static deflection {deflection_mm:.4g} mm exceeds {design.limits.max_static_deflection_mm:g} mm, "
            "more than a single steel spring usually gives (common practice): consider springs in series "
            "or a stiffer choice.")
    if result.peak_transmissibility > design.limits.max_passage_amplification:
        peak = (f"{result.peak_transmissibility:.4g}×" if np.isfinite(result.peak_transmissibility)
                else "unbounded (no damping)")
        warnings.append(
            f"Resonance peak of {peak} is passed at every start and stop "
            f"(limit {design.limits.max_passage_amplification:g}×): add damping or snubbers.")
    mean = float(loads.mean())
    spread = float((loads.max() - loads.min()) / mean * 100.0)
    if spread > design.limits.max_load_spread_percent:
        warnings.append(
            f"Per-mount loads differ by {spread:.3g} % of the mean (limit "
            f"{design.limits.max_load_spread_percent:g} %): choose mounts per position.")
    return replace(result, warnings=tuple(warnings))


__all__ = ["DesignResult", "DutyPoint", "synthesize", "mount_loads", "rectangular_mount_positions", "offset_cg_loads",
           "design_frequency_ratio"]
