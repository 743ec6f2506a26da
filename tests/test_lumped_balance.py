"""The lumped model with a coefficient that follows the surface temperature and with latent
heat, against one-temperature references computed here.

- h(T): the balance C·dT/dt = h(T)·A·(T∞ − T) separates, t(T) = (C/A)·∫_T^{T0} dT' /
  (h(T')·(T' − T∞)), integrated by ``scipy.integrate.quad`` with the table's corners as break
  points. The table jumps tenfold over 50 K, as a vapour film collapsing onto nucleate boiling
  would (invented numbers).
- Latent heat: with constant h and a latent heat spread evenly between a solidus and a
  liquidus, the enthalpy is piecewise linear, so T(t) is a chain of exponentials,
  t = Σ τ_i·ln((T_a − T∞)/(T_b − T∞)) with τ_i = C_i/(h·A) and C_i = ρ·(c + L/ΔT_f)·V in the
  freezing range (the classical lumped solution of Incropera et al., *Fundamentals of Heat and
  Mass Transfer*, 6th ed., eq. 5.6, from memory, applied per stretch).

The kind and the material are defined in this file only: the lumped model reaches them through
``Condition.lumped_heat`` and ``Material.enthalpy`` alone.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pytest
from scipy.integrate import quad

from advisor import LumpedModel, biot_numbers
from fem import Insulated, Material, ThermalModel
from fem.conditions import Condition, Linearised
from geometries import Rectangle

HALF, WIDTH = 0.01, 0.004  # m: one cooled face, so V/A_s = HALF


@dataclass(frozen=True)
class TableCoefficient(Condition):
    """Convection with h a piecewise-linear table of the surface temperature."""

    name = "table_coefficient_test"
    label = "convection, h of surface temperature"
    linear = False
    exchanges = True

    temperatures: tuple[float, ...]
    coefficients: tuple[float, ...]
    ambient: float

    def coefficient(self, temperature):
        return np.interp(temperature, self.temperatures, self.coefficients)

    def driving_temperatures(self, end_time):
        return (self.ambient,)

    def linearised(self, temperature, time):
        return Linearised(float(self.coefficient(temperature)), self.ambient)


@dataclass(frozen=True)
class FreezingMaterial(Material):
    """Constant c and k with latent heat released evenly between solidus and liquidus."""

    latent_heat: float = 0.0
    solidus: float = 0.0
    liquidus: float = 0.0

    def heat_capacity_at(self, temperature):
        t = np.asarray(temperature, dtype=float)
        inside = (t > self.solidus) & (t < self.liquidus)
        width = self.liquidus - self.solidus
        return self.density * (self.specific_heat + np.where(inside, self.latent_heat / width, 0))

    def enthalpy(self, temperature, reference):
        def total(t):
            t = np.asarray(t, dtype=float)
            fraction = np.clip((t - self.solidus) / (self.liquidus - self.solidus), 0, 1)
            return self.density * (self.specific_heat * t + self.latent_heat * fraction)

        return total(temperature) - total(reference)


def strip(material: Material, condition: Condition, initial: float) -> ThermalModel:
    section = Rectangle(
        WIDTH, HALF, edge_names={"bottom": "sides", "left": "sides", "right": "sides"}
    ).mesh(0.002)
    return ThermalModel(
        section, material, {"sides": Insulated(), "top": condition}, initial_temperature=initial
    )


QUENCH = TableCoefficient(
    (60.0, 300.0, 550.0, 600.0, 900.0), (800.0, 2500.0, 3000.0, 300.0, 250.0), 60.0
)
STEEL = Material(40.0, 7850.0, 500.0)


def quench_time(temperature: float) -> float:
    """t(T) for the lumped part under QUENCH, by quadrature (per metre: C/A = ρ·c·HALF)."""
    per_area = STEEL.density * STEEL.specific_heat * HALF
    corners = [t for t in QUENCH.temperatures if temperature < t < 850.0]
    value, error = quad(
        lambda t: 1.0 / (np.interp(t, QUENCH.temperatures, QUENCH.coefficients) * (t - 60.0)),
        temperature,
        850.0,
        points=corners,
        epsabs=0,
        epsrel=1e-12,
        limit=200,
    )
    assert error < 1e-10 * value
    return per_area * value


def test_lumped_model_follows_a_coefficient_of_surface_temperature():
    """Tolerances: LSODA at rtol 1e-9 on the balance and the tabulated inverse of the
    enthalpy within 1e-6 K; the arrival is an event of the integration. Measured: times within
    6e-10, temperatures within 1.6e-6 K; allowed 1e-7 and 1e-5 K."""
    lumped = LumpedModel.of(strip(STEEL, QUENCH, 850.0))
    assert not lumped.closed_form
    for target in (700.0, 580.0, 400.0, 150.0):
        assert lumped.time_to(target, horizon=400.0) == pytest.approx(
            quench_time(target), rel=1e-7
        )
    times = np.array([quench_time(t) for t in (800.0, 600.0, 575.0, 500.0, 200.0)])
    found = lumped.temperature(times)
    assert found == pytest.approx([800.0, 600.0, 575.0, 500.0, 200.0], abs=1e-5)


def test_biot_range_covers_the_coefficients_peak():
    """The Biot number's range over the run must reach the table's peak, h = 3000 W/(m²·K)
    at 550 °C, even though the run's extremes (60 and 850 °C) sit on low coefficients."""
    model = strip(STEEL, QUENCH, 850.0)
    numbers = {b.name: b for b in biot_numbers(model, temperature_range=(60.0, 850.0))}
    slab = numbers["volume_to_surface"]
    assert slab.high == pytest.approx(3000.0 * HALF / 40.0, rel=1e-3)
    assert slab.value == pytest.approx(
        float(np.interp(850.0, QUENCH.temperatures, QUENCH.coefficients)) * HALF / 40.0
    )


WATERY = {"conductivity": 1.5, "density": 1000.0, "specific_heat": 3000.0}
BLAST = TableCoefficient((-200.0, 200.0), (25.0, 25.0), -30.0)  # constant h, as a table


def chain_time(target, start, solidus, liquidus, latent, h=25.0, ambient=-30.0):
    """Time from ``start`` to ``target`` °C: one exponential per stretch of constant C."""
    c, rho = WATERY["specific_heat"], WATERY["density"]
    stretches = [(liquidus, start, c), (solidus, liquidus, c + latent / (liquidus - solidus))]
    stretches.append((-1e9, solidus, c))
    total = 0.0
    for low, high, capacity in stretches:
        a, b = min(start, high), max(target, low)
        if a > b:
            total += rho * capacity * HALF / h * math.log((a - ambient) / (b - ambient))
    return total


@pytest.mark.parametrize("freezing_range", [2.0, 0.01])
def test_lumped_enthalpy_balance_crosses_the_latent_heat(freezing_range):
    """A 0.01 K freezing range is a c(T) peak of 2.5e10 J/(m³·K): dividing by it would stall a
    step-size controller; the enthalpy balance crosses it as heat. Tolerances as above (the
    tabulated enthalpy is refined at the solidus and liquidus until its inverse is within
    1e-6 K): measured times within 2.1e-9, temperatures within 2.3e-7 K; allowed 1e-7 and
    1e-5 K."""
    solidus = -1.0 - freezing_range
    product = FreezingMaterial(
        **WATERY, latent_heat=250e3, solidus=solidus, liquidus=-1.0, name="product"
    )
    lumped = LumpedModel.of(strip(product, BLAST, 10.0))
    assert not lumped.closed_form  # constant c, yet the enthalpy is not ρ·c·ΔT
    for target in (0.0, -1.0 - freezing_range / 2, -5.0, -20.0):
        expected = chain_time(target, 10.0, solidus, -1.0, 250e3)
        assert lumped.time_to(target, horizon=2e5) == pytest.approx(expected, rel=1e-7)
    half_frozen = chain_time(-1.0 - freezing_range / 2, 10.0, solidus, -1.0, 250e3)
    times = np.array([200.0, half_frozen, 0.9 * chain_time(solidus, 10.0, solidus, -1.0, 250e3)])
    found = lumped.temperature(times)
    assert found[0] == pytest.approx(
        -30.0 + 40.0 * math.exp(-200.0 * 25.0 / (3e6 * HALF)), abs=1e-5
    )
    assert found[1] == pytest.approx(-1.0 - freezing_range / 2, abs=1e-5)
    assert solidus - 1e-5 <= found[2] <= -1.0 + 1e-5
    # the stored heat includes the latent heat: ρ·(c·ΔT + L) per unit volume after freezing
    stored = lumped.stored_energy(np.array([-20.0]))[0]
    volume = HALF * WIDTH
    assert stored == pytest.approx(-1000.0 * (3000.0 * 30.0 + 250e3) * volume, rel=1e-9)
