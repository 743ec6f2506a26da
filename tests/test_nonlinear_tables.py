"""The integrals of property tables and the enthalpy with latent heat, which a freezing
residual evaluates at every quadrature point, against quadratures computed here.

- ∫ k dT of a clamped piecewise-linear table (the Kirchhoff transform, the sensible enthalpy)
  against scipy's adaptive quadrature of ``np.interp`` with the table's points as break
  points: the integrand is linear between them, so Gauss–Kronrod is exact to round-off
  (tolerance 1e-9 of the integral's scale). Three tables take the three paths of
  ``fem.table_integrals``: four points (a sum of ramps), twelve points (a binary search), and four
  points with one steep segment among long ones (the search again, since the ramps would
  cancel); temperatures inside, at the points and beyond both ends.
- The enthalpy with latent heat L released by S(T) = 3x² − 2x³ over the freezing range
  (``fem.enthalpy``): its difference between two temperatures against the quadrature of the
  volumetric heat capacity ρ·(c(T) + L·S'(T)), S' = 6x(1 − x)/ΔT written out here; and the
  whole latent heat ρ·L released across the range, as the definition of S requires. The same
  for the evaluator a residual uses at the quadrature points (``fem.stored_heat``), with c a
  table and a constant, and with an enthalpy table (handed to the material).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import quad

from fem import EnthalpyTable, Material, PropertyTable
from fem.stored_heat import PointEnthalpy

FOUR = PropertyTable((-60.0, -1.5, -0.5, 60.0), (1.6, 1.6, 0.5, 0.5))
TWELVE = PropertyTable(
    tuple(np.linspace(20.0, 1200.0, 12).tolist()),
    tuple((52.0 - 0.02 * np.linspace(20.0, 1200.0, 12) + 3.0 * np.sin(np.arange(12))).tolist()),
)
STEEP = PropertyTable((0.0, 1000.0, 1000.1, 2000.0), (1.0, 1.0, 400.0, 400.0))
FOOD_HEAT = PropertyTable((-60.0, -1.5, -0.5, 60.0), (1900.0, 1900.0, 3700.0, 3700.0))
TEMPERATURES = np.array([-80.0, -60.0, -10.0, -1.5, -1.2, -0.5, 0.0, 20.0, 60.0, 75.0])


def _quadrature(table: PropertyTable, low: float, high: float) -> float:
    """∫ from low to high of the table, held at its end values beyond it, by scipy."""
    points = [t for t in table.temperatures if min(low, high) < t < max(low, high)]

    def value(t: float) -> float:
        return float(np.interp(t, table.temperatures, table.values))

    result, _ = quad(value, low, high, points=points or None, limit=200, epsabs=0.0)
    return result


@pytest.mark.parametrize(
    ("table", "shift", "reference"),
    [(FOUR, 0.0, 0.0), (TWELVE, 600.0, 20.0), (STEEP, 1000.0, 500.0)],
    ids=["four points", "twelve points", "steep segment"],
)
def test_table_integral_matches_quadrature(table, shift, reference):
    scale = max(table.values) * (table.temperatures[-1] - table.temperatures[0])
    temperatures = np.concatenate([TEMPERATURES * 10.0 + shift, TEMPERATURES + shift])
    with np.errstate(all="raise"):
        computed = table.integral(temperatures, reference)
    expected = [_quadrature(table, reference, t) for t in temperatures]
    assert np.allclose(computed, expected, rtol=0.0, atol=1e-9 * scale)
    for t, e in zip(temperatures[:3], expected[:3], strict=True):  # one temperature at a time
        assert float(table.integral(t, reference)) == pytest.approx(e, abs=1e-9 * scale)


@pytest.mark.parametrize("heat", [FOOD_HEAT, 2800.0], ids=["c table", "c constant"])
def test_enthalpy_with_latent_heat_matches_quadrature(heat):
    solidus, liquidus, latent, density = -1.5, -0.5, 2.8e5, 1050.0
    material = Material(
        FOUR, density, heat, latent_heat=latent, solidus=solidus, liquidus=liquidus
    )

    def capacity(t: float) -> float:
        x = min(max((t - solidus) / (liquidus - solidus), 0.0), 1.0)
        release = 6.0 * x * (1.0 - x) / (liquidus - solidus)
        c = np.interp(t, FOOD_HEAT.temperatures, FOOD_HEAT.values) if heat == FOOD_HEAT else heat
        return density * (float(c) + latent * release)

    reference = -20.0
    expected = [
        quad(capacity, reference, t, points=[solidus, liquidus], limit=200, epsabs=0.0)[0]
        for t in TEMPERATURES
    ]
    scale = density * (latent + 3700.0 * 100.0)
    points = PointEnthalpy(material, reference, TEMPERATURES.size)
    assert points.fast
    for computed in (material.enthalpy(TEMPERATURES, reference), points(TEMPERATURES.copy())):
        assert np.allclose(computed, expected, rtol=0.0, atol=1e-9 * scale)


def test_the_whole_latent_heat_is_released_across_the_range():
    solidus, liquidus, latent, density = -1.5, -0.5, 2.8e5, 1050.0
    material = Material(
        FOUR, density, FOOD_HEAT, latent_heat=latent, solidus=solidus, liquidus=liquidus
    )
    across = material.enthalpy(np.array([liquidus]), solidus)[0]
    sensible = density * _quadrature(FOOD_HEAT, solidus, liquidus)
    assert across - sensible == pytest.approx(density * latent, rel=1e-12)


def test_point_enthalpy_of_an_enthalpy_table_matches_its_values():
    table = EnthalpyTable((-10.0, -1.0, 0.0, 10.0), (0.0, 1.9e4, 3.5e5, 3.9e5))  # J/kg
    material = Material.from_enthalpy(0.5, 1000.0, table)
    points = PointEnthalpy(material, -10.0, 4)
    assert not points.fast
    computed = points(np.array(table.temperatures))
    assert np.allclose(computed, 1000.0 * np.array(table.values), rtol=1e-12, atol=1e-3)
