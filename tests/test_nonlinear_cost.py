"""The pieces that make nonlinear steps cheap, against references computed here.

- Anderson's mixing on a linear fixed-point iteration ends, like GMRES, in at most n + 1
  iterations for n unknowns (Walker & Ni, "Anderson acceleration for fixed-point
  iterations", *SIAM J. Numer. Anal.* 49, 2011, from memory), where the plain iteration
  converges at its spectral radius; the reference is numpy's direct solve.
- The product approximation of k(T) conduction (Christie, Griffiths, Mitchell & Zienkiewicz
  1981, from memory): on one P1 triangle its residual is K_e·Φ(T_nodes), K_e the textbook
  element stiffness (b_i b_j + c_i c_j)/(4A) (Zienkiewicz & Taylor, *The Finite Element Method*,
  vol. 1, linear triangle, from memory) and Φ = ∫k dT the Kirchhoff transform integrated here
  in closed form; its tangent against central differences of the residual.
- A freezing block at 60 s steps, Crank-Nicolson and BDF2: iterations stopped on their rate
  keep the energy balance within 1e-6 of the exchanged energy.
- Steady conduction with k linear in T between held faces on P2 elements, planar and
  axisymmetric, against the Kirchhoff solution (Incropera et al. §3.2, from memory).
"""

from __future__ import annotations

import numpy as np
import pytest
from skfem import Basis, ElementTriP1, MeshTri

from fem import (
    Convection,
    FixedTemperature,
    Insulated,
    Material,
    PropertyTable,
    ThermalModel,
    solve,
)
from fem.nonlinear_acceleration import AndersonMixing
from fem.nonlinear_assembly import RegionProducts
from geometries import Rectangle, Section


def test_anderson_mixing_ends_a_linear_iteration_like_gmres():
    rng = np.random.default_rng(7)
    n = 6
    q, _ = np.linalg.qr(rng.standard_normal((n, n)))
    contraction = q @ np.diag(np.linspace(-0.95, 0.95, n)) @ q.T  # spectral radius 0.95
    load = rng.standard_normal(n)
    exact = np.linalg.solve(np.eye(n) - contraction, load)

    def update(x):  # g(x) - x for g(x) = G x + b
        return contraction @ x + load - x

    mixing = AndersonMixing(depth=n)
    x = np.zeros(n)
    for _ in range(n + 1):
        x = x + mixing.update(x, update(x))
    # Finite termination (GMRES in exact arithmetic): required 1e-8 of the solution's size,
    # against round-off of a 6x6 least-squares problem.
    assert np.abs(x - exact).max() < 1e-8 * np.abs(exact).max()
    plain = np.zeros(n)
    for _ in range(n + 1):
        plain = plain + update(plain)
    # The plain iteration is still far off after as many steps (0.95^7 of the start).
    assert np.abs(plain - exact).max() > 1e-2 * np.abs(exact).max()


def _kirchhoff(table: PropertyTable, t: float) -> float:
    """∫_0^t k dT for a two-point table k = k0 + s·T (T inside the table), closed form."""
    (t0, t1), (k0, k1) = table.temperatures, table.values
    slope = (k1 - k0) / (t1 - t0)
    at_zero = k0 - slope * t0
    return at_zero * t + slope * t * t / 2


def test_product_conduction_on_one_triangle_matches_the_element_stiffness():
    points = np.array([[0.0, 0.003, 0.001], [0.0, 0.0005, 0.002]])  # m, an oblique triangle
    mesh = MeshTri(points, np.array([[0], [1], [2]]))
    basis = Basis(mesh, ElementTriP1())
    table = PropertyTable((0.0, 500.0), (40.0, 25.0))
    products = RegionProducts(basis, False, Material(table, 7800.0, 460.0), 0.0)
    temperature = np.array([100.0, 250.0, 400.0])

    x, y = points
    area = 0.5 * abs((x[1] - x[0]) * (y[2] - y[0]) - (x[2] - x[0]) * (y[1] - y[0]))
    b = np.array([y[1] - y[2], y[2] - y[0], y[0] - y[1]])
    c = np.array([x[2] - x[1], x[0] - x[2], x[1] - x[0]])
    element = (np.outer(b, b) + np.outer(c, c)) / (4 * area)
    kirchhoff = np.array([_kirchhoff(table, t) for t in temperature])
    # Same quantity by two routes: required to round-off (1e-12 relative).
    expected = element @ kirchhoff
    assert np.allclose(products.conduction(temperature), expected, rtol=1e-12, atol=1e-9)

    tangent = products.conduction_tangent(temperature).toarray()
    step = 1e-3  # K; Φ is quadratic here, so central differences are exact but for round-off
    for j in range(3):
        shift = np.zeros(3)
        shift[j] = step
        column = (
            products.conduction(temperature + shift) - products.conduction(temperature - shift)
        ) / (2 * step)
        assert np.allclose(tangent[:, j], column, rtol=1e-7, atol=1e-9)


@pytest.mark.parametrize("method", ["crank-nicolson", "bdf2"])
def test_freezing_block_balances_its_energy_with_kept_tangents(method):
    # A food block (invented values) frozen in -30 degC air at 60 s fixed steps: iterations on
    # kept tangents stop on the convergence rate, yet the energy balance stays within 1e-6 of
    # the exchanged energy (the run's own check: stored against absorbed, common practice).
    edges = (-60.0, -1.5, -0.5, 60.0)
    material = Material(
        PropertyTable(edges, (1.6, 1.6, 0.5, 0.5)),
        1050.0,
        PropertyTable(edges, (1900.0, 1900.0, 3700.0, 3700.0)),
        latent_heat=2.8e5,
        solidus=-1.5,
        liquidus=-0.5,
    )
    section = Rectangle(
        0.04, 0.02, edge_names={"left": "air", "right": "closed", "top": "air", "bottom": "closed"}
    ).mesh(0.002)
    model = ThermalModel(
        section,
        material,
        {"air": Convection(25.0, -30.0), "closed": Insulated()},
        initial_temperature=5.0,
    )
    solution = solve(model, 6000.0, method=method, time_step=60.0, output_interval=600.0)
    assert solution.checks.energy_balance_error <= 1e-6
    assert solution.stats.newton_iterations > solution.stats.steps  # it was nonlinear
    assert solution.minimum[-1] < -1.5  # part of it froze


@pytest.mark.parametrize("axisymmetric", [False, True], ids=["planar wall", "hollow cylinder"])
def test_steady_conductivity_table_is_exact_at_quadratic_nodes(axisymmetric):
    # Steady conduction with k = k0 (1 + beta T) between two held faces. The Kirchhoff
    # transform U(T) = k0 (T + beta T^2 / 2) (Incropera, DeWitt, Bergman & Lavine, 6th ed.,
    # §3.2, and Carslaw & Jaeger, ch. I, from memory) is linear in x across a wall and linear
    # in ln r across a hollow cylinder. The product approximation interpolates U from the
    # nodes, so on P2 elements the wall's nodes are exact to round-off; the cylinder's U is
    # not a polynomial, so there P2 interpolation error remains (bounded below).
    inner, length, height = 0.01, 0.02, 0.004  # m
    k0, beta, hot, cold = 20.0, 2.0e-3, 400.0, 100.0
    table = PropertyTable((0.0, 500.0), (k0, k0 * (1 + beta * 500.0)))
    shape = Rectangle(
        length,
        height,
        corner=(inner, 0.0) if axisymmetric else (0.0, 0.0),
        edge_names={"left": "hot", "right": "cold", "top": "sides", "bottom": "sides"},
    )
    section = Section(shape, axisymmetric=axisymmetric).mesh(0.002)
    model = ThermalModel(
        section,
        Material(table, 7800.0, 460.0),
        {"hot": FixedTemperature(hot), "cold": FixedTemperature(cold), "sides": Insulated()},
        initial_temperature=250.0,
        element_order=2,
    )
    tau = length**2 * 7800.0 * 460.0 / (k0 * np.pi**2)
    solution = solve(
        model, 100 * tau, method="backward-euler", time_step=5 * tau, output_interval=100 * tau
    )

    def kirchhoff(t):
        return k0 * (t + beta * t**2 / 2)

    x = section.vertices[0]
    if axisymmetric:
        fraction = np.log(x / inner) / np.log((inner + length) / inner)
    else:
        fraction = x / length
    u = kirchhoff(hot) + (kirchhoff(cold) - kirchhoff(hot)) * fraction
    exact = (-1 + np.sqrt(1 + 2 * beta * u / k0)) / beta
    error = np.abs(solution.fields[-1][: x.size] - exact).max()
    # Wall: round-off and the 20 backward-Euler steps' leftover transient, (1/6)^20 of 300 K;
    # measured 6e-13 K. Cylinder: U = a + b ln r is not quadratic; between nodes its P2
    # interpolant is off by up to |U'''| h^3 / (9 sqrt 3) / k_min = 0.4 K (h = 2 mm, r = 10 mm),
    # but a Galerkin solution's nodes lie far closer (superconvergence of P2 in one dimension,
    # from memory); measured 1.3e-3 K, required 0.01 K (1/30,000 of the 300 K span).
    assert error < (0.01 if axisymmetric else 1e-8)
    assert solution.checks.energy_balance_error <= 1e-6
