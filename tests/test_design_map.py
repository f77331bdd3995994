"""Design map against closed forms and scipy.signal."""
import numpy as np
import pytest
from scipy import signal
from scipy.optimize import brentq

from core.design_map import MapLimits, design_map, static_deflection_mm
from core.errors import InputError
from core.passage import passage_amplification_estimate


def _vigran_abs_t(r, zeta):
    """|T| = sqrt((1 + (2 zeta r)**2) / ((1 - r**2)**2 + (2 zeta r)**2)), Vigran eq. 2.33 (REFERENCES §1)."""
    return np.sqrt((1 + (2 * zeta * r) ** 2) / ((1 - r**2) ** 2 + (2 * zeta * r) ** 2))


def test_axes_are_log_spaced_with_the_asked_ends():
    result = design_map(1500.0, (2.0, 20.0), (0.01, 0.4), frequency_points=41, damping_points=31)
    assert result.natural_frequency_hz.shape == (41,) and result.damping_ratio.shape == (31,)
    assert result.natural_frequency_hz[[0, -1]] == pytest.approx([2.0, 20.0], rel=1e-12)
    assert result.damping_ratio[[0, -1]] == pytest.approx([0.01, 0.4], rel=1e-12)
    assert np.allclose(np.diff(np.log(result.natural_frequency_hz)), np.log(10.0) / 40.0)
    assert result.transmissibility.shape == (41, 31)
    assert result.frequency_ratio == pytest.approx(25.0 / result.natural_frequency_hz)


def test_transmissibility_matches_scipy_freqresp():
    # Independent reference: scipy.signal.freqresp on T(s) = (2 zeta wn s + wn**2) / (s**2 + 2 zeta wn s + wn**2)
    # (REFERENCES §8), evaluated at the operating angular speed for sampled grid points.
    result = design_map(1480.0, (0.8, 60.0), (0.002, 1.5), frequency_points=37, damping_points=23)
    omega = 1480.0 * 2.0 * np.pi / 60.0
    for i in (0, 5, 11, 18, 24, 36):
        for j in (0, 4, 9, 15, 22):
            wn = 2.0 * np.pi * result.natural_frequency_hz[i]
            zeta = result.damping_ratio[j]
            _, response = signal.freqresp(([2 * zeta * wn, wn**2], [1.0, 2 * zeta * wn, wn**2]), [omega])
            assert result.transmissibility[i, j] == pytest.approx(abs(response[0]), rel=1e-9)
            assert result.transmissibility_db[i, j] == pytest.approx(20 * np.log10(abs(response[0])), abs=1e-8)
            assert result.isolation_percent[i, j] == pytest.approx((1 - abs(response[0])) * 100, abs=1e-8)


def test_reference_check_value():
    # REFERENCES §8: zeta = 0.1, wn = 2 pi 5, w = 2 wn -> |T| = 0.35586 (and Vigran's table: 0.3559).
    result = design_map(600.0, (5.0, 50.0), (0.1, 0.5), frequency_points=3, damping_points=3)
    assert result.transmissibility[0, 0] == pytest.approx(0.35586, abs=5e-6)


@pytest.mark.parametrize("ratio", [1.0, 1.4])
def test_static_deflection_contour_matches_rule(ratio):
    # fn[Hz] = 15.761 / sqrt(delta[mm]) (common practice, coefficient from g; REFERENCES §2), with the
    # natural frequency on the dynamic stiffness fn = fn,static sqrt(K_dyn / K_stat) (REFERENCES §2).
    result = design_map(1500.0, (0.5, 40.0), (0.01, 0.3), frequency_points=301, damping_points=5,
                        dynamic_to_static_ratio=ratio)
    log_fn = np.log(result.natural_frequency_hz)
    for delta_mm in (1.0, 9.936, 25.4, 100.0):
        column = result.static_deflection_mm[:, 2]
        # the field falls with fn: interpolate log fn against log delta along the axis
        contour_hz = np.exp(np.interp(np.log(delta_mm), np.log(column[::-1]), log_fn[::-1]))
        assert contour_hz == pytest.approx(15.761 * np.sqrt(ratio / delta_mm), rel=1e-4)
    assert np.all(result.static_deflection_mm == result.static_deflection_mm[:, :1])
    # REFERENCES §2 checks: 1 mm -> 15.76 Hz, fn = 5 Hz -> 9.936 mm.
    assert static_deflection_mm(15.761) == pytest.approx(1.0, rel=1e-4)
    assert static_deflection_mm(5.0) == pytest.approx(9.936, rel=1e-4)


def test_feasibility_mask_against_undamped_rule_and_deflection_limit():
    # Lowest damping (1e-4, practically undamped): 90 % isolation needs r >= sqrt(1 + 1/(1 - 0.9)) = 3.3166
    # (REFERENCES §2); a 25.4 mm deflection limit needs fn >= 3.127 Hz (REFERENCES §2, common practice).
    speed = 1500.0
    result = design_map(speed, (1.0, 20.0), (1e-4, 0.5), frequency_points=400, damping_points=50,
                        limits=MapLimits(min_isolation_percent=90.0, max_static_deflection_mm=25.4))
    fn = result.natural_frequency_hz
    column = result.feasible[:, 0]
    upper = 25.0 / 3.3166
    clearly_in = (fn > 3.127 * 1.002) & (fn < upper / 1.002)
    clearly_out = (fn < 3.127 / 1.002) | (fn > upper * 1.002)
    assert column[clearly_in].all() and not column[clearly_out].any()
    assert result.meets_passage.all()       # no passage limit given


def test_isolation_mask_against_damped_boundary():
    # |T| = 0.1 boundary found by root-finding on Vigran eq. 2.33 typed out in this test (REFERENCES §1).
    result = design_map(1200.0, (0.5, 10.0), (0.01, 0.3), frequency_points=500, damping_points=7,
                        limits=MapLimits(min_isolation_percent=90.0))
    fn = result.natural_frequency_hz
    for j, zeta in enumerate(result.damping_ratio):
        r_needed = brentq(lambda r: _vigran_abs_t(r, zeta) - 0.1, 1.5, 100.0, xtol=1e-12)
        boundary_hz = 20.0 / r_needed
        assert result.meets_isolation[fn < boundary_hz / 1.001, j].all()
        assert not result.meets_isolation[fn > boundary_hz * 1.001, j].any()
    assert result.meets_isolation[0, 0] and not result.meets_isolation[-1, 0]


def test_passage_field_and_mask():
    # The map holds the passage estimate of core.passage at every point (consistency) and the mask
    # applies the limit; below resonance (r < 1) nothing is passed and the estimate is 1.
    result = design_map(900.0, (2.0, 30.0), (0.01, 0.5), frequency_points=60, damping_points=40, ramp_s=8.0,
                        limits=MapLimits(max_passage_amplification=6.0))
    for i, j in ((3, 2), (20, 10), (50, 39)):
        expected = passage_amplification_estimate(result.natural_frequency_hz[i], result.damping_ratio[j], 900.0, 8.0)
        assert result.passage_amplification[i, j] == pytest.approx(float(expected), rel=1e-12)
    assert np.array_equal(result.meets_passage, result.passage_amplification <= 6.0)
    assert np.all(result.passage_amplification[result.frequency_ratio < 1.0] == 1.0)
    # More damping lowers the resonance peak: the estimate falls along the damping axis at r = 4.
    i = int(np.argmin(np.abs(result.frequency_ratio - 4.0)))
    assert np.all(np.diff(result.passage_amplification[i]) < 0.0)
    # Feasible = every limit met; with no isolation or deflection limit, it is the passage mask.
    assert np.array_equal(result.feasible, result.meets_passage)
    assert result.meets_passage.any() and not result.meets_passage.all()


@pytest.mark.parametrize("kwargs, field", [
    (dict(speed_rpm=0.0), "machine.speed_rpm"),
    (dict(natural_frequency_range_hz=(5.0, 2.0)), "natural_frequency_range_hz"),
    (dict(natural_frequency_range_hz=(0.0, 2.0)), "natural_frequency_range_hz"),
    (dict(damping_ratio_range=(0.0, 0.5)), "damping_ratio_range"),
    (dict(damping_ratio_range="wide"), "damping_ratio_range"),
    (dict(frequency_points=1), "frequency_points"),
    (dict(damping_points=2.5), "damping_points"),
    (dict(dynamic_to_static_ratio=0.5), "damping.dynamic_stiffness_ratio"),
    (dict(ramp_s=0.0), "ramp_s"),
    (dict(limits=MapLimits(min_isolation_percent=100.0)), "tuning.isolation_percent"),
    (dict(limits=MapLimits(max_static_deflection_mm=-1.0)), "limits.max_static_deflection_mm"),
    (dict(limits=MapLimits(max_passage_amplification=0.5)), "limits.max_passage_amplification"),
])
def test_bad_input_names_field(kwargs, field):
    arguments = dict(speed_rpm=1500.0)
    arguments.update(kwargs)
    with pytest.raises(InputError) as caught:
        design_map(**arguments)
    assert caught.value.field == field
