"""A boiling curve — heat flux against surface temperature — for a part quenched in a liquid,
built from the liquid's properties by the classical correlations.

**A starting point, not a quenchant's data.** Real quenchants (oils, polymer solutions, water
with additives, agitated baths) are characterised by probe tests; their film-to-nucleate
transition depends on the surface, its oxide, agitation and contamination in ways no
correlation carries. Use a curve measured with a probe where one exists; use this one to
explore, and compare its result with measurements before relying on it.

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

Film boiling uses the saturated liquid's properties: a subcooled bath thins the vapour film
and raises the film-boiling flux, which this builder does not model.

``ht`` (and CoolProp, for :meth:`Liquid.water`) are optional: ``pip install soakwise[boiling]``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .errors import ModelError
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
    if leidenfrost_temperature is None:
        q_min = minimum_heat_flux(liquid)
        min_superheat = _leidenfrost_superheat(liquid, q_min, diameter, emissivity, shape)
    else:
        min_superheat = leidenfrost_temperature - saturation
        if not min_superheat > 0:
            raise ModelError(
                "leidenfrost_temperature must be above saturation, "
                f"got {leidenfrost_temperature!r}",
                argument="leidenfrost_temperature",
            )
        film = film_coefficients(liquid, min_superheat, diameter, emissivity, shape)[2][0]
        q_min = float(film * min_superheat)
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
