"""Freezing with latent heat against the Neumann similarity solutions.

A slab of a water-like food (invented values) starts liquid and is frozen from one face held
below its freezing point; the far face is insulated and far enough away to act as infinity.
The references are computed here, with their own root-finding (scipy's ``brentq``):

- one phase (the liquid at its freezing point): Carslaw & Jaeger, *Conduction of Heat in
  Solids*, 2nd ed., §11.2 (from memory): T = T0 + (Tf − T0)·erf(x/2√(αt))/erf λ in the frozen
  layer, front X = 2λ√(αt), λ·exp(λ²)·erf λ = St/√π with St = c(Tf − T0)/L;
- two phases (the liquid above its freezing point, its own k and c): the same section's
  Neumann solution, λ from exp(−λ²)/erf λ − (k_l/k_s)·√(α_s/α_l)·(Ti − Tf)/(Tf − T0)·
  exp(−λ²α_s/α_l)/erfc(λ√(α_s/α_l)) = λ√π·L/(c_s(Tf − T0)) (from memory; the Stefan
  condition k_s∂T_s/∂x − k_l∂T_l/∂x = ρL·dX/dt differentiated from the two profiles).

The model releases the latent heat smoothly over a range centred on Tf (0.2 K for the one-phase
case, 0.5 K for the two-phase one); the front is where the field crosses Tf. Every run is at
the solver's default settings (adaptive Crank–Nicolson, default tolerances), on P1 triangles
of 1 mm, and its energy balance is checked. The smoothing makes the frozen layer's gradient
slightly low near the front, by about 0.4 × the half-range over the drive (measured 0.9 % of
the drive with 0.5 K, 0.3 % with 0.2 K, on one phase).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.special import erf, erfc

from fem import FixedTemperature, Insulated, Material, PropertyTable, ThermalModel, solve
from geometries import Rectangle

FREEZING, FACE = 0.0, -10.0  # degC
HALF_RANGE = 0.25  # K: the latent heat is released over [Tf - 0.25, Tf + 0.25] (two phases)
ONE_PHASE_HALF_RANGE = 0.1  # K: over [Tf - 0.1, Tf + 0.1]
LATENT = 3.3e5  # J/kg, water-like (invented demo value)
DENSITY = 1000.0  # kg/m^3
SOLID_K, SOLID_C = 2.2, 2000.0  # W/(m K), J/(kg K): frozen
LIQUID_K, LIQUID_C = 0.55, 4000.0  # unfrozen
STRIP, SIZE = 0.002, 0.001  # m: strip width, mesh size
TIMES = (1800.0, 3600.0)  # s


def strip_model(length: float, material: Material, initial: float, spacing: float = 0.0005):
    """A strip frozen from x = 0, insulated elsewhere, probes every ``spacing`` m along it."""
    section = Rectangle(
        length,
        STRIP,
        edge_names={"left": "cold", "right": "far", "top": "sides", "bottom": "sides"},
    ).mesh(SIZE)
    count = int(round(length / spacing))
    probes = {f"x{i}": (i * spacing, STRIP / 2) for i in range(count + 1)}
    return ThermalModel(
        section,
        material,
        {"cold": FixedTemperature(FACE), "far": Insulated(), "sides": Insulated()},
        initial_temperature=initial,
        probes=probes,
    )


def profile(solution, time: float):
    """Positions (m) and temperatures (degC) along the strip at ``time``."""
    row = int(np.argmin(np.abs(solution.times - time)))
    assert solution.times[row] == pytest.approx(time)
    names = list(solution.probes)
    x = np.array([float(name[1:]) for name in names]) * 0.0005
    return x, np.array([solution.probes[name][row] for name in names])


def front(x: np.ndarray, temperature: np.ndarray) -> float:
    """Where the profile first crosses the freezing point (linear between probes), m."""
    i = int(np.argmax(temperature >= FREEZING))
    t0, t1 = temperature[i - 1], temperature[i]
    return float(x[i - 1] + (FREEZING - t0) / (t1 - t0) * (x[i] - x[i - 1]))


def one_phase_lambda(stefan: float) -> float:
    return brentq(
        lambda z: z * math.exp(z * z) * math.erf(z) - stefan / math.sqrt(math.pi), 1e-6, 3
    )


def two_phase_lambda(initial: float) -> float:
    a_s = SOLID_K / (DENSITY * SOLID_C)
    a_l = LIQUID_K / (DENSITY * LIQUID_C)
    nu = math.sqrt(a_s / a_l)
    superheat = (LIQUID_K / SOLID_K) * nu * (initial - FREEZING) / (FREEZING - FACE)
    right = math.sqrt(math.pi) * LATENT / (SOLID_C * (FREEZING - FACE))

    def balance(z):
        return (
            math.exp(-z * z) / math.erf(z)
            - superheat * math.exp(-z * z * nu * nu) / math.erfc(z * nu)
            - z * right
        )

    return brentq(balance, 1e-6, 3)


@pytest.fixture(scope="module")
def one_phase():
    material = Material(
        SOLID_K,
        DENSITY,
        SOLID_C,
        latent_heat=LATENT,
        solidus=FREEZING - ONE_PHASE_HALF_RANGE,
        liquidus=FREEZING + ONE_PHASE_HALF_RANGE,
    )
    # The liquid starts at the top of the range: 0.1 K of superheat, whose sensible heat is
    # c·0.1/L = 0.06 % of the latent heat.
    initial = FREEZING + ONE_PHASE_HALF_RANGE
    return solve(strip_model(0.06, material, initial), TIMES[-1], output_times=TIMES)


def test_one_phase_front_and_temperatures(one_phase):
    alpha = SOLID_K / (DENSITY * SOLID_C)
    lam = one_phase_lambda(SOLID_C * (FREEZING - FACE) / LATENT)
    for time in TIMES:
        x, temperature = profile(one_phase, time)
        exact_front = 2 * lam * math.sqrt(alpha * time)
        # Required 1 %; measured 0.34 % at 1800 s and 0.79 % at 3600 s (the front crosses
        # elements of 1 mm, 1/15-1/20 of its depth, and the latent heat is smoothed).
        assert front(x, temperature) == pytest.approx(exact_front, rel=0.01)
        frozen = x < 0.9 * exact_front
        exact = FACE + (FREEZING - FACE) * erf(x[frozen] / (2 * math.sqrt(alpha * time))) / erf(
            lam
        )
        # Within 1 % of the 10 K drive in the frozen layer; measured 0.31 % and 0.23 %.
        assert np.abs(temperature[frozen] - exact).max() < 0.01 * (FREEZING - FACE)
    assert one_phase.checks.energy_balance_error <= 1e-6
    assert one_phase.stats.newton_iterations > one_phase.stats.steps  # it was nonlinear


@pytest.fixture(scope="module")
def two_phase():
    # Frozen and unfrozen conductivity and specific heat as tables of temperature, switching
    # over the freezing range.
    edges = (-50.0, FREEZING - HALF_RANGE, FREEZING + HALF_RANGE, 50.0)
    material = Material(
        PropertyTable(edges, (SOLID_K, SOLID_K, LIQUID_K, LIQUID_K)),
        DENSITY,
        PropertyTable(edges, (SOLID_C, SOLID_C, LIQUID_C, LIQUID_C)),
        latent_heat=LATENT,
        solidus=FREEZING - HALF_RANGE,
        liquidus=FREEZING + HALF_RANGE,
    )
    return solve(strip_model(0.08, material, 5.0), TIMES[-1], output_times=TIMES)


def test_two_phase_front_and_temperatures(two_phase):
    a_s = SOLID_K / (DENSITY * SOLID_C)
    a_l = LIQUID_K / (DENSITY * LIQUID_C)
    lam = two_phase_lambda(5.0)
    for time in TIMES:
        x, temperature = profile(two_phase, time)
        exact_front = 2 * lam * math.sqrt(a_s * time)
        # Required 1 %; measured 0.23 % and 0.09 %.
        assert front(x, temperature) == pytest.approx(exact_front, rel=0.01)
        frozen = x < 0.9 * exact_front
        exact = FACE + (FREEZING - FACE) * erf(x[frozen] / (2 * math.sqrt(a_s * time))) / erf(lam)
        # Measured 0.06 % and 0.01 % of the 10 K drive.
        assert np.abs(temperature[frozen] - exact).max() < 0.01 * (FREEZING - FACE)
        liquid = x > 1.1 * exact_front
        exact_liquid = 5.0 - (5.0 - FREEZING) * erfc(
            x[liquid] / (2 * math.sqrt(a_l * time))
        ) / erfc(lam * math.sqrt(a_s / a_l))
        # The liquid's 5 K drive: within 1 % of the whole 15 K span; measured 0.68 %, 0.67 %
        # (the liquid's conductivity switches over the freezing range, not at Tf).
        assert np.abs(temperature[liquid] - exact_liquid).max() < 0.01 * (5.0 - FACE)
    assert two_phase.checks.energy_balance_error <= 1e-6
