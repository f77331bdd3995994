"""A machine as a rigid body on several resilient mounts (six degrees of freedom).

Machine frame: x, y horizontal, z up, metres. Motion of the body is described
about its centre of gravity (CG) by ``q = [x, y, z, θx, θy, θz]`` (m and rad,
small rotations about axes parallel to the machine axes through the CG).

Mount ``i`` at ``r_i = position_m - cg_m`` moves by ``T_i q`` with
``T_i = [I3 | -[r_i]x]``; its stiffness in the machine frame is
``R_i diag(k_i) R_iᵀ`` (``R_i`` columns: the mount's own axes). The stiffness
matrix about the CG is ``K = Σ T_iᵀ R_i diag(k_i) R_iᵀ T_i`` and the mass matrix
``M = blockdiag(m I3, J)``; natural frequencies solve ``K φ = ω² M φ``.
Sources: Harris' *Shock and Vibration Handbook* ch. 3 (Crede/Ruzicka, rigid
body on resilient supports); Jeong & Singh, J. Sound Vib. 234(1) (2000).

All values are preliminary: supplier data, seismic restraint, local codes and
a licensed engineer's review govern any installation.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from core.constants import STANDARD_GRAVITY
from core.errors import InputError, finite_number
from core.matrices import generalized_eigh

#: Names of the six coordinates, in the order of every 6-vector and 6x6 matrix.
COORDINATES = ("x", "y", "z", "θx", "θy", "θz")
#: An ω² below this share of the largest ω² is taken as "no stiffness" (a free motion).
_FREE_MOTION_RELATIVE = 1e-9
#: Relative tolerances for a symmetric inertia tensor and a rotation matrix.
_SYMMETRY_TOLERANCE = 1e-9
_ROTATION_TOLERANCE = 1e-6
#: Largest accepted loss factor (elastomers are about 0.05-0.5).
_MAX_LOSS_FACTOR = 2.0


# --------------------------------------------------------------------------- input checks


def _real_vector(value, field: str, what: str) -> np.ndarray:
    """Three finite real numbers as a read-only float array, else InputError."""
    try:
        array = np.array(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(field, f"must be three numbers {what}", value) from None
    if array.shape != (3,) or not np.all(np.isfinite(array)):
        raise InputError(field, f"must be three finite numbers {what}", value)
    array.setflags(write=False)
    return array


def _complex_vector(value, field: str, what: str) -> np.ndarray:
    """Three finite (complex) numbers as a read-only complex array, else InputError."""
    try:
        array = np.array(value, dtype=complex)
    except (TypeError, ValueError):
        raise InputError(field, f"must be three numbers {what}", value) from None
    if array.shape != (3,) or not np.all(np.isfinite(array)):
        raise InputError(field, f"must be three finite numbers {what}", value)
    return array


def _positive_number(value, field: str, reason: str) -> float:
    """One finite number > 0, else InputError."""
    number = finite_number(field, value, reason)
    if number <= 0:
        raise InputError(field, reason, value)
    return number


def _rotation(value, field: str) -> np.ndarray:
    """A 3x3 rotation matrix from a matrix or three angles (rad, Rz·Ry·Rx)."""
    if value is None:
        matrix = np.eye(3)
    else:
        try:
            matrix = np.array(value, dtype=float)
        except (TypeError, ValueError):
            raise InputError(field, "must be a 3x3 rotation matrix or three angles in rad", value) from None
        if not np.all(np.isfinite(matrix)):
            raise InputError(field, "must hold finite numbers", value)
        if matrix.shape == (3,):
            from scipy.spatial.transform import Rotation  # imported here: scipy loads in ~0.2 s, kept off the window's start-up
            matrix = Rotation.from_euler("xyz", matrix).as_matrix()
        elif matrix.shape != (3, 3):
            raise InputError(field, "must be a 3x3 rotation matrix or three angles in rad", value)
        orthonormal = np.allclose(matrix @ matrix.T, np.eye(3), atol=_ROTATION_TOLERANCE)
        if not orthonormal or np.linalg.det(matrix) <= 0:
            raise InputError(
                field, "must be a rotation matrix (orthonormal columns, determinant +1)", value
            )
    matrix = np.array(matrix, dtype=float)
    matrix.setflags(write=False)
    return matrix


# --------------------------------------------------------------------------- inputs


@dataclass(frozen=True, eq=False)
class Mount:
    """One resilient mount.

    Parameters
    ----------
    position_m : (3,) float
        Elastic centre of the mount in the machine frame, m.
    stiffness_n_per_m : (3,) float
        Stiffness along the mount's own axes (p, q, r), N/m, each ≥ 0.
        With no ``orientation`` the own axes are the machine axes x, y, z.
    orientation : (3, 3) or (3,) float, optional
        Rotation from the mount's own axes to the machine frame (columns: its
        axes in machine coordinates), or three angles in rad about x, y, z
        applied in that order (R = Rz·Ry·Rx). Stored as a 3x3 matrix.
    damping_n_s_per_m : (3,) float, optional
        Viscous damping along the mount's own axes, N·s/m, each ≥ 0.
    loss_factor : float, optional
        Hysteretic loss factor η of the mount (stiffness k(1 + jη)), 0 to 2.
    label : str, optional
        Name shown in messages and tables, e.g. ``"front left"``.
    """

    position_m: np.ndarray
    stiffness_n_per_m: np.ndarray
    orientation: np.ndarray | None = None
    damping_n_s_per_m: np.ndarray = (0.0, 0.0, 0.0)
    loss_factor: float = 0.0
    label: str = ""

    def __post_init__(self):
        where = f"mounts[{self.label}]" if self.label else "mount"
        store = object.__setattr__
        store(self, "position_m", _real_vector(self.position_m, f"{where}.position_m", "(x, y, z) in m"))
        stiffness = _real_vector(self.stiffness_n_per_m, f"{where}.stiffness_n_per_m", "in N/m")
        if np.any(stiffness < 0):
            raise InputError(f"{where}.stiffness_n_per_m", "must be ≥ 0 N/m on each axis", self.stiffness_n_per_m)
        store(self, "stiffness_n_per_m", stiffness)
        damping = _real_vector(self.damping_n_s_per_m, f"{where}.damping_n_s_per_m", "in N·s/m")
        if np.any(damping < 0):
            raise InputError(f"{where}.damping_n_s_per_m", "must be ≥ 0 N·s/m on each axis", self.damping_n_s_per_m)
        store(self, "damping_n_s_per_m", damping)
        store(self, "orientation", _rotation(self.orientation, f"{where}.orientation"))
        try:
            eta = float(self.loss_factor)
        except (TypeError, ValueError):
            eta = float("nan")
        if not (0.0 <= eta <= _MAX_LOSS_FACTOR):
            raise InputError(f"{where}.loss_factor", f"must be a number from 0 to {_MAX_LOSS_FACTOR:g}", self.loss_factor)
        store(self, "loss_factor", eta)
        store(self, "label", str(self.label))

    def machine_matrix(self, local_diagonal: np.ndarray) -> np.ndarray:
        """Turn per-axis values of the mount's own axes into a machine-frame 3x3 matrix.

        Parameters
        ----------
        local_diagonal : (..., 3) array
            Values along the mount's own axes (N/m, N·s/m or complex N/m).

        Returns
        -------
        (..., 3, 3) array
            ``R diag(local_diagonal) Rᵀ`` in the machine frame.
        """
        rotation = self.orientation
        return np.einsum("ia,...a,ja->...ij", rotation, np.asarray(local_diagonal), rotation)

    @property
    def stiffness_matrix_n_per_m(self) -> np.ndarray:
        """Machine-frame stiffness ``R diag(k) Rᵀ``, N/m, (3, 3)."""
        return self.machine_matrix(self.stiffness_n_per_m)


@dataclass(frozen=True, eq=False)
class RigidBody:
    """The machine as one rigid body.

    Parameters
    ----------
    mass_kg : float
        Mass, kg, > 0.
    inertia_kg_m2 : (3, 3) float
        Inertia tensor about the CG in machine axes, kg·m², symmetric positive
        definite, principal moments obeying J1 + J2 ≥ J3.
    cg_m : (3,) float
        Centre of gravity in the machine frame, m.
    inertia_is_estimate : bool, optional
        True when the inertia is an estimate (e.g. from :func:`box_inertia`).
    """

    mass_kg: float
    inertia_kg_m2: np.ndarray
    cg_m: np.ndarray
    inertia_is_estimate: bool = False

    def __post_init__(self):
        store = object.__setattr__
        store(self, "mass_kg", _positive_number(self.mass_kg, "body.mass_kg", "must be a number > 0 kg"))
        store(self, "cg_m", _real_vector(self.cg_m, "body.cg_m", "(x, y, z) in m"))
        store(self, "inertia_kg_m2", _checked_inertia(self.inertia_kg_m2))
        store(self, "inertia_is_estimate", bool(self.inertia_is_estimate))


def _checked_inertia(value) -> np.ndarray:
    field = "body.inertia_kg_m2"
    try:
        inertia = np.array(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(field, "must be a 3x3 matrix in kg·m²", value) from None
    if inertia.shape != (3, 3) or not np.all(np.isfinite(inertia)):
        raise InputError(field, "must be a 3x3 matrix of finite numbers in kg·m²", value)
    scale = np.max(np.abs(inertia))
    if not np.allclose(inertia, inertia.T, rtol=0.0, atol=_SYMMETRY_TOLERANCE * scale):
        raise InputError(field, "must be symmetric (J_xy = J_yx, J_xz = J_zx, J_yz = J_zy)", value)
    inertia = 0.5 * (inertia + inertia.T)
    principal = np.linalg.eigvalsh(inertia)
    if principal[0] <= 0:
        raise InputError(field, "must be positive definite (all principal moments > 0 kg·m²)", value)
    if principal[0] + principal[1] < principal[2] * (1.0 - 1e-6):
        raise InputError(
            field, "principal moments must obey J1 + J2 ≥ J3 (true of every real body)", value
        )
    inertia.setflags(write=False)
    return inertia


@dataclass(frozen=True, eq=False)
class InertiaEstimate:
    """An inertia tensor that is an estimate, with what it rests on.

    Attributes
    ----------
    inertia_kg_m2 : (3, 3) float
        Inertia about the CG, kg·m².
    basis : str
        What the estimate assumes.
    is_estimate : bool
        Always True: pass it on as ``RigidBody(inertia_is_estimate=...)``.
    """

    inertia_kg_m2: np.ndarray
    basis: str
    is_estimate: bool = True


def box_inertia(mass_kg, lx_m, ly_m, lz_m) -> InertiaEstimate:
    """Estimate the inertia of a machine as a uniform solid box (an estimate only).

    A real machine has its mass where its parts are; use measured or CAD
    values when there are any. J_xx = m(ly² + lz²)/12, etc.

    Parameters
    ----------
    mass_kg : float
        Mass, kg, > 0.
    lx_m, ly_m, lz_m : float
        Box edges along x, y, z, m, > 0.

    Returns
    -------
    InertiaEstimate
        Diagonal inertia about the box centre, kg·m², flagged as an estimate.
    """
    mass = _positive_number(mass_kg, "body.mass_kg", "must be a number > 0 kg")
    edges = [
        _positive_number(length, f"box.{name}", "must be a length > 0 m")
        for name, length in (("lx_m", lx_m), ("ly_m", ly_m), ("lz_m", lz_m))
    ]
    squares = np.square(edges)
    inertia = np.diag(mass / 12.0 * (squares.sum() - squares))
    inertia.setflags(write=False)
    basis = "uniform solid box {:.3g} x {:.3g} x {:.3g} m (estimate)".format(*edges)
    return InertiaEstimate(inertia_kg_m2=inertia, basis=basis)


# --------------------------------------------------------------------------- matrices


def _checked_mounts(mounts) -> tuple[Mount, ...]:
    try:
        mounts = tuple(mounts)
    except TypeError:
        raise InputError("mounts", "must be a list of at least 3 mounts", mounts) from None
    if len(mounts) < 3:
        raise InputError("mounts", "must hold at least 3 mounts, not all on one line", len(mounts))
    for index, mount in enumerate(mounts):
        if not isinstance(mount, Mount):
            raise InputError(f"mounts[{index}]", "must be a Mount", mount)
    if not any(np.any(mount.stiffness_n_per_m > 0) for mount in mounts):
        raise InputError("mounts", "stiffness must not be zero on every mount and axis")
    return mounts


def arm_matrix(arm_m) -> np.ndarray:
    """Map the CG motion q onto the motion of a point: ``T = [I3 | -[r]x]``.

    Parameters
    ----------
    arm_m : (..., 3) array
        Point relative to the CG, m.

    Returns
    -------
    (..., 3, 6) array
        Point displacement (m) per unit CG coordinate (m, rad).
    """
    arm = np.asarray(arm_m, dtype=float)
    x, y, z = arm[..., 0], arm[..., 1], arm[..., 2]
    zero = np.zeros_like(x)
    minus_cross = -np.stack(
        [np.stack([zero, -z, y], -1), np.stack([z, zero, -x], -1), np.stack([-y, x, zero], -1)], -2
    )
    identity = np.broadcast_to(np.eye(3), minus_cross.shape)
    return np.concatenate([identity, minus_cross], axis=-1)


def _arm_matrices(mounts: Sequence[Mount], cg_m: np.ndarray) -> np.ndarray:
    positions = np.array([mount.position_m for mount in mounts])
    return arm_matrix(positions - cg_m)


def _assemble(arms: np.ndarray, mount_matrices: np.ndarray) -> np.ndarray:
    """``Σ T_iᵀ k_i T_i`` for arms (n, 3, 6) and matrices (..., n, 3, 3)."""
    return np.einsum("nai,...nab,nbj->...ij", arms, mount_matrices, arms)


def stiffness_matrix(mounts: Sequence[Mount], cg_m) -> np.ndarray:
    """Stiffness matrix of the mount layout about the CG.

    Parameters
    ----------
    mounts : sequence of Mount
        At least 3 mounts.
    cg_m : (3,) float
        Centre of gravity in the machine frame, m.

    Returns
    -------
    (6, 6) float
        ``K = Σ T_iᵀ R_i diag(k_i) R_iᵀ T_i``; N/m, N/rad, N·m/rad blocks.
    """
    mounts = _checked_mounts(mounts)
    cg = _real_vector(cg_m, "body.cg_m", "(x, y, z) in m")
    matrices = np.array([mount.stiffness_matrix_n_per_m for mount in mounts])
    return _assemble(_arm_matrices(mounts, cg), matrices)


def mass_matrix(body: RigidBody) -> np.ndarray:
    """Mass matrix about the CG, ``blockdiag(m I3, J)``, kg and kg·m², (6, 6)."""
    if not isinstance(body, RigidBody):
        raise InputError("body", "must be a RigidBody", body)
    mass = np.zeros((6, 6))
    mass[:3, :3] = body.mass_kg * np.eye(3)
    mass[3:, 3:] = body.inertia_kg_m2
    return mass


def _energy_share(shapes: np.ndarray, mass: np.ndarray) -> np.ndarray:
    """Kinetic-energy share (modes, coordinates) of shape columns.

    Squared components of the mass-weighted shape ``M^½ φ`` (symmetric square
    root), divided by ``φᵀ M φ``. With principal inertia axes this is the
    usual ``φ_c (Mφ)_c``; with products of inertia it splits the cross terms
    so that every share stays in [0, 1].
    """
    values, vectors = np.linalg.eigh(mass)
    root = (vectors * np.sqrt(values)) @ vectors.T
    weighted = root @ shapes
    return (weighted**2 / np.sum(weighted**2, axis=0)).T


def _named_directions(subspace: np.ndarray) -> list[tuple[str | None, np.ndarray]]:
    """Machine axes lying in an orthonormal subspace (3, d) of directions, else its own columns."""
    named = [(axis, np.eye(3)[index]) for index, axis in enumerate("xyz")
             if np.linalg.norm(subspace.T @ np.eye(3)[index]) > 0.999]
    if len(named) == subspace.shape[1]:
        return named
    return [(None, column) for column in subspace.T]


def _direction_text(direction: np.ndarray) -> str:
    return "({:.2g}, {:.2g}, {:.2g})".format(*(np.round(direction, 3) + 0.0))


def _free_motion_error(free_shapes: np.ndarray, cg_m: np.ndarray) -> InputError:
    """InputError naming the motions a layout leaves without stiffness (free_shapes: (6, f) null space of K)."""
    basis = np.linalg.qr(free_shapes)[0]
    rotation_dirs, singular, combos = np.linalg.svd(basis[3:], full_matrices=True)
    turning = int(np.sum(singular > 1e-6))
    advice = []
    translations = np.linalg.qr(basis[:3] @ combos[turning:].T)[0] if turning < basis.shape[1] else np.zeros((3, 0))
    for axis, direction in _named_directions(translations):
        where = axis or _direction_text(direction)
        advice.append(f"no stiffness along {where}: give some mounts stiffness in that direction")
    for axis, direction in _named_directions(rotation_dirs[:, :turning]):
        weights = (rotation_dirs[:, :turning].T @ direction) / singular[:turning]
        motion = basis @ (combos[:turning].T @ weights)
        line = f"parallel to {axis}" if axis else f"along {_direction_text(direction)}"
        if translations.shape[1] == 0:
            point = cg_m + np.cross(direction, motion[:3])
            line = f"through {_direction_text(point)} m {line}"
        name = f"θ{axis}" if axis else "rotation"
        advice.append(
            f"no stiffness in {name} (turning about the line {line}): "
            f"place a mount away from that line, with stiffness across it"
        )
    return InputError("mounts", "the layout gives " + "; ".join(advice))


def _solve_modes(stiffness: np.ndarray, mass: np.ndarray, cg_m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``eigh(K, M)``; InputError naming the free motions if K leaves any unresisted.

    Shapes come out mass-normalised, S^T M S = I (:func:`core.matrices.generalized_eigh`).
    """
    eigenvalues, shapes = generalized_eigh(stiffness, mass)
    free = eigenvalues <= _FREE_MOTION_RELATIVE * max(eigenvalues[-1], 0.0)
    if np.any(free):
        raise _free_motion_error(shapes[:, free], cg_m)
    return eigenvalues, shapes


# --------------------------------------------------------------------------- results


@dataclass(frozen=True, eq=False)
class RigidBodyModes:
    """The six rigid-body modes of a machine on its mounts.

    Attributes
    ----------
    frequencies_hz : (6,) float
        Natural frequencies, Hz, ascending.
    shapes : (6, 6) float
        Mode shapes as columns over ``COORDINATES`` (m and rad per √kg),
        normalized so that ``shapesᵀ M shapes = I``.
    energy_share : (6, 6) float
        Kinetic-energy share, row = mode, column = coordinate, each in [0, 1],
        each row summing to 1: ``(M^½ φ)_c²``. With principal inertia axes
        this equals the usual ``φ_c (Mφ)_c``; with products of inertia the
        cross terms are split by the symmetric square root ``M^½``.
    dominant : tuple of str
        Per mode, the coordinate with the largest energy share.
    inertia_is_estimate : bool
        Copied from the body: True when the inertia is an estimate.
    """

    frequencies_hz: np.ndarray
    shapes: np.ndarray
    energy_share: np.ndarray
    dominant: tuple[str, ...]
    inertia_is_estimate: bool = False

    @property
    def angular_frequencies_rad_per_s(self) -> np.ndarray:
        """Natural angular frequencies, rad/s, (6,)."""
        return 2.0 * np.pi * self.frequencies_hz


def modes(body: RigidBody, mounts: Sequence[Mount]) -> RigidBodyModes:
    """Natural frequencies and mode shapes of a rigid body on resilient mounts.

    Parameters
    ----------
    body : RigidBody
        Mass, inertia about the CG, CG position.
    mounts : sequence of Mount
        At least 3 mounts, not all on one line.

    Returns
    -------
    RigidBodyModes

    Raises
    ------
    InputError
        ``field="mounts"`` when the layout leaves a motion without stiffness.
    """
    mounts = _checked_mounts(mounts)
    mass = mass_matrix(body)
    stiffness = stiffness_matrix(mounts, body.cg_m)
    eigenvalues, shapes = _solve_modes(stiffness, mass, body.cg_m)
    share = _energy_share(shapes, mass)
    dominant = tuple(COORDINATES[int(index)] for index in np.argmax(share, axis=1))
    frequencies = np.sqrt(eigenvalues) / (2.0 * np.pi)
    for array in (frequencies, shapes, share):
        array.setflags(write=False)
    return RigidBodyModes(frequencies, shapes, share, dominant, body.inertia_is_estimate)


@dataclass(frozen=True, eq=False)
class StaticLoads:
    """Static loads of the body's weight on its mounts.

    Attributes
    ----------
    displacement : (6,) float
        CG motion under the weight over ``COORDINATES``, m and rad.
    deflection_m : (n, 3) float
        Motion of each mount's top in the machine frame, m (z < 0: down).
    force_n : (n, 3) float
        Force of the body on each mount in the machine frame, N (z < 0: down).
    local_force_n : (n, 3) float
        The same force along each mount's own axes, N.
    vertical_load_n : (n,) float
        Vertical load each mount carries, N, > 0 in compression.
    weight_n : float
        Weight m·g, N; ``vertical_load_n`` sums to it.
    """

    displacement: np.ndarray
    deflection_m: np.ndarray
    force_n: np.ndarray
    local_force_n: np.ndarray
    vertical_load_n: np.ndarray
    weight_n: float

    @property
    def mounts_in_tension(self) -> tuple[int, ...]:
        """Indices of mounts pulled upward (CG outside the mount layout)."""
        return tuple(int(index) for index in np.flatnonzero(self.vertical_load_n < 0))


def static_loads(body: RigidBody, mounts: Sequence[Mount], g=STANDARD_GRAVITY) -> StaticLoads:
    """Share the body's weight among its mounts, solved elastically.

    Gravity acts at the CG, so with K about the CG the load vector is
    ``[0, 0, -m g, 0, 0, 0]``; ``K u = F`` gives the CG motion and each mount
    carries ``R_i diag(k_i) R_iᵀ T_i u``. Works for any number of mounts
    (statically indeterminate layouts included).

    Parameters
    ----------
    body : RigidBody
    mounts : sequence of Mount
        At least 3 mounts, not all on one line.
    g : float, optional
        Gravitational acceleration, m/s², > 0.

    Returns
    -------
    StaticLoads
    """
    gravity = _positive_number(g, "g", "must be a number > 0 m/s²")
    mounts = _checked_mounts(mounts)
    mass = mass_matrix(body)
    stiffness = stiffness_matrix(mounts, body.cg_m)
    _solve_modes(stiffness, mass, body.cg_m)
    weight = body.mass_kg * gravity
    load = np.array([0.0, 0.0, -weight, 0.0, 0.0, 0.0])
    displacement = np.linalg.solve(stiffness, load)
    deflection = _arm_matrices(mounts, body.cg_m) @ displacement
    matrices = np.array([mount.stiffness_matrix_n_per_m for mount in mounts])
    force = np.einsum("nab,nb->na", matrices, deflection)
    local = np.einsum("nba,nb->na", np.array([mount.orientation for mount in mounts]), force)
    result = StaticLoads(displacement, deflection, force, local, -force[:, 2], weight)
    for array in (displacement, deflection, force, local, result.vertical_load_n):
        array.setflags(write=False)
    return result


def mode_warnings(frequencies_hz, operating_speed_hz, band=0.2, labels=None) -> list[str]:
    """Warn of natural frequencies near the running speed or twice it.

    A mode is flagged when ``abs(f - h·f_run) ≤ band·h·f_run`` for h = 1, 2.
    A ±20 % margin is common practice.

    Parameters
    ----------
    frequencies_hz : (n,) float
        Natural frequencies, Hz, ≥ 0.
    operating_speed_hz : float
        Running speed, Hz (r/min / 60), > 0.
    band : float, optional
        Relative margin, 0 < band < 1.
    labels : sequence of str, optional
        Name per mode (e.g. ``RigidBodyModes.dominant``).

    Returns
    -------
    list of str
        One message per mode and harmonic; empty when clear.
    """
    speed = _positive_number(operating_speed_hz, "operating_speed_hz", "must be a speed > 0 Hz")
    margin = _positive_number(band, "band", "must be a fraction between 0 and 1")
    if margin >= 1:
        raise InputError("band", "must be a fraction between 0 and 1", band)
    try:
        frequencies = np.atleast_1d(np.asarray(frequencies_hz, dtype=float))
    except (TypeError, ValueError):
        raise InputError("frequencies_hz", "must be numbers ≥ 0 Hz", frequencies_hz) from None
    if frequencies.ndim != 1 or not np.all(np.isfinite(frequencies)) or np.any(frequencies < 0):
        raise InputError("frequencies_hz", "must be a list of numbers ≥ 0 Hz", frequencies_hz)
    if labels is not None and len(labels) != len(frequencies):
        raise InputError("labels", f"must name each of the {len(frequencies)} modes", labels)
    messages = []
    for index, frequency in enumerate(frequencies):
        name = f"mode {index + 1}" + (f" ({labels[index]})" if labels is not None else "")
        for harmonic, what in ((1, "the running speed"), (2, "twice the running speed")):
            target = harmonic * speed
            if abs(frequency - target) <= margin * target:
                messages.append(
                    f"{name} at {frequency:.3g} Hz is within ±{margin:.0%} of {what} ({target:.3g} Hz)"
                )
    return messages


@dataclass(frozen=True, eq=False)
class TransmittedForces:
    """Harmonic forces passed to the foundation through each mount.

    Complex amplitudes: the physical value is ``Re(A e^{jωt})``.

    Attributes
    ----------
    frequency_hz : (...) float
        Excitation frequency, Hz.
    response : (..., 6) complex
        CG motion over ``COORDINATES``, m and rad.
    force_n : (..., n, 3) complex
        Force of each mount on the foundation, machine frame, N.
    magnitude_n : (..., n) float
        ``sqrt(|Fx|² + |Fy|² + |Fz|²)``, N (√2 x the peak for a rotating force).
    peak_n : (..., n) float
        Largest instantaneous force magnitude over one cycle, N.
    """

    frequency_hz: np.ndarray
    response: np.ndarray
    force_n: np.ndarray
    magnitude_n: np.ndarray
    peak_n: np.ndarray

    @property
    def total_force_n(self) -> np.ndarray:
        """Sum over the mounts, (..., 3) complex, N."""
        return self.force_n.sum(axis=-2)


def _peak_magnitude(force: np.ndarray) -> np.ndarray:
    """max over t of |Re(F e^{jωt})| for complex 3-vectors F (..., 3)."""
    real, imag = force.real, force.imag
    a2 = np.sum(real * real, axis=-1)
    b2 = np.sum(imag * imag, axis=-1)
    ab = np.sum(real * imag, axis=-1)
    return np.sqrt(0.5 * (a2 + b2) + np.sqrt(0.25 * (a2 - b2) ** 2 + ab**2))


def mount_forces(
    body: RigidBody, mounts: Sequence[Mount], force_n, frequency_hz, point_m=None
) -> TransmittedForces:
    """Forces each mount passes to the foundation under a harmonic force.

    Solves ``(K* - ω² M) q = F`` with ``K* = Σ T_iᵀ R_i diag(k_i(1 + jη_i) + jω c_i)
    R_iᵀ T_i`` (each mount's ``loss_factor`` and ``damping_n_s_per_m``); the
    mount force is ``R_i diag(k_i(1 + jη_i) + jω c_i) R_iᵀ T_i q``. Only the
    vibration is returned: add the static loads for the total.

    Parameters
    ----------
    body : RigidBody
    mounts : sequence of Mount
    force_n : (3,) complex
        Force amplitude, N, machine frame. A rotating unbalance force F about
        the shaft axis x is ``(0, F, -1j*F)`` (F = U·Ω², ISO 21940-11).
    frequency_hz : float or array
        Excitation frequency, Hz, ≥ 0; arrays broadcast.
    point_m : (3,) float, optional
        Where the force acts, machine frame, m; default the CG.

    Returns
    -------
    TransmittedForces

    Raises
    ------
    InputError
        ``frequency_hz`` at an undamped natural frequency (no finite answer).
    """
    mounts = _checked_mounts(mounts)
    mass = mass_matrix(body)
    stiffness = stiffness_matrix(mounts, body.cg_m)
    _solve_modes(stiffness, mass, body.cg_m)
    try:
        frequency = np.asarray(frequency_hz, dtype=float)
    except (TypeError, ValueError):
        raise InputError("frequency_hz", "must be numbers ≥ 0 Hz", frequency_hz) from None
    if not np.all(np.isfinite(frequency)) or np.any(frequency < 0):
        raise InputError("frequency_hz", "must be numbers ≥ 0 Hz", frequency_hz)
    force = _complex_vector(force_n, "force_n", "(Fx, Fy, Fz) in N")
    point = body.cg_m if point_m is None else _real_vector(point_m, "point_m", "(x, y, z) in m")
    load = np.concatenate([force, np.cross(point - body.cg_m, force)])

    omega = 2.0 * np.pi * frequency[..., np.newaxis, np.newaxis]
    local = np.array([m.stiffness_n_per_m * (1 + 1j * m.loss_factor) for m in mounts]) + 1j * omega * np.array(
        [m.damping_n_s_per_m for m in mounts]
    )
    matrices = np.stack([mount.machine_matrix(local[..., i, :]) for i, mount in enumerate(mounts)], axis=-3)
    arms = _arm_matrices(mounts, body.cg_m)
    dynamic = _assemble(arms, matrices) - omega**2 * mass
    with np.errstate(all="ignore"):
        condition = np.linalg.cond(dynamic)
    if np.any(~np.isfinite(condition) | (condition > 1e13)):
        raise InputError(
            "frequency_hz",
            "falls on a natural frequency of an undamped layout: give the mounts damping or a loss factor",
            frequency_hz,
        )
    response = np.linalg.solve(dynamic, np.broadcast_to(load, dynamic.shape[:-1])[..., np.newaxis])[..., 0]
    motion = np.einsum("nai,...i->...na", arms, response)
    transmitted = np.einsum("...nab,...nb->...na", matrices, motion)
    return TransmittedForces(
        frequency_hz=frequency,
        response=response,
        force_n=transmitted,
        magnitude_n=np.sqrt(np.sum(np.abs(transmitted) ** 2, axis=-1)),
        peak_n=_peak_magnitude(transmitted),
    )
