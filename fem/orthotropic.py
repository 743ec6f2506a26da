"""Orthotropic conductivity: two principal values and the direction of the first.

Laminates, wound cores and cell stacks conduct along their layers far better than across
them. In the section's plane such a material has a symmetric conductivity tensor
K = R(θ)·diag(k₁, k₂)·R(θ)ᵀ, θ the angle of principal direction 1 from the x axis (the
radius r of an axisymmetric section), and the heat flux is q = −K∇T. The principal values
may depend on temperature (property tables); the directions do not.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from .errors import ModelError, shown

if TYPE_CHECKING:
    from .materials import PropertyTable


@dataclass(frozen=True)
class Orthotropic:
    """Principal conductivities and the direction of the first.

    Parameters
    ----------
    first, second : float or PropertyTable
        Principal conductivities k₁ and k₂ in W/(m·K), > 0: along principal direction 1 and
        across it (direction 2, a quarter turn counter-clockwise from it); constants or
        tables of temperature.
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

    first: float | PropertyTable
    second: float | PropertyTable
    angle: float = 0.0

    def __post_init__(self) -> None:
        from .materials import PropertyTable  # materials imports this module

        for name in ("first", "second"):
            value = getattr(self, name)
            if isinstance(value, PropertyTable):
                continue
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

    @property
    def is_constant(self) -> bool:
        """True when neither principal value depends on temperature."""
        return isinstance(self.first, float) and isinstance(self.second, float)

    def tensor(self, temperature: float | None = None) -> np.ndarray:
        """K = R·diag(k₁, k₂)·Rᵀ, (2, 2) in W/(m·K), in x, y (r, z); tables at
        ``temperature`` (°C), or at their mid-range values when None."""
        k_xx, k_xy, k_yy = (
            float(np.asarray(v)) for v in self.components_at(temperature, nominal=True)
        )
        return np.array([[k_xx, k_xy], [k_xy, k_yy]])

    def components_at(self, temperature, nominal: bool = False) -> tuple:
        """(k_xx, k_xy, k_yy) in W/(m·K) at ``temperature`` (°C, scalar or array);
        ``nominal`` takes the tables' mid-range values where ``temperature`` is None."""
        return self._rotated(
            _value(self.first, temperature, nominal), _value(self.second, temperature, nominal)
        )

    def component_slopes(self, temperature) -> tuple:
        """d(k_xx, k_xy, k_yy)/dT in W/(m·K²) at ``temperature`` (°C)."""
        return self._rotated(_slope(self.first, temperature), _slope(self.second, temperature))

    def _rotated(self, along, across) -> tuple:
        c, s = math.cos(math.radians(self.angle)), math.sin(math.radians(self.angle))
        return (
            along * c * c + across * s * s,
            (along - across) * c * s,
            along * s * s + across * c * c,
        )

    @property
    def smallest(self):
        """The smaller principal value, W/(m·K) (a table of the lower of the two at every
        temperature when they depend on it): the one scalar uses of a conductivity take (see
        :class:`fem.Material`)."""
        if self.is_constant:
            return min(self.first, self.second)
        return _lower_envelope(self.first, self.second)

    def describe(self) -> str:
        """One line for reports."""
        smallest = self.smallest
        return (
            f"orthotropic: k1 = {_text(self.first)}, k2 = {_text(self.second)} W/(m·K), "
            f"direction 1 at {self.angle:.4g}° from x (r); Biot numbers and lumped models use "
            f"the smaller, {_text(smallest)} W/(m·K)"
        )


def _value(value, temperature, nominal: bool):
    if isinstance(value, float):
        return (
            value if temperature is None else np.full_like(np.asarray(temperature, float), value)
        )
    if temperature is None and nominal:
        return float(np.mean(value.range))
    return value(temperature)


def _slope(value, temperature):
    if isinstance(value, float):
        return np.zeros_like(np.asarray(temperature, dtype=float))
    return value.slope(temperature)


def _text(value) -> str:
    if isinstance(value, float):
        return f"{value:.4g}"
    low, high = value.range
    return f"{low:.4g}..{high:.4g} (over {value.temperatures[0]:g}..{value.temperatures[-1]:g} °C)"


def _lower_envelope(first, second):
    """The lower of two conductivities at every temperature, as a property table: both are
    piecewise linear, so their minimum is too, with corners at their points and crossings."""
    from .materials import PropertyTable

    points = set()
    for value in (first, second):
        if not isinstance(value, float):
            points.update(value.temperatures)
    grid = np.array(sorted(points))
    a, b = (_clamped(v, grid) for v in (first, second))
    crossings = []
    for i in range(len(grid) - 1):
        da, db = a[i] - b[i], a[i + 1] - b[i + 1]
        if da * db < 0:  # they cross inside the interval
            crossings.append(grid[i] + (grid[i + 1] - grid[i]) * da / (da - db))
    grid = np.array(sorted({*grid.tolist(), *crossings}))  # a table has two points or more
    lower = np.minimum(_clamped(first, grid), _clamped(second, grid))
    return PropertyTable(tuple(grid.tolist()), tuple(lower.tolist()))


def _clamped(value, grid: np.ndarray) -> np.ndarray:
    """A constant or a table at ``grid``, a table held at its ends (without the warning a
    table gives beyond its range: this only describes the material)."""
    if isinstance(value, float):
        return np.full_like(grid, value)
    return np.interp(grid, value.temperatures, value.values)


def _number(value) -> bool:
    return isinstance(value, int | float | np.number) and not isinstance(value, bool)


def _matrix_like(value) -> bool:
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        return False
    return array.ndim == 2
