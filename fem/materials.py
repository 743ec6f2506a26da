"""Material properties of a solid region: constants or tables of temperature."""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

import numpy as np

from .enthalpy import EnthalpyTable, smooth_fraction, smooth_fraction_slope
from .errors import ModelError, shown
from .orthotropic import Orthotropic
from .table_integrals import (
    clamped_integral,
    reference_integral,
    segment_slope,
    table_arrays,
)
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
        temperatures, _, _, slopes, *_ = table_arrays(self)  # made once, kept on the table
        return segment_slope(np.asarray(temperature, dtype=float), temperatures, slopes[:-1])

    def integral(self, temperature, reference: float = 0.0):
        """∫ value dT from ``reference`` to ``temperature`` (exact for the clamped table)."""
        t = np.asarray(temperature, dtype=float)
        if np.ndim(reference) == 0:
            total = clamped_integral(self, t)
            total -= reference_integral(self, float(reference))
            return total
        return clamped_integral(self, t) - clamped_integral(self, np.asarray(reference))

    @property
    def range(self) -> tuple[float, float]:
        return (min(self.values), max(self.values))


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
    conductivity : float, PropertyTable or Orthotropic
        Thermal conductivity k in W/(m·K); > 0. An :class:`Orthotropic` value (two principal
        values and an angle) is kept in ``orthotropic``, and ``conductivity`` becomes its
        smaller principal value: the one that every scalar use of a conductivity takes
        (Biot numbers, the lumped models, the correction length's quotation, the diffusion
        time of the surface elements). The smaller value gives the largest Biot number and the
        slowest diffusion, the cautious side of each of those judgements, as the lowest
        conductivity of several regions already does. The field itself is solved with the
        whole tensor.
    density : float
        Density ρ in kg/m³; > 0 (constant: mass does not change with temperature here).
    specific_heat : float or PropertyTable
        Specific heat capacity c in J/(kg·K); > 0.
    name : str
        A label for reports.
    source : str
        Where the values come from.
    latent_heat : float
        Latent heat of the phase change in J/kg (0: none), released between ``solidus`` and
        ``liquidus`` by the smooth fraction of :func:`smooth_fraction` and added to the
        enthalpy H(T) = ∫ρc dT + ρ·L·S(T).
    solidus, liquidus : float, optional
        Temperatures in °C where the phase change ends and begins (liquidus − solidus > 0; a
        range of 0.5–2 K keeps a front sharp and Newton's method fast).
    specific_enthalpy : EnthalpyTable, optional
        The enthalpy directly (latent heat included), instead of ``specific_heat`` and
        ``latent_heat``; see :meth:`from_enthalpy`.
    orthotropic : Orthotropic, optional
        The principal conductivities and their direction (set from ``conductivity``).

    Examples
    --------
    >>> steel = Material(conductivity=45.0, density=7850.0, specific_heat=475.0)
    >>> round(steel.diffusivity * 1e6, 2)  # mm²/s
    12.07
    >>> laminate = Material(Orthotropic(20.0, 0.5, angle=30.0), 1900.0, 1100.0)
    >>> laminate.conductivity, laminate.orthotropic.first
    (0.5, 20.0)
    """

    conductivity: Property
    density: float
    specific_heat: Property
    name: str = "material"
    source: str = ""
    latent_heat: float = 0.0
    solidus: float | None = None
    liquidus: float | None = None
    specific_enthalpy: EnthalpyTable | None = None
    orthotropic: Orthotropic | None = None

    @classmethod
    def from_enthalpy(
        cls,
        conductivity: Property,
        density: float,
        specific_enthalpy: EnthalpyTable,
        name: str = "material",
        source: str = "",
    ) -> Material:
        """A material whose heat storage is a table of specific enthalpy (J/kg) against
        temperature (°C); ``specific_heat`` becomes its slope at the table's points (for
        reports).

        >>> water = EnthalpyTable((-5.0, -1.0, 0.0, 5.0), (0.0, 8.4e3, 3.4e5, 3.6e5))
        >>> round(float(Material.from_enthalpy(0.6, 1000.0, water).enthalpy(0.0, -5.0)))
        340000000
        """
        if not isinstance(specific_enthalpy, EnthalpyTable):
            raise ModelError(
                f"Material specific_enthalpy must be an EnthalpyTable, got {specific_enthalpy!r}"
            )
        return cls(
            conductivity,
            density,
            _specific_heat_table(specific_enthalpy),
            name,
            source,
            specific_enthalpy=specific_enthalpy,
        )

    def __post_init__(self) -> None:
        self._check_phase_change()
        self._take_orthotropic()
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

    def _take_orthotropic(self) -> None:
        """An orthotropic conductivity moves to ``orthotropic``; ``conductivity`` becomes its
        smaller principal value (see the class's parameters)."""
        if isinstance(self.conductivity, Orthotropic):
            if self.orthotropic is not None and self.orthotropic != self.conductivity:
                raise ModelError(
                    "Material takes the orthotropic conductivity once, as conductivity or as "
                    "orthotropic",
                    argument="conductivity",
                )
            object.__setattr__(self, "orthotropic", self.conductivity)
        if self.orthotropic is None:
            return
        if not isinstance(self.orthotropic, Orthotropic):
            raise ModelError(
                f"Material orthotropic must be an Orthotropic, got {self.orthotropic!r}",
                argument="conductivity",
            )
        object.__setattr__(self, "conductivity", self.orthotropic.smallest)

    def _check_phase_change(self) -> None:
        latent = self.latent_heat
        if not (isinstance(latent, int | float) and not isinstance(latent, bool)) or not (
            math.isfinite(latent) and latent >= 0
        ):
            raise ModelError(
                f"Material latent_heat must be a finite value >= 0 J/kg, got {latent!r}",
                argument="latent_heat",
            )
        object.__setattr__(self, "latent_heat", float(latent))
        bounds = (self.solidus, self.liquidus)
        if latent == 0:
            if bounds != (None, None):
                raise ModelError(
                    "Material solidus and liquidus need a latent_heat > 0 J/kg",
                    argument="latent_heat",
                )
            return
        for name, value in zip(("solidus", "liquidus"), bounds, strict=True):
            if not isinstance(value, int | float) or isinstance(value, bool):
                raise ModelError(
                    f"Material with latent heat needs a {name} temperature in degC, got {value!r}",
                    argument=name,
                )
            if not math.isfinite(value) or value <= ABSOLUTE_ZERO:
                raise ModelError(
                    f"Material {name} must be above {ABSOLUTE_ZERO:g} degC, got {value!r}",
                    argument=name,
                )
        if not self.liquidus > self.solidus:
            raise ModelError(
                f"Material liquidus {self.liquidus!r} degC must lie above the solidus "
                f"{self.solidus!r} degC (a freezing range of 0.5-2 K is typical; a range of 0 "
                "would make the enthalpy jump)",
                argument="liquidus",
            )
        if self.specific_enthalpy is not None:
            raise ModelError(
                "Material takes either latent_heat or specific_enthalpy (which includes it)",
                argument="latent_heat",
            )
        object.__setattr__(self, "solidus", float(self.solidus))
        object.__setattr__(self, "liquidus", float(self.liquidus))

    @property
    def is_constant(self) -> bool:
        """True when no property depends on temperature (and there is no phase change)."""
        return not isinstance(self.conductivity, PropertyTable) and self.constant_capacity

    @property
    def constant_capacity(self) -> bool:
        """True when ρc is one number: no table, no latent heat, no enthalpy table."""
        return (
            isinstance(self.specific_heat, float)
            and self.latent_heat == 0
            and self.specific_enthalpy is None
        )

    @property
    def has_phase_change(self) -> bool:
        """True when the material stores latent heat (given as such or in an enthalpy
        table)."""
        return self.latent_heat > 0 or self.specific_enthalpy is not None

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
        """ρ·dh/dT in J/(m³·K): ρ·c(T), with the latent heat's release ρ·L·S'(T)."""
        if self.specific_enthalpy is not None:
            return self.density * self.specific_enthalpy.slope(temperature)
        c = self.specific_heat
        values = (
            c(temperature)
            if isinstance(c, PropertyTable)
            else np.full_like(np.asarray(temperature, dtype=float), c)
        )
        if self.latent_heat:
            values = values + self.latent_heat * smooth_fraction_slope(
                temperature, self.solidus, self.liquidus
            )
        return self.density * values

    def enthalpy(self, temperature, reference: float):
        """H(T) − H(reference): ∫ ρ·c dT from ``reference`` to ``temperature`` (°C) with the
        latent heat released between them, J/m³."""
        t = np.asarray(temperature, dtype=float)
        if self.specific_enthalpy is not None:
            table = self.specific_enthalpy
            return self.density * (table(t) - table(reference))
        c = self.specific_heat
        if isinstance(c, PropertyTable):
            sensible = c.integral(t, reference)
        else:
            sensible = c * (t - reference)
        if self.latent_heat:  # in place when an array: a residual takes it at every point
            fraction = smooth_fraction(t, self.solidus, self.liquidus)
            fraction -= smooth_fraction(reference, self.solidus, self.liquidus)
            fraction *= self.latent_heat
            sensible += fraction  # (a scalar is rebound, an array is fresh: no caller's)
        sensible *= self.density
        return sensible

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

    def conduction_coefficients(self, temperature):
        """k (W/(m·K)) at ``temperature`` (°C, an array), or (k_xx, k_xy, k_yy) for an
        orthotropic material: what the conduction residual takes at the quadrature points."""
        if self.orthotropic is not None:
            return self.orthotropic.components_at(temperature)
        return self.conductivity_at(temperature)

    def conduction_slopes(self, temperature):
        """dk/dT (W/(m·K²)) at ``temperature``, or d(k_xx, k_xy, k_yy)/dT when orthotropic."""
        if self.orthotropic is not None:
            return self.orthotropic.component_slopes(temperature)
        return self.conductivity_slope(temperature)

    def conduction_at(self, temperature: float | None = None):
        """What the conduction term is assembled with: k in W/(m·K) (at ``temperature`` °C,
        or the mid-range value for a table when None), or the (2, 2) tensor of an orthotropic
        material."""
        if self.orthotropic is not None:
            return self.orthotropic.tensor(temperature)
        if temperature is None:
            return self.nominal_conductivity
        return float(self.conductivity_at(temperature))

    @property
    def diffusivity(self) -> float:
        """Thermal diffusivity α = k/(ρ·c) in m²/s (mid-range values for tables)."""
        return self.nominal_conductivity / self.volumetric_heat_capacity


def _specific_heat_table(table: EnthalpyTable) -> PropertyTable:
    """dh/dT at an enthalpy table's temperatures, as a property table for reports, J/(kg·K)."""
    slopes = table.slope(np.asarray(table.temperatures))
    return PropertyTable(table.temperatures, tuple(np.maximum(slopes, 1e-12).tolist()))
