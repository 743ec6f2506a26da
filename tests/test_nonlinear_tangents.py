"""The tangent solves of fem.tangents against direct solves computed here.

- The bordered surface correction is the Sherman–Morrison–Woodbury identity (Golub & Van Loan,
  *Matrix Computations*, 4th ed., §2.1.4, from memory): its solve must equal scipy's sparse LU
  of J₀ + E·Δ·Eᵀ assembled here, to round-off, also for an indefinite Δ (a falling boiling
  curve's dq/dT < 0).
- A quench through film and nucleate boiling at fixed 0.5 s steps, the bordered tangent's
  case (h(T_s) the only nonlinearity), against the method-of-lines reference of
  ``test_surface_convection`` (scipy's BDF on 400 finite volumes, computed there): within
  0.5 % of the 790 K span, the energy balance within 1e-6, no factorisation beyond one per
  step size (the start-up's, the run's and a retried step's halves); its steps solved on the
  surface unknowns (fem.surface_step) but for those retried smaller. Measured 0.12 % (centre)
  and 0.11 % (surface), 2 factorisations with 2 steps subdivided.
- A coefficient ramping every step (a bordered tangent per step) beside radiation on a thin
  copper-like plate against its lumped balance integrated by scipy: within 0.2 % of the drop
  (measured 0.009 %), and back on kept chords after 12 bordered tangents.
- The symmetric chord for k(T): with k uniform, D = k·I and P·D is J itself, so the chord's
  update is Newton's exactly; with k varying it is an approximation whose error is bounded
  by the capacity term's share (checked as a contraction below 1).
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from test_surface_convection import BATH, END, HOT, TIMES, cylinder_model, method_of_lines

from fem import solve
from fem.tangents import BoundaryCorrection, ScaledFactor, bordered_solve, symmetric_scaled


def _laplacian(n: int) -> sp.csr_matrix:
    """The 5-point Laplacian on an n×n grid (SPD with the identity added below)."""
    one = sp.diags([-1.0, 2.0, -1.0], [-1, 0, 1], shape=(n, n))
    return (sp.kron(one, sp.eye(n)) + sp.kron(sp.eye(n), one)).tocsr()


def test_bordered_solve_matches_a_dense_solve():
    rng = np.random.default_rng(3)
    size = 40
    q = rng.standard_normal((size, size))
    coupling = 0.02 * q @ q.T  # C: symmetric positive definite, as Eᵀ·J₀⁻¹·E is
    delta = sp.diags(
        [rng.uniform(-0.5, 0.5, size - 1), rng.uniform(-1.0, 3.0, size), np.zeros(size - 1)],
        [-1, 0, 1],
    ).tocsr()
    delta = (delta + delta.T).tocsr()  # symmetric, indefinite
    rhs = rng.standard_normal(size)
    x = bordered_solve(coupling, delta, rhs)
    exact = np.linalg.solve(np.eye(size) + coupling @ delta.toarray(), rhs)
    # GMRES to a relative residual of 1e-13: the error is round-off times the condition.
    assert np.abs(x - exact).max() < 1e-10 * np.abs(exact).max()


def test_boundary_correction_is_the_exact_tangent_solve():
    n = 20
    base = (_laplacian(n) + 0.3 * sp.eye(n * n)).tocsc()  # J₀
    edge = np.arange(n)  # one side of the grid: the "surface"
    rng = np.random.default_rng(5)
    ring = sp.diags(
        [rng.uniform(-0.2, 0.2, n - 1), rng.uniform(-0.8, 4.0, n), rng.uniform(-0.2, 0.2, n - 1)],
        [-1, 0, 1],
    )
    delta = (0.5 * (ring + ring.T)).tocsr()
    correction = BoundaryCorrection(spla.splu(base), edge, n * n)
    correction.linearise(delta)
    full = base.tolil()
    full[np.ix_(edge, edge)] = full[np.ix_(edge, edge)].toarray() + delta.toarray()
    rhs = rng.standard_normal(n * n)
    x = correction.solve(rhs)
    exact = spla.spsolve(full.tocsc(), rhs)
    assert np.abs(x - exact).max() < 1e-10 * np.abs(exact).max()


def test_symmetric_chord_for_conductivity():
    n = 12
    stiffness = _laplacian(n)  # K⁰, unit conductivity
    stiffness_abs = abs(stiffness)
    neighbours = stiffness_abs - sp.diags(stiffness_abs.diagonal())
    mass = 5.0 * (sp.eye(n * n) + 0.125 * neighbours)  # a·M: consistent-like, coupled
    uniform = np.full(n * n, 40.0)
    jacobian = mass + stiffness @ sp.diags(uniform)
    chord = ScaledFactor(spla.splu(symmetric_scaled(jacobian, uniform).tocsc()), uniform)
    rhs = np.random.default_rng(9).standard_normal(n * n)
    exact = spla.spsolve(jacobian.tocsc(), rhs)
    assert np.abs(chord.solve(rhs) - exact).max() < 1e-10 * np.abs(exact).max()

    varying = np.linspace(28.0, 40.0, n * n)  # k falling by 30 % across the grid
    jacobian = (mass + stiffness @ sp.diags(varying)).tocsc()
    chord = ScaledFactor(spla.splu(symmetric_scaled(jacobian, varying).tocsc()), varying)
    # The chord iteration x ← x + P⁻¹(r − J·x) contracts, and fast: the capacity term's
    # error M_ij·(1 − k_j/k_i)/2 is small beside the exact conduction (required: 1e-6 of the
    # first residual in four iterations, a rate below 0.03 per iteration).
    x = np.zeros(n * n)
    first = np.abs(rhs).max()
    for _ in range(4):
        x = x + chord.solve(rhs - jacobian @ x)
    assert np.abs(jacobian @ x - rhs).max() < 1e-6 * first
    assert np.abs(chord.solve(rhs) - spla.spsolve(jacobian, rhs)).max() > 1e-12  # not exact


def test_bordered_quench_matches_method_of_lines():
    solution = solve(cylinder_model("coefficient"), END, time_step=0.5, output_times=TIMES)
    centre, surface = method_of_lines("coefficient")
    rows = np.searchsorted(solution.times, TIMES)
    span = HOT - BATH
    # Required 0.5 % of the span, as the adaptive run in test_surface_convection.
    assert np.abs(solution.probes["centre"][rows] - centre).max() < 0.005 * span
    assert np.abs(solution.probes["surface"][rows] - surface).max() < 0.005 * span
    assert solution.checks.energy_balance_error <= 1e-6
    stats = solution.stats
    assert stats.newton_iterations > stats.steps  # it was nonlinear
    # Start-up half steps, the run's steps, and the halves of any retried step: no more.
    assert stats.factorisations <= 2 + 2 * stats.subdivided_steps


def test_bordered_steps_are_solved_on_the_surface(monkeypatch):
    import fem.surface_step as surface_step

    solved = []
    original = surface_step.SurfaceCondensation.step

    def counting(self, *args):
        result = original(self, *args)
        solved.append(result is not None)
        return result

    monkeypatch.setattr(surface_step.SurfaceCondensation, "step", counting)
    solution = solve(cylinder_model("coefficient"), END, time_step=0.5, output_times=TIMES)
    # Every step on the surface unknowns (two solves with J₀), but for the few around the
    # film's collapse that stall and are retried smaller: measured 304 of 304 steps, after 2
    # stalled attempts. The whole field's iterations took two solves an iteration.
    assert sum(solved) >= 0.95 * solution.stats.steps
    assert solution.checks.energy_balance_error <= 1e-6


def test_ramped_coefficient_returns_to_kept_chords():
    # A thin, highly conducting plate (Biot number h·L/k below 1e-3): its temperature is
    # uniform to that share, so the lumped balance ρcL·dT/dt = −h(t)(T − T∞) − εσ(T⁴ − T∞⁴)
    # (Incropera et al., §5.1, from memory), integrated here by scipy, is the reference. The
    # coefficient ramps every step, so each step would need a bordered tangent of its own.
    from scipy.integrate import solve_ivp

    from fem import Convection, Insulated, Material, Radiation, ThermalModel
    from fem.schedules import PiecewiseLinear
    from fem.temperatures import ABSOLUTE_ZERO
    from geometries import Rectangle

    half, depth = 0.002, 0.01  # m: heat leaves through the top face only
    section = Rectangle(depth, half, edge_names={"top": "cooled"}).mesh(0.001)
    metal = Material(400.0, 8900.0, 390.0)  # copper-like, invented
    ramp = PiecewiseLinear((0.0, 200.0), (20.0, 220.0))  # W/(m^2 K)
    cooled = (Convection(ramp, 20.0), Radiation(0.8, 20.0))
    others = [name for name in section.edge_groups if name != "cooled"]
    boundaries = {"cooled": cooled, **{name: Insulated() for name in others}}
    model = ThermalModel(section, metal, boundaries, initial_temperature=600.0)
    solution = solve(model, 200.0, time_step=2.0, output_interval=50.0)

    sigma = 5.670374419e-8
    kelvin = -ABSOLUTE_ZERO

    def rate(t, y):
        loss = ramp(t) * (y[0] - 20.0) + 0.8 * sigma * (
            (y[0] + kelvin) ** 4 - (20.0 + kelvin) ** 4
        )
        return [-loss / (8900.0 * 390.0 * half)]

    times = solution.times
    lumped = solve_ivp(rate, (0.0, 200.0), [600.0], t_eval=times, rtol=1e-10, atol=1e-8).y[0]
    # Required 0.2 % of the 580 K drop: the Biot number's share and 2 s Crank–Nicolson steps
    # (measured 0.009 %).
    assert np.abs(solution.mean - lumped).max() < 0.002 * 580.0
    assert solution.checks.energy_balance_error <= 1e-6
    # Bordered tangents are built for the first steps only; then the kept chord takes over
    # (measured 13 factorisations; without the return, 102: one a step).
    assert solution.stats.factorisations <= 20


def test_surface_condensation_agrees_with_whole_field_newton(monkeypatch):
    # Both solve the same discrete step equations to the 1e-6 K Newton tolerance: a held
    # edge (excluded from the surface unknowns), radiation alone on one edge and radiation
    # beside convection on another. Measured: 1.0e-7 K apart at the end, the held edge's heat
    # flow 1.9e-6 W apart of 5.9e4 W.
    import fem.newton_tangents as newton_tangents
    from fem import Convection, FixedTemperature, Insulated, Material, Radiation, ThermalModel
    from geometries import Rectangle

    section = Rectangle(0.03, 0.01).mesh(0.001)
    boundaries = {
        "left": FixedTemperature(100.0),
        "right": Radiation(0.8, 20.0),
        "top": (Convection(30.0, 20.0), Radiation(0.6, 20.0)),
        "bottom": Insulated(),
    }
    model = ThermalModel(section, Material(20.0, 7800.0, 500.0), boundaries, 900.0)
    condensed = solve(model, 300.0, time_step=2.0, output_interval=60.0)
    monkeypatch.setattr(newton_tangents, "bordered_surface", lambda *arguments: None)
    whole = solve(model, 300.0, time_step=2.0, output_interval=60.0)
    assert np.abs(condensed.final_state - whole.final_state).max() < 1e-5
    held = np.abs(whole.heat_flow["left"]).max()
    assert np.abs(condensed.heat_flow["left"] - whole.heat_flow["left"]).max() < 1e-8 * held
    assert condensed.checks.energy_balance_error <= 1e-6
