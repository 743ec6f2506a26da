"""Thermal properties of foods from their composition: the Choi–Okos component equations and
the ice fraction below the initial freezing point.

Choi, Y. and Okos, M.R. (1986), Effects of temperature and composition on the thermal
properties of foods, in Le Maguer & Jelen (eds.), Food Engineering and Process Applications,
Vol. 1, Elsevier, 93–101: each component's conductivity, density and specific heat as a
quadratic in T (°C, valid −40 to 150 °C); the mixture's density from the components' specific
volumes, its specific heat by mass fractions and its conductivity by volume fractions (the
parallel model). Below the initial freezing point T_f the ice fraction is
x_ice = (x_w − x_b)(1 − T_f/T) (Tchigeov's equation in the form of the ASHRAE Handbook —
Refrigeration, ch. 19), with bound water x_b = 0.4·x_protein (Schwartzberg 1976). All
coefficients written from memory of the equations as the ASHRAE Handbook reproduces them
(water's specific heat in two ranges, as there).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .enthalpy import EnthalpyTable
from .errors import ModelError
from .materials import Material

LATENT_HEAT = 333.6e3  # J/kg, ice melting at 0 °C
BOUND_WATER_PER_PROTEIN = 0.4  # Schwartzberg (1976), from memory

# component → (k, ρ, c) as coefficients (a0, a1, a2) of a0 + a1·T + a2·T², T in °C;
# k in W/(m·K), ρ in kg/m³, c in kJ/(kg·K) (Choi & Okos 1986, from memory)
COMPONENTS = {
    "water": (
        (5.7109e-1, 1.7625e-3, -6.7036e-6),
        (9.9718e2, 3.1439e-3, -3.7574e-3),
        (4.1289, -9.0864e-5, 5.4731e-6),  # 0 to 150 °C; below 0: SUPERCOOLED_WATER
    ),
    "ice": (
        (2.2196, -6.2489e-3, 1.0154e-4),
        (9.1689e2, -1.3071e-1, 0.0),
        (2.0623, 6.0769e-3, 0.0),
    ),
    "protein": (
        (1.7881e-1, 1.1958e-3, -2.7178e-6),
        (1.3299e3, -5.1840e-1, 0.0),
        (2.0082, 1.2089e-3, -1.3129e-6),
    ),
    "fat": (
        (1.8071e-1, -2.7604e-4, -1.7749e-7),
        (9.2559e2, -4.1757e-1, 0.0),
        (1.9842, 1.4733e-3, -4.8008e-6),
    ),
    "carbohydrate": (
        (2.0141e-1, 1.3874e-3, -4.3312e-6),
        (1.5991e3, -3.1046e-1, 0.0),
        (1.5488, 1.9625e-3, -5.9399e-6),
    ),
    "fibre": (
        (1.8331e-1, 1.2497e-3, -3.1683e-6),
        (1.3115e3, -3.6589e-1, 0.0),
        (1.8459, 1.8306e-3, -4.6509e-6),
    ),
    "ash": (
        (3.2962e-1, 1.4011e-3, -2.9069e-6),
        (2.4238e3, -2.8063e-1, 0.0),
        (1.0926, 1.8896e-3, -3.6817e-6),
    ),
}
SOLIDS = ("protein", "fat", "carbohydrate", "fibre", "ash")
# the unfrozen water's specific heat from −40 to 0 °C, kJ/(kg·K) (ASHRAE's form, from memory)
SUPERCOOLED_WATER = (4.1289, -5.3062e-3, 9.9516e-4)


def component(name: str, quantity: str, temperature):
    """k (W/(m·K)), ρ (kg/m³) or c (J/(kg·K)) of one component at ``temperature`` °C."""
    index = ("conductivity", "density", "specific_heat").index(quantity)
    t = np.asarray(temperature, dtype=float)
    a0, a1, a2 = COMPONENTS[name][index]
    value = a0 + a1 * t + a2 * t * t
    if name == "water" and quantity == "specific_heat":
        b0, b1, b2 = SUPERCOOLED_WATER
        value = np.where(t < 0, b0 + b1 * t + b2 * t * t, value)
    return value * 1e3 if quantity == "specific_heat" else value


def _integral(coefficients, low, high):
    """∫ (a0 + a1·T + a2·T²) dT from ``low`` to ``high`` °C, in J/kg (c in kJ/(kg·K))."""
    a0, a1, a2 = coefficients
    return 1e3 * (a0 * (high - low) + a1 / 2 * (high**2 - low**2) + a2 / 3 * (high**3 - low**3))


@dataclass(frozen=True)
class Composition:
    """A food's mass fractions (summing to 1) and its initial freezing point.

    Parameters
    ----------
    water, protein, fat, carbohydrate, fibre, ash : float
        Mass fractions, ≥ 0, summing to 1 within 0.5 %.
    freezing_point : float
        The initial freezing point T_f, °C (< 0).
    """

    water: float
    protein: float
    fat: float
    carbohydrate: float
    fibre: float
    ash: float
    freezing_point: float

    def __post_init__(self) -> None:
        fractions = [getattr(self, name) for name in ("water", *SOLIDS)]
        if any(not (math.isfinite(x) and x >= 0) for x in fractions):
            raise ModelError(f"mass fractions must be >= 0, got {fractions}", argument="water")
        if abs(sum(fractions) - 1) > 5e-3:
            raise ModelError(
                f"mass fractions must sum to 1, got {sum(fractions):.4g}", argument="water"
            )
        if not (math.isfinite(self.freezing_point) and -30 < self.freezing_point < 0):
            raise ModelError(
                f"freezing_point must lie between -30 and 0 degC, got {self.freezing_point!r}",
                argument="freezing_point",
            )

    def ice_fraction(self, temperature):
        """x_ice(T): 0 above T_f, (x_w − x_b)(1 − T_f/T) below."""
        t = np.minimum(np.asarray(temperature, dtype=float), self.freezing_point)
        freezable = self.water - BOUND_WATER_PER_PROTEIN * self.protein
        return np.where(
            np.asarray(temperature) < self.freezing_point,
            freezable * (1 - self.freezing_point / t),
            0.0,
        )

    def _fractions(self, temperature) -> dict:
        ice = self.ice_fraction(temperature)
        fractions = {name: getattr(self, name) for name in SOLIDS}
        return {**fractions, "water": self.water - ice, "ice": ice}

    def density(self, temperature):
        """ρ = 1/Σ(x_i/ρ_i), kg/m³."""
        fractions = self._fractions(temperature)
        return 1 / sum(x / component(n, "density", temperature) for n, x in fractions.items())

    def conductivity(self, temperature):
        """k = Σ v_i k_i with volume fractions v_i = (x_i/ρ_i)·ρ (parallel model), W/(m·K)."""
        fractions, rho = self._fractions(temperature), self.density(temperature)
        return sum(
            x
            / component(n, "density", temperature)
            * rho
            * component(n, "conductivity", temperature)
            for n, x in fractions.items()
        )

    def specific_enthalpy(self, temperature, reference: float = -40.0):
        """h(T) in J/kg from ``reference`` °C: each component's ∫c dT (water's from 0 °C plus
        the latent heat, ice's from 0 °C), weighted by its mass fraction at T."""
        t = np.asarray(temperature, dtype=float)
        fractions = self._fractions(t)
        total = 0.0
        for name, x in fractions.items():
            origin = 0.0 if name in ("water", "ice") else reference
            integral = _integral(COMPONENTS[name][2], origin, t)
            if name == "water":  # the supercooled branch below 0 °C, and the latent heat
                below = _integral(SUPERCOOLED_WATER, origin, t)
                integral = np.where(t < 0, below, integral) + LATENT_HEAT
            total = total + x * integral
        return total

    def material(self, name: str, source: str, low: float = -40.0, high: float = 90.0):
        """A :class:`Material` with the enthalpy (latent heat included) and k(T) as tables over
        ``low``–``high`` °C (denser next to the freezing point), ρ at the freezing point."""
        from .material_data.entries import table

        coarse = np.arange(low, high + 1e-9, 2.0)
        offsets = np.geomspace(0.01, 8.0, 40)  # the kink at T_f stays local in the interpolant
        fine = np.concatenate([self.freezing_point - offsets, self.freezing_point + offsets[:20]])
        temperatures = np.unique(np.concatenate([coarse, fine, [self.freezing_point]]))
        enthalpy = EnthalpyTable(
            tuple(temperatures.tolist()), tuple(self.specific_enthalpy(temperatures).tolist())
        )
        conductivity = table(temperatures, self.conductivity(temperatures))
        density = float(self.density(self.freezing_point))
        step = 1e-3  # K: the apparent specific heat dh/dT for reports (the run uses h itself)
        apparent = (
            self.specific_enthalpy(temperatures + step)
            - self.specific_enthalpy(temperatures - step)
        ) / (2 * step)
        return Material(
            conductivity,
            density,
            table(temperatures, apparent),
            name,
            source,
            specific_enthalpy=enthalpy,
        )
