"""Passage through resonance: a machine on its mounts speeding up or coasting down.

A machine whose mounts put its natural frequency below running speed passes
through resonance every time it starts and stops. The slower the passage, the
closer the response comes to the steady resonance peak.

Model: single degree of freedom, total mass m on mounts of stiffness k and
viscous damping c, vertical coordinate x. A rotating unbalance U = m_u e turns at
angle phi(t) with speed Omega = dphi/dt; its reaction on the machine is

    m x'' + c x' + k x = U (Omega**2 cos(phi) + Omega' sin(phi)),

the second term coming from the angular acceleration (it is kept: it is exact
for this model and costs nothing; it is small when Omega' << Omega**2).
The force into the floor is k x + c x'.

Integration is an exact discretisation of the linear system for a force that is
linear between samples (first-order hold), run in blocks by :func:`linear_recursion`; it
is checked against ``scipy.integrate.solve_ivp`` in the tests.

Two published estimates complete the picture:

* F. Zhi et al., *Measurement* 201 (2022) 111681, eqs. 11 and 13: for a linear
  frequency sweep of constant force amplitude, the peak reaches a fraction
  A = 1 - exp(-2.86 eta_s**-0.455) of the steady resonance peak, with sweep
  parameter eta_s = Q**2 (df/dt) / fn**2 and Q = 1 / (2 zeta).
* F.M. Lewis, Trans. ASME 54 (1932) (from memory): undamped linear sweep at
  angular acceleration alpha, x_max / x_static = 1.467 / sqrt(alpha / omega_n**2).
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np

from core.errors import InputError
from core.matrices import small_matrix_exponential
from core.excitation import rad_s_to_rpm, rpm_to_rad_s
from core.transmissibility import viscous_transmissibility

Direction = Literal["up", "down"]

#: Coefficient of Lewis' undamped sweep peak (Fresnel-integral result).
LEWIS_PEAK_COEFFICIENT = 1.467
#: Largest number of time samples one simulation may use.
MAX_SAMPLES = 20_000_000


def _check_number(field: str, value, allowed: str, low: float | None = None,
                  allow_low: bool = False) -> np.ndarray:
    """Return ``value`` as a finite float array above ``low``, or raise InputError naming ``field``."""
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(field, allowed, value) from None
    ok = np.isfinite(array)
    if low is not None:
        ok &= (array >= low) if allow_low else (array > low)
    if array.size == 0 or not np.all(ok):
        raise InputError(field, allowed, value)
    return array


def _check_positive(field: str, value, unit: str, allow_zero: bool = False) -> np.ndarray:
    """Return ``value`` as a float array > 0 (or >= 0), or raise InputError naming ``field``."""
    allowed = f"must be a finite number {'>=' if allow_zero else '>'} 0 {unit}".rstrip()
    return _check_number(field, value, allowed, 0.0, allow_zero)


def unbalance_displacement_ratio(r, zeta):
    """Displacement under rotating unbalance, normalized by U / m (complex).

    X m / U = r**2 / (1 - r**2 + j 2 zeta r), written as
    r**2 T / (1 + j 2 zeta r) with the shared viscous transmissibility T.
    Broadcasts ``r`` and ``zeta``.
    """
    r = np.asarray(r, dtype=float)
    zeta = np.asarray(zeta, dtype=float)
    return r * r * viscous_transmissibility(r, zeta) / (1.0 + 2j * zeta * r)


def unbalance_peak_ratio(zeta):
    """Frequency ratio of the steady unbalance-response peak, 1 / sqrt(1 - 2 zeta**2).

    ``inf`` for zeta >= 1/sqrt(2), where the response rises monotonically to 1.
    """
    zeta = np.asarray(zeta, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(zeta < np.sqrt(0.5), 1.0 / np.sqrt(np.maximum(1.0 - 2.0 * zeta**2, 0.0)), np.inf)


def unbalance_peak_height(zeta):
    """Height of the steady unbalance-response peak, 1 / (2 zeta sqrt(1 - zeta**2)), in units of U / m.

    Valid for 0 < zeta < 1/sqrt(2) (the same height as the receptance peak).
    """
    zeta = np.asarray(zeta, dtype=float)
    return 1.0 / (2.0 * zeta * np.sqrt(1.0 - zeta * zeta))


# --- time integration ---------------------------------------------------------------------

@dataclass(frozen=True)
class SdofResponse:
    """Time response of a single-degree-of-freedom system.

    Attributes
    ----------
    time_s : ndarray
        Sample times, s (uniform).
    displacement_m : ndarray
        Displacement x, m.
    velocity_m_per_s : ndarray
        Velocity x', m/s.
    """

    time_s: np.ndarray
    displacement_m: np.ndarray
    velocity_m_per_s: np.ndarray


def _hold_matrices(mass_kg: float, stiffness_n_per_m: float, damping_n_s_per_m: float, step_s: float):
    """Exact first-order-hold discretisation x[k+1] = Phi x[k] + G0 u[k] + G1 u[k+1] of x = [x, x'].

    Returns Phi, G0, G1 and Phi**-1 (from exp of the augmented matrix [[A h, B h, 0], [0, 0, 1], [0, 0, 0]]).
    """
    a = np.array([[0.0, 1.0],
                  [-stiffness_n_per_m / mass_kg, -damping_n_s_per_m / mass_kg]])
    b = np.array([0.0, 1.0 / mass_kg])
    augmented = np.zeros((4, 4))
    augmented[:2, :2] = a * step_s
    augmented[:2, 2] = b * step_s
    augmented[2, 3] = 1.0
    exponential = small_matrix_exponential(augmented)
    phi = exponential[:2, :2]
    gain_next = exponential[:2, 3]                       # input rising 0 -> 1 over the step
    gain_now = exponential[:2, 2] - gain_next            # input held at 1, minus the rise
    return phi, gain_now, gain_next, small_matrix_exponential(-a * step_s)


def linear_recursion(phi, drive, block: int = 256) -> np.ndarray:
    """States of x[k] = Phi x[k-1] + b[k] (x[-1] = 0) for a stable 2x2 ``phi`` and ``drive`` b of shape (n, 2).

    Computed in blocks: inside each block the zero-state response is a convolution
    with Phi**m (done by FFT for all blocks at once), and the state at each block's
    end carries into the next through Phi**(j+1). Exact up to rounding; replaces a
    sample-by-sample loop (and scipy.signal.lfilter, whose import costs about 0.3 s
    and 90 MB).
    """
    count = drive.shape[0]
    blocks = -(-count // block)
    padded = np.zeros((blocks * block, 2))
    padded[:count] = drive
    powers = np.empty((block + 1, 2, 2))
    powers[0] = np.eye(2)
    for m in range(1, block + 1):
        powers[m] = phi @ powers[m - 1]
    size = 2 * block
    kernel = np.fft.rfft(powers[:block], n=size, axis=0)                  # (f, 2, 2)
    spectra = np.fft.rfft(padded.reshape(blocks, block, 2), n=size, axis=1)  # (q, f, 2)
    products = np.empty_like(spectra)
    for row in range(2):                                                   # 2x2 product, written out
        products[..., row] = kernel[:, row, 0] * spectra[..., 0] + kernel[:, row, 1] * spectra[..., 1]
    zero_state = np.fft.irfft(products, n=size, axis=1)[:, :block]
    carried = np.zeros((blocks, 2))                                        # state before each block
    for q in range(1, blocks):
        carried[q] = zero_state[q - 1, -1] + powers[block] @ carried[q - 1]
    states = zero_state + (carried @ powers[1:].transpose(0, 2, 1)).transpose(1, 0, 2)  # Phi**(j+1) carried[q]
    return states.reshape(blocks * block, 2)[:count]


def sdof_response(mass_kg: float, stiffness_n_per_m: float, damping_n_s_per_m: float,
                  time_s, force_n, initial_displacement_m: float = 0.0,
                  initial_velocity_m_per_s: float = 0.0) -> SdofResponse:
    """Response of m x'' + c x' + k x = F(t) to a sampled force, linear between samples.

    Exact for a piecewise-linear force (first-order hold); for a smooth force the
    error falls as the square of the step.

    Parameters
    ----------
    mass_kg, stiffness_n_per_m, damping_n_s_per_m : float
        m (kg, > 0), k (N/m, > 0), c (N s/m, >= 0).
    time_s : array_like
        Uniform, increasing sample times, s (at least 2).
    force_n : array_like
        Force at the sample times, N (same length).
    initial_displacement_m, initial_velocity_m_per_s : float
        State at ``time_s[0]``.
    """
    mass = float(_check_positive("mass_kg", mass_kg, "kg"))
    stiffness = float(_check_positive("stiffness_n_per_m", stiffness_n_per_m, "N/m"))
    damping = float(_check_positive("damping_n_s_per_m", damping_n_s_per_m, "N·s/m", allow_zero=True))
    time = np.asarray(time_s, dtype=float)
    force = np.asarray(force_n, dtype=float)
    if time.ndim != 1 or time.size < 2 or not np.all(np.isfinite(time)):
        raise InputError("time_s", "must be a 1-D array of at least 2 finite times in s", time_s)
    step = (time[-1] - time[0]) / (time.size - 1)
    if not step > 0.0 or not np.allclose(np.diff(time), step, rtol=1e-6, atol=0.0):
        raise InputError("time_s", "must be uniformly spaced and increasing", None)
    if force.shape != time.shape or not np.all(np.isfinite(force)):
        raise InputError("force_n", "must be finite and the same length as time_s", None)
    x0 = np.array([_check_number("initial_displacement_m", initial_displacement_m, "must be a finite number in m"),
                   _check_number("initial_velocity_m_per_s", initial_velocity_m_per_s,
                                 "must be a finite number in m/s")], dtype=float)

    phi, gain_now, gain_next, _ = _hold_matrices(mass, stiffness, damping, step)
    # x[k] = Phi x[k-1] + G0 u[k-1] + G1 u[k] for k >= 1, x[0] = x0.
    drive = np.empty((force.size, 2))
    drive[0] = x0
    drive[1:] = np.outer(force[:-1], gain_now) + np.outer(force[1:], gain_next)
    states = linear_recursion(phi, drive)
    return SdofResponse(time, states[:, 0], states[:, 1])


# --- run-up and coast-down ------------------------------------------------------------------

@dataclass(frozen=True)
class PassageResult:
    """Run-up or coast-down of a machine with rotating unbalance on its mounts.

    Attributes
    ----------
    direction : {"up", "down"}
    natural_frequency_hz : float
        Undamped natural frequency on the mounts, Hz.
    damping_ratio : float
        zeta = c / (2 sqrt(k m)).
    operating_speed_rpm : float
    time_s, speed_rpm, displacement_m, transmitted_force_n : ndarray
        Time history: time (s), instantaneous speed (r/min), machine displacement (m),
        force into the floor k x + c x' (N).
    displacement_envelope_speed_rpm, displacement_envelope_m : ndarray
        Upper envelope of |x|: the largest |x| (m) within each window one period of the
        slower of running speed and natural frequency long (windows start every eighth of
        that), at the instantaneous speed (r/min) where it occurs; distinct peaks in time order.
    steady_displacement_envelope_m : ndarray
        Steady-state displacement amplitude at constant speed, at the same speeds, m.
    force_envelope_speed_rpm, force_envelope_n, steady_force_envelope_n : ndarray
        The same for the force into the floor |k x + c x'| (N).
    peak_displacement_m, peak_force_n : float
        Largest |x| and |force| during the passage.
    peak_displacement_speed_rpm, peak_force_speed_rpm : float
        Instantaneous speed when each peak occurs, r/min.
    steady_displacement_m, steady_force_n : float
        Steady-state amplitudes at operating speed, m and N.
    displacement_amplification, force_amplification : float
        Peak over steady-state amplitude at operating speed.
    """

    direction: Direction
    natural_frequency_hz: float
    damping_ratio: float
    operating_speed_rpm: float
    time_s: np.ndarray
    speed_rpm: np.ndarray
    displacement_m: np.ndarray
    transmitted_force_n: np.ndarray
    displacement_envelope_speed_rpm: np.ndarray
    displacement_envelope_m: np.ndarray
    steady_displacement_envelope_m: np.ndarray
    force_envelope_speed_rpm: np.ndarray
    force_envelope_n: np.ndarray
    steady_force_envelope_n: np.ndarray
    peak_displacement_m: float
    peak_force_n: float
    peak_displacement_speed_rpm: float
    peak_force_speed_rpm: float
    steady_displacement_m: float
    steady_force_n: float
    displacement_amplification: float
    force_amplification: float


def _steady_amplitudes(unbalance_kg_m, mass_kg, omega_n, zeta, omega):
    """Steady displacement (m) and transmitted-force (N) amplitudes at constant speed omega (rad/s)."""
    omega = np.asarray(omega, dtype=float)
    r = omega / omega_n
    displacement = unbalance_kg_m / mass_kg * np.abs(unbalance_displacement_ratio(r, zeta))
    force = unbalance_kg_m * omega**2 * np.abs(viscous_transmissibility(r, zeta))
    return displacement, force


#: Envelope windows overlap: a new window starts every 1/ENVELOPE_HOPS of a window length.
ENVELOPE_HOPS = 8


def _envelope_pieces(omega, omega_n, step_s):
    """First sample of each envelope piece, 1/ENVELOPE_HOPS of a period of min(Omega, omega_n)."""
    clock_rate = np.clip(omega, 0.02 * omega_n, omega_n)
    clock = np.concatenate(([0.0], np.cumsum(0.5 * (clock_rate[1:] + clock_rate[:-1]) * step_s)))
    piece = np.floor(clock * ENVELOPE_HOPS / (2.0 * np.pi)).astype(np.int64)
    return np.concatenate(([0], np.flatnonzero(np.diff(piece)) + 1))


def _dominant_peaks(values, starts):
    """Samples where |values| is largest within a window of ENVELOPE_HOPS pieces around them.

    Each window (one period of the slower motion) contributes the sample of its maximum;
    the distinct samples, in time order, trace the upper envelope without the dips of beats.
    """
    magnitude = np.abs(values)
    lengths = np.diff(np.append(starts, magnitude.size))
    piece_max = np.maximum.reduceat(magnitude, starts)
    piece_of_sample = np.repeat(np.arange(starts.size), lengths)
    hits = np.flatnonzero(magnitude == piece_max[piece_of_sample])
    _, first = np.unique(piece_of_sample[hits], return_index=True)
    piece_peak_sample = hits[first]                              # sample of each piece's maximum
    hops = min(ENVELOPE_HOPS, starts.size)
    best_piece = np.lib.stride_tricks.sliding_window_view(piece_max, hops).argmax(axis=1)
    best_piece += np.arange(best_piece.size)
    return piece_peak_sample[np.unique(best_piece)]


def simulate_runup(mass_kg: float, stiffness_n_per_m: float, damping_n_s_per_m: float,
                   unbalance_kg_m: float, speed_rpm: float, ramp_s: float,
                   direction: Direction = "up", samples_per_period: int = 64) -> PassageResult:
    """Simulate a linear run-up from rest (or coast-down to rest) through resonance.

    "up": speed rises linearly from 0 to ``speed_rpm`` over ``ramp_s``, machine at rest at
    t = 0. "down": speed falls linearly from ``speed_rpm`` to 0 over ``ramp_s``, starting from
    the steady state at operating speed.

    Parameters
    ----------
    mass_kg : float
        Total mass on the mounts (rotor included), kg.
    stiffness_n_per_m : float
        Total vertical mount stiffness, N/m.
    damping_n_s_per_m : float
        Total viscous damping, N s/m (>= 0).
    unbalance_kg_m : float
        Rotating unbalance U = m_u e, kg m.
    speed_rpm : float
        Operating speed, r/min.
    ramp_s : float
        Duration of the run-up (or coast-down), s.
    direction : {"up", "down"}
    samples_per_period : int
        Time samples per period of the faster of operating speed and natural frequency
        (16 to 1024); 64 keeps the sampled peak within about 0.2 %.

    Returns
    -------
    PassageResult
    """
    mass = float(_check_positive("mass_kg", mass_kg, "kg"))
    stiffness = float(_check_positive("stiffness_n_per_m", stiffness_n_per_m, "N/m"))
    damping = float(_check_positive("damping_n_s_per_m", damping_n_s_per_m, "N·s/m", allow_zero=True))
    unbalance = float(_check_positive("unbalance_kg_m", unbalance_kg_m, "kg·m"))
    omega_op = float(rpm_to_rad_s(_check_positive("speed_rpm", speed_rpm, "r/min")))
    duration = float(_check_positive("ramp_s", ramp_s, "s"))
    if direction not in ("up", "down"):
        raise InputError("direction", "must be 'up' or 'down'", direction)
    if isinstance(samples_per_period, bool) or not isinstance(samples_per_period, (int, np.integer)) \
            or not 16 <= samples_per_period <= 1024:
        raise InputError("samples_per_period", "must be an integer from 16 to 1024", samples_per_period)

    omega_n = np.sqrt(stiffness / mass)
    zeta = damping / (2.0 * np.sqrt(stiffness * mass))
    if zeta == 0.0 and abs(omega_op / omega_n - 1.0) < 1e-6:
        raise InputError("damping_n_s_per_m", "must be > 0 N·s/m when the operating speed equals the "
                         "natural frequency (the steady amplitude would be unbounded)", damping_n_s_per_m)
    fastest = max(omega_op, omega_n)
    count = int(np.ceil(duration * fastest * samples_per_period / (2.0 * np.pi))) + 1
    if count > MAX_SAMPLES:
        raise InputError("ramp_s", f"needs {count} time samples, more than {MAX_SAMPLES}; "
                         "shorten the ramp or lower samples_per_period", ramp_s)
    count = max(count, 2 * samples_per_period)
    time = np.linspace(0.0, duration, count)
    alpha = omega_op / duration
    if direction == "up":
        omega = alpha * time
        angle = 0.5 * alpha * time**2
        acceleration = alpha
        x0 = v0 = 0.0
    else:
        omega = omega_op - alpha * time
        angle = omega_op * time - 0.5 * alpha * time**2
        acceleration = -alpha
        steady = unbalance / mass * unbalance_displacement_ratio(omega_op / omega_n, zeta)
        x0, v0 = float(steady.real), float(-omega_op * steady.imag)   # Re(X e^{j phi}) at phi = 0
    force = unbalance * (omega**2 * np.cos(angle) + acceleration * np.sin(angle))
    response = sdof_response(mass, stiffness, damping, time, force, x0, v0)
    displacement = response.displacement_m
    transmitted = stiffness * displacement + damping * response.velocity_m_per_s
    speed = rad_s_to_rpm(omega)

    pieces = _envelope_pieces(omega, omega_n, duration / (count - 1))
    x_peaks = _dominant_peaks(displacement, pieces)
    f_peaks = _dominant_peaks(transmitted, pieces)
    steady_x_envelope, _ = _steady_amplitudes(unbalance, mass, omega_n, zeta, omega[x_peaks])
    _, steady_f_envelope = _steady_amplitudes(unbalance, mass, omega_n, zeta, omega[f_peaks])
    steady_x, steady_f = _steady_amplitudes(unbalance, mass, omega_n, zeta, omega_op)

    i_x = int(np.argmax(np.abs(displacement)))
    i_f = int(np.argmax(np.abs(transmitted)))
    peak_x = float(abs(displacement[i_x]))
    peak_f = float(abs(transmitted[i_f]))
    return PassageResult(
        direction=direction,
        natural_frequency_hz=float(omega_n / (2.0 * np.pi)),
        damping_ratio=float(zeta),
        operating_speed_rpm=float(rad_s_to_rpm(omega_op)),
        time_s=time,
        speed_rpm=speed,
        displacement_m=displacement,
        transmitted_force_n=transmitted,
        displacement_envelope_speed_rpm=speed[x_peaks],
        displacement_envelope_m=np.abs(displacement[x_peaks]),
        steady_displacement_envelope_m=steady_x_envelope,
        force_envelope_speed_rpm=speed[f_peaks],
        force_envelope_n=np.abs(transmitted[f_peaks]),
        steady_force_envelope_n=steady_f_envelope,
        peak_displacement_m=peak_x,
        peak_force_n=peak_f,
        peak_displacement_speed_rpm=float(speed[i_x]),
        peak_force_speed_rpm=float(speed[i_f]),
        steady_displacement_m=float(steady_x),
        steady_force_n=float(steady_f),
        displacement_amplification=peak_x / float(steady_x),
        force_amplification=peak_f / float(steady_f),
    )


# --- published estimates ----------------------------------------------------------------------

def sweep_parameter(sweep_rate_hz_per_s, natural_frequency_hz, damping_ratio):
    """Sweep parameter eta_s = Q**2 (df/dt) / fn**2 with Q = 1 / (2 zeta) (Zhi et al. 2022, eq. 11).

    Broadcasts; the sweep rate is taken by magnitude (Hz/s).
    """
    rate = np.abs(_check_number("sweep_rate_hz_per_s", sweep_rate_hz_per_s, "must be a finite number in Hz/s"))
    fn = _check_positive("natural_frequency_hz", natural_frequency_hz, "Hz")
    zeta = _check_positive("damping_ratio", damping_ratio, "")
    quality = 1.0 / (2.0 * zeta)
    return quality**2 * rate / fn**2


def sweep_peak_fraction(sweep_rate_hz_per_s, natural_frequency_hz, damping_ratio):
    """Peak of a linear constant-amplitude sweep as a fraction of the steady resonance peak.

    A = 1 - exp(-2.86 eta_s**-0.455) (F. Zhi et al., *Measurement* 201 (2022) 111681, eq. 13),
    stated good to about 2 % for Q >= 10. A -> 1 for slow sweeps (eta_s -> 0).

    Parameters
    ----------
    sweep_rate_hz_per_s : array_like
        df/dt of the exciting frequency, Hz/s (magnitude used).
    natural_frequency_hz : array_like
        fn, Hz (> 0).
    damping_ratio : array_like
        zeta (> 0).
    """
    eta = sweep_parameter(sweep_rate_hz_per_s, natural_frequency_hz, damping_ratio)
    with np.errstate(divide="ignore"):
        return 1.0 - np.exp(-2.86 * eta**-0.455)


def lewis_undamped_peak(alpha_rad_s2, omega_n):
    """Peak over static response of an undamped linear sweep, 1.467 / sqrt(alpha / omega_n**2).

    F.M. Lewis, Trans. ASME 54 (1932) (from memory).

    Parameters
    ----------
    alpha_rad_s2 : array_like
        Angular acceleration of the exciting frequency, rad/s² (> 0).
    omega_n : array_like
        Natural angular frequency, rad/s (> 0).
    """
    alpha = _check_positive("alpha_rad_s2", alpha_rad_s2, "rad/s²")
    omega = _check_positive("omega_n", omega_n, "rad/s")
    return LEWIS_PEAK_COEFFICIENT / np.sqrt(alpha / omega**2)


def passage_amplification_estimate(natural_frequency_hz, damping_ratio, speed_rpm, ramp_s):
    """Cheap estimate of peak displacement during a run-up over the steady amplitude at speed.

    Steady unbalance response X m / U = r**2 / |1 - r**2 + j 2 zeta r|. When the run-up
    passes its peak (zeta < 1/sqrt(2) and the operating ratio above 1/sqrt(1 - 2 zeta**2)),
    the estimate is

        max(A * 1 / (2 zeta sqrt(1 - zeta**2)), X_op) / X_op,

    with A the sweep peak fraction of Zhi et al. (2022) at the run-up's rate of change of
    exciting frequency df/dt = f_op / ramp_s. Otherwise the largest steady response over the
    run-up is the one at speed and the estimate is 1. The fit is for a constant force
    amplitude; an unbalance force grows as speed squared but changes little near resonance.
    Broadcasts over all arguments (a grid for the design map).

    Parameters
    ----------
    natural_frequency_hz : array_like
        fn, Hz (> 0).
    damping_ratio : array_like
        zeta (> 0).
    speed_rpm : array_like
        Operating speed, r/min (> 0).
    ramp_s : array_like
        Run-up (or coast-down) time, s (> 0).
    """
    fn = _check_positive("natural_frequency_hz", natural_frequency_hz, "Hz")
    zeta = _check_positive("damping_ratio", damping_ratio, "")
    operating_hz = _check_positive("speed_rpm", speed_rpm, "r/min") / 60.0
    duration = _check_positive("ramp_s", ramp_s, "s")
    r_op = operating_hz / fn
    steady_at_speed = np.abs(unbalance_displacement_ratio(r_op, zeta))
    passes_peak = r_op > unbalance_peak_ratio(zeta)
    safe_zeta = np.where(passes_peak, zeta, 0.5)          # keeps the peak height finite where unused
    fraction = sweep_peak_fraction(operating_hz / duration, fn, zeta)
    peak = fraction * unbalance_peak_height(safe_zeta)
    return np.where(passes_peak, np.maximum(peak, steady_at_speed) / steady_at_speed, 1.0)
