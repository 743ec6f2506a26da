"""A quenching liquid's properties at its saturation pressure, as the boiling correlations
(:mod:`fem.boiling_correlations`) take them; water's from CoolProp (``pip install
soakwise[boiling]``)."""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import ModelError
from .temperatures import ABSOLUTE_ZERO


@dataclass(frozen=True)
class Liquid:
    """A quenching liquid at its saturation pressure, in SI units (temperatures in °C).

    Liquid properties are those of the saturated liquid; vapour properties those of the vapour
    at a typical film temperature (T_s + T_sat)/2 of the run.
    """

    saturation_temperature: float
    liquid_density: float
    liquid_viscosity: float
    liquid_conductivity: float
    liquid_specific_heat: float
    liquid_expansion: float
    surface_tension: float
    latent_heat: float
    vapour_density: float
    vapour_viscosity: float
    vapour_conductivity: float
    vapour_specific_heat: float
    name: str = "liquid"

    def __post_init__(self) -> None:
        for name in self.__dataclass_fields__:
            value = getattr(self, name)
            if name in ("name", "saturation_temperature"):
                continue
            if not (isinstance(value, int | float) and math.isfinite(value) and value > 0):
                raise ModelError(f"Liquid {name} must be a finite number > 0, got {value!r}")
        if not self.saturation_temperature > ABSOLUTE_ZERO:
            raise ModelError(
                f"saturation_temperature must be above {ABSOLUTE_ZERO:g} degC, "
                f"got {self.saturation_temperature!r}"
            )

    @property
    def prandtl(self) -> float:
        """Pr of the liquid."""
        return self.liquid_viscosity * self.liquid_specific_heat / self.liquid_conductivity

    @classmethod
    def water(cls, pressure: float = 101325.0, film_temperature: float = 400.0) -> Liquid:
        """Water from CoolProp: saturated liquid at ``pressure`` Pa, vapour at
        ``film_temperature`` °C and the same pressure."""
        try:
            from CoolProp.CoolProp import PropsSI
        except ImportError:  # pragma: no cover - depends on the installation
            raise ModelError(
                "Liquid.water needs CoolProp: pip install soakwise[boiling]", argument="pressure"
            ) from None

        def liquid(key):
            return PropsSI(key, "P", pressure, "Q", 0, "Water")

        t_sat = liquid("T")
        t_film = film_temperature - ABSOLUTE_ZERO
        if not t_film > t_sat:
            raise ModelError(
                f"film_temperature must be above saturation ({t_sat + ABSOLUTE_ZERO:.4g} degC), "
                f"got {film_temperature!r}",
                argument="film_temperature",
            )

        def vapour(key):
            return PropsSI(key, "T", t_film, "P", pressure, "Water")

        return cls(
            t_sat + ABSOLUTE_ZERO,
            liquid("D"),
            liquid("V"),
            liquid("L"),
            liquid("C"),
            liquid("ISOBARIC_EXPANSION_COEFFICIENT"),
            liquid("I"),
            PropsSI("H", "P", pressure, "Q", 1, "Water") - liquid("H"),
            vapour("D"),
            vapour("V"),
            vapour("L"),
            vapour("C"),
            f"water at {pressure / 1000:.4g} kPa (CoolProp)",
        )
