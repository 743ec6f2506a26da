"""A fluid's properties at one temperature and atmospheric pressure, from CoolProp (``pip install
soakwise[correlations]``): air, water, and a few of CoolProp's incompressible liquids."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import ModelError
from .temperatures import KELVIN

ATMOSPHERE = 101325.0  # Pa
EXTRA = "correlations"

# Our name → (CoolProp's fluid, words for reports).
FLUIDS = {
    "air": ("Air", "air"),
    "water": ("Water", "water (liquid)"),
    "ethylene-glycol-30": ("INCOMP::MEG-30%", "ethylene glycol in water, 30 % by mass"),
    "ethylene-glycol-50": ("INCOMP::MEG-50%", "ethylene glycol in water, 50 % by mass"),
    "propylene-glycol-30": ("INCOMP::MPG-30%", "propylene glycol in water, 30 % by mass"),
    "heat-transfer-oil": ("INCOMP::T66", "a synthetic heat-transfer oil (Therminol 66)"),
    "silicone-oil": ("INCOMP::S800", "a silicone heat-transfer fluid (Syltherm 800)"),
}


@dataclass(frozen=True)
class FluidProperties:
    """A fluid at one temperature, SI units.

    Attributes
    ----------
    temperature : float
        °C.
    density, viscosity, conductivity, specific_heat, expansion : float
        ρ in kg/m³, dynamic viscosity μ in Pa·s, k in W/(m·K), c_p in J/(kg·K), and the
        volumetric expansion coefficient β in 1/K.
    """

    temperature: float
    density: float
    viscosity: float
    conductivity: float
    specific_heat: float
    expansion: float

    @property
    def prandtl(self) -> float:
        """Pr = μ·c_p/k."""
        return self.viscosity * self.specific_heat / self.conductivity

    @property
    def kinematic_viscosity(self) -> float:
        """ν = μ/ρ in m²/s."""
        return self.viscosity / self.density


def _props_si():
    try:
        from CoolProp.CoolProp import PropsSI
    except ImportError:  # pragma: no cover - depends on the installation
        raise ModelError(
            f"fluid properties need CoolProp: pip install soakwise[{EXTRA}]", argument="fluid"
        ) from None
    return PropsSI


def check_fluid(fluid: str) -> str:
    """``fluid`` if it is one of :data:`FLUIDS`; otherwise a ModelError listing them."""
    if fluid not in FLUIDS:
        raise ModelError(f"unknown fluid {fluid!r}; known: {sorted(FLUIDS)}", argument="fluid")
    return fluid


def fluid_range(fluid: str) -> tuple[float, float]:
    """The temperatures (°C) where the single-phase properties of ``fluid`` are given at
    atmospheric pressure: for water, from freezing to boiling."""
    PropsSI = _props_si()
    name = FLUIDS[check_fluid(fluid)][0]
    if fluid == "water":
        return 0.01, PropsSI("T", "P", ATMOSPHERE, "Q", 0, name) - KELVIN - 0.01
    if fluid == "air":
        return -150.0, 1700.0  # CoolProp's air (Lemmon et al. 2000) holds far beyond this
    return (
        PropsSI("T_min", "T", 300.0, "P", ATMOSPHERE, name) - KELVIN,
        PropsSI("T_max", "T", 300.0, "P", ATMOSPHERE, name) - KELVIN,
    )


def fluid_properties(fluid: str, temperature: float) -> FluidProperties:
    """The properties of ``fluid`` at ``temperature`` °C and atmospheric pressure.

    Examples
    --------
    >>> air = fluid_properties("air", 26.85)
    >>> round(air.prandtl, 3)
    0.707
    """
    return fluid_property_rows(fluid, [temperature])[0]


def fluid_property_rows(fluid: str, temperatures) -> list[FluidProperties]:
    """The properties of ``fluid`` at each of ``temperatures`` °C (one CoolProp call per
    property for them all)."""
    PropsSI = _props_si()
    low, high = fluid_range(fluid)
    t = np.asarray(temperatures, dtype=float)
    outside = ~((t >= low) & (t <= high))
    if np.any(outside):
        raise ModelError(
            f"{FLUIDS[fluid][1]} has single-phase properties from {low:.4g} to {high:.4g} degC "
            f"at atmospheric pressure; the film temperature {t[outside][0]:.4g} degC lies "
            "outside (a liquid boiling on the surface needs a boiling curve instead)",
            argument="fluid_temperature",
        )
    name, kelvin = FLUIDS[fluid][0], t + KELVIN

    def value(key: str, at=kelvin) -> np.ndarray:
        return np.atleast_1d(np.asarray(PropsSI(key, "T", at, "P", ATMOSPHERE, name), float))

    density = value("D")
    if name.startswith("INCOMP::"):  # CoolProp gives no derivatives here: a central difference
        step = 0.5
        expansion = -(value("D", kelvin + step) - value("D", kelvin - step)) / (2 * step) / density
    else:
        expansion = value("ISOBARIC_EXPANSION_COEFFICIENT")
    columns = (density, value("V"), value("L"), value("C"), expansion)
    if not all(np.all(np.isfinite(c)) for c in columns):
        raise ModelError(
            f"CoolProp gave no properties of {fluid} at {t.tolist()} degC", argument="fluid"
        )
    return [FluidProperties(float(t[i]), *(float(c[i]) for c in columns)) for i in range(t.size)]
