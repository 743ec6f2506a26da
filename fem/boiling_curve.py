"""A boiling curve — heat flux against surface temperature — for a part quenched in a liquid,
built from the liquid's properties (:mod:`fem.liquids`) by the classical correlations
(:mod:`fem.boiling_correlations`, which describes the regimes).

**A starting point, not a quenchant's data.** Real quenchants (oils, polymer solutions, water
with additives, agitated baths) are characterised by probe tests; their film-to-nucleate
transition depends on the surface, its oxide, agitation and contamination in ways no
correlation carries. Use a curve measured with a probe where one exists; use this one to
explore, and compare its result with measurements before relying on it.

Film boiling uses the saturated liquid's properties: a subcooled bath thins the vapour film
and raises the film-boiling flux, which this builder does not model.

``ht`` (and CoolProp, for :meth:`Liquid.water`) are optional: ``pip install soakwise[boiling]``.
This module re-exports the liquid and the correlations, the builder's public names.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .boiling_correlations import (
    BROMLEY,
    GRAVITY,
    STEFAN_BOLTZMANN,
    berenson_minimum_superheat,
    critical_heat_flux,
    film_coefficients,
    minimum_heat_flux,
    natural_convection_flux,
    nucleate_flux,
)
from .errors import ModelError
from .liquids import Liquid
from .temperatures import ABSOLUTE_ZERO

__all__ = [
    "BROMLEY",
    "GRAVITY",
    "STEFAN_BOLTZMANN",
    "BoilingCurve",
    "Liquid",
    "berenson_minimum_superheat",
    "boiling_curve",
    "critical_heat_flux",
    "film_coefficients",
    "minimum_heat_flux",
    "natural_convection_flux",
    "nucleate_flux",
]


@dataclass(frozen=True)
class BoilingCurve:
    """Heat flux into the bath against surface temperature, with its landmarks.

    Attributes
    ----------
    surface_temperatures : ndarray
        T_s in °C, increasing, from just above the bath temperature.
    heat_flux : ndarray
        Heat flux from the surface into the liquid, W/m² (positive).
    heat_transfer_coefficient : ndarray
        q/(T_s − T_bath), W/(m²·K), referred to the bath temperature.
    regimes : tuple of str
        ``"natural convection"``, ``"nucleate"``, ``"transition"`` or ``"film"`` per point.
    bath_temperature : float
        °C.
    critical_heat_flux, critical_temperature : float
        The peak of nucleate boiling: W/m² and the surface temperature, °C.
    minimum_heat_flux, leidenfrost_temperature : float
        The minimum of film boiling: W/m² and the surface temperature where film boiling
        ends, °C.
    berenson_leidenfrost_temperature : float
        Berenson's flat-plate estimate of that temperature, °C, for comparison.
    liquid : str
        The liquid's name.
    """

    surface_temperatures: np.ndarray
    heat_flux: np.ndarray
    heat_transfer_coefficient: np.ndarray
    regimes: tuple[str, ...]
    bath_temperature: float
    critical_heat_flux: float
    critical_temperature: float
    minimum_heat_flux: float
    leidenfrost_temperature: float
    berenson_leidenfrost_temperature: float
    liquid: str = field(default="liquid")

    def rows(self) -> list[tuple[float, float]]:
        """(surface temperature °C, heat flux W/m²) pairs, for a table of heat flux."""
        return list(zip(self.surface_temperatures.tolist(), self.heat_flux.tolist(), strict=True))

    def surface_curve(self):
        """The curve as a :class:`fem.conditions.SurfaceCurve` of heat flux, for a
        :class:`fem.conditions.SurfaceTemperatureConvection` with the bath as its ambient."""
        from .conditions import surface_curve  # the condition's own module, loaded on use

        return surface_curve.SurfaceCurve(
            tuple(self.surface_temperatures.tolist()),
            tuple(self.heat_flux.tolist()),
            "heat_flux",
        )


def boiling_curve(
    liquid: Liquid,
    diameter: float,
    bath_temperature: float,
    *,
    highest_temperature: float = 1000.0,
    shape: str = "horizontal cylinder",
    emissivity: float = 0.8,
    surface_factor: float = 0.013,
    rohsenow_exponent: float = 1.0,
    zuber_constant: float = 0.149,
    leidenfrost_temperature: float | None = None,
) -> BoilingCurve:
    """The boiling curve of a part of ``diameter`` m in a bath of ``liquid``.

    Parameters
    ----------
    liquid : Liquid
    diameter : float
        D of the horizontal cylinder or sphere, m (Bromley's and Churchill's length).
    bath_temperature : float
        °C, at or below the liquid's saturation temperature (below: subcooled).
    highest_temperature : float
        The hottest surface temperature in the table, °C.
    shape : str
        ``"horizontal cylinder"`` or ``"sphere"``.
    emissivity : float
        Of the surface, for radiation across the vapour film.
    surface_factor : float
        Rohsenow's C_sf for the liquid–surface pair (0.013 for water on many metals, common
        practice; 0.0128 polished copper, 0.0132 polished stainless steel, from memory).
    rohsenow_exponent : float
        n: 1 for water, 1.7 for most other liquids.
    zuber_constant : float
        Zuber's constant for the critical heat flux (0.149, Lienhard & Dhir; π/24 Zuber's).
    leidenfrost_temperature : float, optional
        Where film boiling ends, °C, from a probe test or an estimate such as Berenson's
        (``BoilingCurve.berenson_leidenfrost_temperature``); the minimum heat flux is then the
        film-boiling flux there. By default, where the film-boiling curve carries Zuber's and
        Berenson's minimum heat flux.

    Returns
    -------
    BoilingCurve

    Examples
    --------
    >>> water = Liquid(100.0, 957.9, 279e-6, 0.680, 4217.0, 7.5e-4, 58.9e-3, 2257e3,
    ...                0.5955, 14.85e-6, 0.0331, 2560.0, "water, 1 atm")
    >>> curve = boiling_curve(water, 0.012, 100.0)
    >>> round(curve.critical_heat_flux / 1e6, 2)  # MW/m², Zuber with C = 0.149
    1.26
    """
    _check_arguments(liquid, diameter, bath_temperature, highest_temperature, shape, emissivity)
    saturation = liquid.saturation_temperature
    subcooling = saturation - bath_temperature
    q_max = float(critical_heat_flux(liquid, subcooling, zuber_constant))
    per_cube = float(nucleate_flux(liquid, 1.0, surface_factor, rohsenow_exponent)[0])
    chf_superheat = (q_max / per_cube) ** (1 / 3)  # Rohsenow: q ∝ ΔT_e³
    min_superheat, q_min = _minimum_point(
        liquid, leidenfrost_temperature, diameter, emissivity, shape
    )
    if not (q_min < q_max and chf_superheat < min_superheat < highest_temperature - saturation):
        raise ModelError(
            f"the correlations do not give a boiling curve here: critical heat flux "
            f"{q_max:.4g} W/m2 at {chf_superheat:.4g} K superheat, minimum {q_min:.4g} W/m2 at "
            f"{min_superheat:.4g} K; check the properties, or raise highest_temperature "
            f"({highest_temperature:g} degC)",
            argument="liquid",
        )
    superheats = _superheats(
        subcooling, chf_superheat, min_superheat, highest_temperature - saturation
    )
    flux, regimes = _fluxes(
        liquid, superheats, subcooling, diameter, emissivity, shape,
        (surface_factor, rohsenow_exponent), (chf_superheat, q_max), (min_superheat, q_min),
    )  # fmt: skip
    surface = saturation + superheats
    return BoilingCurve(
        surface,
        flux,
        flux / (surface - bath_temperature),
        regimes,
        float(bath_temperature),
        q_max,
        saturation + chf_superheat,
        q_min,
        saturation + min_superheat,
        saturation + berenson_minimum_superheat(liquid),
        liquid.name,
    )


def _check_arguments(liquid, diameter, bath, highest, shape, emissivity) -> None:
    if not isinstance(liquid, Liquid):
        raise ModelError(f"liquid must be a Liquid, got {liquid!r}", argument="liquid")
    if not (isinstance(diameter, int | float) and math.isfinite(diameter) and diameter > 0):
        raise ModelError(f"diameter must be a length > 0 m, got {diameter!r}", argument="diameter")
    if shape not in BROMLEY:
        raise ModelError(f"shape must be one of {list(BROMLEY)}, got {shape!r}", argument="shape")
    if not 0 < emissivity <= 1:
        raise ModelError(
            f"emissivity must be in (0, 1], got {emissivity!r}", argument="emissivity"
        )
    if not ABSOLUTE_ZERO < bath <= liquid.saturation_temperature:
        raise ModelError(
            f"bath_temperature must be at or below the liquid's saturation temperature "
            f"({liquid.saturation_temperature:.4g} degC), got {bath!r}",
            argument="bath_temperature",
        )
    if not highest > liquid.saturation_temperature:
        raise ModelError(
            f"highest_temperature must be above saturation, got {highest!r}",
            argument="highest_temperature",
        )


def _minimum_point(liquid, leidenfrost_temperature, diameter, emissivity, shape):
    """The wall superheat (K) where film boiling ends and the minimum heat flux there (W/m²):
    at ``leidenfrost_temperature`` °C when given, else where the film-boiling curve carries
    Zuber's and Berenson's minimum heat flux."""
    if leidenfrost_temperature is None:
        q_min = minimum_heat_flux(liquid)
        return _leidenfrost_superheat(liquid, q_min, diameter, emissivity, shape), q_min
    min_superheat = leidenfrost_temperature - liquid.saturation_temperature
    if not min_superheat > 0:
        raise ModelError(
            f"leidenfrost_temperature must be above saturation, got {leidenfrost_temperature!r}",
            argument="leidenfrost_temperature",
        )
    film = film_coefficients(liquid, min_superheat, diameter, emissivity, shape)[2][0]
    return min_superheat, float(film * min_superheat)


def _leidenfrost_superheat(liquid, q_min, diameter, emissivity, shape) -> float:
    """Where the film-boiling flux h·ΔT_e equals the minimum heat flux, K."""
    from scipy.optimize import brentq

    def excess(dt):
        return film_coefficients(liquid, dt, diameter, emissivity, shape)[2][0] * dt - q_min

    return float(brentq(excess, 1e-3, 1e4, xtol=1e-9, rtol=1e-12))


def _superheats(subcooling, chf, leidenfrost, highest) -> np.ndarray:
    """Wall superheats of the table, K: dense where the curve bends, landmarks exact."""
    below = -np.linspace(subcooling - 1.0, 0.0, 8) if subcooling > 1.0 else np.array([])
    nucleate = np.geomspace(0.5, chf, 24)
    transition = np.geomspace(chf, leidenfrost, 16)
    film = np.geomspace(leidenfrost, highest, 24)
    return np.unique(np.concatenate([below, nucleate, transition, film]))


def _fluxes(liquid, superheats, subcooling, diameter, emissivity, shape, rohsenow, peak, low):
    """Heat flux at each superheat and the regime it is in."""
    (chf, q_max), (leidenfrost, q_min) = peak, low
    flux = np.empty_like(superheats)
    regimes = []
    natural = natural_convection_flux(liquid, superheats + subcooling, diameter, shape)
    for i, dt in enumerate(superheats):
        if dt <= 0:
            flux[i], regime = natural[i], "natural convection"
        elif dt <= chf:
            boiling = float(nucleate_flux(liquid, dt, *rohsenow)[0])
            flux[i] = max(boiling, natural[i])
            regime = "nucleate" if boiling >= natural[i] else "natural convection"
        elif dt < leidenfrost:  # a straight line on the log–log curve
            s = math.log(dt / chf) / math.log(leidenfrost / chf)
            flux[i], regime = (
                math.exp((1 - s) * math.log(q_max) + s * math.log(q_min)),
                "transition",
            )
        else:
            h = film_coefficients(liquid, dt, diameter, emissivity, shape)[2][0]
            flux[i], regime = h * dt, "film"
        regimes.append(regime)
    return flux, tuple(regimes)
