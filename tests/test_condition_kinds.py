"""A boundary-condition kind defined here, in the test alone, runs through the whole library.

The kind is a convection whose coefficient depends on the surface temperature,
q = h(T)·(T∞ − T) with h(T) = h0 + s·(T − T∞): nonlinear, with the tangent
h(T) + h'(T)·(T − T∞). Nothing outside this file knows it; the solver, the lumped model, the
Biot numbers, the slowest mode, the assessment and the summary take it through the base class
alone.

References, computed here and not by the code under test:
- the field: a 1-D method-of-lines solution of the same slab (second-order finite differences
  on 400 intervals, integrated by scipy's ``solve_ivp`` with BDF);
- the lumped model: the one-temperature balance ρ·c·L·dT/dt = h(T)·(T∞ − T), integrated by
  ``solve_ivp``;
- the Biot number: h(T0)·L/k;
- the slowest mode: the plane wall's first eigenvalue ζ₁²·α/L² with ζ₁·tan ζ₁ = Bi (Incropera
  et al., *Fundamentals of Heat and Mass Transfer*, 6th ed., §5.5.1, eq. 5.39c — from memory),
  ζ₁ found here by ``brentq``, Bi on the coefficient at the initial temperature.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass

import numpy as np
import pytest
import scipy.sparse as sp
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from advisor import LumpedModel, assess, biot_numbers
from advisor.analysis.modes import slowest_mode
from advisor.writers.report_content import condition_text
from advisor.writers.summary_json import summary
from fem import Insulated, Material, ThermalModel, solve
from fem.conditions import Condition, Linearised
from geometries import Rectangle


@dataclass(frozen=True)
class SurfaceConvection(Condition):
    """Convection with h(T) = h0 + slope·(T − T∞), W/(m²·K), T the surface temperature."""

    name = "surface_convection"
    label = "convection, h of surface temperature"
    linear = False
    exchanges = True
    units = {"base_coefficient": "_W_per_m2_K", "slope": "_W_per_m2_K2", "ambient": "_degC"}

    base_coefficient: float
    slope: float
    ambient: float

    def coefficient(self, temperature):
        return self.base_coefficient + self.slope * (temperature - self.ambient)

    def driving_temperatures(self, end_time):
        return (self.ambient,)

    def outflow(self, edge, temperature, time):
        t = edge.interpolate(temperature)
        return edge.integrate(self.coefficient(t) * (t - self.ambient))

    def outflow_tangent(self, edge, temperature, time):
        t = edge.interpolate(temperature)
        return edge.exchange(self.coefficient(t) + self.slope * (t - self.ambient))

    def linearised(self, temperature, time):
        return Linearised(float(self.coefficient(temperature)), self.ambient)

    def describe(self, end_time):
        return f"convection, h = {self.base_coefficient:g} + {self.slope:g}·(T − T∞) W/(m²·K)"


STEEL = Material(45.0, 7850.0, 475.0)  # invented, steel-like
HALF, WIDTH, SIZE = 0.02, 0.004, 0.001  # m: slab half-thickness, strip width, mesh size
HOT, AMBIENT = 400.0, 20.0  # degC
KIND = SurfaceConvection(150.0, 0.8, AMBIENT)  # h from 454 down to 150 W/(m^2 K)
END = 600.0  # s, about 2.4 lumped time constants
TIMES = np.array([30.0, 120.0, 300.0, 600.0])


def slab_model() -> ThermalModel:
    """Strip of half-thickness L (y): symmetry at y = 0, the new kind at y = L."""
    section = Rectangle(
        WIDTH,
        HALF,
        edge_names={"bottom": "symmetry", "left": "ends", "right": "ends", "top": "cooled"},
    ).mesh(SIZE)
    return ThermalModel(
        section,
        STEEL,
        {"symmetry": Insulated("symmetry"), "ends": Insulated(), "cooled": KIND},
        initial_temperature=HOT,
        probes={"centre": (WIDTH / 2, 0.0), "surface": (WIDTH / 2, HALF)},
    )


def method_of_lines(times: np.ndarray, intervals: int = 400):
    """Centre, surface and mean temperature of the slab at ``times`` (independent reference)."""
    k, rho_c = STEEL.conductivity, STEEL.density * STEEL.specific_heat
    dx = HALF / intervals
    capacity = np.full(intervals + 1, rho_c * dx)
    capacity[[0, -1]] /= 2  # half cells at the symmetry line and the surface

    def rate(_, u):
        flow = np.zeros_like(u)
        conducted = k * np.diff(u) / dx  # into node i from node i + 1
        flow[:-1] += conducted
        flow[1:] -= conducted
        flow[-1] += KIND.coefficient(u[-1]) * (AMBIENT - u[-1])
        return flow / capacity

    sparsity = sp.diags([1.0, 1.0, 1.0], [-1, 0, 1], shape=(intervals + 1,) * 2)
    result = solve_ivp(
        rate,
        (0.0, times[-1]),
        np.full(intervals + 1, HOT),
        method="BDF",
        t_eval=times,
        rtol=1e-9,
        atol=1e-9,
        jac_sparsity=sparsity,
    )
    assert result.success
    u = result.y
    mean = (capacity @ u) / capacity.sum()
    return u[0], u[-1], mean


@pytest.fixture(scope="module")
def solution():
    return solve(slab_model(), END, output_times=TIMES, tolerance=1e-3)


def test_new_kind_field_matches_method_of_lines(solution):
    centre, surface, mean = method_of_lines(TIMES)
    rows = np.searchsorted(solution.times, TIMES)
    assert np.allclose(solution.times[rows], TIMES)
    # Adaptive Crank-Nicolson at 1e-3 K local error (about 180 steps) on P1, L/20: the time
    # error dominates (0.10 K at the default tolerance, 0.034 K at 1e-2 K); the reference on
    # L/400 at rtol 1e-9 is far finer. Measured 0.011 K at most; required 0.05 K.
    assert np.abs(solution.probes["centre"][rows] - centre).max() < 0.05
    assert np.abs(solution.probes["surface"][rows] - surface).max() < 0.05
    assert np.abs(solution.mean[rows] - mean).max() < 0.05
    assert solution.stats.newton_iterations > solution.stats.steps  # it is nonlinear


def test_new_kind_heat_flow_is_its_law(solution):
    # The recorded heat flow on the cooled face is the kind's law h(T)(T∞ − T) over the face
    # (uniform in x in this 1-D problem) at the surface probe's temperature; measured 1e-6
    # relative; required 1e-3.
    surface = solution.probes["surface"][-1]
    expected = KIND.coefficient(surface) * (AMBIENT - surface) * WIDTH
    assert solution.heat_flow["cooled"][-1] == pytest.approx(expected, rel=1e-3)


def test_new_kind_in_lumped_model_biot_and_slowest_mode():
    model = slab_model()
    k, rho_c = STEEL.conductivity, STEEL.density * STEEL.specific_heat

    # Lumped model: ρ·c·L·dT/dt = h(T)·(T∞ − T), integrated here.
    lumped = LumpedModel.of(model)
    assert not lumped.closed_form  # nonlinear: integrated in time
    reference = solve_ivp(
        lambda _, y: [KIND.coefficient(y[0]) * (AMBIENT - y[0]) / (rho_c * HALF)],
        (0.0, END),
        [HOT],
        t_eval=TIMES,
        rtol=1e-10,
        atol=1e-10,
    )
    # Both integrated at tight tolerances; measured 8e-7 K, required 1e-4 K.
    assert lumped.temperature(TIMES) == pytest.approx(reference.y[0], abs=1e-4)

    # Biot number on V/A_s = L with the coefficient at the initial temperature.
    h0 = KIND.coefficient(HOT)
    by_name = {b.name: b for b in biot_numbers(model)}
    assert by_name["volume_to_surface"].value == pytest.approx(h0 * HALF / k, rel=1e-9)

    # Slowest mode: ζ tan ζ = Bi, λ = ζ² α / L² (Incropera §5.5.1, from memory).
    biot = h0 * HALF / k
    zeta = brentq(lambda z: z * math.tan(z) - biot, 1e-9, math.pi / 2 - 1e-9)
    expected = zeta**2 * k / rho_c / HALF**2
    # P1 eigenvalue error ~ (ζ Δy / L)^2 / 12 = 4e-5 relative (measured 3e-5); required 1e-3.
    assert slowest_mode(model).rate == pytest.approx(expected, rel=1e-3)


def test_new_kind_is_assessed_and_described(solution):
    assessment = assess(solution)
    assert assessment.verdict.rating in ("adequate", "marginal", "inadequate")
    assert assessment.effective_coefficient < KIND.coefficient(HOT)
    text = condition_text(KIND, END)
    assert text.startswith("convection, h = 150 + 0.8")
    boundaries = json.loads(json.dumps(summary(assessment, [])))["inputs"]["boundaries"]
    assert boundaries["cooled"] == [
        {
            "kind": "convection, h of surface temperature",
            "base_coefficient_W_per_m2_K": 150.0,
            "slope_W_per_m2_K2": 0.8,
            "ambient_degC": 20.0,
        }
    ]
