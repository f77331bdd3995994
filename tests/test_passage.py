"""Passage through resonance: the integrator and the run-up simulation against outside references."""
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from scipy.integrate import solve_ivp
from scipy.optimize import minimize_scalar
from scipy.special import fresnel

from core.errors import InputError
from core.passage import (
    lewis_undamped_peak,
    passage_amplification_estimate,
    sdof_response,
    simulate_runup,
    sweep_parameter,
    sweep_peak_fraction,
)


def _mount(mass_kg, natural_frequency_hz, damping_ratio):
    """Stiffness (N/m) and damping (N s/m) giving fn and zeta for a mass."""
    stiffness = mass_kg * (2.0 * np.pi * natural_frequency_hz) ** 2
    return stiffness, 2.0 * damping_ratio * np.sqrt(stiffness * mass_kg)


def _linear_sweep_peak(quality, sweep_parameter_value, natural_frequency_hz=5.0):
    """Peak |x| of a constant-amplitude linear up-sweep 0 -> 2 fn, over the steady resonance peak."""
    zeta = 1.0 / (2.0 * quality)
    stiffness, damping = _mount(1.0, natural_frequency_hz, zeta)
    rate_hz_per_s = sweep_parameter_value * natural_frequency_hz**2 / quality**2   # Zhi et al. eq. 11
    end_hz = 2.0 * natural_frequency_hz
    duration = end_hz / rate_hz_per_s
    time = np.linspace(0.0, duration, int(duration * end_hz * 64) + 1)
    force = np.cos(np.pi * rate_hz_per_s * time**2)          # phase 2 pi (rate t**2 / 2), unit amplitude
    response = sdof_response(1.0, stiffness, damping, time, force)
    # Steady resonance peak of the receptance: 1 / (2 zeta sqrt(1 - zeta**2)) F/k (REFERENCES §1).
    steady_peak = 1.0 / (stiffness * 2.0 * zeta * np.sqrt(1.0 - zeta**2))
    return np.max(np.abs(response.displacement_m)) / steady_peak


# --- the integrator -------------------------------------------------------------------------

@settings(max_examples=25, deadline=None)
@given(fn=st.floats(0.5, 50.0), zeta=st.floats(0.005, 0.9))
def test_step_response_matches_closed_form(fn, zeta):
    # Step force F0 from rest: x = F0/k [1 - exp(-zeta wn t)(cos wd t + zeta/sqrt(1-zeta**2) sin wd t)]
    # (Inman, Engineering Vibration, underdamped step response; Rao, same). The first-order hold
    # is exact for a constant force, so agreement is to round-off (1e-9 of the static deflection
    # allows for the recursion's poles close to z = 1).
    stiffness, damping = _mount(3.0, fn, zeta)
    wn = 2.0 * np.pi * fn
    wd = wn * np.sqrt(1.0 - zeta**2)
    time = np.linspace(0.0, 6.0 / fn, 3001)
    response = sdof_response(3.0, stiffness, damping, time, np.full_like(time, 50.0))
    decay = np.exp(-zeta * wn * time)
    expected = 50.0 / stiffness * (1.0 - decay * (np.cos(wd * time) + zeta / np.sqrt(1 - zeta**2) * np.sin(wd * time)))
    assert np.max(np.abs(response.displacement_m - expected)) < 1e-9 * 50.0 / stiffness


@pytest.mark.parametrize("direction", ["up", "down"])
def test_runup_agrees_with_solve_ivp(direction):
    # Reference: scipy.integrate.solve_ivp (DOP853, tight tolerances) on the same equation of
    # motion, m x'' + c x' + k x = U (W**2 cos phi + W' sin phi), written out independently here.
    mass, fn, zeta, unbalance, speed_rpm, ramp = 500.0, 5.0, 0.05, 0.01, 1500.0, 4.0
    stiffness, damping = _mount(mass, fn, zeta)
    result = simulate_runup(mass, stiffness, damping, unbalance, speed_rpm, ramp, direction)
    omega_op = speed_rpm * 2.0 * np.pi / 60.0
    alpha = omega_op / ramp

    def rhs(t, y):
        if direction == "up":
            w, phase, w_dot = alpha * t, 0.5 * alpha * t * t, alpha
        else:
            w, phase, w_dot = omega_op - alpha * t, omega_op * t - 0.5 * alpha * t * t, -alpha
        force = unbalance * (w * w * np.cos(phase) + w_dot * np.sin(phase))
        return [y[1], (force - damping * y[1] - stiffness * y[0]) / mass]

    if direction == "up":
        y0 = [0.0, 0.0]
    else:   # steady state at operating speed: X = (U/m) r**2 / (1 - r**2 + j 2 zeta r), x = Re(X e^{j W t})
        r = omega_op / (2.0 * np.pi * fn)
        amplitude = unbalance / mass * r**2 / (1.0 - r**2 + 2j * zeta * r)
        y0 = [amplitude.real, -omega_op * amplitude.imag]
    reference = solve_ivp(rhs, (0.0, ramp), y0, method="DOP853", rtol=1e-10, atol=1e-14,
                          t_eval=result.time_s, max_step=1e-3)
    assert reference.success
    peak = np.max(np.abs(reference.y[0]))
    assert np.max(np.abs(reference.y[0] - result.displacement_m)) < 1e-3 * peak
    force = stiffness * reference.y[0] + damping * reference.y[1]
    assert np.max(np.abs(force - result.transmitted_force_n)) < 1e-3 * np.max(np.abs(force))


# --- run-up physics ---------------------------------------------------------------------------

def test_slow_runup_reaches_steady_resonance_peak():
    # Unbalance response X m / U = r**2 / |1 - r**2 + j 2 zeta r| peaks at r = 1/sqrt(1 - 2 zeta**2)
    # with the receptance's height 1 / (2 zeta sqrt(1 - zeta**2)) (REFERENCES §1, receptance peak;
    # Rao/Inman rotating unbalance, from memory). A very slow run-up (sweep parameter 0.02,
    # Zhi et al. 2022: A = 1 - 3e-8) must come within 0.5 % of it, at that speed within 0.5 %.
    mass, fn, zeta, unbalance = 200.0, 5.0, 0.05, 1e-3
    stiffness, damping = _mount(mass, fn, zeta)
    result = simulate_runup(mass, stiffness, damping, unbalance, 600.0, 2000.0, "up", samples_per_period=32)
    steady_peak = unbalance / mass / (2.0 * zeta * np.sqrt(1.0 - zeta**2))
    assert result.peak_displacement_m == pytest.approx(steady_peak, rel=5e-3)
    assert result.peak_displacement_speed_rpm == pytest.approx(60.0 * fn / np.sqrt(1.0 - 2.0 * zeta**2), rel=5e-3)
    # Transmitted force at constant speed: U W**2 |T|, |T| from Vigran eq. 2.33 typed out here,
    # its peak over r found numerically.
    def minus_force(r):
        return -r**2 * np.sqrt((1 + (2 * zeta * r) ** 2) / ((1 - r**2) ** 2 + (2 * zeta * r) ** 2))
    best = minimize_scalar(minus_force, bounds=(0.5, 1.5), method="bounded", options={"xatol": 1e-9})
    steady_force_peak = unbalance * stiffness / mass * -best.fun
    assert result.peak_force_n == pytest.approx(steady_force_peak, rel=5e-3)
    assert result.peak_force_speed_rpm == pytest.approx(60.0 * fn * best.x, rel=5e-3)


def test_steady_values_at_operating_speed():
    # Closed forms, REFERENCES §1: X = (U/m) r**2 / |1 - r**2 + j 2 zeta r|, F_T = U W**2 |T|,
    # with r = 4, zeta = 0.1: |1 - 16 + 0.8j| = 15.0213, |T| = sqrt(1 + 0.64) / 15.0213.
    mass, fn, zeta, unbalance = 100.0, 6.25, 0.1, 2e-3
    stiffness, damping = _mount(mass, fn, zeta)
    result = simulate_runup(mass, stiffness, damping, unbalance, 1500.0, 20.0)
    denominator = np.hypot(15.0, 0.8)
    omega = 50.0 * np.pi
    assert result.steady_displacement_m == pytest.approx(unbalance / mass * 16.0 / denominator, rel=1e-12)
    assert result.steady_force_n == pytest.approx(unbalance * omega**2 * np.sqrt(1.64) / denominator, rel=1e-12)
    assert result.displacement_amplification == pytest.approx(result.peak_displacement_m / result.steady_displacement_m)
    # At the end of the run-up the response settles to the steady amplitude (last envelope window).
    assert result.displacement_envelope_m[-1] == pytest.approx(result.steady_displacement_m, rel=0.1)
    assert result.speed_rpm[0] == 0.0 and result.speed_rpm[-1] == pytest.approx(1500.0)
    # The envelope is made of response samples in time order and holds the overall peak.
    assert np.all(np.diff(result.displacement_envelope_speed_rpm) > 0.0)
    assert result.displacement_envelope_m.max() == result.peak_displacement_m
    assert result.force_envelope_n.max() == result.peak_force_n
    assert np.all(np.isin(result.displacement_envelope_m, np.abs(result.displacement_m)))


def test_coast_down_starts_in_steady_state():
    # Steady state at constant speed (REFERENCES §1): the first envelope window before the
    # coast-down has had time to change anything holds the steady amplitude.
    mass, fn, zeta, unbalance = 100.0, 5.0, 0.08, 2e-3
    stiffness, damping = _mount(mass, fn, zeta)
    result = simulate_runup(mass, stiffness, damping, unbalance, 1800.0, 60.0, "down")
    assert result.speed_rpm[0] == pytest.approx(1800.0) and result.speed_rpm[-1] == pytest.approx(0.0, abs=1e-9)
    assert result.displacement_envelope_m[0] == pytest.approx(result.steady_displacement_m, rel=0.01)
    assert result.peak_displacement_speed_rpm < 300.0     # passes the peak below fn on the way down


@pytest.mark.parametrize("direction", ["up", "down"])
def test_amplification_estimate_follows_simulation(direction):
    # Consistency of the grid estimate with the validated simulation for Q = 10 and 20. The
    # estimate ignores the growth of the unbalance force with speed near resonance, which the
    # simulation keeps; allowance 10 %.
    mass, fn, unbalance, speed_rpm, ramp = 500.0, 5.0, 0.01, 1500.0, 30.0
    for zeta in (0.05, 0.025):
        stiffness, damping = _mount(mass, fn, zeta)
        result = simulate_runup(mass, stiffness, damping, unbalance, speed_rpm, ramp, direction)
        estimate = passage_amplification_estimate(fn, zeta, speed_rpm, ramp)
        assert estimate == pytest.approx(result.displacement_amplification, rel=0.10)


def test_estimate_is_one_without_a_passed_peak():
    # Running below resonance (r = 0.5) or with zeta >= 1/sqrt(2) (no unbalance-response peak,
    # REFERENCES §1 receptance peak exists only for zeta < 1/sqrt(2)): the largest steady
    # response of the run-up is the one at speed.
    assert passage_amplification_estimate(10.0, 0.05, 300.0, 10.0) == 1.0
    assert passage_amplification_estimate(5.0, 0.8, 1500.0, 10.0) == 1.0


# --- published sweep results --------------------------------------------------------------------

def test_sweep_fit_values():
    # Zhi et al., Measurement 201 (2022) 111681, eq. 13: eta_s = 1 -> 0.9427, eta_s = 3 -> 0.8236
    # (REFERENCES §6). Q = 10 at fn = 5 Hz: eta_s = 100 rate / 25.
    assert sweep_parameter(0.25, 5.0, 0.05) == pytest.approx(1.0)
    assert sweep_peak_fraction(0.25, 5.0, 0.05) == pytest.approx(0.9427, abs=5e-5)
    assert sweep_peak_fraction(0.75, 5.0, 0.05) == pytest.approx(0.8236, abs=5e-5)
    assert sweep_peak_fraction(0.0, 5.0, 0.05) == 1.0
    assert np.shape(sweep_peak_fraction(np.array([0.1, 0.2]), 5.0, np.array([[0.05], [0.1]]))) == (2, 2)


@pytest.mark.parametrize("quality", [10.0, 20.0])
@pytest.mark.parametrize("eta, expected", [(1.0, 0.9427), (3.0, 0.8236)])
def test_simulated_linear_sweep_matches_zhi_fit(quality, eta, expected):
    # Zhi et al. (2022): the fit is good to about +-2 % against direct simulation for Q >= 10.
    assert _linear_sweep_peak(quality, eta) == pytest.approx(expected, rel=0.02)


def test_undamped_sweep_matches_lewis():
    # Lewis (1932, from memory): x_max / x_st = 1.467 / sqrt(alpha / wn**2). The coefficient is
    # sqrt(pi)/2 times the largest distance of the Fresnel (Cornu) spiral from its start,
    # checked here with scipy.special.fresnel. The result is asymptotic for alpha / wn**2 -> 0
    # (slowly varying amplitude); at alpha / wn**2 = 2.5e-5 the neglected terms are of order
    # sqrt(alpha)/wn = 0.5 %, so the simulation must agree within 1 %.
    u = np.linspace(-20.0, 20.0, 400001)
    s, c = fresnel(u)
    assert np.sqrt(np.pi) / 2.0 * np.max(np.hypot(c + 0.5, s + 0.5)) == pytest.approx(1.467, abs=5e-4)

    omega_n = 2.0 * np.pi
    alpha = 1e-3
    duration = 1.6 * omega_n / alpha                     # sweep 0 -> 1.6 wn
    time = np.linspace(0.0, duration, int(duration * 1.6 * 64) + 1)
    response = sdof_response(1.0, omega_n**2, 0.0, time, np.cos(0.5 * alpha * time**2))
    simulated = np.max(np.abs(response.displacement_m)) * omega_n**2      # over x_st = F0 / k
    assert simulated == pytest.approx(lewis_undamped_peak(alpha, omega_n), rel=0.01)
    assert lewis_undamped_peak(alpha, omega_n) == pytest.approx(1.467 * omega_n / np.sqrt(alpha))


# --- input errors -----------------------------------------------------------------------------------

GOOD = dict(mass_kg=100.0, stiffness_n_per_m=1e5, damping_n_s_per_m=300.0, unbalance_kg_m=1e-3,
            speed_rpm=1500.0, ramp_s=10.0)


@pytest.mark.parametrize("field, value", [
    ("mass_kg", 0.0), ("mass_kg", float("nan")), ("stiffness_n_per_m", -1.0),
    ("damping_n_s_per_m", -0.1), ("unbalance_kg_m", 0.0), ("speed_rpm", "fast"),
    ("ramp_s", float("inf")), ("direction", "sideways"), ("samples_per_period", 4),
    ("samples_per_period", 32.5),
])
def test_simulate_runup_names_bad_field(field, value):
    with pytest.raises(InputError) as caught:
        simulate_runup(**{**GOOD, field: value})
    assert caught.value.field == field
    assert field in str(caught.value)


def test_undamped_resonant_operation_is_refused_with_field():
    # Undamped at r = 1 the steady amplitude is unbounded (REFERENCES §1, receptance at r = 1, zeta = 0).
    with pytest.raises(InputError) as caught:
        simulate_runup(**{**GOOD, "damping_n_s_per_m": 0.0, "stiffness_n_per_m": 100.0 * (50 * np.pi) ** 2})
    assert caught.value.field == "damping_n_s_per_m"


def test_too_long_run_is_refused_with_field():
    with pytest.raises(InputError) as caught:
        simulate_runup(**{**GOOD, "ramp_s": 1e7})
    assert caught.value.field == "ramp_s"


@pytest.mark.parametrize("call, field", [
    (lambda: sweep_peak_fraction(0.1, 0.0, 0.05), "natural_frequency_hz"),
    (lambda: sweep_peak_fraction(0.1, 5.0, 0.0), "damping_ratio"),
    (lambda: sweep_peak_fraction(float("nan"), 5.0, 0.05), "sweep_rate_hz_per_s"),
    (lambda: lewis_undamped_peak(0.0, 6.0), "alpha_rad_s2"),
    (lambda: lewis_undamped_peak(1.0, -6.0), "omega_n"),
    (lambda: passage_amplification_estimate(5.0, 0.05, 1500.0, 0.0), "ramp_s"),
    (lambda: passage_amplification_estimate(5.0, 0.05, -1.0, 10.0), "speed_rpm"),
    (lambda: sdof_response(1.0, 1.0, 0.0, [0.0, 1.0, 3.0], [0.0, 0.0, 0.0]), "time_s"),
    (lambda: sdof_response(1.0, 1.0, 0.0, [0.0, 1.0, 2.0], [0.0, 0.0]), "force_n"),
    (lambda: sdof_response(1.0, 1.0, 0.0, [0.0, 1.0], [0.0, 0.0], initial_velocity_m_per_s=np.nan),
     "initial_velocity_m_per_s"),
])
def test_estimates_name_bad_field(call, field):
    with pytest.raises(InputError) as caught:
        call()
    assert caught.value.field == field


@pytest.mark.parametrize("zeta", [0.0, 0.01, 0.3, 1.0, 2.5])
@pytest.mark.parametrize("count", [1, 7, 256, 1000])
def test_block_recursion_equals_the_plain_loop(zeta, count):
    # Independent reference: the recursion x[k] = Φ x[k−1] + b[k] stepped one sample at a time,
    # with Φ from scipy.linalg.expm of the state matrix (critical and overdamped cases included).
    import scipy.linalg
    from core.passage import linear_recursion
    omega = 2 * np.pi * 3.0
    a = np.array([[0.0, 1.0], [-omega**2, -2 * zeta * omega]])
    phi = scipy.linalg.expm(a * 1e-3)
    drive = np.random.default_rng(count).normal(size=(count, 2))
    expected = np.zeros((count, 2))
    state = np.zeros(2)
    for k in range(count):
        state = phi @ state + drive[k]
        expected[k] = state
    got = linear_recursion(phi, drive)
    np.testing.assert_allclose(got, expected, rtol=0, atol=1e-9 * np.abs(expected).max())

