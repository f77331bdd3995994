"""Human-readable rows of an evaluation: label and value with its unit (SI).

Used by the command line's table and the review sheet, so both say the same.
"""
from __future__ import annotations


def _list(values, scale=1.0, digits=4) -> str:
    shown = [f"{v * scale:.{digits}g}" for v in values]
    if len(set(shown)) == 1:
        return f"{shown[0]} (each of {len(shown)})"
    return ", ".join(shown)


def summary_rows(values: dict) -> list[tuple[str, str]]:
    """(label, text) rows for an evaluation dict from :func:`core.evaluate.evaluate_project`."""
    speed = f"{values['speed_rpm']:.6g} r/min"
    if values["speed_max_rpm"] != values["speed_rpm"]:
        speed = f"{values['speed_rpm']:.6g} to {values['speed_max_rpm']:.6g} r/min"
    ratio = f"{values['frequency_ratio']:.4g}"
    if values["frequency_ratio_max"] != values["frequency_ratio"]:
        ratio += f" to {values['frequency_ratio_max']:.4g}"
    damping_label = ("damping per mount (equivalent viscous at speed)"
                     if values["damping_is_equivalent_viscous"] else "damping per mount")
    rows = [
        ("operating speed", speed),
        ("natural frequency", f"{values['natural_frequency_hz']:.4g} Hz ({values['natural_frequency_rpm']:.5g} r/min)"),
        ("frequency ratio ω/ωn", ratio),
        ("transmissibility at speed", f"{values['transmissibility']:.4g}"),
        ("isolation at speed", f"{values['isolation_percent']:.4g} % ({values['isolation_db']:.4g} dB reduction)"),
        ("phase at speed", f"{values['phase_deg']:.4g}° (lag negative)"),
        ("worst over speed range", f"{values['worst_transmissibility']:.4g} at {values['worst_speed_rpm']:.6g} r/min"),
        ("resonance peak", "unbounded (no damping)" if values["peak_transmissibility"] is None else
         f"{values['peak_transmissibility']:.4g} at ω/ωn = {values['peak_frequency_ratio']:.4g}"),
        ("static deflection", f"{values['static_deflection_mm']:.4g} mm"),
        ("load per mount", _list(values["load_per_mount_n"], digits=5) + " N"),
        ("stiffness per mount (dynamic)", _list(values["stiffness_per_mount_n_per_m"], 1e-3) + " N/mm"),
        ("stiffness total (dynamic)", f"{values['stiffness_total_n_per_m'] * 1e-3:.5g} N/mm"),
        (damping_label, _list(values["damping_per_mount_n_s_per_m"]) + " N·s/m"),
        ("damping total", f"{values['damping_total_n_s_per_m']:.5g} N·s/m"),
    ]
    if "excitation_force_n" in values:
        rows += [
            ("exciting force at speed", f"{values['excitation_force_n']:.5g} N (0-to-peak)"),
            ("transmitted force total", f"{values['transmitted_force_n']:.5g} N (0-to-peak)"),
            ("transmitted force per mount", _list(values["transmitted_force_per_mount_n"]) + " N"),
            ("machine displacement", f"{values['machine_displacement_mm']:.4g} mm (0-to-peak)"),
            ("machine velocity", f"{values['machine_velocity_mm_s']:.4g} mm/s 0-to-peak, "
                                 f"{values['machine_velocity_rms_mm_s']:.4g} mm/s RMS"),
        ]
    return rows
