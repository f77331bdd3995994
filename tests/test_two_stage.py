"""Two-stage isolation against published check values and python-control.

Each check names its outside source in a comment.
"""
from __future__ import annotations

import math

import control
import numpy as np
import pytest

from core.errors import InputError
from core.two_stage import (
    TwoStageSystem, compare_with_single_stage, single_stage_natural_frequency_hz,
    single_stage_transmissibility, two_stage_modes, two_stage_transmissibility,
)

TWO_PI = 2 * math.pi
# Bies & Hansen two-stage check system (REFERENCES §7): m1 = 10 kg on k1 = 4e5 N/m to ground, m2 = 1
# kg on k2 = 4e5 N/m on m1.
CHECK = dict(intermediate_mass_kg=10.0, lower_stiffness_n_per_m=4e5,
             machine_mass_kg=1.0, upper_stiffness_n_per_m=4e5)


def state_space(system: TwoStageSystem):
    """python-control model: states (x1, x2, v1, v2), input force on m2, output force into ground.

    m1 x1'' = -k1 x1 - c1 x1' + k2 (x2 - x1) + c2 (x2' - x1'); m2 x2'' = F - k2 (x2 - x1) - c2 (x2' - x1');
    ground force = k1 x1 + c1 x1'.
    """
    m1, m2 = system.intermediate_mass_kg, system.machine_mass_kg
    k1, k2 = system.lower_stiffness_n_per_m, system.upper_stiffness_n_per_m
    c1, c2 = system.lower_damping_n_s_per_m, system.upper_damping_n_s_per_m
    a = [[0, 0, 1, 0], [0, 0, 0, 1],
         [-(k1 + k2) / m1, k2 / m1, -(c1 + c2) / m1, c2 / m1],
         [k2 / m2, -k2 / m2, c2 / m2, -c2 / m2]]
    return control.ss(a, [[0], [0], [0], [1 / m2]], [[k1, 0, c1, 0]], [[0]])


def test_published_check_values_undamped():
    # REFERENCES §7 (Bies & Hansen): |T| at 300 Hz = 1.463e-3, at 1000 Hz = 1.0392e-5.
    system = TwoStageSystem(**CHECK)
    t = np.abs(two_stage_transmissibility(system, TWO_PI * np.array([300.0, 1000.0])))
    assert t[0] == pytest.approx(1.463e-3, rel=5e-4)
    assert t[1] == pytest.approx(1.0392e-5, rel=5e-5)


def test_high_frequency_asymptote():
    # Bies & Hansen (REFERENCES §7): T -> k1 k2 / (w^4 m1 m2) at high frequency, -80 dB/decade undamped.
    system = TwoStageSystem(**CHECK)
    omega = TWO_PI * np.array([1e4, 1e5])
    t = np.abs(two_stage_transmissibility(system, omega))
    asymptote = 4e5 * 4e5 / (omega ** 4 * 10.0 * 1.0)
    assert t[0] == pytest.approx(asymptote[0], rel=2e-3)
    assert t[1] == pytest.approx(asymptote[1], rel=2e-5)
    assert 20 * math.log10(t[1] / t[0]) == pytest.approx(-80.0, abs=0.02)


def test_natural_frequencies_of_two_mass_chain():
    # REFERENCES §5 (Vigran §2.5, Fig. 2.11): 1 kg machine on 4e5 N/m on a 10 kg mass on 4e5 N/m
    # -> 30.2 and 106.0 Hz.
    modes = two_stage_modes(TwoStageSystem(**CHECK))
    assert modes.natural_frequencies_hz[0] == pytest.approx(30.2, abs=0.05)
    assert modes.natural_frequencies_hz[1] == pytest.approx(106.0, abs=0.05)
    # With the intermediate mass made rigid (very stiff lower mounts) the machine alone: 100.66 Hz
    # (Vigran §2.5, REFERENCES §5, "100 Hz"); the upper frequency moves to the lower mounts.
    stiff = two_stage_modes(TwoStageSystem(10.0, 4e11, 1.0, 4e5))
    assert stiff.natural_frequencies_hz[0] == pytest.approx(100.66, abs=0.01)
    assert single_stage_natural_frequency_hz(TwoStageSystem(**CHECK)) == pytest.approx(100.66, abs=0.01)


def test_natural_frequencies_match_python_control_poles():
    # python-control: undamped poles of the state-space model are +-j wn.
    system = TwoStageSystem(**CHECK)
    poles = control.poles(state_space(system))
    from_poles = np.sort(np.abs(poles.imag))[::2] / TWO_PI
    assert np.allclose(two_stage_modes(system).natural_frequencies_hz, from_poles, rtol=1e-9)


@pytest.mark.parametrize("c1, c2", [(0.0, 0.0), (150.0, 20.0), (800.0, 0.0), (0.0, 60.0)])
def test_transmissibility_matches_python_control_state_space(c1, c2):
    # python-control: control.frequency_response of control.ss(A, B, C, D), output = ground force.
    system = TwoStageSystem(**CHECK, lower_damping_n_s_per_m=c1, upper_damping_n_s_per_m=c2)
    omega = TWO_PI * np.geomspace(1.0, 3000.0, 400)
    if c1 == c2 == 0.0:
        omega = omega[np.min(np.abs(omega[:, None] / TWO_PI - [30.214, 106.046]), axis=1) > 0.5]
    reference = control.frequency_response(state_space(system), omega)
    ours = two_stage_transmissibility(system, omega)
    assert np.allclose(ours, reference.complex.ravel(), rtol=1e-8, atol=0)
    assert np.allclose(np.abs(ours), reference.magnitude.ravel(), rtol=1e-8)


def test_hysteretic_damping_matches_direct_complex_solve_and_frd():
    # Independent method: solve (K (1 + j eta) - w^2 M) x = F with numpy.linalg.solve per frequency,
    # ground force = k1 (1 + j eta1) x1; wrapped as a python-control FRD (REFERENCES §8, non-rational).
    eta1, eta2 = 0.2, 0.1
    system = TwoStageSystem(**CHECK, lower_loss_factor=eta1, upper_loss_factor=eta2)
    omega = TWO_PI * np.geomspace(5.0, 2000.0, 200)
    k1, k2 = 4e5 * (1 + 1j * eta1), 4e5 * (1 + 1j * eta2)
    direct = []
    for w in omega:
        dynamic = np.array([[k1 + k2 - w * w * 10.0, -k2], [-k2, k2 - w * w * 1.0]])
        x = np.linalg.solve(dynamic, np.array([0.0, 1.0]))
        direct.append(k1 * x[0])
    frd = control.frd(np.array(direct), omega)
    reference = control.frequency_response(frd, omega)
    assert np.allclose(two_stage_transmissibility(system, omega), reference.complex.ravel(), rtol=1e-10)


def test_single_stage_comparison_matches_transfer_function():
    # python-control tf of the machine on the upper mount to ground: (c s + k)/(m s^2 + c s + k)
    # (viscous T(s), Vigran eq. 2.32 / REFERENCES §8); gain = 20 log10(|T single| / |T two|).
    system = TwoStageSystem(**CHECK, lower_damping_n_s_per_m=150.0, upper_damping_n_s_per_m=20.0)
    speed = TWO_PI * 300.0
    single = control.tf([20.0, 4e5], [1.0, 20.0, 4e5])
    one = abs(control.frequency_response(single, [speed]).complex.ravel()[0])
    two = abs(control.frequency_response(state_space(system), [speed]).complex.ravel()[0])
    comparison = compare_with_single_stage(system, speed)
    assert comparison.single_stage_transmissibility == pytest.approx(one, rel=1e-9)
    assert comparison.two_stage_transmissibility == pytest.approx(two, rel=1e-9)
    assert comparison.gain_db == pytest.approx(20 * math.log10(one / two), abs=1e-9)
    assert comparison.gain_db > 0
    assert comparison.natural_frequencies_hz == pytest.approx([30.2, 106.0], abs=0.05)


def test_gain_undamped_at_300_hz_from_published_values():
    # Bies & Hansen (REFERENCES §7): two-stage 1.463e-3; single stage 1/(r^2 - 1) with r = 300/100.66
    # (Vigran eq. 2.33, zeta = 0; fn = 100.66 Hz, Vigran §2.5) -> 0.1269; gain = 38.8 dB.
    comparison = compare_with_single_stage(TwoStageSystem(**CHECK), TWO_PI * 300.0)
    r = 300.0 / 100.658
    assert comparison.single_stage_transmissibility == pytest.approx(1 / (r * r - 1), rel=1e-4)
    assert comparison.gain_db == pytest.approx(20 * math.log10(1 / (r * r - 1) / 1.463e-3), abs=0.01)


def test_single_stage_hysteretic_uses_loss_factor():
    # REFERENCES §1 (Vinokur 2023): eta = 0.5, r = 2 -> |T| = 0.3676.
    system = TwoStageSystem(10.0, 4e5, 1.0, 4e5, upper_loss_factor=0.5)
    fn = single_stage_natural_frequency_hz(system)
    assert abs(single_stage_transmissibility(system, TWO_PI * 2 * fn)) == pytest.approx(0.3676, rel=2e-4)


@pytest.mark.parametrize("kwargs, field", [
    (dict(CHECK, intermediate_mass_kg=0.0), "intermediate_mass_kg"),
    (dict(CHECK, upper_stiffness_n_per_m=float("nan")), "upper_stiffness_n_per_m"),
    (dict(CHECK, lower_damping_n_s_per_m=-1.0), "lower_damping_n_s_per_m"),
    (dict(CHECK, upper_loss_factor=3.0), "upper_loss_factor"),
    (dict(CHECK, lower_damping_n_s_per_m=10.0, lower_loss_factor=0.1), "lower_loss_factor"),
    (dict(CHECK, machine_mass_kg="heavy"), "machine_mass_kg"),
])
def test_bad_inputs_name_the_field(kwargs, field):
    with pytest.raises(InputError) as info:
        TwoStageSystem(**kwargs)
    assert info.value.field == field


def test_operating_speed_on_undamped_resonance_is_refused():
    system = TwoStageSystem(**CHECK)
    wn = TWO_PI * single_stage_natural_frequency_hz(system)
    with pytest.raises(InputError) as info:
        compare_with_single_stage(system, wn)
    assert info.value.field == "operating_speed_rad_s"
    with pytest.raises(InputError):
        compare_with_single_stage(system, -5.0)
