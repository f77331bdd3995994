"""Display units for the window and exports: SI or US customary.

Everything inside Mountsmith is SI (kg, m, s, N). Only the edges show other
units; this module holds the exact factors and turns typed text into SI
values with messages in the units the user sees.

Exact factors: 1 lb = 0.45359237 kg (international pound, 1959),
1 in = 0.0254 m (international inch, 1959), 1 lbf = 4.4482216152605 N
(pound-force = lb x standard gravity 9.80665 m/s²).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

from core.design import LIMITS
from core.errors import InputError

POUND_KG = 0.45359237
INCH_M = 0.0254
POUND_FORCE_N = 4.4482216152605

UNIT_SYSTEMS = ("SI", "US")
SYSTEM_NAMES = {"SI": "SI (kg, N/mm, mm, N)", "US": "US customary (lb, lbf/in, in, lbf)"}


@dataclass(frozen=True)
class Unit:
    """A display unit: ``value_si = value_shown * si_per_unit``."""

    symbol: str
    si_per_unit: float


#: Units shown the same in both systems.
_SHARED = {
    "speed": Unit("r/min", 1.0),
    "frequency": Unit("Hz", 1.0),
    "unbalance": Unit("g·mm", 1.0),
    "grade": Unit("mm/s", 1.0),
    "percent": Unit("%", 1.0),
    "ratio": Unit("", 1.0),
}

#: Display unit of each kind of quantity, per system.
UNITS: dict[str, dict[str, Unit]] = {
    "SI": {
        "mass": Unit("kg", 1.0),
        "stiffness": Unit("N/mm", 1e3),
        "length": Unit("mm", 1e-3),
        "force": Unit("N", 1.0),
        "damping": Unit("N·s/m", 1.0),
        "velocity": Unit("mm/s", 1e-3),
        **_SHARED,
    },
    "US": {
        "mass": Unit("lb", POUND_KG),
        "stiffness": Unit("lbf/in", POUND_FORCE_N / INCH_M),
        "length": Unit("in", INCH_M),
        "force": Unit("lbf", POUND_FORCE_N),
        "damping": Unit("lbf·s/in", POUND_FORCE_N / INCH_M),
        "velocity": Unit("in/s", INCH_M),
        **_SHARED,
    },
}


def unit(kind: str, system: str) -> Unit:
    """The display unit of ``kind`` (e.g. ``"mass"``) in ``system`` (``"SI"`` or ``"US"``)."""
    if system not in UNITS:
        raise InputError("view.units", "must be one of " + ", ".join(UNIT_SYSTEMS), system)
    return UNITS[system][kind]


def unit_symbol(kind: str, system: str) -> str:
    return unit(kind, system).symbol


def to_display(value_si, kind: str, system: str):
    """SI value (float or array) in the display unit."""
    return value_si / unit(kind, system).si_per_unit


def from_display(value_shown, kind: str, system: str):
    """Display-unit value (float or array) in SI."""
    return value_shown * unit(kind, system).si_per_unit


def display_range(field: str, kind: str, system: str) -> tuple[float, float]:
    """Allowed range of a core field (``LIMITS[field]``, SI) in display units."""
    low, high = LIMITS[field]
    return float(to_display(low, kind, system)), float(to_display(high, kind, system))


def range_reason(field: str, kind: str, system: str, integer: bool = False) -> str:
    """``"must be a number from 0.5 to 7 lb"``: the allowed range in display units."""
    low, high = display_range(field, kind, system)
    symbol = unit_symbol(kind, system)
    what = "a whole number" if integer else "a number"
    return f"must be {what} from {low:.6g} to {high:.6g}{' ' + symbol if symbol else ''}"


def parse_number(text: str, field: str, reason: str) -> float:
    """Parse typed text as a finite number; raise InputError(field, reason, text) otherwise."""
    stripped = text.strip().replace(",", ".") if text.count(",") == 1 and "." not in text else text.strip()
    try:
        value = float(stripped)
    except ValueError:
        raise InputError(field, reason, text) from None
    if not math.isfinite(value):
        raise InputError(field, reason, text)
    return value


def parse_display(text: str, field: str, kind: str, system: str, integer: bool = False) -> float:
    """Typed text in display units to an SI value checked against ``LIMITS[field]``.

    Parameters
    ----------
    text : str
        What the user typed, e.g. ``"1100"``.
    field : str
        Core field name with an entry in :data:`core.design.LIMITS`.
    kind : str
        Kind of quantity (a key of :data:`UNITS`).
    system : {"SI", "US"}

    Raises
    ------
    InputError
        Not a number, or outside the range; the reason gives the range in display units.
    """
    reason = range_reason(field, kind, system, integer)
    shown = parse_number(text, field, reason)
    if integer and shown != int(shown):
        raise InputError(field, reason, text.strip())
    low, high = LIMITS[field]
    value = float(from_display(shown, kind, system))
    # A limit typed as displayed (rounded to 6 significant digits) still counts as inside.
    if not low * (1.0 - 1e-5) <= value <= high * (1.0 + 1e-5):
        raise InputError(field, reason, text.strip())
    value = min(max(value, low), high)
    return int(round(value)) if integer else value


def format_value(value_si: float | None, kind: str, system: str, digits: int = 4) -> str:
    """SI value as display text with its unit, ``"—"`` for None and ``"unbounded"`` for infinity."""
    if value_si is None:
        return "—"
    if isinstance(value_si, float) and math.isinf(value_si):
        return "unbounded"
    if isinstance(value_si, float) and math.isnan(value_si):
        return "—"
    shown = to_display(value_si, kind, system)
    symbol = unit_symbol(kind, system)
    return f"{shown:.{digits}g}{' ' + symbol if symbol else ''}"


def format_values(values_si, kind: str, system: str, digits: int = 4) -> str:
    """Several SI values as ``"2497, 2497, 2029 lbf/in"``: one unit at the end; ``"2497 lbf/in (× 4)"`` if equal."""
    values = [float(v) for v in values_si]
    if not values:
        return "—"
    symbol = unit_symbol(kind, system)
    unit_text = f" {symbol}" if symbol else ""
    if max(values) - min(values) <= 1e-9 * max(abs(max(values)), abs(min(values)), 1e-300):
        return format_value(values[0], kind, system, digits) + (f"  (× {len(values)})" if len(values) > 1 else "")
    shown = ", ".join(f"{to_display(v, kind, system):.{digits}g}" for v in values)
    return shown + unit_text
