"""Display-unit conversions (core/units.py, Qt-free).

Exact factors: international yard and pound agreement (1959): 1 lb = 0.45359237 kg,
1 in = 0.0254 m; 1 lbf = 0.45359237 kg × 9.80665 m/s² = 4.4482216152605 N
(NIST SP 811, Appendix B.8, which lists 1 lbf/in = 1.751268E+02 N/m).
"""
from __future__ import annotations

import math

import pytest
from hypothesis import given, strategies as st

from core.errors import InputError
from core.units import (
    UNITS, format_value, format_values, from_display, parse_display, range_reason, to_display, unit_symbol)


def test_exact_definitions():
    assert from_display(1.0, "mass", "US") == 0.45359237
    assert from_display(1.0, "length", "US") == 0.0254
    assert from_display(1.0, "force", "US") == 4.4482216152605
    # lbf = lb × g (standard gravity 9.80665 m/s², CGPM 1901)
    assert from_display(1.0, "force", "US") == pytest.approx(0.45359237 * 9.80665, rel=1e-15)
    # NIST SP 811 B.8: 1 lbf/in = 1.751268E+02 N/m; 1 lbf·s/in the same factor
    assert from_display(1.0, "stiffness", "US") == pytest.approx(175.1268, rel=1e-6)
    assert from_display(1.0, "damping", "US") == pytest.approx(175.1268, rel=1e-6)
    assert from_display(1.0, "stiffness", "SI") == 1000.0  # 1 N/mm = 1000 N/m
    assert to_display(0.001, "length", "SI") == 1.0  # 1 mm


def test_known_conversions():
    assert to_display(1000.0, "mass", "SI") == 1000.0
    assert to_display(453.59237, "mass", "US") == pytest.approx(1000.0, rel=1e-15)
    assert to_display(0.0254 * 2.5, "length", "US") == pytest.approx(2.5, rel=1e-15)
    assert to_display(25.4e-3, "length", "SI") == pytest.approx(25.4, rel=1e-15)
    assert to_display(175.126835246476 * 300, "stiffness", "US") == pytest.approx(300.0, rel=1e-12)


@given(st.floats(min_value=1e-9, max_value=1e12), st.sampled_from(sorted(UNITS["SI"])),
       st.sampled_from(["SI", "US"]))
def test_round_trip(value, kind, system):
    assert from_display(to_display(value, kind, system), kind, system) == pytest.approx(value, rel=1e-14)


def test_both_systems_have_the_same_kinds():
    assert set(UNITS["SI"]) == set(UNITS["US"])
    assert unit_symbol("stiffness", "US") == "lbf/in" and unit_symbol("damping", "US") == "lbf·s/in"
    assert unit_symbol("stiffness", "SI") == "N/mm" and unit_symbol("damping", "SI") == "N·s/m"


def test_parse_display_converts_and_checks_the_range():
    assert parse_display("1000", "machine.mass_kg", "mass", "US") == pytest.approx(453.59237, rel=1e-15)
    assert parse_display(" 500 ", "machine.mass_kg", "mass", "SI") == 500.0
    assert parse_display("2,5", "machine.mass_kg", "mass", "SI") == 2.5  # decimal comma
    with pytest.raises(InputError) as caught:
        parse_display("0", "machine.mass_kg", "mass", "US")
    assert caught.value.field == "machine.mass_kg"
    assert caught.value.reason == "must be a number from 0.00220462 to 2.20462e+07 lb"
    for bad in ("", "x", "nan", "inf", "1e400", "-3"):
        with pytest.raises(InputError):
            parse_display(bad, "machine.mass_kg", "mass", "SI")
    with pytest.raises(InputError, match="whole number from 1 to 64"):
        parse_display("2.5", "mounts.count", "ratio", "SI", integer=True)


def test_a_limit_typed_as_displayed_is_accepted():
    low_shown = f"{to_display(1e-3, 'mass', 'US'):.6g}"  # 0.00220462 lb, rounded below 1e-3 kg
    assert parse_display(low_shown, "machine.mass_kg", "mass", "US") == 1e-3


def test_range_reason_and_format():
    assert range_reason("machine.speed_rpm", "speed", "SI") == "must be a number from 1 to 1e+06 r/min"
    assert format_value(0.004718, "length", "SI") == "4.718 mm"
    assert format_value(0.0254, "length", "US") == "1 in"
    assert format_value(None, "length", "SI") == "—"
    assert format_value(math.inf, "ratio", "SI") == "unbounded"
    assert format_value(math.nan, "ratio", "SI") == "—"
    with pytest.raises(InputError, match="view.units"):
        to_display(1.0, "mass", "metric")


def test_format_values_puts_one_unit_after_a_list():
    assert format_values([2000.0, 2000.0], "force", "SI") == "2000 N  (× 2)"
    # 1 lbf/in = 175.126835246476 N/m exactly (from the lbf and inch definitions)
    assert format_values([175.126835246476 * 2497, 175.126835246476 * 1600], "stiffness", "US") == \
        "2497, 1600 lbf/in"
    assert format_values([], "force", "SI") == "—"
