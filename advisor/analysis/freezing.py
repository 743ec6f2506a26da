"""Freezing-time hand calculations and their comparison with the field.

Plank's equation (1913) treats the frozen layer as quasi-steady: the latent heat released at
the front flows through the frozen layer and the surface film, and everything else is ignored,

    t = ρ·L / (T_f − T_a) · (P·D/h + R·D²/k_f),

with D the full thickness (slab cooled on both faces) or diameter, and P, R = 1/2, 1/8
(infinite slab), 1/4, 1/16 (infinite cylinder), 1/6, 1/24 (sphere) — Plank's shape factors as
given in Singh & Heldman, *Introduction to Food Engineering*, 4th ed., §7.6 (from memory).
Written with the half-thickness or radius d and the shape number E = 1, 2, 3 it reads
t = ρ·L/(T_f − T_a)·(d/(E·h) + d²/(2·E·k_f)), the form used below.

Pham's method (Q. T. Pham, "Simplified equation for predicting the freezing time of
foodstuffs", *J. Food Technology* 21, 1986, 209–219; as summarised in the ASHRAE Handbook —
Refrigeration, chapter on cooling and freezing times of foods; from memory) adds the sensible
heat removed before and after the latent heat:

    t = d/(E·h) · (ΔH₁/ΔT₁ + ΔH₂/ΔT₂) · (1 + Bi/2),   Bi = h·d/k_f,
    ΔH₁ = ρ_u·c_u·(T_i − T_fm),          ΔT₁ = (T_i + T_fm)/2 − T_a,
    ΔH₂ = ρ_f·(L + c_f·(T_fm − T_c)),    ΔT₂ = T_fm − T_a,
    T_fm = 1.8 + 0.263·T_c + 0.105·T_a  (°C),

T_i the initial and T_c the final centre temperature. The mean freezing temperature T_fm is an
empirical fit for water-rich foods that begin freezing near −1 °C; for other materials Pham's
estimate is outside the data it was fitted to.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import AdvisorError
from ..time_words import duration_text

SHAPES = {"slab": 1.0, "cylinder": 2.0, "sphere": 3.0}  # Plank's E: d·A/V


@dataclass(frozen=True)
class FreezingProduct:
    """The properties the freezing-time hand calculations need.

    Parameters
    ----------
    density : float
        Density of the unfrozen product ρ_u, kg/m³.
    latent_heat : float
        Latent heat released per unit mass of product (not of water), J/kg.
    freezing_point : float
        Initial freezing temperature T_f, °C (Plank's equation).
    frozen_conductivity : float
        k_f, W/(m·K).
    unfrozen_specific_heat, frozen_specific_heat : float
        c_u and c_f, J/(kg·K) (Pham's method).
    frozen_density : float, optional
        ρ_f in kg/m³; the unfrozen density when omitted.

    Examples
    --------
    >>> lean_meat = FreezingProduct(1050.0, 250e3, -1.0, 1.5, 3500.0, 1800.0)
    >>> round(plank_time(lean_meat, 0.05, 25.0, -30.0, "slab") / 3600, 2)  # h
    7.12
    """

    density: float
    latent_heat: float
    freezing_point: float
    frozen_conductivity: float
    unfrozen_specific_heat: float
    frozen_specific_heat: float
    frozen_density: float | None = None

    def __post_init__(self) -> None:
        for name in (
            "density",
            "latent_heat",
            "frozen_conductivity",
            "unfrozen_specific_heat",
            "frozen_specific_heat",
        ):
            _positive(getattr(self, name), name)
        if self.frozen_density is not None:
            _positive(self.frozen_density, "frozen_density")
        if not math.isfinite(self.freezing_point):
            raise AdvisorError(f"freezing_point must be finite, got {self.freezing_point!r}")

    @classmethod
    def of_material(
        cls, material, *, unfrozen_temperature: float, frozen_temperature: float
    ) -> FreezingProduct:
        """The product of a :class:`fem.Material` with latent heat (``latent_heat`` J/kg
        released between ``solidus`` and ``liquidus`` °C): the freezing point is the
        liquidus; c_u, c_f and k_f are the material's at ``unfrozen_temperature`` (above the
        liquidus) and ``frozen_temperature`` (below the solidus), °C."""
        if getattr(material, "specific_enthalpy", None) is not None:
            return cls._of_enthalpy_table(material, unfrozen_temperature, frozen_temperature)
        latent = getattr(material, "latent_heat", 0.0) or 0.0
        liquidus, solidus = getattr(material, "liquidus", None), getattr(material, "solidus", None)
        if latent <= 0 or liquidus is None or solidus is None:
            raise AdvisorError(
                f"material {getattr(material, 'name', material)!r} has no latent heat, so it "
                "has no freezing time; give a FreezingProduct, or a material with latent_heat, "
                "solidus and liquidus"
            )
        if not (frozen_temperature < solidus and unfrozen_temperature > liquidus):
            raise AdvisorError(
                f"the frozen temperature ({frozen_temperature:g} degC) must lie below the "
                f"solidus ({solidus:g} degC) and the unfrozen one ({unfrozen_temperature:g} "
                f"degC) above the liquidus ({liquidus:g} degC)"
            )
        density = float(material.density)

        def specific_heat(t):
            return float(np.asarray(material.heat_capacity_at(t))) / density

        return cls(
            density,
            float(latent),
            float(liquidus),
            float(np.asarray(material.conductivity_at(frozen_temperature))),
            specific_heat(unfrozen_temperature),
            specific_heat(frozen_temperature),
        )

    @classmethod
    def _of_enthalpy_table(
        cls, material, unfrozen_temperature: float, frozen_temperature: float
    ) -> FreezingProduct:
        """The product of a material given by its enthalpy table (a food through freezing):
        the freezing point is where the table is steepest (the initial freezing point, where
        ice starts to form); c_u and c_f are the table's slopes at the unfrozen and frozen
        temperatures; the latent heat is the enthalpy released from the freezing point down to
        the frozen temperature less its sensible part at c_f, so that Plank's and Pham's
        balances remove the table's whole enthalpy change."""
        table = material.specific_enthalpy
        temperatures = np.asarray(table.temperatures, dtype=float)
        steepest = np.argmax(np.diff(table.values) / np.diff(temperatures))
        freezing_point = float(temperatures[steepest + 1])
        if not frozen_temperature < freezing_point < unfrozen_temperature:
            raise AdvisorError(
                f"the frozen temperature ({frozen_temperature:g} degC) must lie below the "
                f"initial freezing point of {getattr(material, 'name', 'the material')!r} "
                f"({freezing_point:g} degC, where its enthalpy table is steepest) and the "
                f"unfrozen one ({unfrozen_temperature:g} degC) above it"
            )
        frozen_specific_heat = float(table.slope(frozen_temperature))
        released = float(table(freezing_point) - table(frozen_temperature))
        latent = released - frozen_specific_heat * (freezing_point - frozen_temperature)
        if latent <= 0:
            raise AdvisorError(
                f"material {getattr(material, 'name', material)!r} releases no latent heat "
                f"between {freezing_point:g} and {frozen_temperature:g} degC, so it has no "
                "freezing time"
            )
        return cls(
            float(material.density),
            latent,
            freezing_point,
            float(np.asarray(material.conductivity_at(frozen_temperature))),
            float(table.slope(unfrozen_temperature)),
            frozen_specific_heat,
        )

    @property
    def solid_density(self) -> float:
        """ρ_f in kg/m³."""
        return self.density if self.frozen_density is None else self.frozen_density


def _positive(value, name: str) -> None:
    if not (isinstance(value, int | float) and math.isfinite(value) and value > 0):
        raise AdvisorError(f"{name} must be a finite number > 0, got {value!r}")


def shape_number(shape: str | float) -> float:
    """Plank's E (1 slab, 2 infinite cylinder, 3 sphere) from a name or a number in [1, 3]."""
    if isinstance(shape, str):
        if shape not in SHAPES:
            raise AdvisorError(f"shape must be one of {list(SHAPES)} or a number, got {shape!r}")
        return SHAPES[shape]
    if not (isinstance(shape, int | float) and 0.5 <= shape <= 3.5):
        raise AdvisorError(f"shape number E must be about 1 to 3 (d·A/V), got {shape!r}")
    return float(shape)


def _check_case(half_thickness, coefficient, medium, below: float, what: str) -> None:
    _positive(half_thickness, "half_thickness")
    _positive(coefficient, "heat_transfer_coefficient")
    if not medium < below:
        raise AdvisorError(
            f"the medium temperature ({medium:g} degC) must be below {what} ({below:g} degC)"
        )


def plank_time(
    product: FreezingProduct,
    half_thickness: float,
    heat_transfer_coefficient: float,
    medium_temperature: float,
    shape: str | float = "slab",
) -> float:
    """Freezing time by Plank's equation, s.

    Parameters
    ----------
    product : FreezingProduct
    half_thickness : float
        d: half the thickness of a slab cooled on both faces (the thickness of one cooled on
        one face), the radius of a cylinder or sphere, m.
    heat_transfer_coefficient : float
        h at the surface, W/(m²·K).
    medium_temperature : float
        T_a, °C, below the freezing point.
    shape : str or float
        ``"slab"``, ``"cylinder"``, ``"sphere"`` or Plank's E = d·A/V directly.

    Returns
    -------
    float
        ρ·L/(T_f − T_a)·(d/(E·h) + d²/(2·E·k_f)), s; the form ρ·L/ΔT·(P·D/h + R·D²/k_f)
        with D = 2d.
    """
    _check_case(
        half_thickness,
        heat_transfer_coefficient,
        medium_temperature,
        product.freezing_point,
        "the freezing point",
    )
    e = shape_number(shape)
    d, h, k = half_thickness, heat_transfer_coefficient, product.frozen_conductivity
    drive = product.freezing_point - medium_temperature
    return product.density * product.latent_heat / drive * (d / (e * h) + d * d / (2 * e * k))


def mean_freezing_temperature(centre_temperature: float, medium_temperature: float) -> float:
    """Pham's mean freezing temperature T_fm = 1.8 + 0.263·T_c + 0.105·T_a, °C."""
    return 1.8 + 0.263 * centre_temperature + 0.105 * medium_temperature


def pham_time(
    product: FreezingProduct,
    half_thickness: float,
    heat_transfer_coefficient: float,
    medium_temperature: float,
    initial_temperature: float,
    centre_temperature: float,
    shape: str | float = "slab",
) -> float:
    """Freezing time by Pham's method (1986), s: pre-cooling, latent heat and sub-cooling.

    Parameters
    ----------
    product, half_thickness, heat_transfer_coefficient, medium_temperature, shape
        As for :func:`plank_time`.
    initial_temperature : float
        T_i, °C, at or above Pham's mean freezing temperature.
    centre_temperature : float
        T_c, the final centre temperature, °C, above the medium temperature.

    Returns
    -------
    float
        d/(E·h)·(ΔH₁/ΔT₁ + ΔH₂/ΔT₂)·(1 + Bi/2) (see the module's notes), s.

    Examples
    --------
    >>> lean_meat = FreezingProduct(1050.0, 250e3, -1.0, 1.5, 3500.0, 1800.0)
    >>> round(pham_time(lean_meat, 0.05, 25.0, -30.0, 5.0, -10.0) / 3600, 2)  # h
    9.14
    """
    t_fm = mean_freezing_temperature(centre_temperature, medium_temperature)
    _check_case(
        half_thickness, heat_transfer_coefficient, medium_temperature, centre_temperature,
        "the final centre temperature",
    )  # fmt: skip
    if not centre_temperature < t_fm <= initial_temperature:
        raise AdvisorError(
            f"Pham's method needs the final centre temperature ({centre_temperature:g} degC) "
            f"below its mean freezing temperature T_fm = {t_fm:.3g} degC and the initial "
            f"temperature ({initial_temperature:g} degC) at or above it"
        )
    e = shape_number(shape)
    d, h = half_thickness, heat_transfer_coefficient
    precooling = product.density * product.unfrozen_specific_heat * (initial_temperature - t_fm)
    precooling_drive = 0.5 * (initial_temperature + t_fm) - medium_temperature
    freezing = product.solid_density * (
        product.latent_heat + product.frozen_specific_heat * (t_fm - centre_temperature)
    )
    freezing_drive = t_fm - medium_temperature
    biot = h * d / product.frozen_conductivity
    return (
        d / (e * h) * (precooling / precooling_drive + freezing / freezing_drive) * (1 + biot / 2)
    )


@dataclass(frozen=True)
class FreezingComparison:
    """The field's freezing time beside Plank's and Pham's.

    Attributes
    ----------
    end_temperature : float
        The temperature the slowest point must pass through, °C.
    field_time : float or None
        When the field's slowest point passes through it, s (None if not within the run).
    plank, pham : float or None
        The hand calculations, s (Pham None where its range of use is not met).
    half_thickness : float
        d, the largest distance from a point to a cooled edge, m.
    shape_number : float
        E = d·A_s/V (1 slab, 2 cylinder, 3 sphere).
    heat_transfer_coefficient, medium_temperature : float
        The h (W/(m²·K)) and T_a (°C) the hand calculations used.
    wording : str
        The direction of each hand calculation's error in plain words.
    """

    end_temperature: float
    field_time: float | None
    plank: float
    pham: float | None
    half_thickness: float
    shape_number: float
    heat_transfer_coefficient: float
    medium_temperature: float
    wording: str

    def error(self, which: str) -> float | None:
        """(hand − field)/field for ``"plank"`` or ``"pham"``; None without both."""
        hand = getattr(self, which)
        if hand is None or not self.field_time:
            return None
        return (hand - self.field_time) / self.field_time


def direction(name: str, hand: float | None, field_time: float | None) -> str:
    """One sentence on which way a hand freezing time is wrong."""
    if hand is None:
        return f"{name}: outside its range of use here."
    if field_time is None:
        return f"{name}: {duration_text(hand)}; the field does not finish freezing within the run."
    gap = (hand - field_time) / field_time
    if abs(gap) < 0.005:
        return (
            f"{name}: {duration_text(hand)}, within 0.5 % of the field's "
            f"{duration_text(field_time)}."
        )
    way = (
        "too short: it would stop the freezer before the slowest point is frozen "
        "(non-conservative)"
        if gap < 0
        else "too long: a safe but costly estimate (conservative)"
    )
    return f"{name}: {duration_text(hand)}, {abs(gap):.1%} {way}."


def compare_freezing(
    product: FreezingProduct,
    times: np.ndarray,
    slowest: np.ndarray,
    *,
    end_temperature: float,
    initial_temperature: float,
    half_thickness: float,
    shape: float,
    heat_transfer_coefficient: float,
    medium_temperature: float,
) -> FreezingComparison:
    """Plank's and Pham's freezing times beside the time the field's ``slowest`` history
    (°C at ``times`` s) first passes through ``end_temperature`` °C."""
    from .lumped import crossing_time  # one crossing rule for every time the advisor reads

    if not medium_temperature < end_temperature < product.freezing_point:
        raise AdvisorError(
            f"the freezing end temperature ({end_temperature:g} degC) must lie between the "
            f"medium ({medium_temperature:g} degC) and the freezing point "
            f"({product.freezing_point:g} degC)"
        )
    field_time = crossing_time(times, slowest, end_temperature, 1.0)
    args = (product, half_thickness, heat_transfer_coefficient, medium_temperature)
    plank = plank_time(*args, shape)
    try:
        pham = pham_time(*args, initial_temperature, end_temperature, shape)
    except AdvisorError:
        pham = None
    wording = (
        direction("Plank's equation", plank, field_time)
        + " "
        + direction("Pham's method", pham, field_time)
    )
    return FreezingComparison(
        end_temperature, field_time, plank, pham, half_thickness, shape,
        heat_transfer_coefficient, medium_temperature, wording,
    )  # fmt: skip
