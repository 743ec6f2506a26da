"""Material properties of a solid region: constants or tables of temperature."""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

import numpy as np

from .errors import ModelError, shown
from .temperatures import ABSOLUTE_ZERO


class PropertyRangeWarning(UserWarning):
    """A property table was evaluated outside its temperature range (and held at its end)."""


@dataclass(frozen=True)
class PropertyTable:
    """A property as a piecewise-linear function of temperature, held constant beyond the
    table's ends (with a :class:`PropertyRangeWarning`).

    Parameters
    ----------
    temperatures : sequence of float
        Strictly increasing temperatures in °C.
    values : sequence of float
        Property values at those temperatures, all > 0, in the property's SI unit.
    """

    temperatures: tuple[float, ...]
    values: tuple[float, ...]

    def __post_init__(self) -> None:
        t = np.asarray(self.temperatures, dtype=float)
        v = np.asarray(self.values, dtype=float)
        if t.ndim != 1 or t.shape != v.shape or len(t) < 2:
            raise ModelError(
                "a property table needs at least two (temperature, value) pairs of equal length"
            )
        if not (np.all(np.isfinite(t)) and np.all(np.isfinite(v))):
            raise ModelError("property table entries must be finite")
        if np.any(np.diff(t) <= 0):
            raise ModelError(
                f"property table temperatures must increase strictly, got {t.tolist()}"
            )
        if np.any(t <= ABSOLUTE_ZERO):
            raise ModelError(f"property table temperatures must be above {ABSOLUTE_ZERO:g} degC")
        if np.any(v <= 0):
            raise ModelError(f"property table values must be > 0, got {v.tolist()}")
        object.__setattr__(self, "temperatures", tuple(t.tolist()))
        object.__setattr__(self, "values", tuple(v.tolist()))

    def __call__(self, temperature):
        """Value at ``temperature`` (°C, scalar or array)."""
        t = np.asarray(temperature, dtype=float)
        low, high = self.temperatures[0], self.temperatures[-1]
        slack = 1e-9 * (high - low)  # interpolation round-off at a table end is not leaving it
        if np.any(t < low - slack) or np.any(t > high + slack):
            warnings.warn(
                f"temperature {float(t.min()):.4g}..{float(t.max()):.4g} degC leaves the "
                f"property table's range [{low:g}, {high:g}] degC; the end value is used "
                "beyond it",
                PropertyRangeWarning,
                stacklevel=3,
            )
        return np.interp(t, self.temperatures, self.values)

    def slope(self, temperature):
        """d(value)/dT at ``temperature`` (0 beyond the table)."""
        t = np.asarray(temperature, dtype=float)
        slopes = np.diff(self.values) / np.diff(self.temperatures)
        i = np.clip(np.searchsorted(self.temperatures, t, side="right") - 1, 0, len(slopes) - 1)
        inside = (t >= self.temperatures[0]) & (t <= self.temperatures[-1])
        return np.where(inside, slopes[i], 0.0)

    def integral(self, temperature, reference: float = 0.0):
        """∫ value dT from ``reference`` to ``temperature`` (exact for the clamped table)."""
        t = np.asarray(temperature, dtype=float)
        return _clamped_integral(self, t) - _clamped_integral(self, np.asarray(reference))

    @property
    def range(self) -> tuple[float, float]:
        return (min(self.values), max(self.values))


def _clamped_integral(table: PropertyTable, t: np.ndarray) -> np.ndarray:
    """∫ from the first table temperature to t of the clamped piecewise-linear table."""
    tt = np.asarray(table.temperatures)
    vv = np.asarray(table.values)
    cumulative = np.concatenate([[0.0], np.cumsum(0.5 * (vv[1:] + vv[:-1]) * np.diff(tt))])
    below = t < tt[0]
    above = t > tt[-1]
    tc = np.clip(t, tt[0], tt[-1])
    i = np.clip(np.searchsorted(tt, tc, side="right") - 1, 0, len(tt) - 2)
    vc = np.interp(tc, tt, vv)
    inside = cumulative[i] + 0.5 * (vv[i] + vc) * (tc - tt[i])
    return (
        inside
        + np.where(below, vv[0] * (t - tt[0]), 0.0)
        + np.where(above, vv[-1] * (t - tt[-1]), 0.0)
    )


Property = float | PropertyTable


def _check_property(value, name: str, unit: str) -> Property:
    if isinstance(value, PropertyTable):
        return value
    if isinstance(value, int | float | np.number) and not isinstance(value, bool):
        if not math.isfinite(value) or value <= 0:
            raise ModelError(
                f"Material {name} must be a finite value > 0 {unit}, got {shown(value, unit)}"
            )
        return float(value)
    raise ModelError(
        f"Material {name} must be a number in {unit} or a PropertyTable, got {value!r}"
    )


@dataclass(frozen=True)
class Material:
    """A solid's thermal properties, each a constant or a :class:`PropertyTable`.

    Parameters
    ----------
    conductivity : float or PropertyTable
        Thermal conductivity k in W/(m·K); > 0.
    density : float
        Density ρ in kg/m³; > 0 (constant: mass does not change with temperature here).
    specific_heat : float or PropertyTable
        Specific heat capacity c in J/(kg·K); > 0.
    name : str
        A label for reports.
    source : str
        Where the values come from.

    Examples
    --------
    >>> steel = Material(conductivity=45.0, density=7850.0, specific_heat=475.0)
    >>> round(steel.diffusivity * 1e6, 2)  # mm²/s
    12.07
    """

    conductivity: Property
    density: float
    specific_heat: Property
    name: str = "material"
    source: str = ""

    def __post_init__(self) -> None:
        object.__setattr__(
            self, "conductivity", _check_property(self.conductivity, "conductivity", "W/(m*K)")
        )
        density = _check_property(self.density, "density", "kg/m^3")
        if isinstance(density, PropertyTable):
            raise ModelError("Material density must be a constant in kg/m^3")
        object.__setattr__(self, "density", density)
        object.__setattr__(
            self, "specific_heat", _check_property(self.specific_heat, "specific_heat", "J/(kg*K)")
        )

    @property
    def is_constant(self) -> bool:
        """True when no property depends on temperature."""
        return not isinstance(self.conductivity, PropertyTable) and not isinstance(
            self.specific_heat, PropertyTable
        )

    def conductivity_at(self, temperature):
        k = self.conductivity
        return (
            k(temperature)
            if isinstance(k, PropertyTable)
            else np.full_like(np.asarray(temperature, dtype=float), k)
        )

    def conductivity_slope(self, temperature):
        k = self.conductivity
        return (
            k.slope(temperature)
            if isinstance(k, PropertyTable)
            else np.zeros_like(np.asarray(temperature, dtype=float))
        )

    def heat_capacity_at(self, temperature):
        """ρ·c(T) in J/(m³·K)."""
        c = self.specific_heat
        values = (
            c(temperature)
            if isinstance(c, PropertyTable)
            else np.full_like(np.asarray(temperature, dtype=float), c)
        )
        return self.density * values

    def enthalpy(self, temperature, reference: float):
        """∫ ρ·c dT from ``reference`` to ``temperature`` (°C), J/m³."""
        c = self.specific_heat
        t = np.asarray(temperature, dtype=float)
        if isinstance(c, PropertyTable):
            return self.density * c.integral(t, reference)
        return self.density * c * (t - reference)

    def _nominal(self, value) -> float:
        return float(np.mean(value.range)) if isinstance(value, PropertyTable) else value

    @property
    def volumetric_heat_capacity(self) -> float:
        """ρ·c in J/(m³·K) (the mid-range value for a table)."""
        return self.density * self._nominal(self.specific_heat)

    @property
    def nominal_conductivity(self) -> float:
        """k in W/(m·K) (the mid-range value for a table)."""
        return self._nominal(self.conductivity)

    @property
    def diffusivity(self) -> float:
        """Thermal diffusivity α = k/(ρ·c) in m²/s (mid-range values for tables)."""
        return self.nominal_conductivity / self.volumetric_heat_capacity
