"""The design inputs: machine, mount set, damping, tuning, excitation and limits.

One frozen dataclass, :class:`DesignInputs`, holds everything the engineer
chooses. It converts to and from the ``"design"`` object of a project file
(SI units, unit in every key) and validates every field with a message that
names the field and its allowed range.
"""
from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field, fields, replace
from typing import Any, Literal

from core.constants import STANDARD_GRAVITY
from core.errors import InputError
from core.excitation import Excitation
from core.transmissibility import MAX_DAMPING, MAX_DESIGN_RATIO, Damping

#: Most duty speeds a design may list.
MAX_DUTY_SPEEDS = 24

LoadLayout = Literal["equal", "per_mount", "cg_offset"]
Tuning = Literal["isolation", "frequency_ratio", "natural_frequency"]

#: Allowed ranges, shared by validation, the command line and the window.
LIMITS = {
    "machine.mass_kg": (1e-3, 1e7),
    "machine.speed_rpm": (1.0, 1e6),
    "machine.duty_speeds_rpm": (1.0, 1e6),
    "mounts.count": (1, 64),
    "damping.dynamic_stiffness_ratio": (1.0, 10.0),
    "tuning.frequency_ratio": (0.05, MAX_DESIGN_RATIO),
    "tuning.isolation_percent": (0.1, 99.99),
    "tuning.natural_frequency_hz": (0.05, 500.0),
    "limits.max_static_deflection_mm": (0.01, 1000.0),
    "limits.max_load_spread_percent": (0.0, 1000.0),
    "limits.max_passage_amplification": (1.0, 1000.0),
}


def check_range(name: str, value: Any, unit: str = "", integer: bool = False) -> float:
    """Return ``value`` as a float (or int) if it lies in ``LIMITS[name]``, else raise InputError."""
    low, high = LIMITS[name]
    kind = "a whole number" if integer else "a number"
    reason = f"must be {kind} from {low:g} to {high:g}{' ' + unit if unit else ''}"
    if isinstance(value, bool) or not isinstance(value, int if integer else (int, float)):
        raise InputError(name, reason, value)   # a whole number must be an int: 4.0 would reach array shapes
    try:
        finite = math.isfinite(value)
    except OverflowError:   # an int beyond the float range
        finite = False
    if not finite or not low <= value <= high:
        raise InputError(name, reason, value)
    return int(value) if integer else float(value)


@dataclass(frozen=True)
class DesignLimits:
    """User limits that turn into warnings.

    Attributes
    ----------
    max_static_deflection_mm : float
        Beyond this a single steel spring is unusual (50 mm, common practice).
    max_load_spread_percent : float
        Warn when per-mount loads differ by more than this share of the mean (%).
    max_passage_amplification : float
        Warn when the resonance peak passed at start and stop exceeds this (10, common practice).
    """

    max_static_deflection_mm: float = 50.0
    max_load_spread_percent: float = 25.0
    max_passage_amplification: float = 10.0


@dataclass(frozen=True)
class DesignInputs:
    """Everything the engineer chooses, in SI units.

    Attributes
    ----------
    mass_kg : float
        Machine mass including base frame (kg).
    speed_rpm : float
        Operating speed, or the lowest of a range (r/min).
    speed_max_rpm : float or None
        Highest operating speed of a range (r/min); None for one speed.
    duty_speeds_rpm : tuple of float
        Further speeds the machine runs at for long (r/min), e.g. the steps of a
        variable-speed drive; each is checked like the range ends.
    mount_count : int
    load_layout : {"equal", "per_mount", "cg_offset"}
        How the weight shares out: equally, by given loads, or by statics of a
        centre-of-gravity offset over a rectangular mount layout.
    loads_n : tuple of float
        Static load per mount (N) for ``"per_mount"``; must sum to the weight.
    cg_offset_m : (float, float)
        Centre-of-gravity offset (x, y) from the layout centre (m) for ``"cg_offset"``.
    span_m : (float, float)
        Mount layout length along x and width along y (m) for ``"cg_offset"``.
    damping : Damping
    dynamic_stiffness_ratio : float
        Dynamic over static stiffness of the mount material (1 for steel springs).
    tuning : {"isolation", "frequency_ratio", "natural_frequency"}
        Whether the natural frequency follows from a target isolation at the
        lowest speed, from a chosen frequency ratio, or is chosen directly
        (sensitive equipment on a moving floor).
    isolation_percent : float
        Target isolation efficiency at the lowest speed (%); also drawn as a line.
    frequency_ratio : float
        Chosen omega / omega_n at the lowest speed.
    natural_frequency_hz : float
        Chosen natural frequency on the mounts (Hz) for ``tuning="natural_frequency"``.
    excitation : Excitation
    limits : DesignLimits
    """

    mass_kg: float = 500.0
    speed_rpm: float = 1480.0
    speed_max_rpm: float | None = None
    duty_speeds_rpm: tuple[float, ...] = ()
    mount_count: int = 4
    load_layout: LoadLayout = "equal"
    loads_n: tuple[float, ...] = ()
    cg_offset_m: tuple[float, float] = (0.0, 0.0)
    span_m: tuple[float, float] = (1.0, 0.6)
    damping: Damping = field(default_factory=lambda: Damping("viscous", 0.05))
    dynamic_stiffness_ratio: float = 1.0
    tuning: Tuning = "isolation"
    isolation_percent: float = 90.0
    frequency_ratio: float = 3.0
    natural_frequency_hz: float = 5.0
    excitation: Excitation = field(default_factory=Excitation)
    limits: DesignLimits = field(default_factory=DesignLimits)

    # ------------------------------------------------------------------ checks
    def validate(self) -> "DesignInputs":
        """Return self if every field is in range; else raise InputError naming the field."""
        check_range("machine.mass_kg", self.mass_kg, "kg")
        check_range("machine.speed_rpm", self.speed_rpm, "r/min")
        if self.speed_max_rpm is not None:
            top = check_range("machine.speed_rpm", self.speed_max_rpm, "r/min")
            if top < self.speed_rpm:
                raise InputError("machine.speed_max_rpm",
                                 f"must be at least the lowest speed {self.speed_rpm:g} r/min", top)
        if len(self.duty_speeds_rpm) > MAX_DUTY_SPEEDS:
            raise InputError("machine.duty_speeds_rpm", f"must hold at most {MAX_DUTY_SPEEDS} speeds",
                             len(self.duty_speeds_rpm))
        for speed in self.duty_speeds_rpm:
            check_range("machine.duty_speeds_rpm", speed, "r/min")
        count = check_range("mounts.count", self.mount_count, integer=True)
        if self.load_layout not in ("equal", "per_mount", "cg_offset"):
            raise InputError("mounts.load_layout", "must be equal, per_mount or cg_offset", self.load_layout)
        if self.load_layout == "per_mount":
            self._check_loads(count)
        if self.load_layout == "cg_offset":
            self._check_cg_layout(count)
        check_range("damping.dynamic_stiffness_ratio", self.dynamic_stiffness_ratio)
        if self.tuning not in ("isolation", "frequency_ratio", "natural_frequency"):
            raise InputError("tuning.method", "must be isolation, frequency_ratio or natural_frequency",
                             self.tuning)
        check_range("tuning.isolation_percent", self.isolation_percent, "%")
        check_range("tuning.frequency_ratio", self.frequency_ratio)
        check_range("tuning.natural_frequency_hz", self.natural_frequency_hz, "Hz")
        self.excitation.validate()
        check_range("limits.max_static_deflection_mm", self.limits.max_static_deflection_mm, "mm")
        check_range("limits.max_load_spread_percent", self.limits.max_load_spread_percent, "%")
        check_range("limits.max_passage_amplification", self.limits.max_passage_amplification)
        return self

    def _check_loads(self, count: int) -> None:
        if len(self.loads_n) != count:
            raise InputError("mounts.loads_n", f"must hold one load per mount ({count} values)", list(self.loads_n))
        for value in self.loads_n:
            if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) \
                    or value <= 0:
                raise InputError("mounts.loads_n", "every load must be a number > 0 N", value)
        weight = self.weight_n
        total = sum(self.loads_n)
        if abs(total - weight) > 0.01 * weight:
            raise InputError("mounts.loads_n",
                             f"must add up to the machine weight {weight:.6g} N within 1 %", round(total, 6))

    def _check_cg_layout(self, count: int) -> None:
        if count < 4 or count % 2:
            raise InputError("mounts.count", "must be an even number from 4 for a centre-of-gravity layout",
                             count)
        for i, name in enumerate(("x", "y")):
            span = self.span_m[i]
            if not isinstance(span, (int, float)) or not math.isfinite(span) or not 0.01 <= span <= 100.0:
                raise InputError(f"mounts.span_m.{name}", "must be a number from 0.01 to 100 m", span)
            offset = self.cg_offset_m[i]
            limit = 0.45 * span
            if not isinstance(offset, (int, float)) or not math.isfinite(offset) or abs(offset) > limit:
                raise InputError(f"mounts.cg_offset_m.{name}",
                                 f"must lie within ±{limit:.4g} m (45 % of the span) so every mount "
                                 "stays loaded", offset)

    @property
    def weight_n(self) -> float:
        """Machine weight m g (N)."""
        return self.mass_kg * STANDARD_GRAVITY

    @property
    def speed_range_rpm(self) -> tuple[float, float]:
        """(lowest, highest) operating speed (r/min)."""
        top = self.speed_rpm if self.speed_max_rpm is None else self.speed_max_rpm
        return (self.speed_rpm, top)

    def with_changes(self, **changes) -> "DesignInputs":
        """A copy with some fields replaced (not validated)."""
        return replace(self, **changes)

    # ------------------------------------------------------------ dict form
    def to_dict(self) -> dict:
        """The ``"design"`` object of a project file (JSON types, SI units)."""
        return {
            "machine": {"mass_kg": self.mass_kg, "speed_rpm": self.speed_rpm,
                        "speed_max_rpm": self.speed_max_rpm, "duty_speeds_rpm": list(self.duty_speeds_rpm)},
            "mounts": {"count": self.mount_count, "load_layout": self.load_layout,
                       "loads_n": list(self.loads_n), "cg_offset_m": list(self.cg_offset_m),
                       "span_m": list(self.span_m)},
            "damping": {"model": self.damping.model, "value": self.damping.value,
                        "dynamic_stiffness_ratio": self.dynamic_stiffness_ratio},
            "tuning": {"method": self.tuning, "isolation_percent": self.isolation_percent,
                       "frequency_ratio": self.frequency_ratio,
                       "natural_frequency_hz": self.natural_frequency_hz},
            "excitation": asdict(self.excitation),
            "limits": asdict(self.limits),
        }

    @classmethod
    def from_dict(cls, data: Any) -> "DesignInputs":
        """Build and validate from a ``"design"`` object; raise InputError naming the field."""
        root = _Reader(data, "design")
        machine = root.section("machine")
        mounts = root.section("mounts")
        damping = root.section("damping")
        tuning = root.section("tuning")
        excitation = root.section("excitation", optional=True)
        limits = root.section("limits", optional=True)
        speed_max = machine.get("speed_max_rpm", optional=True)
        model = damping.get("model", kind=str)
        value = damping.get("value")
        if model not in ("viscous", "hysteretic"):
            raise InputError("design.damping.model", "must be viscous or hysteretic", model)
        if not 0.0 <= value <= MAX_DAMPING:
            raise InputError("design.damping.value", f"must be a number from 0 to {MAX_DAMPING:g}", value)
        defaults = Excitation()
        design = cls(
            mass_kg=machine.get("mass_kg"),
            speed_rpm=machine.get("speed_rpm"),
            speed_max_rpm=speed_max,
            duty_speeds_rpm=tuple(machine.get_list("duty_speeds_rpm", default=[])),
            mount_count=mounts.get("count", kind=int),
            load_layout=mounts.get("load_layout", kind=str, default="equal"),
            loads_n=tuple(mounts.get_list("loads_n", default=[])),
            cg_offset_m=tuple(mounts.get_list("cg_offset_m", default=[0.0, 0.0], length=2)),
            span_m=tuple(mounts.get_list("span_m", default=[1.0, 0.6], length=2)),
            damping=Damping(model, value),
            dynamic_stiffness_ratio=damping.get("dynamic_stiffness_ratio", default=1.0),
            tuning=tuning.get("method", kind=str),
            isolation_percent=tuning.get("isolation_percent", default=90.0),
            frequency_ratio=tuning.get("frequency_ratio", default=3.0),
            natural_frequency_hz=tuning.get("natural_frequency_hz", default=5.0),
            excitation=Excitation(
                kind=excitation.get("kind", kind=str, default="none"),
                force_n=excitation.get("force_n", default=defaults.force_n),
                unbalance_g_mm=excitation.get("unbalance_g_mm", default=defaults.unbalance_g_mm),
                balance_grade_mm_s=excitation.get("balance_grade_mm_s", default=defaults.balance_grade_mm_s),
                rotor_mass_kg=excitation.get("rotor_mass_kg", default=defaults.rotor_mass_kg)),
            limits=DesignLimits(**{f.name: limits.get(f.name, default=f.default) for f in fields(DesignLimits)}),
        )
        try:
            return design.validate()
        except InputError as error:
            raise InputError("design." + error.field, error.reason, error.value) from None


class _Reader:
    """Typed access to one JSON object with errors that name the dotted path."""

    def __init__(self, data: Any, path: str):
        if not isinstance(data, dict):
            raise InputError(path, "must be an object", type(data).__name__)
        self.data = data
        self.path = path

    def section(self, key: str, optional: bool = False) -> "_Reader":
        if key not in self.data and optional:
            return _Reader({}, f"{self.path}.{key}")
        if key not in self.data:
            raise InputError(f"{self.path}.{key}", "is missing")
        return _Reader(self.data[key], f"{self.path}.{key}")

    def get(self, key: str, kind: type = float, default: Any = None, optional: bool = False):
        name = f"{self.path}.{key}"
        if key not in self.data or (self.data[key] is None and (optional or default is not None)):
            if optional:
                return None
            if default is None:
                raise InputError(name, "is missing")
            return default
        value = self.data[key]
        if kind is str:
            if not isinstance(value, str):
                raise InputError(name, "must be text", value)
            return value
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise InputError(name, "must be a number", value)
        if not math.isfinite(value):
            raise InputError(name, "must be a finite number", value)
        if kind is int:
            if value != int(value):
                raise InputError(name, "must be a whole number", value)
            return int(value)
        return float(value)

    def get_list(self, key: str, default: list, length: int | None = None) -> list:
        name = f"{self.path}.{key}"
        value = self.data.get(key, default)
        if not isinstance(value, list) or len(value) > 1000:
            raise InputError(name, "must be a list of numbers", type(value).__name__)
        if length is not None and len(value) != length:
            raise InputError(name, f"must hold {length} numbers", value)
        for item in value:
            if isinstance(item, bool) or not isinstance(item, (int, float)) or not math.isfinite(item):
                raise InputError(name, "must hold finite numbers only", item)
        return [float(item) for item in value]
