"""Single-degree-of-freedom isolator responses over the frequency ratio.

All functions take the frequency ratio ``r = omega / omega_n`` (dimensionless,
any numpy shape, broadcasting with the damping argument) and return complex or
real numpy arrays. Two damping models:

* viscous, by damping ratio ``zeta`` (dashpot force proportional to velocity);
* hysteretic, by loss factor ``eta`` (complex stiffness ``k (1 + j eta)``, the
  usual model of an elastomer).

Force transmissibility (machine excited, force into the floor over exciting
force) and motion transmissibility (floor moves, machine follows) share one
expression, so :func:`motion_transmissibility` is the same function as
:func:`force_transmissibility`.

Conventions: phase is the angle of the complex response in degrees; a lag is
negative. Isolation in dB is ``-20 log10 |T|``: positive means the mounts
reduce what passes through, negative means they amplify it.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np

from core.errors import InputError, TargetUnreachable

DampingModel = Literal["viscous", "hysteretic"]

#: Frequency ratio at which |T| = 1 for every damping value (isolation begins above it).
CROSSOVER_RATIO = float(np.sqrt(2.0))
#: Largest frequency ratio that inverse design will propose.
MAX_DESIGN_RATIO = 50.0


@dataclass(frozen=True)
class Damping:
    """Damping of an isolator.

    Attributes
    ----------
    model : {"viscous", "hysteretic"}
        Viscous: ``value`` is the damping ratio zeta. Hysteretic: ``value`` is
        the loss factor eta.
    value : float
        Damping ratio or loss factor, dimensionless, >= 0.
    """

    model: DampingModel
    value: float

    def __post_init__(self):
        if self.model not in ("viscous", "hysteretic"):
            raise InputError("damping.model", "must be 'viscous' or 'hysteretic'", self.model)
        name = "damping.damping_ratio" if self.model == "viscous" else "damping.loss_factor"
        if not np.isfinite(self.value) or not 0.0 <= self.value <= MAX_DAMPING:
            raise InputError(name, f"must be a number from 0 to {MAX_DAMPING:g}", self.value)

    @property
    def label(self) -> str:
        """Short label, e.g. ``"ζ = 0.05"`` or ``"η = 0.2"``."""
        symbol = "ζ" if self.model == "viscous" else "η"
        return f"{symbol} = {self.value:.3g}"


#: Largest damping ratio or loss factor accepted.
MAX_DAMPING = 2.0


def viscous_transmissibility(r, zeta):
    """Complex transmissibility with viscous damping.

    T = (1 + j 2 zeta r) / (1 - r**2 + j 2 zeta r).

    Parameters
    ----------
    r : array_like
        Frequency ratio omega / omega_n (dimensionless).
    zeta : array_like
        Damping ratio (dimensionless).
    """
    r = np.asarray(r, dtype=float)
    two_zeta_r = 2.0 * np.asarray(zeta, dtype=float) * r
    return (1.0 + 1j * two_zeta_r) / ((1.0 - r * r) + 1j * two_zeta_r)


def hysteretic_transmissibility(r, eta):
    """Complex transmissibility with hysteretic damping, stiffness k (1 + j eta).

    T = (1 + j eta) / (1 - r**2 + j eta).
    """
    r = np.asarray(r, dtype=float)
    eta = np.asarray(eta, dtype=float)
    return (1.0 + 1j * eta) / ((1.0 - r * r) + 1j * eta)


def _dynamic_denominator(r, damping: Damping):
    """1 - r**2 + j (2 zeta r or eta): the normalized dynamic stiffness."""
    r = np.asarray(r, dtype=float)
    loss = 2.0 * damping.value * r if damping.model == "viscous" else damping.value
    return (1.0 - r * r) + 1j * loss


def force_transmissibility(r, damping: Damping):
    """Complex force transmissibility: force into the floor over exciting force."""
    if damping.model == "viscous":
        return viscous_transmissibility(r, damping.value)
    return hysteretic_transmissibility(r, damping.value)


#: Motion transmissibility (machine motion over floor motion) has the same expression.
motion_transmissibility = force_transmissibility


def receptance(r, damping: Damping):
    """Dynamic amplification: machine displacement per force, normalized by F/k (complex)."""
    return 1.0 / _dynamic_denominator(r, damping)


def unbalance_response(r, damping: Damping):
    """Machine displacement under rotating unbalance, normalized by unbalance / mass.

    X M / (m e) = r**2 / (1 - r**2 + j ...) (complex).
    """
    r = np.asarray(r, dtype=float)
    return r * r / _dynamic_denominator(r, damping)


def stroke_ratio(r, damping: Damping):
    """Relative deflection of the mount under floor motion, Z / Y (complex).

    Z / Y = r**2 / (1 - r**2 + j ...).
    """
    return unbalance_response(r, damping)


def magnitude(response):
    """Magnitude of a complex response (same shape)."""
    return np.abs(response)


def phase_deg(response):
    """Phase angle in degrees of a complex response; lag is negative."""
    return np.degrees(np.angle(response))


def isolation_percent(transmissibility_magnitude):
    """Isolation efficiency in percent, (1 - |T|) * 100 (negative where |T| > 1)."""
    return (1.0 - np.asarray(transmissibility_magnitude, dtype=float)) * 100.0


def isolation_db(transmissibility_magnitude):
    """Isolation in dB, -20 log10 |T| (positive = reduction)."""
    return -20.0 * np.log10(np.asarray(transmissibility_magnitude, dtype=float))


def transmissibility_db(transmissibility_magnitude):
    """Transmissibility level in dB, 20 log10 |T| (negative = reduction)."""
    return 20.0 * np.log10(np.asarray(transmissibility_magnitude, dtype=float))


@dataclass(frozen=True)
class FrequencyResponse:
    """Transmissibility over a grid of frequency ratios.

    Attributes
    ----------
    ratio : ndarray
        Frequency ratio omega / omega_n.
    magnitude : ndarray
        |T|.
    phase_deg : ndarray
        Phase in degrees, lag negative.
    """

    ratio: np.ndarray
    magnitude: np.ndarray
    phase_deg: np.ndarray

    @property
    def response(self) -> np.ndarray:
        """Complex transmissibility |T| exp(j phase)."""
        return self.magnitude * np.exp(1j * np.radians(self.phase_deg))


#: Below this the squared denominator of |T| has lost precision to underflow (subnormals start
#: at 2.2e-308).
_SQUARES_UNDERFLOW = 1e-300


def frequency_response(r, damping: Damping) -> FrequencyResponse:
    """Transmissibility magnitude and phase over the frequency ratios ``r``.

    Evaluated in real arithmetic, with a = 2 zeta r (viscous) or eta (hysteretic):
    |T|**2 = (1 + a**2) / ((1 - r**2)**2 + a**2), where that denominator underflows (a damping
    below about 1e-150 at resonance) |T| = sqrt(1 + a**2) / hypot(1 - r**2, a), and
    phase = -atan2(a r**2, 1 - r**2 + a**2), the angle of (1 + j a)(1 - r**2 - j a).
    The same numbers as the complex expression, in about 60 % of its time.
    """
    ratio = np.asarray(r, dtype=float)
    if ratio.ndim == 0:    # a single ratio: the array path below works in place
        single = frequency_response(ratio.reshape(1), damping)
        return FrequencyResponse(ratio, single.magnitude[0], single.phase_deg[0])
    r2 = ratio * ratio
    loss = 2.0 * damping.value * ratio if damping.model == "viscous" else np.full_like(ratio, damping.value)
    loss2 = loss * loss
    one_minus = 1.0 - r2
    # In place where a temporary would be thrown away (about 12 % of the time at 2000 points).
    denominator = one_minus * one_minus
    denominator += loss2
    magnitude = loss2 + 1.0
    with np.errstate(divide="ignore", over="ignore"):  # no damping at r = 1: |T| = inf, as the complex form
        np.divide(magnitude, denominator, out=magnitude)
    np.sqrt(magnitude, out=magnitude)
    lost = denominator < _SQUARES_UNDERFLOW
    if lost.any():                      # squares near the float floor: the unsquared form
        with np.errstate(divide="ignore", over="ignore"):
            magnitude[lost] = np.sqrt(1.0 + loss2[lost]) / np.hypot(one_minus[lost], loss[lost])
    phase = np.multiply(loss, r2, out=loss)     # loss is a new array, not needed after this
    one_minus += loss2
    np.arctan2(phase, one_minus, out=phase)
    phase *= -180.0 / np.pi
    return FrequencyResponse(ratio, magnitude, phase)


@dataclass(frozen=True)
class Peak:
    """Resonance peak of the transmissibility.

    Attributes
    ----------
    ratio : float
        Frequency ratio of the maximum of |T|.
    magnitude : float
        max |T| (``inf`` without damping).
    """

    ratio: float
    magnitude: float


def transmissibility_peak(damping: Damping) -> Peak:
    """Exact resonance peak of |T| (location and height).

    Viscous: r_peak = sqrt(sqrt(1 + 8 zeta**2) - 1) / (2 zeta), which is below 1
    and distinct from the displacement peak at sqrt(1 - 2 zeta**2).
    Hysteretic: r_peak = 1, |T| = sqrt(1 + eta**2) / eta.
    """
    value = damping.value
    if value == 0.0:
        return Peak(1.0, float("inf"))
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):  # vanishing damping: unbounded
        if damping.model == "hysteretic":
            magnitude = float(np.sqrt(1.0 + value * value) / value)
            ratio = 1.0
        else:
            # The same r_peak written without the cancellation sqrt(1 + 8 zeta**2) - 1 at small zeta.
            ratio = float(np.sqrt(2.0 / (1.0 + np.sqrt(1.0 + 8.0 * value * value))))
            magnitude = float(np.abs(viscous_transmissibility(ratio, value)))
    return Peak(ratio, magnitude if np.isfinite(magnitude) else float("inf"))


def required_ratio(target_transmissibility: float, damping: Damping,
                   max_ratio: float = MAX_DESIGN_RATIO, field: str = "target") -> float:
    """Frequency ratio above resonance at which |T| equals a target below 1.

    Closed form in x = r**2 for both damping models:

    * viscous: tau**2 x**2 + (4 zeta**2 tau**2 - 2 tau**2 - 4 zeta**2) x + tau**2 - 1 = 0,
      positive root;
    * hysteretic: x = 1 + sqrt((1 + eta**2) / tau**2 - eta**2).

    Parameters
    ----------
    target_transmissibility : float
        Wanted |T|, 0 < tau < 1.
    damping : Damping
    max_ratio : float
        Largest ratio that counts as reachable.
    field : str
        Field name the error message names.

    Raises
    ------
    TargetUnreachable
        When the target is outside (0, 1) or needs a ratio beyond ``max_ratio``.
    """
    tau = float(target_transmissibility)
    if not np.isfinite(tau) or not 0.0 < tau < 1.0:
        raise TargetUnreachable(
            field, f"transmissibility target must be between 0 and 1 exclusive (isolation "
            f"between 0 and 100 %), got {tau!r}")
    value = damping.value
    tau2 = tau * tau
    if damping.model == "viscous":
        four_zeta2 = 4.0 * value * value
        b = four_zeta2 * tau2 - 2.0 * tau2 - four_zeta2
        c = tau2 - 1.0
        x = (-b + np.sqrt(b * b - 4.0 * tau2 * c)) / (2.0 * tau2)
    else:
        x = 1.0 + np.sqrt((1.0 + value * value) / tau2 - value * value)
    ratio = float(np.sqrt(x))
    if ratio > max_ratio:
        raise TargetUnreachable(
            field, f"isolation {isolation_percent(tau):.4g} % needs a frequency ratio of "
            f"{ratio:.4g} with {damping.label}, beyond the supported {max_ratio:g}; "
            "lower the damping or the target")
    return ratio


def loss_factor_with_same_peak(damping_ratio: float) -> float:
    """Loss factor eta whose hysteretic peak equals the viscous peak for ``damping_ratio``.

    The hysteretic peak height is sqrt(1 + eta**2) / eta, so eta = 1 / sqrt(P**2 - 1)
    with P the exact viscous peak height. Used to compare the two models fairly.
    """
    if not np.isfinite(damping_ratio) or not 0.0 < damping_ratio <= MAX_DAMPING:
        raise InputError("damping.damping_ratio", f"must be a number above 0 and up to {MAX_DAMPING:g}",
                         damping_ratio)
    height = transmissibility_peak(Damping("viscous", damping_ratio)).magnitude
    return float(1.0 / np.sqrt(height * height - 1.0))


def damping_with_same_peak(damping: Damping) -> Damping:
    """The other damping model with the same resonance peak height of |T|.

    Viscous zeta -> loss factor (:func:`loss_factor_with_same_peak`);
    hysteretic eta -> the viscous ratio whose exact peak equals sqrt(1 + eta**2) / eta
    (found with ``scipy.optimize.brentq``; the viscous peak falls as zeta grows).

    Raises
    ------
    InputError
        Without damping, or for a loss factor whose peak no viscous ratio up to
        ``MAX_DAMPING`` reaches.
    """
    from scipy.optimize import brentq

    if damping.model == "viscous":
        return Damping("hysteretic", loss_factor_with_same_peak(damping.value))
    eta = damping.value
    if not eta > 0.0:
        raise InputError("damping.loss_factor", f"must be above 0 and up to {MAX_DAMPING:g}", eta)
    height = transmissibility_peak(damping).magnitude
    lowest = transmissibility_peak(Damping("viscous", MAX_DAMPING)).magnitude
    if height <= lowest:
        raise InputError("damping.loss_factor", f"gives a peak of {height:.4g}, lower than any viscous "
                         f"damping ratio up to {MAX_DAMPING:g} reaches", eta)
    zeta = brentq(lambda z: transmissibility_peak(Damping("viscous", z)).magnitude - height,
                  1e-9, MAX_DAMPING, xtol=1e-14, rtol=1e-12)
    return Damping("viscous", float(zeta))
