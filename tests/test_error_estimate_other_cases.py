"""The run's own error estimate on exact solutions its factor of safety was not chosen on.

``tests/test_error_estimate.py`` holds the five shapes at Biot 1 and a target of 30 % of the
initial difference, where the factor of safety 1.5 was chosen. Here the plane wall, the long
cylinder, the sphere and the square bar run at Biot 5 (target 50 %) and Biot 0.3 (target
60 %), on meshes of R/4 and R/8, against the same exact series (Incropera, DeWitt, Bergman &
Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed., §5.5–5.6 and §5.8; Carslaw &
Jaeger, *Conduction of Heat in Solids*, 2nd ed., §3.10, ch. VII and IX — from memory; computed
by ``tests/exact_series.py``). Each test states what held and what did not: the slowest
point's temperature stays within [1, 3]; the time to target and the peak difference scatter
more, which is the limit of two meshes outside the asymptotic range, stated in
:mod:`advisor.analysis.error_estimate`.
"""

from __future__ import annotations

import numpy as np
import pytest
from exact_series import cylinder_profile, plane_wall_profile, sphere_profile
from scipy.optimize import brentq
from test_error_estimate import (
    ALPHA,
    AMBIENT,
    CONDUCTIVITY,
    DENSITY,
    INITIAL,
    SPECIFIC_HEAT,
    TERMS,
    R,
    _bar_section,
    _cylinder_section,
    _largest,
    _sphere_section,
    _wall_section,
)

from advisor.analysis.error_estimate import estimate_errors
from advisor.analysis.lumped_fits import crossing_time
from fem import Convection, Insulated, Material, ThermalModel, solve

# shape → (section builder, series, whether θ* is the square of the wall's)
SHAPES = {
    "plane wall": (_wall_section, plane_wall_profile, False),
    "cylinder": (_cylinder_section, cylinder_profile, False),
    "sphere": (_sphere_section, sphere_profile, False),
    "square bar": (_bar_section, plane_wall_profile, True),
}
# (Biot number on R, target as the fraction of the initial difference left, end as Fo)
CONDITIONS = ((5.0, 0.5, 1.5), (0.3, 0.6, 5.0))
DIVISIONS = (4, 8)


def _model(section, biot: float) -> ThermalModel:
    fluid = Convection(heat_transfer_coefficient=biot * CONDUCTIVITY / R, ambient=AMBIENT)
    boundaries = {"cooled": fluid}
    for name in section.edge_groups:
        if name != "cooled":
            boundaries[name] = Insulated("symmetry" if name == "symmetry" else "insulated")
    return ThermalModel(
        section,
        Material(CONDUCTIVITY, DENSITY, SPECIFIC_HEAT),
        boundaries=boundaries,
        initial_temperature=INITIAL,
    )


def _exact(series, biot: float, squared: bool, x: float):
    """θ*(Fo) at x*, memoised (the series' root-finding is the cost)."""
    memory: dict[float, float] = {}

    def theta(fourier: float) -> float:
        if fourier not in memory:
            value = float(series(biot, float(fourier), x, terms=TERMS))
            memory[fourier] = value**2 if squared else value
        return memory[fourier]

    return theta


@pytest.fixture(
    scope="module",
    params=[(s, c, d) for s in SHAPES for c in CONDITIONS for d in DIVISIONS],
    ids=lambda p: f"{p[0]}-Bi{p[1][0]:g}-R/{p[2]}",
)
def effectivities(request) -> dict[str, float]:
    """Estimate over true error of the three answers of one run."""
    shape, (biot, theta, end_fourier), divisions = request.param
    build, series, squared = SHAPES[shape]
    centre = _exact(series, biot, squared, 0.0)
    fastest = _exact(series, biot, squared, 1.0)  # the face, or the bar's corner
    end = end_fourier * R**2 / ALPHA
    solution = solve(_model(build(R / divisions), biot), end)
    drive = INITIAL - AMBIENT
    target = AMBIENT + theta * drive
    coarse = _model(build(2 * R / divisions), biot)
    estimate = estimate_errors(solution, coarse, end_time=end, target=target, heading=AMBIENT)
    fourier = brentq(lambda fo: centre(fo) - theta, 1e-4, 50.0, xtol=1e-14)
    crossing = crossing_time(solution.times, solution.maximum, target, drive)
    outputs = solution.output_times[1:]  # not t = 0, where the series converges slowly
    exact = AMBIENT + drive * np.array([centre(ALPHA * t / R**2) for t in outputs])
    slowest = np.interp(outputs, solution.times, solution.maximum) - exact
    peak = drive * _largest(lambda fo: centre(fo) - fastest(fo))
    true = {
        "time_to_target": abs(crossing - fourier * R**2 / ALPHA),
        "slowest": float(np.max(np.abs(slowest))),
        "peak_difference": abs(float(solution.internal_difference.max()) - peak),
    }
    return {key: estimate.answers[key].estimate / error for key, error in true.items()}


def test_the_slowest_point_temperature_is_bracketed(effectivities):
    """Measured effectivities 1.32–2.79 over the sixteen runs; asked: [1, 3]."""
    assert 1.0 <= effectivities["slowest"] <= 3.0


def test_the_time_to_target_is_within_a_factor_two_of_a_bracket(effectivities):
    """Measured 0.54–3.75: under 1 at Biot 5 on the finer meshes of the wall and the bar
    (0.90) and on the sphere at R/4 (0.54 and 0.66), where the error falls more slowly than
    h² (on the wall at Biot 5, by 2.3 from R/4 to R/8, not 4); asked: [0.5, 4]."""
    assert 0.5 <= effectivities["time_to_target"] <= 4.0


def test_the_peak_difference_is_not_underestimated(effectivities):
    """Measured 1.75 upwards; above 3 on eight runs, up to 29 on the square bar at Biot 0.3
    and R/4, whose true error is 0.1 % of its peak difference of 44 K: the bound by
    magnitudes of the hottest and coldest temperatures' errors is loose when they cancel in
    the difference. Asked: at least 1 (a bound), and at most 40."""
    assert 1.0 <= effectivities["peak_difference"] <= 40.0
