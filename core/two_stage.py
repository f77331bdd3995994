"""Two-stage isolation: a machine on mounts on an intermediate mass on mounts.

Stage 1: intermediate mass m1 on the lower mounts (k1, c1 or loss factor eta1)
to the ground. Stage 2: machine m2 on the upper mounts (k2, c2 or eta2) on m1.
A force on the machine reaches the ground through both stages; the force
transmissibility is (Bies & Hansen, *Engineering Noise Control*, two-stage
isolation; Snowdon, NBS Handbook 128)

    T = Z1 Z2 / [(Z1 + Z2 - w^2 m1)(Z2 - w^2 m2) - Z2^2],
    Zi = ki (1 + j etai) + j w ci,

and falls as k1 k2 / (w^4 m1 m2) at high frequency (-80 dB/decade undamped)
instead of k2 / (w^2 m2) for the machine on its mounts alone.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from core.errors import InputError, finite_number
from core.matrices import generalized_eigh
from core.transmissibility import MAX_DAMPING, Damping, force_transmissibility

#: Allowed ranges (SI) of the two-stage inputs.
MASS_RANGE_KG = (1e-6, 1e9)
STIFFNESS_RANGE_N_PER_M = (1e-3, 1e13)
DAMPING_RANGE_N_S_PER_M = (0.0, 1e11)


def _checked(field: str, value, low: float, high: float, unit: str) -> float:
    return finite_number(field, value, f"must be a number from {low:g} to {high:g}{' ' + unit if unit else ''}",
                         low, high)


@dataclass(frozen=True)
class TwoStageSystem:
    """Machine on upper mounts on an intermediate mass on lower mounts (SI).

    Each stage takes viscous damping (N s/m) or a loss factor, not both.

    Attributes
    ----------
    intermediate_mass_kg : float
        m1, the intermediate mass (inertia block, frame) (kg).
    lower_stiffness_n_per_m : float
        k1, total stiffness from the intermediate mass to the ground (N/m).
    machine_mass_kg : float
        m2 (kg).
    upper_stiffness_n_per_m : float
        k2, total stiffness from the machine to the intermediate mass (N/m).
    lower_damping_n_s_per_m, upper_damping_n_s_per_m : float
        Viscous damping c1, c2 (N s/m), default 0.
    lower_loss_factor, upper_loss_factor : float
        Hysteretic loss factors eta1, eta2 (stiffness k (1 + j eta)), default 0, at most 2.
    """

    intermediate_mass_kg: float
    lower_stiffness_n_per_m: float
    machine_mass_kg: float
    upper_stiffness_n_per_m: float
    lower_damping_n_s_per_m: float = 0.0
    upper_damping_n_s_per_m: float = 0.0
    lower_loss_factor: float = 0.0
    upper_loss_factor: float = 0.0

    def __post_init__(self):
        for name in ("intermediate_mass_kg", "machine_mass_kg"):
            object.__setattr__(self, name, _checked(name, getattr(self, name), *MASS_RANGE_KG, "kg"))
        for name in ("lower_stiffness_n_per_m", "upper_stiffness_n_per_m"):
            object.__setattr__(self, name, _checked(name, getattr(self, name),
                                                    *STIFFNESS_RANGE_N_PER_M, "N/m"))
        for name in ("lower_damping_n_s_per_m", "upper_damping_n_s_per_m"):
            object.__setattr__(self, name, _checked(name, getattr(self, name),
                                                    *DAMPING_RANGE_N_S_PER_M, "N·s/m"))
        for name in ("lower_loss_factor", "upper_loss_factor"):
            object.__setattr__(self, name, _checked(name, getattr(self, name), 0.0, MAX_DAMPING, ""))
        for stage in ("lower", "upper"):
            if getattr(self, f"{stage}_damping_n_s_per_m") > 0 and getattr(self, f"{stage}_loss_factor") > 0:
                raise InputError(f"{stage}_loss_factor", "must be 0 when the same stage has viscous "
                                 "damping: give one damping model per stage",
                                 getattr(self, f"{stage}_loss_factor"))


def _stage_impedances(system: TwoStageSystem, omega):
    """Complex dynamic stiffness Zi = ki (1 + j etai) + j w ci of both stages (N/m)."""
    omega = np.asarray(omega, dtype=float)
    lower = (system.lower_stiffness_n_per_m * (1 + 1j * system.lower_loss_factor)
             + 1j * omega * system.lower_damping_n_s_per_m)
    upper = (system.upper_stiffness_n_per_m * (1 + 1j * system.upper_loss_factor)
             + 1j * omega * system.upper_damping_n_s_per_m)
    return omega, lower, upper


def two_stage_transmissibility(system: TwoStageSystem, omega_rad_s):
    """Complex force transmissibility, force into the ground over force on the machine.

    Parameters
    ----------
    system : TwoStageSystem
    omega_rad_s : array_like
        Angular frequency (rad/s), any shape.

    Returns
    -------
    ndarray of complex
        T = Z1 Z2 / [(Z1 + Z2 - w^2 m1)(Z2 - w^2 m2) - Z2^2] (same shape as ``omega_rad_s``).
    """
    omega, lower, upper = _stage_impedances(system, omega_rad_s)
    omega2 = omega * omega
    denominator = ((lower + upper - omega2 * system.intermediate_mass_kg)
                   * (upper - omega2 * system.machine_mass_kg) - upper * upper)
    with np.errstate(divide="ignore", invalid="ignore"):  # undamped resonance -> inf
        return lower * upper / denominator


@dataclass(frozen=True)
class TwoStageModes:
    """Undamped modes of the two-stage system.

    Attributes
    ----------
    natural_frequencies_hz : ndarray, shape (2,)
        Ascending (Hz).
    mode_shapes : ndarray, shape (2, 2)
        Columns are the modes, rows (intermediate mass, machine), mass-normalized.
    """

    natural_frequencies_hz: np.ndarray
    mode_shapes: np.ndarray


def two_stage_modes(system: TwoStageSystem) -> TwoStageModes:
    """Natural frequencies and mode shapes from K phi = w^2 M phi, damping ignored."""
    k1, k2 = system.lower_stiffness_n_per_m, system.upper_stiffness_n_per_m
    stiffness = np.array([[k1 + k2, -k2], [-k2, k2]])
    mass = np.diag([system.intermediate_mass_kg, system.machine_mass_kg])
    eigenvalues, shapes = generalized_eigh(stiffness, mass)
    return TwoStageModes(np.sqrt(eigenvalues) / (2.0 * np.pi), shapes)


def single_stage_damping(system: TwoStageSystem) -> Damping:
    """Damping of the machine on the upper mounts alone (viscous ratio or loss factor)."""
    if system.upper_loss_factor > 0:
        return Damping("hysteretic", system.upper_loss_factor)
    critical = 2.0 * math.sqrt(system.upper_stiffness_n_per_m * system.machine_mass_kg)
    zeta = system.upper_damping_n_s_per_m / critical
    if zeta > MAX_DAMPING:
        raise InputError("upper_damping_n_s_per_m", f"must give a damping ratio of at most "
                         f"{MAX_DAMPING:g} on the machine alone (at most {MAX_DAMPING * critical:.4g} "
                         "N·s/m)", system.upper_damping_n_s_per_m)
    return Damping("viscous", zeta)


def single_stage_natural_frequency_hz(system: TwoStageSystem) -> float:
    """Natural frequency (Hz) of the machine on the upper mounts directly on the ground."""
    return math.sqrt(system.upper_stiffness_n_per_m / system.machine_mass_kg) / (2.0 * math.pi)


def single_stage_transmissibility(system: TwoStageSystem, omega_rad_s):
    """Complex force transmissibility of the machine on the upper mounts directly on the ground."""
    omega_n = 2.0 * math.pi * single_stage_natural_frequency_hz(system)
    ratio = np.asarray(omega_rad_s, dtype=float) / omega_n
    return force_transmissibility(ratio, single_stage_damping(system))


@dataclass(frozen=True)
class TwoStageComparison:
    """Two-stage against single-stage mounting at the operating speed.

    Attributes
    ----------
    operating_speed_rad_s : float
    two_stage_transmissibility : float
        |T| of the two-stage system.
    single_stage_transmissibility : float
        |T| of the machine on the upper mounts directly on the ground.
    gain_db : float
        20 log10(|T single| / |T two-stage|) (dB): positive when the
        intermediate stage lets less force into the ground.
    natural_frequencies_hz : ndarray, shape (2,)
        Two-stage natural frequencies (Hz).
    single_stage_natural_frequency_hz : float
    """

    operating_speed_rad_s: float
    two_stage_transmissibility: float
    single_stage_transmissibility: float
    gain_db: float
    natural_frequencies_hz: np.ndarray
    single_stage_natural_frequency_hz: float


def compare_with_single_stage(system: TwoStageSystem,
                              operating_speed_rad_s: float) -> TwoStageComparison:
    """|T| of both arrangements and the gain of the intermediate stage at the operating speed.

    Parameters
    ----------
    system : TwoStageSystem
    operating_speed_rad_s : float
        Forcing angular frequency (rad/s), > 0.
    """
    omega = _checked("operating_speed_rad_s", operating_speed_rad_s, 1e-6, 1e8, "rad/s")
    with np.errstate(divide="ignore", invalid="ignore"):  # undamped resonance, refused below
        two = float(np.abs(two_stage_transmissibility(system, omega)))
        one = float(np.abs(single_stage_transmissibility(system, omega)))
    if two == 0.0 or not math.isfinite(two) or not math.isfinite(one):
        raise InputError("operating_speed_rad_s", "must not sit on an undamped natural frequency "
                         "(infinite response); add damping or move the speed", omega)
    return TwoStageComparison(omega, two, one, float(20.0 * np.log10(one / two)),
                              two_stage_modes(system).natural_frequencies_hz,
                              single_stage_natural_frequency_hz(system))
