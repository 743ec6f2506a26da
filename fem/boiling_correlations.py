"""The classical correlations of a boiling curve, each from a liquid's properties
(:class:`fem.liquids.Liquid`), in SI units.

Regimes, in order of rising wall superheat ΔT_e = T_s − T_sat:

- natural convection to the bath (horizontal cylinder, Churchill & Chu, from ``ht``), while it
  carries more heat than nucleate boiling;
- nucleate boiling by Rohsenow's correlation (from ``ht``), up to
- the critical heat flux by Zuber's correlation with the textbook constant 0.149 (``ht``'s
  default is 0.18), raised for subcooling by Ivey & Morris's factor
  1 + 0.1·(ρ_l/ρ_v)^0.75·c_l·ΔT_sub/h_fg (from memory);
- a transition segment, a straight line on the log–log boiling curve from the critical point to
- the minimum heat flux of Zuber and Berenson, q_min = 0.09·ρ_v·h_fg·[σ·g·(ρ_l − ρ_v) /
  (ρ_l + ρ_v)²]^(1/4) (Incropera et al., *Fundamentals of Heat and Mass Transfer*, 6th ed.,
  eq. 10.7, from memory), placed where the film-boiling curve carries it (the Leidenfrost
  point); Berenson's own estimate of that temperature is reported beside it;
- film boiling by Bromley's correlation, h_conv = C·[g·(ρ_l − ρ_v)·h'_fg·ρ_v·k_v³ /
  (μ_v·D·ΔT_e)]^(1/4) with h'_fg = h_fg + 0.8·c_v·ΔT_e, C = 0.62 for a horizontal cylinder and
  0.67 for a sphere, combined with radiation across the film as h^(4/3) = h_conv^(4/3) +
  h_rad·h^(1/3) (Incropera et al., 6th ed., eqs. 10.9–10.11, from memory).

``ht`` is optional: ``pip install soakwise[boiling]``.
"""

from __future__ import annotations

import numpy as np

from .errors import ModelError
from .liquids import Liquid
from .temperatures import ABSOLUTE_ZERO

GRAVITY = 9.80665  # m/s²
STEFAN_BOLTZMANN = 5.670374419e-8  # W/(m²·K⁴)
BROMLEY = {"horizontal cylinder": 0.62, "sphere": 0.67}


def _ht():
    try:
        import ht
    except ImportError:  # pragma: no cover - depends on the installation
        raise ModelError(
            "the boiling-curve builder needs the 'ht' package: pip install soakwise[boiling]",
            argument="liquid",
        ) from None
    return ht


def critical_heat_flux(liquid: Liquid, subcooling: float = 0.0, constant: float = 0.149):
    """Zuber's critical heat flux, W/m², raised by Ivey & Morris's factor for ``subcooling``
    K of the bath below saturation."""
    saturated = _ht().Zuber(
        sigma=liquid.surface_tension,
        Hvap=liquid.latent_heat,
        rhol=liquid.liquid_density,
        rhog=liquid.vapour_density,
        K=constant,
    )
    ratio = (liquid.liquid_density / liquid.vapour_density) ** 0.75
    return saturated * (
        1 + 0.1 * ratio * liquid.liquid_specific_heat * subcooling / liquid.latent_heat
    )


def nucleate_flux(liquid: Liquid, superheat, surface_factor: float, exponent: float = 1.0):
    """Rohsenow's nucleate-boiling heat flux at wall ``superheat`` K, W/m² (``ht``)."""
    rohsenow = _ht().Rohsenow
    return np.array(
        [
            rohsenow(
                rhol=liquid.liquid_density,
                rhog=liquid.vapour_density,
                mul=liquid.liquid_viscosity,
                kl=liquid.liquid_conductivity,
                Cpl=liquid.liquid_specific_heat,
                Hvap=liquid.latent_heat,
                sigma=liquid.surface_tension,
                Te=float(t),
                Csf=surface_factor,
                n=exponent,
            )
            * float(t)
            for t in np.atleast_1d(superheat)
        ]
    )


def minimum_heat_flux(liquid: Liquid) -> float:
    """Zuber's and Berenson's minimum film-boiling heat flux, W/m² (constant 0.09)."""
    rho_l, rho_v = liquid.liquid_density, liquid.vapour_density
    group = liquid.surface_tension * GRAVITY * (rho_l - rho_v) / (rho_l + rho_v) ** 2
    return 0.09 * rho_v * liquid.latent_heat * group**0.25


def berenson_minimum_superheat(liquid: Liquid) -> float:
    """Berenson's wall superheat at the minimum heat flux (flat plate), K (from memory)."""
    rho_l, rho_v = liquid.liquid_density, liquid.vapour_density
    difference = rho_l - rho_v
    return (
        0.127
        * rho_v
        * liquid.latent_heat
        / liquid.vapour_conductivity
        * (GRAVITY * difference / (rho_l + rho_v)) ** (2 / 3)
        * (liquid.surface_tension / (GRAVITY * difference)) ** 0.5
        * (liquid.vapour_viscosity / difference) ** (1 / 3)
    )


def film_coefficients(liquid: Liquid, superheat, diameter: float, emissivity: float, shape: str):
    """Bromley's convective coefficient, the radiation coefficient and their combination
    h^(4/3) = h_conv^(4/3) + h_rad·h^(1/3), each in W/(m²·K), at wall ``superheat`` K."""
    dt = np.atleast_1d(np.asarray(superheat, dtype=float))
    latent = liquid.latent_heat + 0.8 * liquid.vapour_specific_heat * dt
    group = (
        GRAVITY
        * (liquid.liquid_density - liquid.vapour_density)
        * latent
        * liquid.vapour_density
        * liquid.vapour_conductivity**3
        / (liquid.vapour_viscosity * diameter * dt)
    )
    convective = BROMLEY[shape] * group**0.25
    saturation = liquid.saturation_temperature - ABSOLUTE_ZERO
    surface = saturation + dt
    radiative = emissivity * STEFAN_BOLTZMANN * (surface**4 - saturation**4) / dt
    total = convective + 0.75 * radiative  # start from the simple sum; the map contracts
    for _ in range(60):
        total = (convective ** (4 / 3) + radiative * total ** (1 / 3)) ** 0.75
    return convective, radiative, total


def natural_convection_flux(liquid: Liquid, difference, diameter: float, shape: str):
    """Single-phase natural convection to the bath at surface-to-bath ``difference`` K, W/m²."""
    ht = _ht()
    dt = np.atleast_1d(np.asarray(difference, dtype=float))
    nu = liquid.liquid_viscosity / liquid.liquid_density
    grashof = GRAVITY * liquid.liquid_expansion * dt * diameter**3 / nu**2
    correlation = (
        ht.Nu_horizontal_cylinder_Churchill_Chu
        if shape == "horizontal cylinder"
        else ht.Nu_sphere_Churchill
    )
    nusselt = np.array([correlation(liquid.prandtl, float(g)) for g in grashof])
    return nusselt * liquid.liquid_conductivity / diameter * dt
