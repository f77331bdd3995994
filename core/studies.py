"""Studies beyond one operating point, stored with a project and evaluated from the design.

Each study is a frozen dataclass of inputs with ``to_dict``/``from_dict``
(validated, errors name the field under ``studies.``) and an ``evaluate``
function that takes the design and its :class:`~core.synthesis.DesignResult`
and returns JSON-ready keys (SI, unit in each name):

* :class:`PassageStudy` — run-up and coast-down through resonance (core.passage);
* :class:`RigidBodyStudy` — the machine as a rigid body on its mounts, six modes (core.rigid_body);
* :class:`FloorStudy` — floor vibration reaching sensitive equipment, against a criterion (core.floor);
* :class:`TwoStageStudy` — the machine on an intermediate mass on a second set of mounts (core.two_stage).
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from core import floor as floor_module
from core import passage, rigid_body, two_stage
from core.design import DesignInputs
from core.errors import InputError, TargetUnreachable
from core.excitation import permissible_unbalance_kg_m, rpm_to_rad_s
from core.synthesis import DesignResult, rectangular_mount_positions

AXES = ("x", "y", "z")


# ----------------------------------------------------------------- helpers
def _number(data: dict, key: str, path: str, low: float, high: float, unit: str = "",
            default: float | None = None) -> float:
    """A finite number in [low, high] from ``data[key]``, or InputError naming ``path.key``."""
    name = f"{path}.{key}"
    value = data.get(key, default)
    reason = f"must be a number from {low:g} to {high:g}{' ' + unit if unit else ''}"
    if value is None:
        raise InputError(name, "is missing; " + reason)
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) \
            or not low <= value <= high:
        raise InputError(name, reason, value)
    return float(value)


def _vector(value: Any, name: str, length: int, low: float, high: float, unit: str) -> tuple[float, ...]:
    reason = f"must be {length} numbers from {low:g} to {high:g} {unit}".rstrip()
    if not isinstance(value, (list, tuple)) or len(value) != length:
        raise InputError(name, reason, value if not isinstance(value, (list, tuple)) else len(value))
    for item in value:
        if isinstance(item, bool) or not isinstance(item, (int, float)) or not math.isfinite(item) \
                or not low <= item <= high:
            raise InputError(name, reason, item)
    return tuple(float(item) for item in value)


def _object(data: Any, path: str) -> dict:
    if not isinstance(data, dict):
        raise InputError(path, "must be an object", type(data).__name__)
    return data


def unbalance_of(design: DesignInputs) -> tuple[float, bool]:
    """Rotating unbalance U (kg m) that drives the machine, and whether it is an equivalent.

    A constant force F at the lowest speed counts as the unbalance F / Omega**2
    (an equivalent); with no excitation there is none (0).
    """
    excitation = design.excitation
    low, high = design.speed_range_rpm
    if excitation.kind == "unbalance":
        return excitation.unbalance_g_mm * 1e-6, False
    if excitation.kind == "balance_grade":
        return permissible_unbalance_kg_m(excitation.balance_grade_mm_s, excitation.rotor_mass_kg, high), False
    if excitation.kind == "force":
        omega = float(rpm_to_rad_s(low))
        return excitation.force_n / (omega * omega), True
    return 0.0, False


# --------------------------------------------------------------- passage
@dataclass(frozen=True)
class PassageStudy:
    """Run-up from rest and coast-down to rest through the mounts' resonance.

    Attributes
    ----------
    runup_s : float
        Time from rest to the lowest operating speed (s).
    rundown_s : float
        Time from that speed back to rest (s).
    """

    runup_s: float = 30.0
    rundown_s: float = 60.0

    def to_dict(self) -> dict:
        return {"runup_s": self.runup_s, "rundown_s": self.rundown_s}

    @classmethod
    def from_dict(cls, data: Any, path: str = "studies.passage") -> "PassageStudy":
        data = _object(data, path)
        return cls(runup_s=_number(data, "runup_s", path, 0.1, 3600.0, "s", default=30.0),
                   rundown_s=_number(data, "rundown_s", path, 0.1, 3600.0, "s", default=60.0))


def simulate_passages(design: DesignInputs, result: DesignResult, study: PassageStudy):
    """Run-up and coast-down simulations, as two :class:`core.passage.PassageResult`.

    Viscous mounts use their damping coefficient. An elastomer (loss factor eta)
    is simulated with the equivalent viscous damping at the natural frequency,
    c = eta k / omega_n (zeta = eta / 2), where the passage peak occurs; the value
    at running speed would understate the damping there by the frequency ratio.
    """
    unbalance, _ = unbalance_of(design)
    unbalance = unbalance if unbalance > 0 else 1e-3  # ratios do not depend on it (linear system)
    stiffness = result.stiffness_total_n_per_m
    if design.damping.model == "hysteretic":
        damping = design.damping.value * math.sqrt(stiffness * design.mass_kg)
    else:
        damping = result.damping_total_n_s_per_m
    common = dict(mass_kg=design.mass_kg, stiffness_n_per_m=stiffness,
                  damping_n_s_per_m=damping, unbalance_kg_m=unbalance,
                  speed_rpm=result.speeds_rpm[0])
    up = passage.simulate_runup(ramp_s=study.runup_s, direction="up", **common)
    down = passage.simulate_runup(ramp_s=study.rundown_s, direction="down", **common)
    return up, down


def evaluate_passage(design: DesignInputs, result: DesignResult, study: PassageStudy,
                     simulated=None) -> dict:
    """Keys ``startup_*`` and ``shutdown_*``: peaks during the passage over the steady values at speed."""
    up, down = simulated or simulate_passages(design, result, study)
    unbalance, _ = unbalance_of(design)
    has_force = unbalance > 0
    values: dict[str, Any] = {}
    for prefix, run in (("startup", up), ("shutdown", down)):
        values[f"{prefix}_amplification"] = run.displacement_amplification
        values[f"{prefix}_force_amplification"] = run.force_amplification
        values[f"{prefix}_peak_speed_rpm"] = run.peak_displacement_speed_rpm
        values[f"{prefix}_peak_displacement_mm"] = run.peak_displacement_m * 1e3 if has_force else None
        values[f"{prefix}_peak_force_n"] = run.peak_force_n if has_force else None
    limit = design.limits.max_passage_amplification
    warnings = []
    for word, prefix in (("start-up", "startup"), ("shutdown", "shutdown")):
        amplification = values[f"{prefix}_amplification"]
        if amplification > limit:
            warnings.append(
                f"During {word} the machine moves {amplification:.3g}× as much as at speed "
                f"(limit {limit:g}×, peak at {values[f'{prefix}_peak_speed_rpm']:.4g} r/min): "
                "pass resonance faster, add damping or fit snubbers.")
    values["passage_warnings"] = warnings
    return values


# ------------------------------------------------------------ rigid body
@dataclass(frozen=True)
class MountPlacement:
    """One mount of a rigid-body study.

    Attributes
    ----------
    position_m : (float, float, float)
        Elastic centre in the machine frame (m); z is up.
    stiffness_n_per_m : (float, float, float) or None
        Stiffness along the mount's own axes (N/m); None takes the vertical
        value from the single-degree-of-freedom design for this mount and the
        lateral values from ``lateral_stiffness_ratio``.
    angles_deg : (float, float, float)
        Inclination: rotations about x, y, z (degrees), applied in that order.
    """

    position_m: tuple[float, float, float]
    stiffness_n_per_m: tuple[float, float, float] | None = None
    angles_deg: tuple[float, float, float] = (0.0, 0.0, 0.0)

    def to_dict(self) -> dict:
        return {"position_m": list(self.position_m),
                "stiffness_n_per_m": None if self.stiffness_n_per_m is None else list(self.stiffness_n_per_m),
                "angles_deg": list(self.angles_deg)}


@dataclass(frozen=True)
class RigidBodyStudy:
    """The machine as a rigid body on its mounts.

    Attributes
    ----------
    cg_m : (float, float, float)
        Centre of gravity in the machine frame (m).
    mounts : tuple of MountPlacement
        One per mount of the design, in the design's order.
    inertia_kg_m2 : 3x3 nested tuple or None
        Inertia tensor about the CG (kg m²); None estimates it from ``box_m``.
    box_m : (float, float, float)
        Length, width, height of the machine (m) for the estimate.
    lateral_stiffness_ratio : float
        Horizontal over vertical stiffness for mounts without their own values.
    shaft_axis : {"x", "y", "z"}
        Axis the unbalance rotates about.
    mode_band : float
        Warn for a mode within this share of the running speed or twice it.
    """

    cg_m: tuple[float, float, float]
    mounts: tuple[MountPlacement, ...]
    inertia_kg_m2: tuple[tuple[float, float, float], ...] | None = None
    box_m: tuple[float, float, float] = (1.5, 1.0, 1.0)
    lateral_stiffness_ratio: float = 1.0
    shaft_axis: str = "x"
    mode_band: float = 0.2

    @property
    def inertia_is_estimate(self) -> bool:
        return self.inertia_kg_m2 is None

    def to_dict(self) -> dict:
        return {"cg_m": list(self.cg_m), "mounts": [m.to_dict() for m in self.mounts],
                "inertia_kg_m2": None if self.inertia_kg_m2 is None else [list(r) for r in self.inertia_kg_m2],
                "box_m": list(self.box_m), "lateral_stiffness_ratio": self.lateral_stiffness_ratio,
                "shaft_axis": self.shaft_axis, "mode_band": self.mode_band}

    @classmethod
    def from_dict(cls, data: Any, path: str = "studies.rigid_body") -> "RigidBodyStudy":
        data = _object(data, path)
        mounts_data = data.get("mounts")
        if not isinstance(mounts_data, list) or not 3 <= len(mounts_data) <= 64:
            raise InputError(f"{path}.mounts", "must be a list of 3 to 64 mounts",
                             type(mounts_data).__name__ if not isinstance(mounts_data, list) else len(mounts_data))
        mounts = []
        for index, item in enumerate(mounts_data):
            where = f"{path}.mounts[{index}]"
            item = _object(item, where)
            stiffness = item.get("stiffness_n_per_m")
            mounts.append(MountPlacement(
                position_m=_vector(item.get("position_m"), f"{where}.position_m", 3, -100.0, 100.0, "m"),
                stiffness_n_per_m=None if stiffness is None else _vector(
                    stiffness, f"{where}.stiffness_n_per_m", 3, 0.0, 1e12, "N/m"),
                angles_deg=_vector(item.get("angles_deg", [0.0, 0.0, 0.0]), f"{where}.angles_deg", 3,
                                   -360.0, 360.0, "degrees")))
        inertia = data.get("inertia_kg_m2")
        if inertia is not None:
            if not isinstance(inertia, list) or len(inertia) != 3:
                raise InputError(f"{path}.inertia_kg_m2", "must be a 3x3 list of numbers or null", inertia)
            inertia = tuple(_vector(row, f"{path}.inertia_kg_m2", 3, -1e9, 1e9, "kg·m²") for row in inertia)
        axis = data.get("shaft_axis", "x")
        if axis not in AXES:
            raise InputError(f"{path}.shaft_axis", "must be x, y or z", axis)
        return cls(cg_m=_vector(data.get("cg_m"), f"{path}.cg_m", 3, -100.0, 100.0, "m"),
                   mounts=tuple(mounts), inertia_kg_m2=inertia,
                   box_m=_vector(data.get("box_m", [1.5, 1.0, 1.0]), f"{path}.box_m", 3, 0.01, 100.0, "m"),
                   lateral_stiffness_ratio=_number(data, "lateral_stiffness_ratio", path, 0.0, 100.0,
                                                   default=1.0),
                   shaft_axis=axis,
                   mode_band=_number(data, "mode_band", path, 0.0, 1.0, default=0.2))


def default_rigid_body_study(design: DesignInputs, cg_height_m: float = 0.5) -> RigidBodyStudy:
    """A starting rigid-body study from the design: its rectangular layout, CG above the mount plane.

    The CG sits at the design's offset (or the centre) and ``cg_height_m``
    above the mounts; the inertia is estimated from a box of the layout's
    length and width and twice the CG height (at least 0.1 m).
    """
    count = design.mount_count if design.mount_count >= 4 and design.mount_count % 2 == 0 else 4
    positions = rectangular_mount_positions(count, design.span_m)
    offset = design.cg_offset_m if design.load_layout == "cg_offset" else (0.0, 0.0)
    mounts = tuple(MountPlacement(position_m=(float(x), float(y), 0.0)) for x, y in positions)
    if count != design.mount_count:  # an odd count: keep the first mounts of a larger grid
        mounts = mounts[: design.mount_count] if design.mount_count >= 3 else mounts
    return RigidBodyStudy(cg_m=(float(offset[0]), float(offset[1]), cg_height_m), mounts=mounts,
                          box_m=(design.span_m[0], design.span_m[1], max(2.0 * cg_height_m, 0.1)))


def build_rigid_body(design: DesignInputs, result: DesignResult, study: RigidBodyStudy):
    """The core.rigid_body objects of a study: (body, mounts)."""
    if len(study.mounts) != design.mount_count:
        raise InputError("studies.rigid_body.mounts",
                         f"must hold one entry per mount of the design ({design.mount_count})", len(study.mounts))
    if study.inertia_kg_m2 is None:
        estimate = rigid_body.box_inertia(design.mass_kg, *study.box_m)
        inertia, is_estimate = estimate.inertia_kg_m2, True
    else:
        inertia, is_estimate = np.array(study.inertia_kg_m2, dtype=float), False
    body = rigid_body.RigidBody(mass_kg=design.mass_kg, inertia_kg_m2=inertia, cg_m=np.array(study.cg_m),
                                inertia_is_estimate=is_estimate)
    hysteretic = design.damping.model == "hysteretic"
    mounts = []
    for index, placement in enumerate(study.mounts):
        vertical = result.stiffness_per_mount_n_per_m[index]
        stiffness = placement.stiffness_n_per_m or (
            vertical * study.lateral_stiffness_ratio, vertical * study.lateral_stiffness_ratio, vertical)
        damping_scale = 0.0 if hysteretic else result.damping_per_mount_n_s_per_m[index] / vertical
        mounts.append(rigid_body.Mount(
            position_m=np.array(placement.position_m), stiffness_n_per_m=np.array(stiffness),
            orientation=np.radians(placement.angles_deg) if any(placement.angles_deg) else None,
            damping_n_s_per_m=np.array(stiffness) * damping_scale,
            loss_factor=design.damping.value if hysteretic else 0.0,
            label=f"mount {index + 1}"))
    return body, mounts


def evaluate_rigid_body(design: DesignInputs, result: DesignResult, study: RigidBodyStudy) -> dict:
    """Keys ``rigid_body_*``: six frequencies, energy shares, static loads, transmitted forces, warnings."""
    body, mounts = build_rigid_body(design, result, study)
    found = rigid_body.modes(body, mounts)
    loads = rigid_body.static_loads(body, mounts)
    speed_hz = result.speeds_rpm[0] / 60.0
    warnings = list(rigid_body.mode_warnings(found.frequencies_hz, speed_hz, band=study.mode_band,
                                             labels=found.dominant))
    if result.speeds_rpm[1] != result.speeds_rpm[0]:
        warnings += rigid_body.mode_warnings(found.frequencies_hz, result.speeds_rpm[1] / 60.0,
                                             band=study.mode_band, labels=found.dominant)
    if np.any(loads.vertical_load_n <= 0.0):
        warnings.append("A mount of the rigid-body layout carries no load or is lifted: move it or the CG.")
    values = {
        "rigid_body_frequencies_hz": [float(f) for f in found.frequencies_hz],
        "rigid_body_mode_dominant": list(found.dominant),
        "rigid_body_energy_share": [[float(v) for v in row] for row in found.energy_share],
        "rigid_body_mount_loads_n": [float(v) for v in loads.vertical_load_n],
        "rigid_body_inertia_is_estimate": body.inertia_is_estimate,
        "rigid_body_warnings": warnings,
    }
    unbalance, _ = unbalance_of(design)
    if unbalance > 0:
        omega = float(rpm_to_rad_s(result.speeds_rpm[0]))
        amplitude = unbalance * omega * omega
        axis = AXES.index(study.shaft_axis)
        force = np.zeros(3, dtype=complex)
        force[(axis + 1) % 3] = amplitude
        force[(axis + 2) % 3] = -1j * amplitude
        forces = rigid_body.mount_forces(body, mounts, force, speed_hz)
        values["rigid_body_transmitted_force_n"] = [float(v) for v in np.ravel(forces.peak_n)]
    return values


# ----------------------------------------------------------------- floor
@dataclass(frozen=True)
class FloorStudy:
    """Floor vibration reaching sensitive equipment on the mounts.

    Attributes
    ----------
    criterion : str
        Name of a criterion in :data:`core.floor.CRITERIA`, e.g. ``"VC-C"``.
    band_hz : tuple of float
        One-third-octave band centres of the floor spectrum (Hz).
    velocity_m_s : tuple of float
        Floor RMS velocity in each band (m/s).
    """

    criterion: str = "VC-C"
    band_hz: tuple[float, ...] = ()
    velocity_m_s: tuple[float, ...] = ()

    def spectrum(self):
        return floor_module.floor_spectrum(list(self.band_hz), list(self.velocity_m_s), field="studies.floor")

    def to_dict(self) -> dict:
        return {"criterion": self.criterion, "band_hz": list(self.band_hz),
                "velocity_m_s": list(self.velocity_m_s)}

    @classmethod
    def from_dict(cls, data: Any, path: str = "studies.floor") -> "FloorStudy":
        data = _object(data, path)
        criterion = data.get("criterion", "VC-C")
        names = [c.name for c in floor_module.CRITERIA]
        if criterion not in names:
            raise InputError(f"{path}.criterion", "must be one of " + ", ".join(names), criterion)
        bands, velocities = data.get("band_hz"), data.get("velocity_m_s")
        if not isinstance(bands, list) or not isinstance(velocities, list) or len(bands) != len(velocities) \
                or not 1 <= len(bands) <= 60:
            raise InputError(f"{path}.band_hz", "band_hz and velocity_m_s must be lists of 1 to 60 numbers "
                             "of the same length")
        study = cls(criterion=criterion, band_hz=tuple(bands), velocity_m_s=tuple(velocities))
        study.spectrum()  # validates every band and value
        return study


def floor_check(design: DesignInputs, result: DesignResult, study: FloorStudy):
    """The criterion check of a floor study and the highest natural frequency meeting it.

    Returns ``(check, limit, note)``: a :class:`core.floor.CriterionCheck` at the
    design's natural frequency, the :class:`core.floor.NaturalFrequencyLimit`
    (None when no natural frequency meets the criterion) and the reason then (else None).
    """
    spectrum = study.spectrum()
    if design.damping.value <= 0.0:
        raise InputError("design.damping.value", "must be > 0 for a floor-vibration study (an undamped "
                         "mount responds without bound at resonance)", design.damping.value)
    damping_kw = ({"damping_ratio": design.damping.value} if design.damping.model == "viscous"
                  else {"loss_factor": design.damping.value})
    check = floor_module.check_criterion(spectrum, study.criterion, result.natural_frequency_hz, **damping_kw)
    try:
        return check, floor_module.max_natural_frequency_for_criterion(spectrum, study.criterion, **damping_kw), None
    except TargetUnreachable as error:
        return check, None, str(error)


def evaluate_floor(design: DesignInputs, result: DesignResult, study: FloorStudy) -> dict:
    """Keys ``criterion*``, ``floor_*``: equipment velocity per band against the criterion."""
    check, best, note = floor_check(design, result, study)
    values = {
        "criterion": study.criterion,
        "criterion_pass": bool(check.passed),
        "criterion_worst_margin_db": float(check.worst_margin_db),
        "criterion_worst_band_hz": float(check.worst_band_nominal_hz),
        "floor_band_hz": [float(v) for v in check.nominal_hz],
        "floor_velocity_um_s": [float(v) * 1e6 for v in check.floor_velocity_m_s],
        "predicted_velocity_um_s": [float(v) * 1e6 for v in check.predicted_velocity_m_s],
        "criterion_limit_um_s": [float(v) * 1e6 for v in check.limit_m_s],
        "criterion_margin_db": [float(v) for v in check.margin_db],
        "mount_stroke_rms_mm": [float(v) * 1e3 for v in check.prediction.stroke_rms_m],
    }
    if best is not None:
        values["max_natural_frequency_for_criterion_hz"] = float(best.natural_frequency_hz)
        values["max_natural_frequency_static_deflection_mm"] = float(best.static_deflection_m) * 1e3
    else:
        values["max_natural_frequency_for_criterion_hz"] = None
        values["max_natural_frequency_static_deflection_mm"] = None
        values["criterion_note"] = note
    return values


# ------------------------------------------------------------- two stage
@dataclass(frozen=True)
class TwoStageStudy:
    """The machine's mounts on an intermediate mass (inertia block, floating slab) on a second set.

    Attributes
    ----------
    block_mass_kg : float
        The intermediate mass (kg).
    lower_natural_frequency_hz : float
        Natural frequency of machine plus block on the lower mounts alone (Hz);
        sets the lower stiffness (m_machine + m_block) (2 pi f)**2.
    lower_damping_ratio : float
        Viscous damping ratio of the lower stage on the total mass.
    """

    block_mass_kg: float = 1000.0
    lower_natural_frequency_hz: float = 3.0
    lower_damping_ratio: float = 0.05

    def to_dict(self) -> dict:
        return {"block_mass_kg": self.block_mass_kg, "lower_natural_frequency_hz": self.lower_natural_frequency_hz,
                "lower_damping_ratio": self.lower_damping_ratio}

    @classmethod
    def from_dict(cls, data: Any, path: str = "studies.two_stage") -> "TwoStageStudy":
        data = _object(data, path)
        return cls(block_mass_kg=_number(data, "block_mass_kg", path, 1e-3, 1e7, "kg", default=None),
                   lower_natural_frequency_hz=_number(data, "lower_natural_frequency_hz", path, 0.05, 500.0, "Hz",
                                                      default=None),
                   lower_damping_ratio=_number(data, "lower_damping_ratio", path, 0.0, 2.0, default=0.05))


def build_two_stage(design: DesignInputs, result: DesignResult, study: TwoStageStudy):
    """The :class:`core.two_stage.TwoStageSystem` of a study (upper stage = the design's mounts)."""
    total = design.mass_kg + study.block_mass_kg
    omega_lower = 2.0 * np.pi * study.lower_natural_frequency_hz
    lower_k = total * omega_lower * omega_lower
    hysteretic = design.damping.model == "hysteretic"
    return two_stage.TwoStageSystem(
        intermediate_mass_kg=study.block_mass_kg, lower_stiffness_n_per_m=lower_k,
        machine_mass_kg=design.mass_kg, upper_stiffness_n_per_m=result.stiffness_total_n_per_m,
        lower_damping_n_s_per_m=2.0 * study.lower_damping_ratio * math.sqrt(lower_k * total),
        upper_damping_n_s_per_m=0.0 if hysteretic else result.damping_total_n_s_per_m,
        upper_loss_factor=design.damping.value if hysteretic else 0.0)


def evaluate_two_stage(design: DesignInputs, result: DesignResult, study: TwoStageStudy) -> dict:
    """Keys ``two_stage_*``: both natural frequencies and |T| at speed against the single stage."""
    system = build_two_stage(design, result, study)
    comparison = two_stage.compare_with_single_stage(system, float(rpm_to_rad_s(result.speeds_rpm[0])))
    return {
        "two_stage_frequencies_hz": [float(f) for f in sorted(comparison.natural_frequencies_hz)],
        "two_stage_transmissibility": comparison.two_stage_transmissibility,
        "single_stage_transmissibility": comparison.single_stage_transmissibility,
        "two_stage_gain_db": comparison.gain_db,
    }


@dataclass(frozen=True)
class TwoStageCurves:
    """Force transmissibility of both arrangements against frequency.

    Attributes
    ----------
    frequency_hz : ndarray
        Log-spaced forcing frequencies (Hz), from a third of the lower natural
        frequency to three times the highest operating speed.
    two_stage : ndarray
        |T| of the machine on the intermediate mass on the lower mounts.
    single_stage : ndarray
        |T| of the machine on its mounts directly on the ground.
    speed_hz : float
        Lowest operating speed (Hz), where :func:`evaluate_two_stage` compares them.
    """

    frequency_hz: np.ndarray
    two_stage: np.ndarray
    single_stage: np.ndarray
    speed_hz: float


def two_stage_curves(design: DesignInputs, result: DesignResult, study: TwoStageStudy,
                     points: int = 400) -> TwoStageCurves:
    """|T| of the two-stage system and of the single stage over frequency (core.two_stage)."""
    system = build_two_stage(design, result, study)
    speed_hz = result.speeds_rpm[0] / 60.0
    low = min(study.lower_natural_frequency_hz, result.natural_frequency_hz) / 3.0
    high = max(result.speeds_rpm[1] / 60.0, result.natural_frequency_hz) * 3.0
    frequency = np.geomspace(low, high, int(points))
    omega = 2.0 * np.pi * frequency
    with np.errstate(divide="ignore", invalid="ignore"):  # an undamped resonance on the grid -> inf
        two = np.abs(two_stage.two_stage_transmissibility(system, omega))
        one = np.abs(two_stage.single_stage_transmissibility(system, omega))
    return TwoStageCurves(frequency, two, one, speed_hz)


# ----------------------------------------------------------- design map
#: Run-up time of the design map's passage estimate when the project has no passage study (s).
DEFAULT_MAP_RUNUP_S = 10.0


def design_map_of(design: DesignInputs, result: DesignResult | None, passage_study: PassageStudy | None = None,
                  points: int = 160):
    """The :func:`core.design_map.design_map` of a design at its lowest speed, with its limits.

    Limits: the target isolation, the largest static deflection and passage
    amplification of ``design.limits``; the design's dynamic-to-static
    ratio; the run-up of the passage study (else :data:`DEFAULT_MAP_RUNUP_S`).
    The natural-frequency axis spans from a 30th of the speed to the speed
    (and covers the design's natural frequency); damping 0.005 to 1.
    """
    from core.design_map import FREQUENCY_LIMITS_HZ, MapLimits, design_map

    speed_hz = design.speed_rpm / 60.0
    low, high = speed_hz / 30.0, speed_hz
    if result is not None:
        low = min(low, result.natural_frequency_hz / 1.5)
        high = max(high, result.natural_frequency_hz * 1.5)
    low = max(low, FREQUENCY_LIMITS_HZ[0])
    high = min(max(high, low * 2.0), FREQUENCY_LIMITS_HZ[1])
    limits = MapLimits(min_isolation_percent=design.isolation_percent,
                       max_static_deflection_mm=design.limits.max_static_deflection_mm,
                       max_passage_amplification=design.limits.max_passage_amplification)
    return design_map(design.speed_rpm, natural_frequency_range_hz=(low, high), damping_ratio_range=(0.005, 1.0),
                      frequency_points=points, damping_points=points,
                      dynamic_to_static_ratio=design.dynamic_stiffness_ratio,
                      ramp_s=passage_study.runup_s if passage_study is not None else DEFAULT_MAP_RUNUP_S,
                      limits=limits)


def design_at_map_point(design: DesignInputs, natural_frequency_hz: float, damping_ratio: float) -> DesignInputs:
    """The design moved to a point of its design map: tuning by the frequency ratio
    r = (lowest speed) / fn and viscous damping ``damping_ratio``; validated (InputError names the field)."""
    if not (math.isfinite(natural_frequency_hz) and natural_frequency_hz > 0.0):
        raise InputError("tuning.natural_frequency_hz", "must be a number above 0 Hz", natural_frequency_hz)
    ratio = float(rpm_to_rad_s(design.speed_rpm)) / (2.0 * math.pi * natural_frequency_hz)
    from core.transmissibility import Damping
    return design.with_changes(tuning="frequency_ratio", frequency_ratio=ratio,
                               damping=Damping("viscous", float(damping_ratio))).validate()


# ------------------------------------------------------------- container
@dataclass(frozen=True)
class Studies:
    """The studies a project holds; None where the study is off."""

    passage: PassageStudy | None = None
    rigid_body: RigidBodyStudy | None = None
    floor: FloorStudy | None = None
    two_stage: TwoStageStudy | None = None

    def to_dict(self) -> dict:
        return {name: (None if study is None else study.to_dict())
                for name, study in (("passage", self.passage), ("rigid_body", self.rigid_body),
                                    ("floor", self.floor), ("two_stage", self.two_stage))}

    @classmethod
    def from_dict(cls, data: Any) -> "Studies":
        data = _object(data, "studies")
        kinds = {"passage": PassageStudy, "rigid_body": RigidBodyStudy, "floor": FloorStudy,
                 "two_stage": TwoStageStudy}
        unknown = sorted(set(data) - set(kinds))
        if unknown:
            raise InputError("studies", "may hold only " + ", ".join(kinds), unknown[0])
        return cls(**{name: None if data.get(name) is None else kind.from_dict(data[name], f"studies.{name}")
                      for name, kind in kinds.items()})

    def evaluate(self, design: DesignInputs, result: DesignResult) -> dict:
        """All study keys for ``evaluate --json``; study warnings join ``warnings``."""
        values: dict[str, Any] = {}
        warnings: list[str] = []
        if self.passage is not None:
            found = evaluate_passage(design, result, self.passage)
            warnings += found.pop("passage_warnings")
            values.update(found)
        if self.rigid_body is not None:
            found = evaluate_rigid_body(design, result, self.rigid_body)
            warnings += found.pop("rigid_body_warnings")
            values.update(found)
        if self.floor is not None:
            values.update(evaluate_floor(design, result, self.floor))
            if not values["criterion_pass"]:
                warnings.append(
                    f"Equipment vibration exceeds {values['criterion']} by {-values['criterion_worst_margin_db']:.3g} dB "
                    f"in the {values['criterion_worst_band_hz']:g} Hz band.")
        if self.two_stage is not None:
            values.update(evaluate_two_stage(design, result, self.two_stage))
        values["study_warnings"] = warnings
        return values


__all__ = ["Studies", "PassageStudy", "RigidBodyStudy", "MountPlacement", "FloorStudy", "TwoStageStudy",
           "default_rigid_body_study", "build_rigid_body", "build_two_stage", "simulate_passages",
           "unbalance_of", "floor_check", "two_stage_curves", "TwoStageCurves", "design_map_of", "design_at_map_point"]
