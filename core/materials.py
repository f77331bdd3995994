"""Typical starting values for mount materials: loss factor and dynamic-to-static stiffness ratio.

These are starting points for early design, not data for a product: the
supplier's measured values govern. Each row names where its range comes from.
"""
from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class MountMaterial:
    """Typical ranges for one kind of mount.

    Attributes
    ----------
    name : str
    loss_factor : (float, float)
        Typical range of the loss factor eta (for steel springs: 2 x damping ratio).
    dynamic_stiffness_ratio : (float, float)
        Typical range of dynamic over static stiffness.
    source : str
        Where the ranges come from.
    """

    name: str
    loss_factor: tuple[float, float]
    dynamic_stiffness_ratio: tuple[float, float]
    source: str

    @property
    def typical_loss_factor(self) -> float:
        """Middle of the loss-factor range (geometric mean)."""
        return (self.loss_factor[0] * self.loss_factor[1]) ** 0.5

    @property
    def typical_dynamic_stiffness_ratio(self) -> float:
        """Middle of the stiffness-ratio range (arithmetic mean)."""
        return 0.5 * (self.dynamic_stiffness_ratio[0] + self.dynamic_stiffness_ratio[1])


MOUNT_MATERIALS = (
    MountMaterial("Steel coil spring", (0.005, 0.02), (1.0, 1.0),
                  "typical values: damping ratio about 0.005 (from memory); stiffness is rate-independent"),
    MountMaterial("Natural rubber", (0.05, 0.15), (1.1, 1.5),
                  "typical values: loss factor from compiled rubber-damping tables; stiffness ratio from "
                  "Harris' Shock and Vibration Handbook chs. 32-33 (from memory)"),
    MountMaterial("Neoprene (chloroprene)", (0.08, 0.20), (1.4, 2.0),
                  "typical values: loss factor from compiled rubber-damping tables; stiffness ratio from "
                  "Harris' Shock and Vibration Handbook chs. 32-33 (from memory)"),
    MountMaterial("Butyl rubber", (0.2, 0.5), (1.5, 4.0),
                  "typical values: loss factor from compiled rubber-damping tables; stiffness ratio from "
                  "Harris' Shock and Vibration Handbook chs. 32-33 (from memory)"),
)
