"""The solver against the exact solution for a rectangular bar plunged into a fluid.

A bar of cross-section 2a x 2b (a = 15 mm along x, b = 10 mm along y) at a uniform initial
temperature is cooled by convection on all four faces into a fluid at 0. The quarter model has
symmetry edges on the left and bottom and convection on the right and top, so temperatures are
theta/theta0 with theta0 = 1.

Reference: the exact solution is the product of two plane-wall series, one across x (half-width
a) and one across y (half-width b), each with its own Biot and Fourier numbers. Sources:

- Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed.,
  §5.5.1, eq. 5.39-5.42 (plane-wall series) and §5.8 (product solutions for multidimensional
  transient conduction), from memory;
- Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §3.10, from memory.

The reference is computed in the test suite, with its own root-finding and series (the shared
module ``tests/exact_series.py``); nothing of it comes from the code under test. The material
values are invented for this test.
"""

from __future__ import annotations

import numpy as np
import pytest
from exact_series import (
    plane_wall_coefficients,
    plane_wall_mean,
    plane_wall_profile,
    plane_wall_roots,
    plane_wall_tail_bound,
)

from fem import Convection, Insulated, Material, ThermalModel, solve
from geometries import Rectangle

HALF_WIDTH = 0.015  # a, m (along x)
HALF_HEIGHT = 0.010  # b, m (along y); Bi and Fo of the tests are defined on b
MATERIAL = Material(conductivity=20.0, density=8000.0, specific_heat=500.0)  # invented
DIFFUSION_TIME = HALF_HEIGHT**2 / MATERIAL.diffusivity  # b^2/alpha = 20 s: t = Fo * this

FOURIER_NUMBERS = (0.1, 0.5, 2.0)
SERIES_TERMS = 50
TAIL_LIMIT = 1e-12

# P1 triangles of size b/20 and Crank-Nicolson steps of b^2/alpha / 200 (400 steps to Fo = 2).
# The nodal error of P1 is O(h^2) and the step error O(dt^2): (h/b)^2 = 2.5e-3 and
# (alpha dt / b^2)^2 = 2.5e-5, times constants of order 0.1-1 for this smooth field, so the error
# is a few 1e-4 of the initial difference or less. 0.5 % keeps a wide margin above that and is
# still exceeded by a heat transfer coefficient only 2 % off at Bi = 1.
MESH_SIZE = HALF_HEIGHT / 20
TIME_STEP = DIFFUSION_TIME / 200
OUTPUT_INTERVAL = 0.1 * DIFFUSION_TIME
TOLERANCE = 0.005  # of the initial temperature difference


def plane_wall(biot: float, fourier: float) -> dict[str, float]:
    """Centre (x* = 0), face (x* = 1) and mean theta/theta0 of a plane wall.

    theta* = sum C_n exp(-zeta_n^2 Fo) cos(zeta_n x*) and
    mean = sum C_n sin(zeta_n)/zeta_n exp(-zeta_n^2 Fo)
    (Incropera 6th ed. §5.5.1 eq. 5.39-5.42; Carslaw & Jaeger 2nd ed. §3.10; both from memory),
    summed by ``exact_series`` with SERIES_TERMS terms and a tail bound below TAIL_LIMIT.
    """
    tail = plane_wall_tail_bound(fourier, SERIES_TERMS)
    assert tail < TAIL_LIMIT, f"series truncated too early at Fo = {fourier}: tail {tail:.1e}"
    centre, face = plane_wall_profile(biot, fourier, [0.0, 1.0], terms=SERIES_TERMS)
    return {
        "centre": float(centre),
        "face": float(face),
        "mean": plane_wall_mean(biot, fourier, terms=SERIES_TERMS),
    }


def bar_exact(biot: float, fourier: float) -> dict[str, float]:
    """Exact centre, corner and mean theta/theta0 of the bar (Incropera 6th ed. §5.8, memory).

    ``biot`` = h b / k and ``fourier`` = alpha t / b^2 are defined on the half-height b; the
    wall across x has Bi = h a / k and Fo = alpha t / a^2. The mean over the section is the
    product of the two means because the solution separates.
    """
    ratio = HALF_WIDTH / HALF_HEIGHT
    across_x = plane_wall(biot * ratio, fourier / ratio**2)
    across_y = plane_wall(biot, fourier)
    return {
        "centre": across_x["centre"] * across_y["centre"],
        "corner": across_x["face"] * across_y["face"],
        "mean": across_x["mean"] * across_y["mean"],
    }


def solve_bar(biot: float):
    """Run the quarter model to Fo = 2 with convection h = Bi k / b on the outer faces."""
    quarter = Rectangle(
        HALF_WIDTH,
        HALF_HEIGHT,
        edge_names={"left": "symmetry", "bottom": "symmetry", "right": "cooled", "top": "cooled"},
    )
    fluid = Convection(
        heat_transfer_coefficient=biot * MATERIAL.conductivity / HALF_HEIGHT, ambient=0.0
    )
    model = ThermalModel(
        quarter.mesh(MESH_SIZE),
        MATERIAL,
        boundaries={"symmetry": Insulated("symmetry"), "cooled": fluid},
        initial_temperature=1.0,
        probes={"centre": (0.0, 0.0), "corner": (HALF_WIDTH, HALF_HEIGHT)},
    )
    end_time = max(FOURIER_NUMBERS) * DIFFUSION_TIME
    return solve(model, end_time, time_step=TIME_STEP, output_interval=OUTPUT_INTERVAL)


def time_index(times: np.ndarray, time: float) -> int:
    """The index of ``time`` in the recorded times; fails unless it is hit exactly once."""
    hits = np.flatnonzero(np.isclose(times, time, rtol=1e-12, atol=1e-12 * times[-1]))
    assert len(hits) == 1, f"t = {time} s is not on the time grid (found {len(hits)} matches)"
    return int(hits[0])


def bar_errors(solution, biot: float) -> dict[tuple[float, str], float]:
    """|FEM - exact| / theta0 for centre, corner and mean at each Fourier number."""
    errors = {}
    for fourier in FOURIER_NUMBERS:
        i = time_index(solution.times, fourier * DIFFUSION_TIME)
        exact = bar_exact(biot, fourier)
        computed = {
            "centre": solution.probes["centre"][i],
            "corner": solution.probes["corner"][i],
            "mean": solution.mean[i],
        }
        for where, value in computed.items():
            errors[fourier, where] = abs(float(value) - exact[where])
    return errors


def test_reference_roots_match_the_handbook_table():
    # First root and coefficient of the plane-wall series, Incropera, DeWitt, Bergman & Lavine,
    # Fundamentals of Heat and Mass Transfer, 6th ed., Table 5.1 (from memory); the table gives
    # four decimals, so agreement within 1e-4 is expected.
    for biot, zeta_1, c_1 in ((0.05, 0.2217, 1.0082), (1.0, 0.8603, 1.1191)):
        roots = plane_wall_roots(biot, 3)
        assert roots[0] == pytest.approx(zeta_1, abs=1e-4)
        assert plane_wall_coefficients(roots)[0] == pytest.approx(c_1, abs=1e-4)
        assert np.allclose(roots * np.tan(roots), biot, rtol=1e-12, atol=0.0)


def test_reference_product_solution_starts_at_one_and_decays():
    # At small Fo the centre has not yet felt the surface, so the product is close to 1; the
    # corner, cooled from two faces, is below the centre; all values lie in (0, 1). These are
    # properties of the exact solution, checked so that a wrong series cannot pass unnoticed.
    early = bar_exact(1.0, 0.01)
    assert early["centre"] == pytest.approx(1.0, abs=1e-6)
    for fourier in FOURIER_NUMBERS:
        values = bar_exact(1.0, fourier)
        assert 0.0 < values["corner"] < values["mean"] < values["centre"] < 1.0


@pytest.mark.parametrize("biot", [0.05, 1.0])
def test_quarter_bar_matches_product_solution(biot):
    solution = solve_bar(biot)
    errors = bar_errors(solution, biot)
    for (fourier, where), error in errors.items():
        assert error < TOLERANCE, (
            f"Bi = {biot}, Fo = {fourier}: {where} differs from the product solution by "
            f"{error:.2e} of the initial difference (tolerance {TOLERANCE})"
        )
    # The run's own checks: Crank-Nicolson with the start-up half-steps conserves energy to
    # round-off, one LU factorisation serves the whole run, and nothing was flagged.
    assert solution.checks.warnings == ()
    assert solution.checks.energy_balance_error < 1e-8
    assert solution.stats.factorisations == 1
    assert solution.stats.time_step == pytest.approx(TIME_STEP, rel=1e-12)
