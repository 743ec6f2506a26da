"""The run's own error estimate on exact solutions it was not tuned on.

``tests/test_error_estimate.py`` holds the five shapes at Biot 1 and a target of 30 % of the
initial difference, on which the method was worked out. Here the plane wall, the long cylinder,
the sphere and the square bar run at Biot 5 (target 50 %) and Biot 0.3 (target 60 %), on meshes
of R/4 and R/8 (P1), against the same exact series (Incropera, DeWitt, Bergman & Lavine,
*Fundamentals of Heat and Mass Transfer*, 6th ed., §5.5–5.6 and §5.8; Carslaw & Jaeger,
*Conduction of Heat in Solids*, 2nd ed., §3.10, ch. VII and IX — from memory; computed by
``tests/exact_series.py``). As there, each estimate is set against the true error and against
the uncancelled error |space| + |time| (both parts from a reference run on the same mesh with
far shorter steps), and each test states what it measured, including where it fell short.
"""

from __future__ import annotations

import numpy as np
import pytest
from exact_series import cylinder_profile, plane_wall_profile, sphere_profile
from scipy.optimize import brentq
from test_error_estimate import (
    ALPHA,
    AMBIENT,
    INITIAL,
    SHORT_STEPS,
    TERMS,
    R,
    _bar_section,
    _cylinder_section,
    _largest,
    _sphere_section,
    _wall_section,
    model,
)

from advisor.analysis.error_estimate import estimate_errors
from advisor.analysis.lumped_fits import crossing_time
from fem import solve

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


def _exact(series, biot: float, squared: bool, x: float):
    """θ*(Fo) at x*, memoised (the series' root-finding is the cost)."""
    memory: dict[float, float] = {}

    def theta(fourier: float) -> float:
        if fourier not in memory:
            value = float(series(biot, float(fourier), x, terms=TERMS))
            memory[fourier] = value**2 if squared else value
        return memory[fourier]

    return theta


def _true_errors(solution, centre, fastest, theta: float) -> dict[str, np.ndarray]:
    """run − exact, signed: time to target (s), the slowest point's temperature at the output
    times after t = 0 (K), the peak internal difference (K)."""
    drive = INITIAL - AMBIENT
    fourier = brentq(lambda fo: centre(fo) - theta, 1e-4, 50.0, xtol=1e-14)
    crossing = crossing_time(solution.times, solution.maximum, AMBIENT + theta * drive, drive)
    outputs = solution.output_times[1:]  # not t = 0, where the series converges slowly
    exact = AMBIENT + drive * np.array([centre(ALPHA * t / R**2) for t in outputs])
    peak = drive * _largest(lambda fo: centre(fo) - fastest(fo))
    return {
        "time_to_target": np.array(crossing - fourier * R**2 / ALPHA),
        "slowest": np.interp(outputs, solution.times, solution.maximum) - exact,
        "peak_difference": np.array(float(solution.internal_difference.max()) - peak),
    }


@pytest.fixture(
    scope="module",
    params=[(s, c, d) for s in SHAPES for c in CONDITIONS for d in DIVISIONS],
    ids=lambda p: f"{p[0]}-Bi{p[1][0]:g}-R/{p[2]}",
)
def effectivities(request) -> dict[str, tuple[float, float]]:
    """answer → (estimate / true error, estimate / the uncancelled error |space| + |time|,
    both parts from a reference run on the same mesh with far shorter steps)."""
    shape, (biot, theta, end_fourier), divisions = request.param
    build, series, squared = SHAPES[shape]
    centre = _exact(series, biot, squared, 0.0)
    fastest = _exact(series, biot, squared, 1.0)  # the face, or the bar's corner
    end = end_fourier * R**2 / ALPHA
    fine = model(build(R / divisions), biot=biot)
    solution = solve(fine, end)
    target = AMBIENT + theta * (INITIAL - AMBIENT)
    coarse = model(build(2 * R / divisions), biot=biot)
    estimate = estimate_errors(solution, coarse, end_time=end, target=target, heading=AMBIENT)
    total = _true_errors(solution, centre, fastest, theta)
    space = _true_errors(solve(fine, end, **SHORT_STEPS), centre, fastest, theta)
    found = {}
    for key, error in total.items():
        uncancelled = np.max(np.abs(space[key]) + np.abs(error - space[key]))
        value = estimate.answers[key].estimate
        found[key] = (value / np.max(np.abs(error)), value / uncancelled)
    return found


def test_the_slowest_point_temperature_is_bracketed(effectivities):
    """Measured effectivities 1.31–3.15 over the sixteen runs (above 3 on the cylinder at
    Biot 5 and R/4), and 0.47–2.18 against the uncancelled error. Asked: at least the true
    error, at most 3 times the uncancelled one."""
    against_true, against_uncancelled = effectivities["slowest"]
    assert against_true >= 1.0
    assert against_uncancelled <= 3.0


def test_the_time_to_target_is_bracketed(effectivities):
    """Measured effectivities 0.85–4.09: under 1 on the sphere at Biot 5 and R/4 (0.85),
    above 3 on the sphere at Biot 0.3 and R/4 and the cylinder at Biot 0.3 and R/8 (3.42,
    4.09, where the true parts cancel: 1.10 against the uncancelled error, at most 2.23 on
    any run). Asked: at least 0.75 of the true error, at most 3 times the uncancelled one
    (room of 10 % or more against the values measured, as gmsh's versions may place the nodes
    differently)."""
    against_true, against_uncancelled = effectivities["time_to_target"]
    assert against_true >= 0.75
    assert against_uncancelled <= 3.0


def test_the_peak_difference_is_bracketed(effectivities):
    """Measured effectivities 1.74 upwards, above 3 on seven runs and up to 29 on the square
    bar at Biot 0.3 and R/4, whose true error is 0.1 % of its peak difference of 44 K; against
    the uncancelled error 0.99–2.92 (the hottest and coldest temperatures' errors, and the
    space and time parts, cancel in the difference). Asked: at least the true error, at most
    3.3 times the uncancelled one (10 % room against the 2.92 measured)."""
    against_true, against_uncancelled = effectivities["peak_difference"]
    assert against_true >= 1.0
    assert against_uncancelled <= 3.3
