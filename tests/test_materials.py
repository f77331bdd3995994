"""Typical material values and the viscous/hysteretic comparison at equal peak.

Sources: shared/REFERENCES.md §2 (typical ranges, from memory of Harris chs. 32–33 and compiled
rubber-damping tables); §1 peak formulas (viscous exact peak; hysteretic sqrt(1+η²)/η).
"""
import numpy as np
import pytest
import scipy.optimize

from core.errors import InputError
from core.materials import MOUNT_MATERIALS
from core.transmissibility import (Damping, hysteretic_transmissibility, loss_factor_with_same_peak,
                                   viscous_transmissibility)


def test_material_table_matches_listed_ranges():
    by_name = {m.name: m for m in MOUNT_MATERIALS}
    # REFERENCES §2: natural rubber 1.1–1.5, neoprene 1.4–2.0, butyl 1.5–4 (from memory, Harris chs. 32–33).
    assert by_name["Natural rubber"].dynamic_stiffness_ratio == (1.1, 1.5)
    assert by_name["Neoprene (chloroprene)"].dynamic_stiffness_ratio == (1.4, 2.0)
    assert by_name["Butyl rubber"].dynamic_stiffness_ratio == (1.5, 4.0)
    assert by_name["Natural rubber"].loss_factor == (0.05, 0.15)
    for material in MOUNT_MATERIALS:
        assert material.source
        low, high = material.loss_factor
        assert low <= material.typical_loss_factor <= high
        Damping("hysteretic", material.typical_loss_factor)  # a valid starting value


@pytest.mark.parametrize("zeta", [0.02, 0.05, 0.1, 0.3])
def test_equal_peak_comparison(zeta):
    eta = loss_factor_with_same_peak(zeta)
    # Numerical maxima of both closed forms (independent of the peak formulas used inside).
    viscous_peak = -scipy.optimize.minimize_scalar(lambda r: -abs(viscous_transmissibility(r, zeta)),
                                                   bounds=(0.5, 1.2), method="bounded",
                                                   options={"xatol": 1e-12}).fun
    assert abs(complex(hysteretic_transmissibility(1.0, eta))) == pytest.approx(viscous_peak, rel=1e-7)
    # Far above resonance the hysteretic mount isolates better (−40 vs −20 dB/decade, REFERENCES §1).
    r = np.array([5.0, 10.0, 20.0])
    assert np.all(np.abs(hysteretic_transmissibility(r, eta)) < np.abs(viscous_transmissibility(r, zeta)))
    # For small damping η ≈ 2ζ (equal peaks 1/(2ζ) ≈ 1/η).
    if zeta <= 0.05:
        assert eta == pytest.approx(2 * zeta, rel=0.02)


def test_equal_peak_refuses_zero_damping():
    with pytest.raises(InputError, match="damping_ratio"):
        loss_factor_with_same_peak(0.0)
