"""Small dense matrix helpers in numpy alone (no scipy on the window's path).

scipy.linalg costs about 0.2 s to import and the window would pay it at its first study
update (measured); these cover the few small, well-conditioned matrices the studies need
and are checked against scipy.linalg in the tests.
"""
from __future__ import annotations

import math

import numpy as np

#: Scaled 1-norm at or below which :func:`small_matrix_exponential` sums its series.
_SERIES_NORM = 0.5
#: Terms of that series: the first left out is below 0.5**19 / 19! (about 1e-23).
_SERIES_TERMS = 18


def small_matrix_exponential(matrix) -> np.ndarray:
    """exp(M) of a small square matrix, by scaling and squaring with a Taylor series (numpy only).

    M is scaled by 2**-s to a 1-norm of at most 0.5, the series summed to 18 terms and the
    result squared s times. For the 2x2 and 4x4 matrices of the time stepping here it agrees
    with ``scipy.linalg.expm`` to rounding (checked in the tests); not for large or badly
    scaled matrices.
    """
    matrix = np.asarray(matrix, dtype=float)
    norm = float(np.abs(matrix).sum(axis=0).max()) if matrix.size else 0.0
    squarings = max(0, math.ceil(math.log2(norm / _SERIES_NORM))) if norm > _SERIES_NORM else 0
    scaled = matrix / 2.0 ** squarings
    result = np.eye(matrix.shape[0])
    term = np.eye(matrix.shape[0])
    for k in range(1, _SERIES_TERMS + 1):
        term = term @ scaled / k
        result = result + term
    for _ in range(squarings):
        result = result @ result
    return result


def generalized_eigh(stiffness, mass) -> tuple[np.ndarray, np.ndarray]:
    """Eigenvalues (ascending) and mass-normalised vectors of K v = w M v, M symmetric positive definite.

    Solved as the standard problem of L^-1 K L^-T with M = L L^T; the vectors S satisfy
    S^T M S = I, as ``scipy.linalg.eigh(K, M)`` returns them.
    """
    lower = np.linalg.cholesky(np.asarray(mass, dtype=float))
    inverse = np.linalg.inv(lower)
    reduced = inverse @ np.asarray(stiffness, dtype=float) @ inverse.T
    eigenvalues, vectors = np.linalg.eigh((reduced + reduced.T) / 2.0)
    return eigenvalues, inverse.T @ vectors
