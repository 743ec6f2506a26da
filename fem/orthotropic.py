"""Orthotropic conductivity: two principal values and the direction of the first.

Laminates, wound cores and cell stacks conduct along their layers far better than across
them. In the section's plane such a material has a symmetric conductivity tensor
K = R(θ)·diag(k₁, k₂)·R(θ)ᵀ, θ the angle of principal direction 1 from the x axis (the
radius r of an axisymmetric section), and the heat flux is q = −K∇T.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .errors import ModelError, shown


@dataclass(frozen=True)
class Orthotropic:
    """Principal conductivities and the direction of the first.

    Parameters
    ----------
    first, second : float
        Principal conductivities k₁ and k₂ in W/(m·K), > 0: along principal direction 1 and
        across it (direction 2, a quarter turn counter-clockwise from it).
    angle : float
        Angle of principal direction 1 from the x axis (from r in an axisymmetric section),
        degrees, counter-clockwise.

    Examples
    --------
    >>> laminate = Orthotropic(20.0, 0.5, angle=90.0)
    >>> laminate.tensor().round(12).tolist()  # conducts well along y
    [[0.5, 0.0], [0.0, 20.0]]
    >>> Orthotropic.from_tensor([[2.0, 1.0], [1.0, 2.0]])
    Orthotropic(first=3.0, second=1.0, angle=45.0)
    """

    first: float
    second: float
    angle: float = 0.0

    def __post_init__(self) -> None:
        for name in ("first", "second"):
            value = getattr(self, name)
            if not _number(value) or not math.isfinite(value) or value <= 0:
                raise ModelError(
                    f"Orthotropic {name} principal conductivity must be a finite value > 0 "
                    f"W/(m*K), got {shown(value, 'W/(m*K)')}",
                    argument=name,
                )
            object.__setattr__(self, name, float(value))
        if not _number(self.angle) or not math.isfinite(self.angle):
            raise ModelError(
                f"Orthotropic angle must be a finite angle in degrees, got {self.angle!r}",
                argument="angle",
            )
        object.__setattr__(self, "angle", float(self.angle))

    @classmethod
    def from_tensor(cls, tensor) -> Orthotropic:
        """The principal form of a symmetric, positive definite tensor [[k_xx, k_xy],
        [k_xy, k_yy]] in W/(m·K); direction 1 is the one of the larger value."""
        k = np.asarray(tensor, dtype=float) if _matrix_like(tensor) else None
        if k is None or k.shape != (2, 2) or not np.all(np.isfinite(k)):
            raise ModelError(
                f"a conductivity tensor must be [[k_xx, k_xy], [k_xy, k_yy]] in W/(m*K), "
                f"got {tensor!r}",
                argument="tensor",
            )
        if abs(k[0, 1] - k[1, 0]) > 1e-12 * np.abs(k).max():
            raise ModelError(
                f"a conductivity tensor must be symmetric (k_xy = k_yx), got {k.tolist()}",
                argument="tensor",
            )
        values, vectors = np.linalg.eigh(k)
        if values[0] <= 0:
            raise ModelError(
                f"a conductivity tensor must be positive definite (k_xx > 0, k_yy > 0 and "
                f"k_xx*k_yy > k_xy^2), got {k.tolist()}",
                argument="tensor",
            )
        direction = vectors[:, 1]
        angle = math.degrees(math.atan2(direction[1], direction[0])) % 180.0
        return cls(float(values[1]), float(values[0]), round(angle, 12))

    def tensor(self) -> np.ndarray:
        """K = R·diag(k₁, k₂)·Rᵀ, (2, 2) in W/(m·K), in x, y (r, z)."""
        c, s = math.cos(math.radians(self.angle)), math.sin(math.radians(self.angle))
        rotation = np.array([[c, -s], [s, c]])
        return rotation @ np.diag([self.first, self.second]) @ rotation.T

    @property
    def smallest(self) -> float:
        """The smaller principal value, W/(m·K): the one scalar uses of a conductivity take
        (see :class:`fem.Material`)."""
        return min(self.first, self.second)

    @property
    def largest(self) -> float:
        """The larger principal value, W/(m·K)."""
        return max(self.first, self.second)

    def describe(self) -> str:
        """One line for reports."""
        return (
            f"orthotropic: k1 = {self.first:.4g}, k2 = {self.second:.4g} W/(m·K), direction 1 "
            f"at {self.angle:.4g}° from x (r); Biot numbers and lumped models use the smaller, "
            f"{self.smallest:.4g} W/(m·K)"
        )


def _number(value) -> bool:
    return isinstance(value, int | float | np.number) and not isinstance(value, bool)


def _matrix_like(value) -> bool:
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        return False
    return array.ndim == 2
