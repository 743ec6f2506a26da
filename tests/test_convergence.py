"""Observed orders of convergence in space and time for the quarter rectangular bar.

The problem is the one of ``test_exact_rectangular_bar.py``: a bar of cross-section 2a x 2b
(a = 15 mm, b = 10 mm), initially at 1, cooled by convection into a fluid at 0 on all faces,
modelled as a quarter with symmetry edges on the left and bottom. Bi = h b / k = 1 and the
comparison time is Fo = alpha t / b^2 = 0.2, when the field is smooth.

Space: the exact solution is the product of two plane-wall series (Incropera, DeWitt, Bergman &
Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed., §5.5.1 eq. 5.39-5.42 and §5.8;
Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §3.10; both from memory), computed
in the test suite with its own root-finding (``tests/exact_series.py``). Time: each run is
compared with a much finer-step run on the same mesh, so the space error cancels.

The meshes are unstructured (gmsh), so the orders are least-squares slopes of log(error)
against log(h), with h the mean edge length of the mesh, not ratios of two runs. The material
values are invented.
"""

from __future__ import annotations

from functools import cache

import numpy as np
import pytest
from exact_series import plane_wall_profile, plane_wall_tail_bound

from fem import Convection, Insulated, Material, ThermalModel, solve
from geometries import Rectangle, SectionMesh

HALF_WIDTH = 0.015  # a, m
HALF_HEIGHT = 0.010  # b, m
MATERIAL = Material(conductivity=20.0, density=8000.0, specific_heat=500.0)  # invented
BIOT = 1.0  # h b / k
FOURIER = 0.2  # alpha t / b^2 at the comparison time
END_TIME = FOURIER * HALF_HEIGHT**2 / MATERIAL.diffusivity  # 4 s
SERIES_TERMS = 50


def exact_field(points: np.ndarray) -> np.ndarray:
    """theta/theta0 of the bar at ``points`` (2, n) at Fo = FOURIER (Incropera §5.8, memory).

    Each factor is the plane-wall series sum C_n exp(-zeta_n^2 Fo) cos(zeta_n x*) of
    ``exact_series`` (Incropera 6th ed. §5.5.1 eq. 5.39-5.42, from memory) with SERIES_TERMS
    terms; the bound on the omitted terms must be below 1e-12.
    """
    ratio = HALF_WIDTH / HALF_HEIGHT
    factors = []
    for biot, fourier, x_star in (
        (BIOT * ratio, FOURIER / ratio**2, points[0] / HALF_WIDTH),
        (BIOT, FOURIER, points[1] / HALF_HEIGHT),
    ):
        tail = plane_wall_tail_bound(fourier, SERIES_TERMS)
        assert tail < 1e-12, f"series truncated too early at Fo = {fourier}: tail {tail:.1e}"
        factors.append(plane_wall_profile(biot, fourier, x_star, terms=SERIES_TERMS))
    return factors[0] * factors[1]


@cache
def quarter_mesh(divisions: int) -> SectionMesh:
    """The quarter section meshed with target element size b / ``divisions``."""
    quarter = Rectangle(
        HALF_WIDTH,
        HALF_HEIGHT,
        edge_names={"left": "symmetry", "bottom": "symmetry", "right": "cooled", "top": "cooled"},
    )
    return quarter.mesh(HALF_HEIGHT / divisions)


def mean_edge_length(section: SectionMesh) -> float:
    mesh = section.mesh
    return float(
        np.linalg.norm(mesh.p[:, mesh.facets[0]] - mesh.p[:, mesh.facets[1]], axis=0).mean()
    )


def run(divisions: int, steps: int, *, element_order: int = 1, startup_steps: int = 2):
    """Solve to Fo = FOURIER in ``steps`` equal steps, storing the field only at the end."""
    fluid = Convection(BIOT * MATERIAL.conductivity / HALF_HEIGHT, ambient=0.0)
    model = ThermalModel(
        quarter_mesh(divisions),
        MATERIAL,
        boundaries={"symmetry": Insulated("symmetry"), "cooled": fluid},
        initial_temperature=1.0,
        element_order=element_order,
    )
    solution = solve(
        model,
        END_TIME,
        time_step=END_TIME / steps,
        output_interval=END_TIME,
        startup_steps=startup_steps,
    )
    assert np.isclose(solution.stats.time_step, END_TIME / steps, rtol=1e-12, atol=0.0)
    assert np.isclose(solution.output_times[-1], END_TIME, rtol=1e-12, atol=0.0)
    assert solution.checks.energy_balance_error < 1e-8
    return solution


def final_field(solution) -> np.ndarray:
    return solution.fields[-1]


def nodal_error(solution) -> float:
    """Max-norm error at the mesh vertices against the exact solution at Fo = FOURIER."""
    return float(np.abs(final_field(solution) - exact_field(solution.model.section.mesh.p)).max())


def fitted_order(sizes, errors) -> float:
    """Least-squares slope of log(error) against log(size)."""
    slope, _ = np.polyfit(np.log(sizes), np.log(errors), 1)
    return float(slope)


def assert_time_error_negligible(solution, divisions, steps, element_order, space_error):
    # Crank-Nicolson is second order, so a run with twice the step differs from this one by
    # about three times this run's time error. Below 5 % of the space error means the time
    # error is below about 2 % of it, which moves an order fitted over a factor of two in h by
    # less than 0.05.
    coarser = run(divisions, steps // 2, element_order=element_order)
    difference = np.abs(final_field(coarser) - final_field(solution)).max()
    assert difference < 0.05 * space_error, (
        f"time error not negligible on b/{divisions}: step-halving changes the field by "
        f"{difference:.1e}, space error {space_error:.1e}"
    )


def space_study(element_order: int, divisions: tuple[int, ...], steps: int):
    solutions = [run(n, steps, element_order=element_order) for n in divisions]
    sizes = [mean_edge_length(s.model.section) for s in solutions]
    errors = [nodal_error(s) for s in solutions]
    assert_time_error_negligible(solutions[-1], divisions[-1], steps, element_order, errors[-1])
    return sizes, errors


def test_p1_space_order_is_two():
    # P1 interpolation is O(h^2) in the max norm (up to a log factor on unstructured meshes),
    # and so is the P1 Galerkin error at the vertices for this smooth field. A fit over three
    # meshes within 1.7-2.5 shows second order; a lost factor of h (a wrong boundary term, a
    # mislabelled edge) would give about 1 or stall the error altogether.
    sizes, errors = space_study(1, (8, 16, 32), steps=800)
    order = fitted_order(sizes, errors)
    assert 1.7 <= order <= 2.5, f"P1 space order {order:.2f}; errors {errors} at h {sizes}"


def test_p2_space_order_is_three_and_beats_p1():
    # P2 interpolation is O(h^3) in the max norm; 2.6-3.5 allows for the scatter of a fit on
    # unstructured meshes and for vertex superconvergence. On the same mesh the P2 error must
    # also be well below the P1 error: their ratio grows like 1/h (it is about 65 on b/8 and
    # 125 on b/16); 10 is required, which fails if P2 falls back to P1 accuracy.
    sizes, errors = space_study(2, (8, 12, 16), steps=1600)
    order = fitted_order(sizes, errors)
    assert 2.6 <= order <= 3.5, f"P2 space order {order:.2f}; errors {errors} at h {sizes}"
    for divisions, p2_error in ((8, errors[0]), (16, errors[2])):
        p1_error = nodal_error(run(divisions, 800, element_order=1))
        assert p2_error < p1_error / 10, (
            f"on b/{divisions} P2 error {p2_error:.1e} is not well below P1 error {p1_error:.1e}"
        )


@cache
def fine_step_reference(divisions: int) -> np.ndarray:
    # 3200 steps, at least 8 times finer than any step studied, so its own time error is at
    # most 1/64 of the finest run's and moves a fitted order by about 0.01. Both start-ups
    # converge to the same semi-discrete solution, so one reference serves both.
    return final_field(run(divisions, 3200))


@pytest.mark.parametrize(
    ("startup_steps", "steps"),
    [
        # Default Rannacher start-up: second order from the coarsest step on.
        (2, (50, 100, 200)),
        # Plain Crank-Nicolson: second order too, once the step is below the diffusion time of
        # the smallest surface element (the run's own oscillation check then stays silent).
        (0, (100, 200, 400)),
    ],
)
def test_crank_nicolson_time_order_is_two(startup_steps, steps):
    # Crank-Nicolson is second order in time and the backward-Euler start-up half-steps keep it
    # so (a fixed number of them, each with an O(dt^2) local error). Errors are taken against a
    # run with a much finer step on the same mesh (b/16, P1), so the space error cancels;
    # 1.8-2.3 allows for the slight pre-asymptotic spread of a three-step fit.
    divisions = 16
    reference = fine_step_reference(divisions)
    errors = []
    for n in steps:
        solution = run(divisions, n, startup_steps=startup_steps)
        # Steps below the smallest surface diffusion time, so no oscillation warning. (Small
        # steps on the consistent capacity matrix may overshoot the initial temperature by a
        # fraction of a percent near the cooled corner, which the run reports separately.)
        if startup_steps == 0:
            assert solution.checks.step_to_surface_diffusion < 1.0
        assert not any("oscillate" in w for w in solution.checks.warnings)
        errors.append(float(np.abs(final_field(solution) - reference).max()))
    order = fitted_order([END_TIME / n for n in steps], errors)
    assert 1.8 <= order <= 2.3, f"time order {order:.2f}; errors {errors} for {steps} steps"


def test_startup_steps_damp_the_plunge_transient():
    # On b/32 with 50 steps the step is about four times the diffusion time of the smallest
    # surface element. Plain Crank-Nicolson then barely damps the stiff modes the sudden plunge
    # excites (their amplification factor tends to -1), and the run must say so; the default
    # backward-Euler start-up damps them, leaving only the smooth O(dt^2) error. The two errors
    # differ by a wide margin (a factor of about 35 here); at least 10 is required.
    divisions, steps = 32, 50
    reference = final_field(run(divisions, 1600))
    plain = run(divisions, steps, startup_steps=0)
    default = run(divisions, steps)
    assert plain.checks.step_to_surface_diffusion > 1.0
    assert any("Crank-Nicolson may oscillate" in w for w in plain.checks.warnings)
    assert default.checks.warnings == ()
    assert default.stats.startup_steps == 4  # two steps, each as two half-steps
    plain_error = np.abs(final_field(plain) - reference).max()
    default_error = np.abs(final_field(default) - reference).max()
    assert default_error < plain_error / 10, (
        f"start-up did not help: error {default_error:.1e} with it, {plain_error:.1e} without"
    )
