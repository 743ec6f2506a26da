"""The run's own error estimate brackets its true error on five exact-solution cases.

References, computed here from ``tests/exact_series.py`` (its own root-finding and sums):

- plane wall, long cylinder and sphere plunged into a fluid: θ* = Σ C_n exp(−ζ_n² Fo) X(ζ_n x*)
  (Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed.,
  §5.5–5.6; Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §3.10, ch. VII and IX —
  from memory);
- a square bar and a short cylinder as products of those (Incropera et al., 6th ed., §5.8,
  from memory): θ*_bar = θ*_wall(x)·θ*_wall(y), θ*_short = θ*_cylinder(r)·θ*_wall(z).

Each case runs at two mesh sizes (P1 elements, default adaptive Crank–Nicolson), and the
estimate (two extra solves on a mesh twice as coarse: Richardson with the element's order 2,
and in time with Crank–Nicolson's order 2; factor of safety 1.5) is set against the true error
of the slowest point's time to target, of its temperature (largest over the output times after
t = 0) and of the peak internal difference. Effectivity (estimate/true) in [1, 3] means the
estimate bounds the error without crying wolf; it is asked of every answer on every run, with
two exceptions whose cause each test checks against the exact solution rather than assumes.
The factor of safety was chosen on these runs (see ``SAFETY_FACTOR``); its check on cases it
was not chosen on is ``tests/test_error_estimate_other_cases.py``.
"""

from __future__ import annotations

import numpy as np
import pytest
from exact_series import cylinder_profile, plane_wall_profile, sphere_profile
from scipy.optimize import brentq, minimize_scalar

from advisor.analysis.error_estimate import estimate_errors
from advisor.analysis.lumped_fits import crossing_time
from fem import Convection, Insulated, Material, ThermalModel, solve
from geometries import Circle, Rectangle, Section

CONDUCTIVITY, DENSITY, SPECIFIC_HEAT = 12.5, 4000.0, 625.0  # invented
ALPHA = CONDUCTIVITY / (DENSITY * SPECIFIC_HEAT)
R = 0.01  # m: half-thickness, radius, half-side
BIOT = 1.0  # on R
INITIAL, AMBIENT = 220.0, 20.0
THETA_TARGET = 0.3  # the target: 30 % of the initial difference left at the slowest point
TERMS = 80
END_FOURIER = 2.5


def cached(profile, x):
    """θ*(Fo) at x*, memoised on Fo (the root-finding of each call is the cost)."""
    memory: dict[float, float] = {}

    def theta(fourier: float) -> float:
        key = float(fourier)
        if key not in memory:
            memory[key] = float(profile(BIOT, key, x, terms=TERMS))
        return memory[key]

    return theta


def wall(x):
    return cached(plane_wall_profile, x)


def cylinder(r):
    return cached(cylinder_profile, r)


def sphere(r):
    return cached(sphere_profile, r)


# name → (section builder at a size, exact θ* at the centre, exact θ* at the fastest point)
def _wall_section(size):
    edges = {"bottom": "symmetry", "top": "cooled", "left": "ends", "right": "ends"}
    return Rectangle(R, R, edge_names=edges).mesh(size)


def _cylinder_section(size):
    quarter = Circle(R, name="cooled").symmetry_cut((0.0, 0.0), (1.0, 0.0))
    return quarter.symmetry_cut((0.0, 0.0), (0.0, 1.0)).mesh(size)


def _sphere_section(size):
    half = Circle(R, name="cooled").symmetry_cut((0.0, 0.0), (1.0, 0.0))
    return Section(half, axisymmetric=True).mesh(size)


def _bar_section(size):
    edges = {"left": "symmetry", "bottom": "symmetry", "right": "cooled", "top": "cooled"}
    return Rectangle(R, R, edge_names=edges).mesh(size)


def _short_cylinder_section(size):
    edges = {"bottom": "symmetry", "right": "cooled", "top": "cooled"}
    return Section(Rectangle(R, R, edge_names=edges), axisymmetric=True).mesh(size)


WALL_CENTRE, WALL_FACE = wall(0.0), wall(1.0)
CYLINDER_AXIS, CYLINDER_FACE = cylinder(0.0), cylinder(1.0)
CASES = {
    "plane wall": (_wall_section, WALL_CENTRE, WALL_FACE),
    "cylinder": (_cylinder_section, CYLINDER_AXIS, CYLINDER_FACE),
    "sphere": (_sphere_section, sphere(0.0), sphere(1.0)),
    "square bar": (
        _bar_section,
        lambda fo: WALL_CENTRE(fo) ** 2,
        lambda fo: WALL_FACE(fo) ** 2,  # the corner
    ),
    "short cylinder": (
        _short_cylinder_section,
        lambda fo: CYLINDER_AXIS(fo) * WALL_CENTRE(fo),
        lambda fo: CYLINDER_FACE(fo) * WALL_FACE(fo),  # the rim's corner
    ),
}
DIVISIONS = (5, 10)  # element size R/5 and R/10 (coarse meshes R/2.5 and R/5)


def model(section) -> ThermalModel:
    fluid = Convection(heat_transfer_coefficient=BIOT * CONDUCTIVITY / R, ambient=AMBIENT)
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


def true_errors(solution, centre, fastest) -> dict[str, float]:
    """fine − exact for the three answers, from the series."""
    drive = INITIAL - AMBIENT
    target = AMBIENT + THETA_TARGET * drive
    fourier = brentq(lambda fo: float(centre(fo)) - THETA_TARGET, 1e-4, 50.0, xtol=1e-14)
    field_time = crossing_time(solution.times, solution.maximum, target, drive)
    outputs = solution.output_times[1:]  # not t = 0, where the series converges slowly
    exact_slowest = AMBIENT + drive * np.array([float(centre(ALPHA * t / R**2)) for t in outputs])
    slowest = np.interp(outputs, solution.times, solution.maximum)
    exact_peak = drive * _largest(lambda fo: centre(fo) - fastest(fo))
    return {
        "time_to_target": field_time - fourier * R**2 / ALPHA,
        "slowest": float(np.max(np.abs(slowest - exact_slowest))),
        "peak_difference": float(solution.internal_difference.max()) - exact_peak,
    }


def _largest(difference) -> float:
    """The largest value of ``difference``(Fo) over Fo in (0, 1]: a grid, then a bounded
    search around its best point (the peak internal difference comes early)."""
    grid = np.geomspace(1e-3, 1.0, 60)
    values = [difference(fo) for fo in grid]
    i = int(np.argmax(values))
    low, high = grid[max(i - 1, 0)], grid[min(i + 1, len(grid) - 1)]
    found = minimize_scalar(lambda fo: -difference(fo), bounds=(low, high), method="bounded",
                            options={"xatol": 1e-10})  # fmt: skip
    return max(-float(found.fun), max(values))


@pytest.fixture(scope="module", params=[(n, d) for n in CASES for d in DIVISIONS],
                ids=lambda p: f"{p[0]}-R/{p[1]}")  # fmt: skip
def effectivities(request):
    name, divisions = request.param
    section, centre, fastest = CASES[name]
    fine = model(section(R / divisions))
    coarse = model(section(2 * R / divisions))
    end = END_FOURIER * R**2 / ALPHA
    solution = solve(fine, end)
    target = AMBIENT + THETA_TARGET * (INITIAL - AMBIENT)
    estimate = estimate_errors(solution, coarse, end_time=end, target=target, heading=AMBIENT)
    true = true_errors(solution, centre, fastest)
    found = {key: (estimate.answers[key], abs(error)) for key, error in true.items()}
    found["run"] = (name, divisions, solution, centre, fastest)
    return found


def test_the_estimate_brackets_the_slowest_point_temperature(effectivities):
    """Measured effectivities 1.05–2.29 over the ten runs (1.05 on the sphere at R/5, whose
    coarse mesh of R/2.5 is outside the asymptotic range); asked: [1, 3]."""
    answer, error = effectivities["slowest"]
    assert error <= answer.estimate <= 3.0 * error, answer.estimate / error


def test_the_estimate_brackets_the_time_to_target(effectivities):
    """Measured effectivities 1.24–2.84 on nine runs; asked: [1, 3].

    The exception is the sphere at R/5 (measured 23): there the run's temperature error at
    the centre changes sign at the crossing, so the true error of the time is 6e-4 of it,
    which a two-mesh estimate cannot see. The test checks that cause on the exact series (a
    true error below 0.1 % of the time, the temperature error of opposite signs at output
    times within 2 s of the crossing) and then asks the estimate to bound the error and stay
    below 1.5 % of the time (a third of the 5 % tolerance it is judged by)."""
    answer, error = effectivities["time_to_target"]
    assert answer.estimate >= error
    if answer.estimate <= 3.0 * error:
        return
    _, _, solution, centre, _ = effectivities["run"]
    assert error < 1e-3 * answer.value
    near = solution.output_times[np.abs(solution.output_times - answer.value) <= 2.0]
    exact = AMBIENT + (INITIAL - AMBIENT) * np.array([centre(ALPHA * t / R**2) for t in near])
    wrong = np.interp(near, solution.times, solution.maximum) - exact
    assert wrong.min() < 0.0 < wrong.max(), wrong
    assert answer.estimate <= 0.015 * answer.value


def test_the_estimate_brackets_the_peak_difference(effectivities):
    """The estimate adds the magnitudes of the hottest and the coldest temperature's errors
    at the peak (their Richardson estimates change sign between R/5 and R/10, so the
    difference's own estimate fell to 0.33 of the true error). Measured effectivities
    1.20–2.34 on eight runs; asked: [1, 3].

    The exceptions are the square bar and the short cylinder at R/5 (measured 3.13 and 3.56):
    there the two temperatures' true errors have the same sign and partly cancel in the
    difference, which a bound by magnitudes ignores. The test checks that cause on the exact
    series (same sign at the output times either side of the peak) and then asks at most 4."""
    answer, error = effectivities["peak_difference"]
    assert error <= answer.estimate, answer.estimate / error
    if answer.estimate <= 3.0 * error:
        return
    _, _, solution, centre, fastest = effectivities["run"]
    peak = solution.times[int(np.argmax(solution.internal_difference))]
    k = int(np.searchsorted(solution.output_times, peak))
    either = solution.output_times[k - 1 : k + 1]
    drive = INITIAL - AMBIENT
    errors = [
        np.interp(either, solution.times, history)
        - (AMBIENT + drive * np.array([exact(ALPHA * t / R**2) for t in either]))
        for exact, history in ((centre, solution.maximum), (fastest, solution.minimum))
    ]
    assert np.all(np.concatenate(errors) > 0) or np.all(np.concatenate(errors) < 0), errors
    assert answer.estimate <= 4.0 * error


def test_a_case_asks_for_its_error_estimate(tmp_path):
    """``[advisor] error_estimate = true`` runs the two coarse solves and the summary carries
    each answer's ±; the estimate of a wall at R/10 agrees with the library call's."""
    from advisor.casefile import load_case
    from advisor.pipeline import run_case
    from advisor.writers.summary_json import summary

    path = tmp_path / "wall.toml"
    path.write_text(CASE_TEXT.replace("ERROR_ESTIMATE", "error_estimate = true"), encoding="utf-8")
    results = run_case(load_case(path))
    estimate = results.assessment.error_estimate
    assert estimate is not None and estimate.space_order == 2 and estimate.time_order == 2
    assert 1.7 < estimate.size_ratio < 2.3  # a mesh about twice as coarse
    answers = summary(results.assessment, [])["error_estimate"]["answers"]
    assert set(answers) == {"time_to_target", "peak_difference", "slowest", "probe:centre"}
    assert answers["time_to_target"]["plus_minus"] < answers["time_to_target"]["allowed"]
    path.write_text(CASE_TEXT.replace("ERROR_ESTIMATE", ""), encoding="utf-8")
    assert run_case(load_case(path)).assessment.error_estimate is None


CASE_TEXT = """
title = "wall"
[section]
mesh_size = "1 mm"
[[section.shape]]
kind = "rectangle"
width = "10 mm"
height = "10 mm"
edges = { bottom = "symmetry", top = "cooled", left = "ends", right = "ends" }
[material]
conductivity = "12.5 W/(m*K)"
density = "4000 kg/m^3"
specific_heat = "625 J/(kg*K)"
[boundaries.symmetry]
insulated = "symmetry"
[boundaries.ends]
insulated = true
[boundaries.cooled]
convection = { coefficient = "1250 W/(m^2*K)", ambient = "20 degC" }
[initial]
temperature = "220 degC"
[probes]
centre = ["5 mm", "0 mm"]
[run]
end_time = "50 s"
[advisor]
target = "80 degC"
ERROR_ESTIMATE
"""


def test_quadratic_elements_use_order_three_and_say_where_they_fall_short():
    """P2: Richardson with order 3; on this wall the slowest point's estimate was measured at
    0.08 of its true error (the quadratic nodes' early overshoot), which the description
    states rather than hides."""
    edges = {"bottom": "symmetry", "top": "cooled", "left": "ends", "right": "ends"}

    def quadratic(size):
        section = Rectangle(R, R, edge_names=edges).mesh(size, order=2)
        base = model(section)
        return ThermalModel(
            section,
            base.materials,
            boundaries=base.boundaries,
            initial_temperature=INITIAL,
            element_order=2,
        )

    end = END_FOURIER * R**2 / ALPHA
    solution = solve(quadratic(R / 3), end)
    estimate = estimate_errors(solution, quadratic(2 * R / 3), end_time=end, heading=AMBIENT)
    assert estimate.space_order == 3
    assert "with P2 elements it falls short" in estimate.method
    true = true_errors(solution, WALL_CENTRE, WALL_FACE)["slowest"]
    assert estimate.answers["slowest"].estimate < true  # the shortfall the text owns up to


def test_an_estimate_above_the_tolerance_warns():
    """A wall on a coarse mesh (R/3) held to a tolerance of 1e-4: every answer's estimate is
    above it and each says so, naming the remedy."""
    fine, coarse = model(_wall_section(R / 3)), model(_wall_section(2 * R / 3))
    end = END_FOURIER * R**2 / ALPHA
    target = AMBIENT + THETA_TARGET * (INITIAL - AMBIENT)
    estimate = estimate_errors(
        solve(fine, end), coarse, end_time=end, target=target, tolerance=1e-4, heading=AMBIENT
    )
    assert all(a.exceeds for a in estimate.answers.values())
    assert len(estimate.warnings) == len(estimate.answers)
    assert all("exceeds the advisor's tolerance" in w for w in estimate.warnings)
    assert all("refine the mesh" in w for w in estimate.warnings)
