"""k(T) and c(T) together, without latent heat: Newton's iterations on the symmetric chord of
``fem.tangents`` factorised by Cholesky, against an exact solution computed here.

With k = k0·(1 + βT) and c = c0·(1 + βT) the diffusivity k/(ρc) = k0/(ρ·c0) = α is constant,
and the Kirchhoff transform Φ(T) = ∫₀ᵀ k dT = k0·(T + βT²/2) obeys the linear heat equation
∂Φ/∂t = α·∂²Φ/∂x², since ρc·∂T/∂t = (ρc0/k0)·∂Φ/∂t (Carslaw & Jaeger, *Conduction of Heat
in Solids*, 2nd ed., §1.7, from memory). A slab 0 ≤ x ≤ L insulated at x = 0, held at T_s at
x = L from t = 0, initially at T_i, then has

    Φ − Φ_s = (Φ_i − Φ_s)·Σ_n 4(−1)ⁿ/((2n+1)π)·cos(λ_n x)·exp(−λ_n² α t),
    λ_n = (2n+1)π/(2L)

(Carslaw & Jaeger §3.3, from memory), and T = (√(1 + 2βΦ/k0) − 1)/β. Both tables are two
points, so exactly linear over the run's range.

Tolerance: 0.5 % of the 300 K span. P1 elements of 1 mm on the 20 mm slab and Crank–Nicolson
steps of 0.5 s (Fo 0.007 a step) are second order; the interpolation error l²·max|T''|/8 at
the surface's steepest profile after the first step is ~1 K, and it decays with the profile,
to about 0.1 K at t = 20 s (measured 0.12 K, and 0.88 K at 2 s). The energy balance is held
to 1e-6 of the exchanged energy and the chord is kept: at most 2 factorisations (the
start-up's half steps and the run's), all by Cholesky.
"""

from __future__ import annotations

import math
import warnings

import numpy as np

import fem.linalg
from fem import FixedTemperature, Insulated, Material, PropertyTable, ThermalModel, solve
from fem.materials import PropertyRangeWarning
from geometries import Rectangle

LENGTH, HEIGHT = 0.020, 0.004  # m
K0, C0, BETA, DENSITY = 20.0, 460.0, 2.0e-3, 7800.0  # W/(m K), J/(kg K), 1/K, kg/m^3 (invented)
INITIAL, SURFACE = 400.0, 100.0  # degC


def _exact(x: np.ndarray, time: float, terms: int = 200) -> np.ndarray:
    """T at distance ``x`` m from the insulated face at ``time`` s (the series above)."""
    alpha = K0 / (DENSITY * C0)

    def kirchhoff(t: float) -> float:
        return K0 * (t + BETA * t**2 / 2)

    n = np.arange(terms)[:, None]
    rate = (2 * n + 1) * math.pi / (2 * LENGTH)
    series = (4 * (-1.0) ** n / ((2 * n + 1) * math.pi) * np.cos(rate * x[None, :])) * np.exp(
        -(rate**2) * alpha * time
    )
    phi = kirchhoff(SURFACE) + (kirchhoff(INITIAL) - kirchhoff(SURFACE)) * series.sum(axis=0)
    return (np.sqrt(1 + 2 * BETA * phi / K0) - 1) / BETA


def test_conductivity_and_heat_capacity_tables_follow_the_kirchhoff_series(monkeypatch):
    made = []

    class Counted(fem.linalg.CholeskyFactor):
        def __init__(self, matrix):
            super().__init__(matrix)
            made.append(matrix.shape)

    monkeypatch.setattr(fem.linalg, "CholeskyFactor", Counted)
    top = 500.0
    material = Material(
        PropertyTable((0.0, top), (K0, K0 * (1 + BETA * top))),
        DENSITY,
        PropertyTable((0.0, top), (C0, C0 * (1 + BETA * top))),
    )
    section = Rectangle(
        LENGTH,
        HEIGHT,
        edge_names={"left": "sides", "right": "held", "top": "sides", "bottom": "sides"},
    ).mesh(0.001)
    model = ThermalModel(
        section,
        material,
        boundaries={"held": FixedTemperature(SURFACE), "sides": Insulated()},
        initial_temperature=INITIAL,
    )
    end = 20.0
    with warnings.catch_warnings():
        warnings.simplefilter("error", PropertyRangeWarning)  # the tables cover the run
        solution = solve(model, end, time_step=0.5, output_times=[end])
    x = section.vertices[0]
    error = np.abs(solution.fields[-1] - _exact(x, end)).max()
    assert error <= 0.005 * (INITIAL - SURFACE), error
    assert solution.checks.energy_balance_error <= 1e-6
    stats = solution.stats
    assert stats.newton_iterations > stats.steps  # it is nonlinear
    assert 1 <= stats.factorisations <= 2 and len(made) == stats.factorisations
