"""The field's freezing time beside Plank's, and a quench on a built boiling curve, through
:func:`advisor.assess` — for solver versions with latent heat in :class:`fem.Material` and a
coefficient that follows the surface temperature (skipped without them, saying so).

Plank's equation omits the sensible heat of the frozen layer (Plank 1913; the quasi-steady
limit of the one-phase Stefan problem, Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd
ed., §11.2, from memory), so it must be short of the field by a fraction of the Stefan number
Ste = c_s·(T_f − T_a)/L: Ste/3 in the limit of a fixed face (see test_freezing_estimates.py),
at most Ste if the whole frozen layer were cooled to the medium. We require 0 < bias < Ste/2.
"""

from __future__ import annotations

import numpy as np
import pytest

from advisor import assess
from advisor.analysis.freezing import FreezingProduct, plank_time
from fem import Convection, Insulated, Material, ThermalModel, solve
from geometries import Rectangle

try:
    Material(1.0, 1000.0, 1000.0, latent_heat=1e5, solidus=-1.0, liquidus=0.0)
except TypeError:
    pytest.skip("this solver version has no latent heat in fem.Material", allow_module_level=True)

FREEZING, HALF_RANGE, MEDIUM = 0.0, 0.25, -10.0  # degC, K, degC
LATENT, SOLID_C, SOLID_K = 3.3e5, 2000.0, 2.2  # invented, water-like
THICKNESS, H = 0.02, 20.0  # m (one cooled face), W/(m² K): Bi = 0.18


def test_field_freezing_time_is_plank_plus_the_frozen_layers_sensible_heat():
    material = Material(
        SOLID_K, 1000.0, SOLID_C, latent_heat=LATENT,
        solidus=FREEZING - HALF_RANGE, liquidus=FREEZING + HALF_RANGE,
    )  # fmt: skip
    section = Rectangle(
        THICKNESS, 0.002, edge_names={"left": "cold", "right": "far", "top": "s", "bottom": "s"}
    ).mesh(0.001)
    model = ThermalModel(
        section,
        material,
        {"cold": Convection(H, MEDIUM), "far": Insulated(), "s": Insulated()},
        initial_temperature=FREEZING + HALF_RANGE,
    )
    solution = solve(model, end_time=60000.0)
    assert solution.checks.energy_balance_error < 1e-6
    found = assess(solution, freeze_to=FREEZING - HALF_RANGE - 0.5).freezing
    # one cooled face: d is the whole thickness
    # the product as the material gives it: freezing point at the liquidus
    product = FreezingProduct(1000.0, LATENT, FREEZING + HALF_RANGE, SOLID_K, SOLID_C, SOLID_C)
    plank = plank_time(product, THICKNESS, H, MEDIUM, "slab")
    assert found.plank == pytest.approx(plank, rel=1e-12)
    assert found.half_thickness == pytest.approx(THICKNESS)
    stefan = SOLID_C * (FREEZING - MEDIUM) / LATENT
    bias = found.field_time / plank - 1
    assert 0 < bias < stefan / 2  # measured 0.020 with Ste = 0.061
    assert "non-conservative" in found.wording


def test_quench_on_a_built_boiling_curve_reports_rates():
    pytest.importorskip("ht", reason="the boiling-curve builder needs the optional 'ht'")
    conditions = pytest.importorskip("fem.conditions")
    if not hasattr(conditions, "SurfaceTemperatureConvection"):
        pytest.skip("this solver version has no coefficient of surface temperature")
    from fem.boiling_curve import Liquid, boiling_curve

    water = Liquid(
        100.0, 957.9, 279e-6, 0.680, 4217.0, 7.5e-4, 58.9e-3, 2257e3, 0.4, 20e-6, 0.05, 2100.0
    )
    curve = boiling_curve(water, 0.02, 100.0, highest_temperature=900.0)
    quench = conditions.SurfaceTemperatureConvection(curve.surface_curve(), 100.0)
    section = Rectangle(0.01, 0.002, edge_names={"left": "wet", "right": "c", "top": "s"}).mesh(
        0.001
    )
    model = ThermalModel(
        section,
        Material(40.0, 7850.0, 500.0),
        {"wet": quench, "c": Insulated(), "s": Insulated(), "bottom": Insulated()},
        initial_temperature=850.0,
    )
    solution = solve(model, end_time=900.0)
    assert solution.checks.energy_balance_error < 1e-6
    result = assess(solution, times_to=(300.0,), cooling_range=(800.0, 500.0))
    slowest = result.quench.curves["slowest"]
    assert slowest.range_time is not None and slowest.range_time > 0
    # the fastest cooling is reached where the boiling curve carries most heat: below the
    # Leidenfrost point, as the vapour film has collapsed
    assert slowest.largest_rate_temperature < curve.leidenfrost_temperature + 50.0
    biot = {b.name: b for b in result.biot}["volume_to_surface"]
    peak_h = float(np.max(curve.heat_transfer_coefficient[curve.surface_temperatures < 850]))
    assert biot.high == pytest.approx(peak_h * 0.01 / 40.0, rel=0.02)
