"""Exciting forces of a running machine: constant force, rotating unbalance, balance grade.

Balance grades follow ISO 21940-11 (formerly ISO 1940-1): the grade G is the
product of the permissible specific unbalance e (m) and the maximum service
angular speed Omega (rad/s), G = e * Omega, quoted in mm/s.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np

from core.errors import InputError

#: Balance grades of ISO 21940-11, mm/s.
BALANCE_GRADES_MM_S = (0.4, 1.0, 2.5, 6.3, 16.0, 40.0, 100.0, 250.0, 630.0, 1600.0, 4000.0)

ExcitationKind = Literal["none", "force", "unbalance", "balance_grade"]


def rpm_to_rad_s(speed_rpm):
    """Rotational speed from r/min to rad/s."""
    return np.asarray(speed_rpm, dtype=float) * (2.0 * np.pi / 60.0)


def rad_s_to_rpm(omega_rad_s):
    """Angular speed from rad/s to r/min."""
    return np.asarray(omega_rad_s, dtype=float) * (60.0 / (2.0 * np.pi))


def permissible_unbalance_kg_m(grade_mm_s: float, rotor_mass_kg: float, max_speed_rpm: float) -> float:
    """Permissible residual unbalance U = m e (kg m) for balance grade G at the maximum service speed.

    e = G / Omega; with G in mm/s this equals ISO 21940-11's U[g mm] = 9549 G m / n.
    """
    omega = float(rpm_to_rad_s(max_speed_rpm))
    return rotor_mass_kg * (grade_mm_s * 1e-3) / omega


@dataclass(frozen=True)
class Excitation:
    """Harmonic excitation at running speed.

    Attributes
    ----------
    kind : {"none", "force", "unbalance", "balance_grade"}
    force_n : float
        Force amplitude (0-to-peak, N) for ``kind="force"``; independent of speed.
    unbalance_g_mm : float
        Unbalance U in g mm for ``kind="unbalance"``; force U Omega**2.
    balance_grade_mm_s : float
        ISO 21940-11 grade G (mm/s) for ``kind="balance_grade"``, with ``rotor_mass_kg``.
    rotor_mass_kg : float
        Mass of the balanced rotor (kg).
    """

    kind: ExcitationKind = "none"
    force_n: float = 0.0
    unbalance_g_mm: float = 0.0
    balance_grade_mm_s: float = 6.3
    rotor_mass_kg: float = 0.0

    def validate(self) -> None:
        """Raise InputError naming the first field out of range."""
        if self.kind not in ("none", "force", "unbalance", "balance_grade"):
            raise InputError("excitation.kind", "must be none, force, unbalance or balance_grade", self.kind)
        checks = {
            "force": (("excitation.force_n", self.force_n, "N"),),
            "unbalance": (("excitation.unbalance_g_mm", self.unbalance_g_mm, "g·mm"),),
            "balance_grade": (("excitation.balance_grade_mm_s", self.balance_grade_mm_s, "mm/s"),
                              ("excitation.rotor_mass_kg", self.rotor_mass_kg, "kg")),
        }.get(self.kind, ())
        for field, value, unit in checks:
            if not np.isfinite(value) or not 0.0 < value < 1e9:
                raise InputError(field, f"must be a number > 0 {unit} (and below 1e9)", value)

    def force_amplitude_n(self, speed_rpm, max_speed_rpm: float):
        """Exciting force amplitude (N, 0-to-peak) at ``speed_rpm``.

        For a balance grade the permissible unbalance is fixed at the maximum
        service speed ``max_speed_rpm`` and the force grows with speed squared.
        """
        omega = rpm_to_rad_s(speed_rpm)
        if self.kind == "force":
            return np.full_like(omega, self.force_n)
        if self.kind == "unbalance":
            return self.unbalance_g_mm * 1e-6 * omega * omega
        if self.kind == "balance_grade":
            unbalance = permissible_unbalance_kg_m(self.balance_grade_mm_s, self.rotor_mass_kg, max_speed_rpm)
            return unbalance * omega * omega
        return np.zeros_like(omega)
