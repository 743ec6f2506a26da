"""Validity maps and design rules against the lumped error computed from exact series.

The field is the exact series of a plane wall (both faces cooled) and of an infinite
cylinder (tests/exact_series.py: Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat
and Mass Transfer*, 6th ed., §5.5 and §5.6, from memory). The lumped estimates are computed
here in closed form: θ = exp(−h·A_s·t/(ρ·c·V)), i.e. exp(−Bi·Fo) for the wall (Bi, Fo on the
half-thickness) and exp(−2·Bi·Fo) for the cylinder (on the radius); the corrected model
replaces h by h/(1 + Bi/β), β = 3 (wall) and 4 (cylinder) (Cotta & Mikhailov 1997, from
memory). The error judged is the largest |θ_lumped − θ_centre| over time, the centre being the
slowest point. The design rule's limit is checked against the root found here by ``brentq``
on that exact error.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from exact_series import (
    cylinder_coefficients,
    cylinder_roots,
    plane_wall_coefficients,
    plane_wall_roots,
)
from scipy.optimize import brentq, minimize_scalar

from advisor.errors import AdvisorError
from advisor.studies.validity import (
    design_rule,
    quantity_text,
    rating_regions,
    refine_rule,
    validity_map,
)

TERMS = 200  # at Fo ≥ 1e-3 the omitted terms are below exp(−(200π)²·1e-3) ≈ 1e-171
SHAPES = {
    # name: (roots, coefficients, centre factor, β, area·length/volume, V/A_s over length)
    "wall": (plane_wall_roots, plane_wall_coefficients, 3.0, 1.0),
    "cylinder": (cylinder_roots, cylinder_coefficients, 4.0, 2.0),
}


def exact_error(shape: str, biot: float, model: str) -> float:
    """Largest |lumped − centre| over time for Bi on the half-thickness or radius."""
    roots_of, coefficients_of, beta, surface_factor = SHAPES[shape]
    roots = roots_of(biot, TERMS)
    weights = coefficients_of(roots)  # the centre: cos(0) = J0(0) = 1
    effective = biot if model == "classical" else biot / (1.0 + biot / beta)
    rate = surface_factor * effective  # d ln θ_lumped / d Fo

    def gap(log_fourier: float) -> float:
        fourier = math.exp(log_fourier)
        centre = float(weights @ np.exp(-(roots**2) * fourier))
        return -abs(math.exp(-rate * fourier) - centre)

    grid = np.linspace(math.log(1e-3), math.log(60.0 / rate + 10.0), 400)
    values = [gap(s) for s in grid]
    k = int(np.argmin(values))
    low, high = grid[max(k - 1, 0)], grid[min(k + 1, len(grid) - 1)]
    best = minimize_scalar(gap, bounds=(low, high), method="bounded", options={"xatol": 1e-10})
    return -min(best.fun, values[k])


def study_table(shape: str, biot_values: np.ndarray) -> pd.DataFrame:
    """A study's table: one row per case, Bi on V/A_s and the exact lumped errors."""
    _, _, _, surface_factor = SHAPES[shape]
    return pd.DataFrame(
        {
            # Bi on V/A_s: the half-thickness for the wall, r/2 for the cylinder.
            "biot_volume_to_surface": biot_values / surface_factor,
            "lumped_error_classical": [exact_error(shape, b, "classical") for b in biot_values],
            "lumped_error_corrected": [exact_error(shape, b, "corrected") for b in biot_values],
            "status": "done",
        }
    )


@pytest.fixture(scope="module", params=sorted(SHAPES))
def shape_table(request):
    # Ten cases a decade of Bi, 0.01 to 10 on the half-thickness or radius.
    return request.param, study_table(request.param, np.geomspace(0.01, 10.0, 31))


@pytest.mark.parametrize("model", ["classical", "corrected"])
def test_the_design_rule_finds_the_exact_limiting_biot_number(shape_table, model):
    shape, table = shape_table
    _, _, _, surface_factor = SHAPES[shape]
    tolerance = 0.05
    vmap = validity_map(table, tolerance=tolerance)
    exact = (
        brentq(lambda b: exact_error(shape, b, model) - tolerance, 0.01, 10.0, xtol=1e-12)
        / surface_factor
    )
    for interpolation, allowed in (("pchip", 1e-4), ("linear", 1e-3)):
        rule = design_rule(vmap, model, interpolation=interpolation)
        assert rule.status == "limit"
        lower, upper = rule.bracket
        assert lower <= exact <= upper
        # Interpolation error between cases a tenth of a decade apart (Δ = Δ ln Bi = 0.23):
        # a chord of y = ln e(ln Bi) misplaces the crossing by about Δ²/8·|y''/y'| in ln Bi,
        # with |y''/y'| < 0.15 here: under 1e-3; PCHIP, a cubic, an order of Δ smaller.
        # (Measured: chord ≤ 4.7e-4, PCHIP ≤ 2.1e-5.)
        assert abs(rule.limit / exact - 1) < allowed, (interpolation, rule.limit, exact)
    assert "Bi = " in rule.text and "5 %" in rule.text and "the slowest point" in rule.text


def test_bisection_with_one_more_case_at_a_time_converges_on_the_root(shape_table):
    shape, table = shape_table
    _, _, _, surface_factor = SHAPES[shape]
    vmap = validity_map(table, tolerance=0.05)
    rule = design_rule(vmap, "classical")
    runs = []

    def one_more_case(biot_volume_to_surface: float) -> float:
        runs.append(biot_volume_to_surface)
        return exact_error(shape, biot_volume_to_surface * surface_factor, "classical")

    refined, cases = refine_rule(rule, one_more_case, relative_width=1e-6, max_cases=40)
    exact = (
        brentq(lambda b: exact_error(shape, b, "classical") - 0.05, 0.01, 10.0, xtol=1e-13)
        / surface_factor
    )
    assert len(cases) == len(runs) <= 40
    assert refined.bracket[0] <= exact <= refined.bracket[1]
    assert abs(refined.limit / exact - 1) < 1e-6  # the final bracket's width
    assert f"up to Bi = {refined.limit:.3g} for this section." in refined.text


def test_ratings_and_regions_follow_the_tolerance(shape_table):
    _, table = shape_table
    vmap = validity_map(table, tolerance=0.05)
    errors = vmap.errors["classical"]
    for error, rated in zip(errors, vmap.ratings["classical"], strict=True):
        # advisor/analysis/verdict.py's rule: adequate ≤ tol, marginal ≤ 2·tol
        assert rated == (
            "adequate" if error <= 0.05 else "marginal" if error <= 0.1 else "inadequate"
        )
    regions = rating_regions(vmap, "classical")
    assert [r[2] for r in regions] == ["adequate", "marginal", "inadequate"]
    assert regions[0][0] == pytest.approx(vmap.values[0]) and regions[-1][1] == pytest.approx(
        vmap.values[-1]
    )
    first_limit = design_rule(vmap, "classical").limit
    assert regions[0][1] == pytest.approx(first_limit, rel=0.01)  # the shading grid's step
    second_limit = design_rule(vmap, "classical", tolerance=0.1).limit
    assert regions[1][1] == pytest.approx(second_limit, rel=0.01)


def test_failed_cases_and_shared_values_and_words():
    table = pd.DataFrame(
        {
            "boundaries.outside.convection.coefficient": [50.0, 100.0, 100.0, 200.0, 400.0],
            "lumped_error_classical": [0.01, 0.02, 0.03, np.nan, 0.2],
            "status": ["done", "done", "done", "failed", "done"],
        }
    )
    vmap = validity_map(
        table,
        "boundaries.outside.convection.coefficient",
        errors={"classical": "lumped_error_classical"},
    )
    assert list(vmap.values) == [50.0, 100.0, 400.0]
    assert list(vmap.errors["classical"]) == [0.01, 0.03, 0.2]  # the worse of the two at 100
    rule = design_rule(vmap, interpolation="linear")
    # log-log chord between (100, 0.03) and (400, 0.2), computed here
    expected = 100.0 * 4.0 ** (math.log(0.05 / 0.03) / math.log(0.2 / 0.03))
    assert rule.limit == pytest.approx(expected, rel=1e-9)
    assert f"h = {expected:.3g} W/(m²·K)" in rule.text
    assert quantity_text("section.mesh_size", 0.002) == "mesh size = 2 mm"
    everywhere = design_rule(vmap, tolerance=0.5)
    assert everywhere.status == "everywhere" and everywhere.limit is None
    assert design_rule(vmap, tolerance=0.005).status == "nowhere"
    with pytest.raises(AdvisorError, match="no column"):
        validity_map(table, "section.mesh_size")
