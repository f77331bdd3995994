"""Small-matrix helpers (core/matrices.py) against scipy.linalg and closed forms."""
import numpy as np
import scipy.linalg
from hypothesis import given, settings
from hypothesis import strategies as st

from core.matrices import generalized_eigh, small_matrix_exponential


@settings(max_examples=300, deadline=None)
@given(size=st.sampled_from([2, 4]), scale=st.floats(-4.0, 0.0), seed=st.integers(0, 2**32 - 1))
def test_small_matrix_exponential_matches_scipy_expm(size, scale, seed):
    # Reference: scipy.linalg.expm (Pade approximation with scaling and squaring), on random
    # matrices of 1-norm up to about 5, wider than the stepping matrices (about 0.5 to 1).
    matrix = np.random.default_rng(seed).normal(size=(size, size)) * 10.0 ** scale
    reference = scipy.linalg.expm(matrix)
    np.testing.assert_allclose(small_matrix_exponential(matrix), reference,
                               rtol=0, atol=1e-12 * np.abs(reference).max())


def test_small_matrix_exponential_of_a_rotation_generator():
    # exp([[0, t], [-t, 0]]) = [[cos t, sin t], [-sin t, cos t]] (closed form).
    for angle in (1e-6, 0.3, 2.0, 7.5):
        got = small_matrix_exponential(np.array([[0.0, angle], [-angle, 0.0]]))
        np.testing.assert_allclose(got, [[np.cos(angle), np.sin(angle)], [-np.sin(angle), np.cos(angle)]],
                                   rtol=0, atol=1e-14)


@settings(max_examples=100, deadline=None)
@given(seed=st.integers(0, 2**32 - 1))
def test_generalized_eigh_matches_scipy(seed):
    # Reference: scipy.linalg.eigh(K, M) on random symmetric positive-definite 6x6 pairs
    # scaled like a machine (M from 100 kg to 10 t, K up to 1e8 N/m).
    rng = np.random.default_rng(seed)
    a = rng.normal(size=(6, 6))
    b = rng.normal(size=(6, 6))
    mass = (a @ a.T + 6 * np.eye(6)) * 10.0 ** rng.uniform(2, 4)
    stiffness = (b @ b.T + 6 * np.eye(6)) * 10.0 ** rng.uniform(5, 8)
    values, shapes = generalized_eigh(stiffness, mass)
    reference = scipy.linalg.eigh(stiffness, mass, eigvals_only=True)
    np.testing.assert_allclose(values, reference, rtol=1e-9)
    np.testing.assert_allclose(shapes.T @ mass @ shapes, np.eye(6), atol=1e-9)
    np.testing.assert_allclose(stiffness @ shapes, mass @ shapes * values, rtol=0,
                               atol=1e-8 * np.abs(stiffness).max())


def test_generalized_eigh_two_mass_chain_closed_form():
    # Two equal masses m on springs k (ground - m - m): w = (3 -+ sqrt 5)/2 k/m
    # (textbook two-degree-of-freedom chain, from memory).
    k, m = 2.0e5, 150.0
    values, _ = generalized_eigh(np.array([[2 * k, -k], [-k, k]]), np.diag([m, m]))
    np.testing.assert_allclose(values, [(3 - 5 ** 0.5) / 2 * k / m, (3 + 5 ** 0.5) / 2 * k / m], rtol=1e-13)
