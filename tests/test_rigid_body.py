"""Rigid body on several mounts (6 DOF): checks against published values and independent derivations.

Every check names its source beside it. Layouts and machines are invented.
"""
import control
import numpy as np
import pytest
import scipy.linalg
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from scipy.spatial.transform import Rotation

from core.errors import InputError
from core.rigid_body import (
    COORDINATES,
    Mount,
    RigidBody,
    box_inertia,
    mass_matrix,
    mode_warnings,
    modes,
    mount_forces,
    static_loads,
    stiffness_matrix,
)

G = 9.80665  # standard gravity, m/s² (ISO 80000-3)


# --------------------------------------------------------------------------- layouts


def decoupled_case():
    """m = 1000 kg, J = diag(200, 300, 400), mounts at (±0.6, ±0.4, 0), kx = ky = 1e5, kz = 4e5 (REFERENCES §5)."""
    body = RigidBody(1000.0, np.diag([200.0, 300.0, 400.0]), (0.0, 0.0, 0.0))
    mounts = [
        Mount((sx * 0.6, sy * 0.4, 0.0), (1e5, 1e5, 4e5), label=f"m{i}")
        for i, (sx, sy) in enumerate([(1, 1), (1, -1), (-1, 1), (-1, -1)])
    ]
    return body, mounts


def car_case(damping_front=0.0, damping_rear=0.0):
    """Bounce-pitch car as four vertical mounts: axles 1.0 m ahead / 1.5 m behind the CG.

    m = 1000 kg, J_pitch = 810 kg·m², kf = 18 kN/m, kr = 22 kN/m (Rao, *Mechanical
    Vibrations*, two-DOF worked example; data from memory). Each axle is split
    into a left and a right mount. Roll/yaw inertia and the lateral stiffness are
    our own additions: the mounts lie in the CG plane, so x, y, θx, θz stay
    decoupled from bounce and pitch (REFERENCES §5 decoupling conditions).
    """
    body = RigidBody(1000.0, np.diag([300.0, 810.0, 900.0]), (0.0, 0.0, 0.0))
    lateral = 5e3
    mounts = []
    for x, k, c in ((1.0, 18e3, damping_front), (-1.5, 22e3, damping_rear)):
        for y in (0.75, -0.75):
            mounts.append(Mount((x, y, 0.0), (lateral, lateral, k / 2), damping_n_s_per_m=(0, 0, c / 2)))
    return body, mounts


# --------------------------------------------------------------------------- natural frequencies


def test_car_bounce_pitch_from_four_mounts_matches_published_and_two_by_two():
    body, mounts = car_case()
    result = modes(body, mounts)
    share = result.energy_share
    bounce_pitch = share[:, COORDINATES.index("z")] + share[:, COORDINATES.index("θy")] > 0.999
    assert bounce_pitch.sum() == 2
    omega = 2 * np.pi * result.frequencies_hz[bounce_pitch]
    # Rao, Mechanical Vibrations, two-DOF car example (data from memory): 5.8593 and 9.4341 rad/s
    np.testing.assert_allclose(omega, [5.8593, 9.4341], rtol=2e-5)
    # Independent hand-built 2x2 (equations of motion written out, z_i = z - x_i·θ), scipy.linalg.eigh
    kf, kr, a, b = 18e3, 22e3, 1.0, 1.5
    k2 = np.array([[kf + kr, -(kf * a - kr * b)], [-(kf * a - kr * b), kf * a**2 + kr * b**2]])
    m2 = np.diag([1000.0, 810.0])
    np.testing.assert_allclose(omega, np.sqrt(scipy.linalg.eigh(k2, m2, eigvals_only=True)), rtol=1e-10)


def test_decoupled_layout_frequencies_and_diagonal_stiffness():
    body, mounts = decoupled_case()
    stiffness = stiffness_matrix(mounts, body.cg_m)
    # REFERENCES §5: Σkz·x = Σkz·y = Σkz·x·y = 0 and mounts in the CG plane → K is diagonal
    np.testing.assert_allclose(stiffness - np.diag(np.diag(stiffness)), 0.0, atol=1e-6)
    # Hand sums (Harris ch. 3): Kxx = Σkx, Kθx = Σ(kz y² + ky z²), Kθy = Σ(kz x² + kx z²), Kθz = Σ(kx y² + ky x²)
    np.testing.assert_allclose(
        np.diag(stiffness),
        [4e5, 4e5, 1.6e6, 4 * 4e5 * 0.16, 4 * 4e5 * 0.36, 4 * 1e5 * (0.16 + 0.36)],
        rtol=1e-12,
    )
    result = modes(body, mounts)
    # REFERENCES §5 decoupled case: 3.183, 3.183, 3.629, 5.694, 6.366, 6.974 Hz
    np.testing.assert_allclose(result.frequencies_hz, [3.183, 3.183, 3.629, 5.694, 6.366, 6.974], atol=6e-4)
    assert sorted(result.dominant[:2]) == ["x", "y"]
    assert result.dominant[2:] == ("θz", "θx", "z", "θy")
    np.testing.assert_allclose(result.energy_share.max(axis=1), 1.0, atol=1e-12)


def test_single_body_limit_of_two_mass_chain():
    # Vigran, Building Acoustics §2.5 / Fig. 2.11: m1 = 1 kg on k1 = 4e5 N/m, m2 rigid → 100.66 Hz ("100 Hz").
    # Here the 1 kg body stands on four mounts of 1e5 N/m each (vertical); lateral values are our own.
    inertia = box_inertia(1.0, 0.1, 0.1, 0.05)
    body = RigidBody(1.0, inertia.inertia_kg_m2, (0.0, 0.0, 0.0), inertia_is_estimate=True)
    mounts = [Mount((sx * 0.05, sy * 0.05, 0.0), (5e4, 5e4, 1e5)) for sx in (1, -1) for sy in (1, -1)]
    result = modes(body, mounts)
    vertical = result.dominant.index("z")
    assert result.energy_share[vertical, COORDINATES.index("z")] == pytest.approx(1.0, abs=1e-12)
    assert result.frequencies_hz[vertical] == pytest.approx(100.66, abs=0.005)
    assert result.inertia_is_estimate


def test_box_inertia_matches_handbook_formula_and_is_flagged():
    # Uniform solid box about its centre: J_xx = m(ly² + lz²)/12 (standard table of mass moments of inertia)
    estimate = box_inertia(12.0, 1.0, 2.0, 3.0)
    np.testing.assert_allclose(estimate.inertia_kg_m2, np.diag([13.0, 10.0, 5.0]), rtol=1e-14)
    assert estimate.is_estimate
    assert "estimate" in estimate.basis


def test_stiffness_matrix_equals_hessian_of_spring_energy_with_finite_rotations():
    # Independent derivation: potential energy ½ Σ δᵢᵀ Kᵢ δᵢ with exact rigid-body kinematics
    # δᵢ = u + (Rot(θ) - I) rᵢ (scipy Rotation), Hessian by central differences at q = 0.
    cg = np.array([0.1, -0.2, 0.35])
    specs = [  # position m, own-axis stiffness N/m, angles rad about x, y, z (R = Rz·Ry·Rx)
        ((0.8, 0.5, 0.0), (2e5, 1e5, 5e5), (0.0, 0.4, 0.0)),
        ((-0.7, 0.4, -0.1), (1e5, 3e5, 4e5), (-0.3, 0.0, 0.5)),
        ((-0.6, -0.5, 0.05), (1.5e5, 1.5e5, 6e5), (0.0, 0.0, 0.0)),
        ((0.7, -0.6, 0.0), (1e5, 2e5, 3e5), (0.2, -0.3, 1.0)),
    ]
    mounts = [Mount(position, stiffness, orientation=angles) for position, stiffness, angles in specs]
    frames = []
    for _, _, (ax, ay, az) in specs:
        c, s = np.cos, np.sin
        rx = np.array([[1, 0, 0], [0, c(ax), -s(ax)], [0, s(ax), c(ax)]])
        ry = np.array([[c(ay), 0, s(ay)], [0, 1, 0], [-s(ay), 0, c(ay)]])
        rz = np.array([[c(az), -s(az), 0], [s(az), c(az), 0], [0, 0, 1]])
        frames.append(rz @ ry @ rx)

    def energy(q):
        rotation = Rotation.from_rotvec(q[3:]).as_matrix()
        total = 0.0
        for (position, stiffness, _), frame in zip(specs, frames):
            deflection = q[:3] + (rotation - np.eye(3)) @ (np.array(position) - cg)
            total += 0.5 * deflection @ frame @ np.diag(stiffness) @ frame.T @ deflection
        return total

    step = 1e-4
    hessian = np.zeros((6, 6))
    for i in range(6):
        for j in range(6):
            e_i, e_j = np.eye(6)[i] * step, np.eye(6)[j] * step
            hessian[i, j] = (
                energy(e_i + e_j) - energy(e_i - e_j) - energy(-e_i + e_j) + energy(-e_i - e_j)
            ) / (4 * step**2)
    stiffness = stiffness_matrix(mounts, cg)
    np.testing.assert_allclose(stiffness, hessian, atol=1e-6 * np.abs(stiffness).max())


def test_inclined_mount_stiffness_transformation():
    # Inclined isolator tilted by α about y: K_zz = kp sin²α + kr cos²α, K_xx = kp cos²α + kr sin²α,
    # K_xz = (kr - kp) sinα cosα (Harris ch. 3, inclined isolators; from memory — tensor transformation)
    alpha, kp, kq, kr = np.radians(30.0), 1e5, 2e5, 6e5
    c, s = np.cos(alpha), np.sin(alpha)
    expected = np.array([[kp * c**2 + kr * s**2, 0.0, (kr - kp) * s * c], [0.0, kq, 0.0],
                         [(kr - kp) * s * c, 0.0, kp * s**2 + kr * c**2]])
    by_angles = Mount((0, 0, 0), (kp, kq, kr), orientation=(0.0, alpha, 0.0))
    by_matrix = Mount((0, 0, 0), (kp, kq, kr), orientation=[[c, 0, s], [0, 1, 0], [-s, 0, c]])
    np.testing.assert_allclose(by_angles.stiffness_matrix_n_per_m, expected, rtol=1e-12)
    np.testing.assert_allclose(by_matrix.stiffness_matrix_n_per_m, expected, rtol=1e-12)


# --------------------------------------------------------------------------- static loads


def test_three_mounts_carry_the_statically_determinate_loads():
    # Statics of a rigid body on three supports (any statics text): ΣF = W, ΣF·x = W·xc, ΣF·y = W·yc.
    # Supports at (0,0), (2,0), (0,1.5); CG at (0.6, 0.5): F2 = 0.3 W, F3 = W/3, F1 = 11/30 W,
    # whatever the (axis-aligned) mount stiffness.
    body = RigidBody(500.0, box_inertia(500.0, 2.0, 1.5, 0.8).inertia_kg_m2, (0.6, 0.5, 0.4))
    weight = 500.0 * G
    for stiffness in [(1e5, 1e5, 1e5), (3e4, 2e5, 7e5)]:
        mounts = [Mount((0, 0, 0), stiffness), Mount((2, 0, 0), (2e5, 5e4, 3e5)), Mount((0, 1.5, 0), (1e5, 1e5, 9e5))]
        loads = static_loads(body, mounts)
        np.testing.assert_allclose(loads.vertical_load_n, [11 / 30 * weight, 0.3 * weight, weight / 3], rtol=1e-9)
        np.testing.assert_allclose(loads.force_n[:, :2], 0.0, atol=1e-9 * weight)
        assert loads.weight_n == pytest.approx(weight, rel=1e-15)


def test_four_equal_mounts_follow_the_rigid_cap_formula():
    # Rigid cap on equal springs, F_i = W(1/n + ex·x_i/Σx² + ey·y_i/Σy²) (common practice: pile-group /
    # bolt-group formula); exact here because the cap stays plane and Σx·y = 0.
    a, b, ex, ey = 0.9, 0.5, 0.12, -0.07
    body = RigidBody(2000.0, np.diag([300.0, 500.0, 700.0]), (ex, ey, 0.6))
    mounts = [Mount((sx * a, sy * b, 0.0), (1e5, 2e5, 8e5)) for sx in (1, -1) for sy in (1, -1)]
    loads = static_loads(body, mounts)
    weight = 2000.0 * G
    expected = [weight * (0.25 + ex * m.position_m[0] / (4 * a**2) + ey * m.position_m[1] / (4 * b**2)) for m in mounts]
    np.testing.assert_allclose(loads.vertical_load_n, expected, rtol=1e-9)
    # Deflection: F/kz on each mount (Hooke's law)
    np.testing.assert_allclose(-loads.deflection_m[:, 2], np.array(expected) / 8e5, rtol=1e-9)
    assert loads.mounts_in_tension == ()


def test_cg_outside_the_layout_puts_a_mount_in_tension():
    # Statics: CG beyond the supports' line → the far support pulls down (lever rule).
    body = RigidBody(100.0, np.diag([10.0, 10.0, 10.0]), (1.5, 0.2, 0.0))
    mounts = [Mount((0, 0, 0), (1e5,) * 3), Mount((1, 0, 0), (1e5,) * 3), Mount((0, 1, 0), (1e5,) * 3)]
    loads = static_loads(body, mounts)
    # ΣF·x: F2 = 1.5 W; ΣF·y: F3 = 0.2 W; F1 = W - 1.7 W = -0.7 W
    np.testing.assert_allclose(loads.vertical_load_n, np.array([-0.7, 1.5, 0.2]) * 100 * G, rtol=1e-9)
    assert loads.mounts_in_tension == (0,)


# --------------------------------------------------------------------------- transmitted forces


@pytest.mark.parametrize(
    "zeta, eta, r, expected",
    [
        (0.1, 0.0, 2.0, 0.3559),  # Vigran eq. 2.33 (REFERENCES §1 table)
        (0.1, 0.0, 0.5, 1.328),  # Vigran eq. 2.33
        (0.3, 0.0, 5.0, 0.1307),  # Vigran eq. 2.33
        (0.0, 0.5, 2.0, 0.3676),  # hysteretic, Vinokur (2023) / Snowdon NBS Handbook 128
        (0.0, 0.05, 1.0, 20.02),  # hysteretic at resonance, sqrt(1+η²)/η
    ],
)
def test_vertical_force_on_symmetric_layout_reduces_to_sdof_transmissibility(zeta, eta, r, expected):
    body, _ = decoupled_case()  # lateral stiffness raised so that no undamped mode sits at r·ωn
    kz, mass = 4e5, 1000.0
    omega_n = np.sqrt(4 * kz / mass)
    c_each = 2 * zeta * np.sqrt(4 * kz * mass) / 4
    mounts = [
        Mount((sx * 0.6, sy * 0.4, 0.0), (1.5e5, 1.5e5, kz), damping_n_s_per_m=(0, 0, c_each), loss_factor=eta)
        for sx in (1, -1) for sy in (1, -1)
    ]
    forces = mount_forces(body, mounts, (0.0, 0.0, 250.0), r * omega_n / (2 * np.pi))
    np.testing.assert_allclose(abs(forces.total_force_n[2]) / 250.0, expected, rtol=6e-4)
    np.testing.assert_allclose(forces.magnitude_n, abs(forces.total_force_n[2]) / 4, rtol=1e-12)


def test_car_axle_forces_match_python_control_state_space():
    # Reference: python-control frequency_response of the bounce-pitch model written out by hand
    # (states z, θ, ż, θ̇; z_i = z - x_i θ), force at a point 0.4 m ahead of the CG.
    cf, cr, x_p, amplitude = 1500.0, 1800.0, 0.4, 300.0
    body, mounts = car_case(cf, cr)
    kf, kr, a, b = 18e3, 22e3, 1.0, 1.5
    lever = np.array([[1.0, -a], [1.0, b]])  # axle motion per (z, θ)
    k2 = lever.T @ np.diag([kf, kr]) @ lever
    c2 = lever.T @ np.diag([cf, cr]) @ lever
    m2 = np.diag([1000.0, 810.0])
    m_inv = np.linalg.inv(m2)
    a_ss = np.block([[np.zeros((2, 2)), np.eye(2)], [-m_inv @ k2, -m_inv @ c2]])
    b_ss = np.vstack([np.zeros((2, 1)), m_inv @ np.array([[1.0], [-x_p]])])
    frequencies = np.array([0.3, 0.93, 1.5, 4.0])
    omega = 2 * np.pi * frequencies
    result = mount_forces(body, mounts, (0, 0, amplitude), frequencies, point_m=(x_p, 0.0, 0.0))
    for axle, (k, c) in enumerate([(kf, cf), (kr, cr)]):
        c_ss = np.hstack([k * lever[axle], c * lever[axle]])[np.newaxis, :]
        reference = control.frequency_response(control.ss(a_ss, b_ss, c_ss, 0.0), omega).complex
        ours = result.force_n[:, 2 * axle, 2] + result.force_n[:, 2 * axle + 1, 2]
        np.testing.assert_allclose(ours, amplitude * np.ravel(reference), rtol=1e-8)


def test_slow_force_off_the_cg_matches_statics():
    # At ω → 0 the mounts carry the static reactions of a point load (statics, three supports):
    # load P at (1.0, 0.3) on supports (0,0), (2,0), (0,1.5) → F2 = 0.5 P, F3 = 0.2 P, F1 = 0.3 P.
    body = RigidBody(300.0, np.diag([40.0, 60.0, 80.0]), (0.6, 0.5, 0.3))
    mounts = [Mount((0, 0, 0), (1e5, 1e5, 4e5)), Mount((2, 0, 0), (1e5, 1e5, 2e5)), Mount((0, 1.5, 0), (1e5, 1e5, 6e5))]
    result = mount_forces(body, mounts, (0, 0, -1000.0), 0.0, point_m=(1.0, 0.3, 0.3))
    np.testing.assert_allclose(-result.force_n[:, 2].real, [300.0, 500.0, 200.0], rtol=1e-9)


def test_peak_force_over_a_cycle_matches_time_sampling():
    # Independent: sample Re(F e^{jωt}) over one cycle and take the largest length.
    body, _ = decoupled_case()
    mounts = [
        Mount((sx * 0.6, sy * 0.4, 0.0), (1e5, 1e5, 4e5), damping_n_s_per_m=(500, 500, 2000), loss_factor=0.1)
        for sx in (1, -1) for sy in (1, -1)
    ]
    rotating = (0.0, 200.0, -200.0j)  # force rotating about x, ISO 21940-11 unbalance force U·Ω²
    result = mount_forces(body, mounts, rotating, 12.5, point_m=(0.3, 0.0, 0.25))
    phases = np.exp(1j * np.linspace(0.0, 2 * np.pi, 200001))
    sampled = np.linalg.norm((result.force_n[:, :, np.newaxis] * phases).real, axis=1).max(axis=1)
    np.testing.assert_allclose(result.peak_n, sampled, rtol=1e-8)
    assert np.all(result.magnitude_n >= result.peak_n)


def test_undamped_drive_at_a_natural_frequency_is_refused():
    body, mounts = decoupled_case()
    with pytest.raises(InputError) as error:
        mount_forces(body, mounts, (0, 0, 100.0), 40.0 / (2 * np.pi))  # z mode: sqrt(1.6e6/1000) rad/s
    assert error.value.field == "frequency_hz"


# --------------------------------------------------------------------------- warnings


def test_mode_warnings_flag_modes_near_running_speed_and_twice_it():
    # Rule: ±20 % margin around running speed and twice running speed (common practice)
    messages = mode_warnings([7.9, 8.1, 11.9, 12.1, 15.9, 19.0, 24.5], 10.0)
    flagged = [message.split()[1] for message in messages]
    assert flagged == ["2", "3", "6"]
    assert "twice the running speed" in messages[2]
    assert mode_warnings([3.0, 5.0], 25.0) == []
    labelled = mode_warnings([10.0], 10.0, band=0.05, labels=["θz"])
    assert labelled == ["mode 1 (θz) at 10 Hz is within ±5% of the running speed (10 Hz)"]


# --------------------------------------------------------------------------- properties


@st.composite
def layouts(draw, principal_axes=False):
    count = draw(st.integers(3, 7))
    coordinate = st.floats(-1.0, 1.0)
    positions = np.array([[draw(coordinate), draw(coordinate), draw(st.floats(-0.3, 0.3))] for _ in range(count)])
    spread = np.linalg.svd(positions[:, :2] - positions[:, :2].mean(axis=0), compute_uv=False)
    assume(spread[1] > 0.2)  # not (nearly) on one line
    stiffness = st.floats(1e4, 1e6)
    angle = st.floats(-np.pi, np.pi)
    mounts = [
        Mount(p, (draw(stiffness), draw(stiffness), draw(stiffness)), orientation=(draw(angle), draw(angle), draw(angle)))
        for p in positions
    ]
    mass = draw(st.floats(10.0, 5000.0))
    edges = [draw(st.floats(0.2, 2.0)) for _ in range(3)]
    inertia = box_inertia(mass, *edges).inertia_kg_m2
    if not principal_axes:
        turn = Rotation.from_euler("xyz", [draw(angle), draw(angle), draw(angle)]).as_matrix()
        inertia = turn @ inertia @ turn.T
    cg = (draw(st.floats(-0.3, 0.3)), draw(st.floats(-0.3, 0.3)), draw(st.floats(0.0, 0.8)))
    return RigidBody(mass, inertia, cg), mounts


@settings(max_examples=40, deadline=None)
@given(layouts())
def test_mode_shapes_diagonalize_mass_and_stiffness(layout):
    # Modal analysis (Harris ch. 3): ΦᵀMΦ = I and ΦᵀKΦ = diag(ω²) for M-normalized shapes
    body, mounts = layout
    result = modes(body, mounts)
    shapes = result.shapes
    np.testing.assert_allclose(shapes.T @ mass_matrix(body) @ shapes, np.eye(6), atol=1e-9)
    omega_squared = result.angular_frequencies_rad_per_s**2
    modal_k = shapes.T @ stiffness_matrix(mounts, body.cg_m) @ shapes
    np.testing.assert_allclose(modal_k, np.diag(omega_squared), atol=1e-8 * omega_squared.max())
    assert np.all(np.diff(result.frequencies_hz) >= 0)


@settings(max_examples=40, deadline=None)
@given(layouts(principal_axes=True))
def test_energy_shares_with_principal_inertia_are_the_kinetic_energy_distribution(layout):
    # Kinetic-energy distribution (Jeong & Singh, J. Sound Vib. 234(1) 2000): KE_cj = φ_cj (Mφ_j)_c / φ_jᵀMφ_j
    body, mounts = layout
    result = modes(body, mounts)
    mass, shapes = mass_matrix(body), result.shapes
    distribution = (shapes * (mass @ shapes) / np.sum(shapes * (mass @ shapes), axis=0)).T
    np.testing.assert_allclose(result.energy_share, distribution, atol=1e-9)


@settings(max_examples=40, deadline=None)
@given(layouts())
def test_energy_shares_are_fractions_summing_to_one(layout):
    # Definition of a share (products of inertia included): each in [0, 1], all six summing to 1
    share = modes(*layout).energy_share
    assert np.all(share >= 0.0) and np.all(share <= 1.0 + 1e-12)
    np.testing.assert_allclose(share.sum(axis=1), 1.0, atol=1e-9)


@settings(max_examples=40, deadline=None)
@given(layouts())
def test_static_loads_balance_the_weight(layout):
    # Equilibrium of the rigid body (statics): mount forces sum to (0, 0, -W) and their moments about the CG vanish
    body, mounts = layout
    loads = static_loads(body, mounts)
    weight = body.mass_kg * G
    np.testing.assert_allclose(loads.force_n.sum(axis=0), [0.0, 0.0, -weight], atol=1e-8 * weight)
    assert loads.vertical_load_n.sum() == pytest.approx(weight, rel=1e-9)
    arms = np.array([m.position_m for m in mounts]) - body.cg_m
    np.testing.assert_allclose(np.cross(arms, loads.force_n).sum(axis=0), 0.0, atol=1e-8 * weight)


@settings(max_examples=30, deadline=None)
@given(layouts())
def test_mirror_symmetric_layout_gives_mirror_symmetric_loads(layout):
    # Symmetry: a layout mirrored in the plane x = 0 with the CG on it loads each pair alike
    body, half = layout
    mirror = np.diag([-1.0, 1.0, 1.0])
    shifted = [Mount(m.position_m + (1.2, 0, 0), m.stiffness_n_per_m, orientation=m.orientation) for m in half]
    mirrored = [Mount(mirror @ m.position_m, m.stiffness_n_per_m, orientation=mirror @ m.orientation @ mirror)
                for m in shifted]
    cg = (0.0, body.cg_m[1], body.cg_m[2])
    loads = static_loads(RigidBody(body.mass_kg, body.inertia_kg_m2, cg), shifted + mirrored)
    n = len(half)
    scale = body.mass_kg * G
    np.testing.assert_allclose(loads.vertical_load_n[:n], loads.vertical_load_n[n:], atol=1e-8 * scale)
    np.testing.assert_allclose(loads.force_n[:n] @ mirror, loads.force_n[n:], atol=1e-8 * scale)


@settings(max_examples=30, deadline=None)
@given(layouts(), st.floats(-np.pi, np.pi))
def test_turning_the_whole_layout_about_z_keeps_the_frequencies(layout, angle):
    # Frame invariance: natural frequencies do not depend on the choice of axes
    body, mounts = layout
    turn = Rotation.from_euler("z", angle).as_matrix()
    turned_mounts = [Mount(turn @ m.position_m, m.stiffness_n_per_m, orientation=turn @ m.orientation) for m in mounts]
    turned_body = RigidBody(body.mass_kg, turn @ body.inertia_kg_m2 @ turn.T, turn @ body.cg_m)
    np.testing.assert_allclose(
        modes(turned_body, turned_mounts).frequencies_hz, modes(body, mounts).frequencies_hz, rtol=1e-8
    )


# --------------------------------------------------------------------------- bad input


def _four(**overrides):
    stiffness = overrides.pop("stiffness", (1e5, 1e5, 4e5))
    return [Mount((sx * 0.6, sy * 0.4, 0.0), stiffness) for sx in (1, -1) for sy in (1, -1)]


GOOD_BODY = dict(mass_kg=1000.0, inertia_kg_m2=np.diag([200.0, 300.0, 400.0]), cg_m=(0, 0, 0))


@pytest.mark.parametrize(
    "build, field",
    [
        (lambda: RigidBody(**{**GOOD_BODY, "mass_kg": 0.0}), "body.mass_kg"),
        (lambda: RigidBody(**{**GOOD_BODY, "mass_kg": float("nan")}), "body.mass_kg"),
        (lambda: RigidBody(**{**GOOD_BODY, "inertia_kg_m2": [[200, 5, 0], [0, 300, 0], [0, 0, 400]]}), "body.inertia_kg_m2"),
        (lambda: RigidBody(**{**GOOD_BODY, "inertia_kg_m2": np.diag([200.0, -300.0, 400.0])}), "body.inertia_kg_m2"),
        (lambda: RigidBody(**{**GOOD_BODY, "inertia_kg_m2": np.diag([100.0, 100.0, 400.0])}), "body.inertia_kg_m2"),
        (lambda: RigidBody(**{**GOOD_BODY, "inertia_kg_m2": np.eye(2)}), "body.inertia_kg_m2"),
        (lambda: RigidBody(**{**GOOD_BODY, "cg_m": (0, 0)}), "body.cg_m"),
        (lambda: Mount((0, 0, 0), (1e5, -1.0, 1e5)), "mount.stiffness_n_per_m"),
        (lambda: Mount((0, 0, 0), (1e5, -1.0, 1e5), label="front left"), "mounts[front left].stiffness_n_per_m"),
        (lambda: Mount((0, 0, "a"), (1e5, 1e5, 1e5)), "mount.position_m"),
        (lambda: Mount((0, 0, 0), (1e5, 1e5, 1e5), damping_n_s_per_m=(0, 0, -5)), "mount.damping_n_s_per_m"),
        (lambda: Mount((0, 0, 0), (1e5, 1e5, 1e5), loss_factor=-0.1), "mount.loss_factor"),
        (lambda: Mount((0, 0, 0), (1e5, 1e5, 1e5), orientation=np.diag([1.0, 1.0, -1.0])), "mount.orientation"),
        (lambda: Mount((0, 0, 0), (1e5, 1e5, 1e5), orientation=2 * np.eye(3)), "mount.orientation"),
        (lambda: box_inertia(10.0, 1.0, 0.0, 1.0), "box.ly_m"),
        (lambda: modes(RigidBody(**GOOD_BODY), _four()[:2]), "mounts"),
        (lambda: modes(RigidBody(**GOOD_BODY), _four(stiffness=(0, 0, 0))), "mounts"),
        (lambda: modes(RigidBody(**GOOD_BODY), _four()[:3] + ["not a mount"]), "mounts[3]"),
        (lambda: modes("body", _four()), "body"),
        (lambda: static_loads(RigidBody(**GOOD_BODY), _four(), g=0.0), "g"),
        (lambda: mount_forces(RigidBody(**GOOD_BODY), _four(), (0, 0, 1.0), -1.0), "frequency_hz"),
        (lambda: mount_forces(RigidBody(**GOOD_BODY), _four(), (0, 1.0), 5.0), "force_n"),
        (lambda: mode_warnings([3.0], 0.0), "operating_speed_hz"),
        (lambda: mode_warnings([3.0], 10.0, band=1.5), "band"),
        (lambda: mode_warnings([-3.0], 10.0), "frequencies_hz"),
    ],
)
def test_bad_input_names_the_field(build, field):
    with pytest.raises(InputError) as error:
        build()
    assert error.value.field == field
    assert str(error.value).startswith(field + ":")


@pytest.mark.parametrize(
    "mounts, cg, expected",
    [
        # all on the x axis: nothing resists turning about that line (statics: a line of supports)
        ([Mount((x, 0.0, 0.0), (1e5, 1e5, 1e5)) for x in (-1.0, 0.0, 1.0)], (0, 0, 0.5),
         "no stiffness in θx (turning about the line through (0, 0, 0) m parallel to x)"),
        # vertical-only mounts: nothing resists sliding or yaw
        (_four(stiffness=(0, 0, 4e5)), (0, 0, 0), "no stiffness along x"),
        (_four(stiffness=(0, 0, 4e5)), (0, 0, 0), "no stiffness in θz (turning about the line parallel to z)"),
        (_four(stiffness=(0, 1e5, 4e5)), (0, 0, 0), "no stiffness along x"),
    ],
)
def test_free_motion_is_refused_naming_the_motion(mounts, cg, expected):
    body = RigidBody(**{**GOOD_BODY, "cg_m": cg})
    with pytest.raises(InputError) as error:
        modes(body, mounts)
    assert error.value.field == "mounts"
    assert expected in str(error.value)
    with pytest.raises(InputError):
        static_loads(body, mounts)


def test_mounts_may_be_any_iterable():
    body, mounts = decoupled_case()
    from_generator = static_loads(body, (mount for mount in mounts))
    # Statics: a symmetric layout carries a quarter of the weight on each mount
    np.testing.assert_allclose(from_generator.vertical_load_n, 1000.0 * G / 4, rtol=1e-12)

