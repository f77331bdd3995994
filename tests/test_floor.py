"""Floor vibration: one-third-octave bands, criteria, prediction, check and inverse design.

Each check names its outside source in a comment.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import integrate, signal

from core.errors import InputError, TargetUnreachable
from core.floor import (
    CRITERIA, check_criterion, criterion_by_name, flat_floor_spectrum, floor_spectrum,
    max_natural_frequency_for_criterion, parse_floor_csv, parse_floor_rows,
    predict_equipment_spectrum, static_deflection_m, third_octave_bands,
)

UM = 1e-6  # m/s per µm/s


def viscous_tf(zeta: float, fn_hz: float):
    """T(s) = (2 zeta wn s + wn^2) / (s^2 + 2 zeta wn s + wn^2) (REFERENCES §8, Laplace form of Vigran eq. 2.32)."""
    wn = 2 * np.pi * fn_hz
    return [2 * zeta * wn, wn * wn], [1.0, 2 * zeta * wn, wn * wn]


# --------------------------------------------------------------------------- bands

# IEC 61260-1 nominal one-third-octave centres, 1 to 80 Hz (from memory of the
# standard's nominal series).
IEC_NOMINAL_1_TO_80 = [1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8, 10, 12.5, 16, 20, 25, 31.5,
                       40, 50, 63, 80]


def test_band_nominal_labels_match_iec_61260_series():
    bands = third_octave_bands(1.0, 80.0)
    assert bands.nominal_hz.tolist() == IEC_NOMINAL_1_TO_80


def test_band_exact_centres_are_base_10_and_near_nominal():
    # IEC 61260-1 base-10 system: exact mid-band fm = 10^(n/10) Hz (1000 Hz reference).
    bands = third_octave_bands(1.0, 80.0)
    assert np.allclose(bands.centre_hz, [10 ** (n / 10) for n in range(20)], rtol=1e-14)
    assert np.allclose(bands.centre_hz, IEC_NOMINAL_1_TO_80, rtol=0.02)
    # Edges fm * 10^(±1/20): adjacent bands touch and each spans a tenth of a decade.
    assert np.allclose(bands.upper_hz / bands.lower_hz, 10 ** 0.1)
    assert np.allclose(bands.upper_hz[:-1], bands.lower_hz[1:])


def test_band_range_up_to_200_hz():
    bands = third_octave_bands(1.0, 200.0)  # IEC nominal series continues 100, 125, 160, 200
    assert bands.nominal_hz[-4:].tolist() == [100, 125, 160, 200]
    assert bands.index.size == 24


def test_non_band_frequency_is_refused_with_nearest_centre():
    with pytest.raises(InputError, match="nearest centre is 1.6 Hz") as info:
        third_octave_bands(1.5, 80.0)
    assert info.value.field == "low_hz"


# --------------------------------------------------------------------------- criteria


@pytest.mark.parametrize("name, limit_um_s", [
    # REFERENCES §4 (B. Davis 2008 note; ASHRAE TC 2.6 table; IEST-RP-CC012), metric definition.
    ("VC-A", 50.0), ("VC-B", 25.0), ("VC-C", 12.5), ("VC-D", 6.25),
    ("VC-E", 3.12), ("VC-F", 1.56), ("VC-G", 0.78),
    # ISO 2631-2 (1989) building lines, from memory (ASHRAE TC 2.6 table).
    ("ISO 2631-2 operating theatre", 100.0), ("ISO 2631-2 residential (day)", 200.0),
    ("ISO 2631-2 office", 400.0), ("ISO 2631-2 workshop", 800.0),
])
def test_criterion_values(name, limit_um_s):
    criterion = criterion_by_name(name)
    assert criterion.velocity_limit_m_s == pytest.approx(limit_um_s * UM, rel=1e-12)
    assert criterion.source


def test_vc_uses_metric_definition_not_inch():
    # REFERENCES §4 (B. Davis 2008 note): the inch definition (2000 µin/s = 50.8 µm/s for VC-A)
    # differs by 1.6 %.
    assert criterion_by_name("vc-a").velocity_limit_m_s == pytest.approx(50e-6, rel=1e-12)
    assert criterion_by_name("VC-A").velocity_limit_m_s != pytest.approx(2000 * 25.4e-9, rel=1e-3)


def test_vc_range_is_1_to_80_hz_and_iso_constant_part_8_to_80_hz():
    # REFERENCES §4 (B. Davis 2008; IEST-RP-CC012): VC constant 1-80 Hz; ISO 2631-2 constant-
    # velocity part 8-80 Hz (from memory).
    bands = third_octave_bands(0.8, 100.0).nominal_hz
    vc = criterion_by_name("VC-D").covers(bands)
    iso = criterion_by_name("ISO 2631-2 office").covers(bands)
    assert bands[vc].tolist() == IEC_NOMINAL_1_TO_80
    assert bands[iso].tolist() == IEC_NOMINAL_1_TO_80[9:]
    assert len(CRITERIA) == 11


def test_unknown_criterion_names_the_choices():
    with pytest.raises(InputError, match="VC-A, VC-B") as info:
        criterion_by_name("VC-Z")
    assert info.value.field == "criterion"


# --------------------------------------------------------------------------- prediction


@pytest.mark.parametrize("zeta, fn_hz", [(0.05, 4.0), (0.1, 12.0), (0.3, 2.2)])
def test_band_centre_transmissibility_matches_scipy_freqresp(zeta, fn_hz):
    # scipy.signal.freqresp of the viscous T(s) (REFERENCES §8), evaluated at exact band centres.
    floor = flat_floor_spectrum(3 * UM, 1.0, 200.0)
    prediction = predict_equipment_spectrum(floor, fn_hz, damping_ratio=zeta)
    _, response = signal.freqresp(viscous_tf(zeta, fn_hz), 2 * np.pi * floor.band_hz)
    assert np.allclose(prediction.transmissibility, np.abs(response), rtol=1e-10)
    assert np.allclose(prediction.equipment_velocity_m_s, 3 * UM * np.abs(response), rtol=1e-10)


def test_reference_point_zeta_0_1_at_twice_fn():
    # REFERENCES §8 (python-control/scipy check of Vigran eq. 2.33): zeta = 0.1, w = 2 wn -> |T|
    # = 0.35586. Band 10 Hz (exact), fn = 5 Hz.
    floor = floor_spectrum([10.0], [1 * UM])
    prediction = predict_equipment_spectrum(floor, 5.0, damping_ratio=0.1)
    assert prediction.transmissibility[0] == pytest.approx(0.35586, rel=2e-5)


def test_hysteretic_prediction_matches_published_table():
    # REFERENCES §1 (Vinokur 2023; Snowdon NBS 128): eta = 0.5, r = 2 -> 0.3676.
    floor = floor_spectrum([10.0, 25.0], [1 * UM, 1 * UM])
    prediction = predict_equipment_spectrum(floor, 5.0, loss_factor=0.5)
    assert prediction.transmissibility[0] == pytest.approx(0.3676, rel=2e-4)
    centre_ratio = 10 ** 1.4 / 5.0  # exact 25 Hz centre is 25.119 Hz, r = 5.024
    # Vinokur 2023 / Snowdon formula (REFERENCES §1): |T| = sqrt((1 + eta^2) / ((1 - r^2)^2 + eta^2)).
    expected = math.sqrt((1 + 0.25) / ((1 - centre_ratio ** 2) ** 2 + 0.25))
    assert prediction.transmissibility[1] == pytest.approx(expected, rel=1e-10)


def test_stroke_matches_relative_displacement_transfer_function():
    # Relative deflection z = x - y of m z'' + c z' + k z = -m y'': Z/Y(s) = -s^2/(s^2 + 2 zeta
    # wn s + wn^2),
    # |Z/Y| = r^2/sqrt((1-r^2)^2 + (2 zeta r)^2) (Rao / Inman, from memory; REFERENCES §1);
    # scipy.signal.freqresp evaluates it.
    zeta, fn = 0.08, 6.0
    wn = 2 * np.pi * fn
    floor = floor_spectrum([2.0, 5.0, 6.3, 20.0, 80.0], [4 * UM, 2 * UM, 3 * UM, 1 * UM, 0.5 * UM])
    prediction = predict_equipment_spectrum(floor, fn, damping_ratio=zeta)
    omega = 2 * np.pi * floor.band_hz
    _, relative = signal.freqresp(([-1.0, 0.0, 0.0], [1.0, 2 * zeta * wn, wn * wn]), omega)
    expected = floor.velocity_m_s / omega * np.abs(relative)
    assert np.allclose(prediction.stroke_rms_m, expected, rtol=1e-10)
    assert prediction.stroke_total_rms_m == pytest.approx(math.sqrt(np.sum(expected ** 2)), rel=1e-12)
    # Far above resonance the mass stands still and the mount strokes by the floor displacement.
    assert prediction.stroke_rms_m[-1] == pytest.approx(0.5 * UM / omega[-1], rel=0.01)


def test_band_average_rule_matches_quadrature():
    # scipy.integrate.quad of |T(f)|^2 over the band edges fc 10^(±1/20) (IEC 61260-1 base-10 edges).
    zeta, fn = 0.1, 7.0
    floor = flat_floor_spectrum(1 * UM, 4.0, 16.0)
    prediction = predict_equipment_spectrum(floor, fn, damping_ratio=zeta, band_rule="band-average")
    num, den = viscous_tf(zeta, fn)
    for centre, factor in zip(floor.band_hz, prediction.transmissibility):
        lower, upper = centre * 10 ** -0.05, centre * 10 ** 0.05

        def squared(f):
            return abs(signal.freqresp((num, den), [2 * np.pi * f])[1][0]) ** 2

        mean, _ = integrate.quad(squared, lower, upper, limit=200)
        assert factor == pytest.approx(math.sqrt(mean / (upper - lower)), rel=1e-4)


def test_damping_must_be_given_once_and_positive():
    floor = flat_floor_spectrum(1 * UM)
    with pytest.raises(InputError, match="exactly one"):
        predict_equipment_spectrum(floor, 3.0)
    with pytest.raises(InputError, match="exactly one"):
        predict_equipment_spectrum(floor, 3.0, damping_ratio=0.1, loss_factor=0.1)
    with pytest.raises(InputError, match="must be > 0") as info:
        predict_equipment_spectrum(floor, 3.0, damping_ratio=0.0)
    assert info.value.field == "damping.damping_ratio"
    with pytest.raises(InputError) as info:
        predict_equipment_spectrum(floor, 0.0, loss_factor=0.1)
    assert info.value.field == "natural_frequency_hz"
    with pytest.raises(InputError) as info:
        predict_equipment_spectrum(floor, 3.0, loss_factor=0.1, band_rule="mean")
    assert info.value.field == "band_rule"


# --------------------------------------------------------------------------- criterion check


def test_margin_sign_positive_below_limit():
    # Hand computation: an isolator far stiffer than every band (fn = 10 kHz, |T| -> 1 within
    # 1e-4 by Vigran eq. 2.33 at r <= 0.008) passes the floor on; margin = 20 log10(limit / level).
    quiet = check_criterion(flat_floor_spectrum(5 * UM), "VC-C", 1e4, damping_ratio=0.05)
    assert np.allclose(quiet.margin_db, 20 * math.log10(12.5 / 5), atol=1e-3)  # +7.96 dB
    assert quiet.passed
    loud = check_criterion(flat_floor_spectrum(25 * UM), "VC-C", 1e4, damping_ratio=0.05)
    assert np.allclose(loud.margin_db, 20 * math.log10(12.5 / 25), atol=1e-3)  # -6.02 dB
    assert not loud.passed


def test_worst_band_is_the_resonant_band():
    # Vigran eq. 2.33 (REFERENCES §1): at r = 1, |T| = sqrt(1 + 4 zeta^2)/(2 zeta) = 10.05 for
    # zeta = 0.05.
    fn = 10 ** 0.6  # exact centre of the 4 Hz band
    result = check_criterion(flat_floor_spectrum(1 * UM), "VC-C", fn, damping_ratio=0.05)
    assert result.worst_band_nominal_hz == 4.0
    assert result.worst_band_hz == pytest.approx(fn, rel=1e-12)
    peak = math.sqrt(1 + 4 * 0.05 ** 2) / (2 * 0.05)
    assert result.worst_margin_db == pytest.approx(20 * math.log10(12.5 / peak), abs=1e-9)
    assert result.worst_margin_db == pytest.approx(1.895, abs=0.001)
    assert result.passed
    assert result.limit_m_s.tolist() == [12.5 * UM] * 20


def test_value_equal_to_limit_passes():
    # Stated rule: equal to the limit passes. At r = sqrt(2), |T| = 1 for every damping
    # (Vigran, Building Acoustics, p. 45), so a floor at the limit gives a prediction at the limit.
    centre = 10.0  # nominal 10 Hz band, exact centre 10 Hz
    floor = floor_spectrum([centre], [12.5 * UM])
    at_limit = check_criterion(floor, "VC-C", centre / math.sqrt(2), damping_ratio=0.2)
    assert at_limit.predicted_velocity_m_s[0] == pytest.approx(12.5 * UM, rel=1e-12)
    assert at_limit.passed
    assert at_limit.worst_margin_db == pytest.approx(0.0, abs=1e-9)
    above = check_criterion(floor_spectrum([centre], [12.5 * UM * (1 + 1e-6)]), "VC-C",
                            centre / math.sqrt(2), damping_ratio=0.2)
    assert not above.passed


def test_bands_outside_criterion_range_are_listed_not_assessed():
    # ISO 2631-2 constant-velocity part starts at 8 Hz (from memory); VC starts at 1 Hz (B.
    # Davis 2008; REFERENCES §4).
    floor = flat_floor_spectrum(1000 * UM, 1.0, 200.0)
    result = check_criterion(floor, "ISO 2631-2 office", 1e4, damping_ratio=0.05)
    assert result.nominal_hz.tolist() == IEC_NOMINAL_1_TO_80[9:]
    assert result.unassessed_band_hz == (1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 100, 125, 160, 200)
    assert result.prediction.band_hz.size == 24
    with pytest.raises(InputError, match="no band inside"):
        check_criterion(flat_floor_spectrum(1 * UM, 1.0, 6.3), "ISO 2631-2 office", 3.0,
                        damping_ratio=0.1)


# --------------------------------------------------------------------------- inverse design


def test_inverse_single_band_undamped_limit_matches_required_ratio():
    # Undamped relation r = sqrt(1 + 1/(1 - IE)) from Vigran eq. 2.33 with zeta = 0 (REFERENCES
    # §2): |T| = 0.1 (90 % isolation) needs r = sqrt(1 + 1/0.1) = 3.3166.
    # One 20 Hz band at 125 µm/s against VC-C 12.5 µm/s needs |T| <= 0.1, so fn = fc / 3.3166.
    centre = 10 ** 1.3
    floor = floor_spectrum([20.0], [125 * UM])
    result = max_natural_frequency_for_criterion(floor, "VC-C", damping_ratio=1e-7)
    assert result.natural_frequency_hz == pytest.approx(centre / 3.3166, rel=2e-5)
    assert result.bound == "criterion"


def test_inverse_single_band_damped_matches_table():
    # REFERENCES §1 table (Vigran eq. 2.33): zeta = 0.1, r = 2 -> |T| = 0.3559 (4 s.f.).
    centre = 10 ** 1.3
    floor = floor_spectrum([20.0], [12.5 / 0.3559 * UM])
    result = max_natural_frequency_for_criterion(floor, "VC-C", damping_ratio=0.1)
    assert result.natural_frequency_hz == pytest.approx(centre / 2.0, rel=5e-4)


@pytest.mark.parametrize("band_rule", ["centre", "band-average"])
def test_inverse_meets_at_fn_and_fails_just_above(band_rule):
    # The criterion itself is the reference: the check at fn passes, at fn (1 + 1e-6) it fails.
    floor = parse_floor_csv("Hz,um/s\n1,4\n2,6\n4,9\n8,18\n16,30\n31.5,22\n63,12\n80,8\n")
    result = max_natural_frequency_for_criterion(floor, "VC-C", damping_ratio=0.05,
                                                 band_rule=band_rule)
    fn = result.natural_frequency_hz
    assert result.bound == "criterion"
    assert result.check.passed
    assert check_criterion(floor, "VC-C", fn, damping_ratio=0.05, band_rule=band_rule).passed
    above = check_criterion(floor, "VC-C", fn * (1 + 1e-6), damping_ratio=0.05, band_rule=band_rule)
    assert not above.passed
    # Static deflection: fn[Hz] = 15.761 / sqrt(delta[mm]) (REFERENCES §2, common practice;
    # coefficient from g = 9.80665).
    assert result.static_deflection_mm == pytest.approx((15.761 / fn) ** 2, rel=1e-4)


def test_static_deflection_reference_points():
    # Common practice relation (REFERENCES §2): fn = 5 Hz -> 9.936 mm; 15.76 Hz -> 1 mm.
    assert static_deflection_m(5.0) * 1e3 == pytest.approx(9.936, rel=1e-4)
    assert static_deflection_m(15.761) * 1e3 == pytest.approx(1.0, rel=1e-4)


def test_inverse_already_met_over_whole_range():
    # Peak table (Rao, from memory; REFERENCES §1): zeta = 0.3 peaks at |T| = 1.995, so 1 µm/s
    # never exceeds VC-A 50 µm/s.
    result = max_natural_frequency_for_criterion(flat_floor_spectrum(1 * UM), "VC-A",
                                                 damping_ratio=0.3, max_hz=300.0)
    assert result.bound == "search range"
    assert result.every_frequency_passes
    assert result.natural_frequency_hz == 300.0
    assert result.check.passed


def test_inverse_with_failing_window_below_a_passing_top():
    # Peak table (Rao, from memory; REFERENCES §1): zeta = 0.05 peaks at |T| = 10.06, so 20 µm/s
    # * 10 > VC-A 50 µm/s when the
    # resonance sits in a band, while a stiff mount (|T| -> 1) passes 20 < 50.
    result = max_natural_frequency_for_criterion(flat_floor_spectrum(20 * UM), "VC-A",
                                                 damping_ratio=0.05)
    assert result.bound == "search range"
    assert not result.every_frequency_passes
    assert not check_criterion(flat_floor_spectrum(20 * UM), "VC-A", 10.0, damping_ratio=0.05).passed


def test_inverse_cannot_be_met():
    # 1000 µm/s at 1 Hz against VC-G 0.78 µm/s needs |T| <= 7.8e-4, i.e. r ~ 36 (undamped Vigran
    # eq. 2.33, REFERENCES §2
    # undamped relation), fn ~ 0.028 Hz: below the 0.5 Hz search floor.
    floor = floor_spectrum([1.0], [1000 * UM])
    with pytest.raises(TargetUnreachable, match="VC-G is not met") as info:
        max_natural_frequency_for_criterion(floor, "VC-G", damping_ratio=0.05)
    assert info.value.field == "criterion"


def test_inverse_refuses_bad_range():
    with pytest.raises(InputError) as info:
        max_natural_frequency_for_criterion(flat_floor_spectrum(1 * UM), "VC-A", loss_factor=0.1,
                                            min_hz=5.0, max_hz=2.0)
    assert info.value.field == "max_hz"


# --------------------------------------------------------------------------- floor input


def test_csv_with_header_blank_lines_comments_and_separators():
    text = "# invented survey, slab bay 3\nband_hz; velocity_um_s\n\n8; 2.5\n1.25,1\n16\t0.5\n31.5 0.25\n"
    floor = parse_floor_csv(text)
    assert floor.nominal_hz.tolist() == [1.25, 8, 16, 31.5]
    assert floor.velocity_m_s == pytest.approx([1e-6, 2.5e-6, 0.5e-6, 0.25e-6], rel=1e-12)
    assert floor.band_hz[1] == pytest.approx(10 ** 0.9, rel=1e-14)  # IEC 61260-1 exact centre of "8"
    # Header optional.
    assert parse_floor_csv("4,3\n").velocity_um_s.tolist() == pytest.approx([3.0])


@pytest.mark.parametrize("text, field, reason", [
    ("Hz,um/s\n1,2\n\n1.5,3\n", "floor CSV line 4, band (Hz)", "nearest centre is 1.6 Hz"),
    ("1,2\n2,abc\n", "floor CSV line 2, velocity (µm/s)", "> 0"),
    ("1,2\n2,0\n", "floor CSV line 2, velocity (µm/s)", "> 0"),
    ("1,2\n2,nan\n", "floor CSV line 2, velocity (µm/s)", "> 0"),
    ("1,2\n2,2e7\n", "floor CSV line 2, velocity (µm/s)", "at most 1e+06"),
    ("h1,h2\n1,2\n4\n", "floor CSV line 3", "needs two values"),
    ("1,2\n2,3,4\n", "floor CSV line 2", "needs two values"),
    ("1,2\n2,1\n1.0,3\n", "floor CSV line 3", "given twice (also line 1)"),
    ("band,velocity\n", "floor CSV", "at least one row"),
    ("1,2\nband,velocity\n", "floor CSV line 2, band (Hz)", "band centre"),
])
def test_csv_errors_name_the_line(text, field, reason):
    with pytest.raises(InputError) as info:
        parse_floor_csv(text)
    assert info.value.field == field
    assert reason in info.value.reason


def test_table_rows_and_numeric_input():
    floor = parse_floor_rows([("2", "1.5"), ("1", "3"), ("", "")][:2])
    assert floor.nominal_hz.tolist() == [1, 2]
    with pytest.raises(InputError) as info:
        parse_floor_rows([("1", "3"), ("2", "")])
    assert info.value.field == "floor table row 2"
    with pytest.raises(InputError) as info:
        floor_spectrum([1.0, 2.0], [1e-6, -1e-6])
    assert info.value.field == "floor.velocity_m_s[1]"
    with pytest.raises(InputError):
        floor_spectrum([1.0, 2.0], [1e-6])
    with pytest.raises(InputError):
        flat_floor_spectrum(2.0)  # more than 1 m/s
