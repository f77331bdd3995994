"""Core speed: transmissibility on a 2000-point grid against python-control and the bare
numpy expression; design map, six-degree-of-freedom modes and run-up simulation with their
growth when the grid, the mount count or the run length doubles."""
from __future__ import annotations

import importlib.util

import numpy as np

from bench.timing import per_call_seconds

GRID_POINTS = 2000
ZETA = 0.05


def frequency_response_speed(repeats: int) -> dict:
    """Magnitude and phase of T on 2000 ratios: ours, python-control, bare numpy."""
    import control
    from core.transmissibility import Damping, frequency_response

    ratio = np.geomspace(0.05, 100.0, GRID_POINTS)
    damping = Damping("viscous", ZETA)
    # T(s) = (2 zeta s + 1) / (s^2 + 2 zeta s + 1) with omega_n = 1 rad/s, so omega = r.
    system = control.tf([2.0 * ZETA, 1.0], [1.0, 2.0 * ZETA, 1.0])

    def ours():
        response = frequency_response(ratio, damping)
        return response.magnitude, response.phase_deg

    def with_control():
        response = control.frequency_response(system, ratio)
        return response.magnitude, np.degrees(response.phase)

    def bare():
        two_zeta_r = 2.0 * ZETA * ratio
        response = (1.0 + 1j * two_zeta_r) / ((1.0 - ratio * ratio) + 1j * two_zeta_r)
        return np.abs(response), np.degrees(np.angle(response))

    def bare_real():
        # The same |T| and phase in real arithmetic (Vigran eq. 2.33 and the angle of
        # (1 + j a)(1 - r^2 - j a)), written inline with no function around it.
        a = 2.0 * ZETA * ratio
        r2 = ratio * ratio
        below = 1.0 - r2
        a2 = a * a
        return np.sqrt((1.0 + a2) / (below * below + a2)), np.degrees(-np.arctan2(a * r2, below + a2))

    # The three must agree before their speed means anything.
    reference_magnitude, reference_phase = bare()
    for function in (ours, with_control, bare_real):
        magnitude, phase = function()
        magnitude = np.ravel(magnitude)
        phase = np.ravel(phase)
        assert np.allclose(magnitude, reference_magnitude, rtol=1e-9), function.__name__
        wrapped = (phase - reference_phase + 180.0) % 360.0 - 180.0
        assert np.allclose(wrapped, 0.0, atol=1e-6), function.__name__
    times = {name: per_call_seconds(function, repeats) for name, function in
             (("ours", ours), ("python_control", with_control), ("bare_numpy", bare),
              ("bare_numpy_real", bare_real))}
    floor = min(times["bare_numpy"], times["bare_numpy_real"])   # the faster bare form is the floor
    return {
        "core_response_us": times["ours"] * 1e6,
        "python_control_response_us": times["python_control"] * 1e6,
        "bare_numpy_response_us": times["bare_numpy"] * 1e6,
        "bare_numpy_real_response_us": times["bare_numpy_real"] * 1e6,
        "core_speedup_vs_python_control": times["python_control"] / times["ours"],
        "core_time_vs_numpy_floor": times["ours"] / floor,
    }


def _available(name: str) -> bool:
    try:
        return importlib.util.find_spec(name) is not None
    except ImportError:
        return False


def design_map_speed(repeats: int) -> dict:
    if not _available("core.design_map"):
        return {"design_map_note": "core/design_map.py absent: skipped"}
    from core.design_map import design_map
    small = per_call_seconds(lambda: design_map(1480.0, frequency_points=300, damping_points=300), repeats)
    large = per_call_seconds(lambda: design_map(1480.0, frequency_points=600, damping_points=600), repeats)
    return {"design_map_300_ms": small * 1e3, "design_map_600_ms": large * 1e3,
            "design_map_growth_per_doubling": large / small}


def rigid_body_speed(repeats: int) -> dict:
    if not _available("core.rigid_body"):
        return {"rigid_body_note": "core/rigid_body.py absent: skipped"}
    from core.rigid_body import Mount, RigidBody, box_inertia, modes

    body = RigidBody(1200.0, box_inertia(1200.0, 2.0, 1.2, 1.0).inertia_kg_m2, (0.05, -0.02, 0.45))

    def mounts(count):
        per_side = count // 2
        xs = np.linspace(-0.9, 0.9, per_side)
        return [Mount((x, y, 0.0), (2.0e5, 2.0e5, 6.0e5), damping_n_s_per_m=(500.0, 500.0, 900.0))
                for x in xs for y in (-0.5, 0.5)]

    four, eight = mounts(4), mounts(8)
    first = per_call_seconds(lambda: modes(body, four), repeats)
    second = per_call_seconds(lambda: modes(body, eight), repeats)
    return {"rigid_body_modes_4_mounts_us": first * 1e6, "rigid_body_modes_8_mounts_us": second * 1e6,
            "rigid_body_growth_per_doubling": second / first}


def passage_speed(repeats: int) -> dict:
    if not _available("core.passage"):
        return {"passage_note": "core/passage.py absent: skipped"}
    from core.passage import simulate_runup

    mass, fn_hz, zeta = 800.0, 4.0, 0.05
    stiffness = mass * (2 * np.pi * fn_hz) ** 2
    damping = 2 * zeta * np.sqrt(stiffness * mass)

    def run(ramp_s):
        return simulate_runup(mass, stiffness, damping, 0.002, 1480.0, ramp_s)

    short = per_call_seconds(lambda: run(30.0), max(3, repeats // 2), min_time_s=0.02)
    long = per_call_seconds(lambda: run(60.0), max(3, repeats // 2), min_time_s=0.02)
    return {"runup_30s_ms": short * 1e3, "runup_60s_ms": long * 1e3, "runup_growth_per_doubling": long / short,
            "runup_30s_samples": int(len(run(30.0).time_s)) if hasattr(run(30.0), "time_s") else None}
