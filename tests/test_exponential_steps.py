"""Exponential steps (``solve(..., method="exponential")``) against references outside the code.

The method integrates a linear model exactly in time between schedule breakpoints, up to the
error of a shift-and-invert Krylov approximation of the matrix exponential that it keeps below
``tolerance``. So two kinds of reference are used:

- for the numerics alone, the exact solution of the same semi-discrete system: on a small dense
  pencil from ``scipy.linalg.expm`` of the augmented matrix (Van Loan, "Computing integrals
  involving the matrix exponential", IEEE Trans. Automatic Control 23 (1978), from memory) and
  ``scipy.linalg.eigh``, with ``scipy.integrate.quad`` for the integral and the equation's right
  side, checked by finite differences, for the rate; on the finite-element meshes from the
  eigen-expansion of the assembled matrices (as ``test_transient_exact.semi_discrete_field``
  does); the phi functions against ``mpmath`` at 50 digits (definitions of Hochbruck &
  Ostermann, "Exponential integrators", Acta Numerica 19 (2010), from memory);
- for the physics, the same references as the other solver tests, computed here: the plane-wall,
  sphere and fixed-face series (Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and
  Mass Transfer*, 6th ed., §5.5.1 and §5.6.1; Carslaw & Jaeger, *Conduction of Heat in Solids*,
  2nd ed., §3.3, with Duhamel's superposition, §1.14, for a stepped face; all from memory), the
  lumped exponentials at small Biot number (Incropera §5.1-5.3, from memory), the steady
  profile of a slab with generation (Incropera §3.5, from memory) and the conservation of
  energy.

On a finite-element mesh the exact-in-time solution with a consistent capacity matrix leaves
the range of initial and boundary temperatures for a moment after a plunge, at times far
below the surface elements' diffusion time; the records after a jump start at that time, so
little of the overshoot is left to sample. The tests check that whatever the run's excursion
check reports is the semi-discrete solution's own overshoot at the records.

Since the time error is the Krylov tolerance's, the errors against the series are the mesh's
alone: the tests use the meshes of ``test_transient_exact`` and ``test_solver_conditions`` and
require the exponential run to be at least as close as Crank-Nicolson with many small steps.
The materials are those tests' invented ones.
"""

from __future__ import annotations

import math
from functools import cache

import mpmath
import numpy as np
import pytest
import scipy.linalg
import scipy.sparse as sp
from exact_series import plane_wall_coefficients, plane_wall_roots
from scipy.integrate import quad
from scipy.optimize import brentq
from test_solver_conditions import (
    BAR_H,
    BAR_HALF_HEIGHT,
    BAR_HALF_WIDTH,
    BAR_TAU,
    LUMPED_SHARE,
    SLAB,
    SLAB_AMBIENT,
    SLAB_H,
    SLAB_HALF,
    SLAB_SIZE,
    SLAB_SOURCE,
    SLAB_WIDTH,
    bar_model,
    generating_slab,
    lumped_piecewise,
    plane_wall_first_root,
)
from test_transient_exact import (
    AMBIENT,
    BIOT_NUMBERS,
    CONDUCTIVITY,
    DENSITY,
    DIFFUSION_TIME,
    FOURIER_NUMBERS,
    INITIAL,
    LENGTH,
    MATERIAL,
    SERIES_TERMS,
    SPAN,
    SPECIFIC_HEAT,
    STRIP_WIDTH,
    WALL_TOLERANCE,
    WallSeries,
    errors_at_fourier_numbers,
    radial_model,
    sphere_exact,
    strip_mesh,
    strip_model,
    theta,
    time_index,
    wall_exact,
)

from fem import (
    Convection,
    FixedTemperature,
    HeatFlux,
    Insulated,
    Material,
    ModelError,
    Periodic,
    PiecewiseLinear,
    PropertyTable,
    Radiation,
    Sinusoid,
    Steps,
    StopWhen,
    ThermalModel,
    assemble,
    solve,
)
from fem.exponential import SMALL, krylov_exponential, phi1, phi2
from fem.run_checks import EXCURSION_TOLERANCE
from geometries import Rectangle

EPS = float(np.finfo(float).eps)


# =================================================================================================
# 1. The Krylov approximation on a small dense pencil
# =================================================================================================

PENCIL_SIZE = 60
PENCIL_RATES = (1e-2, 1e4)  # 1/s: generalised eigenvalues of (A, M), log-uniform in between
PENCIL_TAUS = np.logspace(-2.0, 1.0, 13)  # s: three decades


@cache
def pencil(semidefinite: bool):
    """A random (seeded) SPD capacity M, an operator A with generalised eigenvalues spread over
    six decades (one of them 0 when ``semidefinite``: an insulated body), a start u0 of order
    100 K and a forcing r. A = M V diag(rates) V^T M with V^T M V = I."""
    rng = np.random.default_rng(20261201)
    n = PENCIL_SIZE
    rotation, _ = np.linalg.qr(rng.standard_normal((n, n)))
    capacity = rotation @ np.diag(rng.uniform(0.5, 2.0, n)) @ rotation.T
    capacity = 0.5 * (capacity + capacity.T)
    cholesky = np.linalg.cholesky(capacity)
    modes = np.linalg.solve(cholesky.T, np.linalg.qr(rng.standard_normal((n, n)))[0])
    rates = np.logspace(*np.log10(PENCIL_RATES), n)
    if semidefinite:
        rates[0] = 0.0
    operator = capacity @ modes @ np.diag(rates) @ modes.T @ capacity
    operator = 0.5 * (operator + operator.T)
    start = 100.0 + 50.0 * rng.standard_normal(n)
    forcing = operator @ (20.0 + 5.0 * rng.standard_normal(n))
    if semidefinite:  # a net heat input: the null mode grows linearly
        forcing = forcing + 3.0 * capacity @ np.ones(n)
    rows = {"capacity columns": capacity @ np.ones(n), "random": rng.standard_normal(n)}
    return capacity, operator, start, forcing, rows


@cache
def pencil_exact(semidefinite: bool):
    """u(tau) at PENCIL_TAUS from expm of the augmented matrix [[-M^-1 A, M^-1 r], [0, 0]]
    (Van Loan 1978, from memory); central differences of it for u'(tau) (step 1e-4 tau, so the
    difference error (1e-4 lambda tau)^2 / 6 is below 2e-7 relative for every mode still alive,
    lambda tau <= 40); and u(s) for any s from scipy.linalg.eigh(A, M), for the quadrature."""
    capacity, operator, start, forcing, _ = pencil(semidefinite)
    n = start.size
    augmented = np.zeros((n + 1, n + 1))
    augmented[:n, :n] = -np.linalg.solve(capacity, operator)
    augmented[:n, n] = np.linalg.solve(capacity, forcing)

    def expm_state(tau: float) -> np.ndarray:
        return (scipy.linalg.expm(tau * augmented) @ np.append(start, 1.0))[:n]

    values = np.array([expm_state(t) for t in PENCIL_TAUS])
    delta = 1e-4 * PENCIL_TAUS
    rates = np.array(
        [
            (expm_state(t + d) - expm_state(t - d)) / (2 * d)
            for t, d in zip(PENCIL_TAUS, delta, strict=True)
        ]
    )
    right_side = np.linalg.solve(capacity, forcing[:, None] - operator @ values.T).T
    eigenvalues, vectors = scipy.linalg.eigh(operator, capacity)
    initial = vectors.T @ (capacity @ start)
    drive = vectors.T @ forcing

    def eigen_state(s: float) -> np.ndarray:
        x = eigenvalues * s
        growth = np.where(np.abs(x) < 1e-12, s, -np.expm1(-x) / np.where(x == 0, 1.0, eigenvalues))
        return vectors @ (initial * np.exp(-x) + drive * growth)

    return values, rates, right_side, eigen_state


def shift_for(longest: float) -> float:
    """The run's choice: about 1/32 of the interval, rounded to a power of two seconds."""
    return 2.0 ** round(math.log2(longest / 32))


@pytest.mark.parametrize("semidefinite", [False, True], ids=["definite", "semidefinite"])
@pytest.mark.parametrize("tolerance", [1e-1, 1e-2, 1e-3])
def test_krylov_exponential_matches_expm(semidefinite, tolerance):
    capacity, operator, start, forcing, rows = pencil(semidefinite)
    values, rates, right_side, eigen_state = pencil_exact(semidefinite)
    # Guards on the references: the eigen-expansion agrees with expm (measured 5e-9 K), and the
    # rate u' = M^-1 (r - A u) at the expm states with the central differences of those states:
    # tau |difference - u'| is expm's rounding (about 1e-8 K) over the relative step 1e-4,
    # measured 1.8e-4 K, allowed 1e-3 K (a hundredth of the tolerance of the loosest case).
    assert np.abs(np.array([eigen_state(t) for t in PENCIL_TAUS]) - values).max() < 1e-7
    assert np.abs((rates - right_side) * PENCIL_TAUS[:, None]).max() < 1e-3

    shift = shift_for(PENCIL_TAUS[-1])
    factor = scipy.linalg.cho_factor(capacity + shift * operator)
    approximation, estimate, converged = krylov_exponential(
        lambda x: scipy.linalg.cho_solve(factor, x),
        sp.csr_matrix(capacity),
        sp.csr_matrix(operator),
        forcing,
        start,
        shift,
        PENCIL_TAUS,
        tolerance,
        100,
    )
    assert converged
    # A true approximation, not the whole space (where it would be exact).
    assert approximation.dimension < PENCIL_SIZE
    error = float(np.abs(approximation.fields(PENCIL_TAUS) - values).max())
    # The tolerance bounds the largest nodal error over the checked times. Measured: at most
    # 0.66 of it (0.95 over 15 seeds of pencils like this one).
    assert error <= tolerance, f"error {error:.3g} K, tolerance {tolerance} K"
    assert estimate <= tolerance
    # The estimate is the change from m - 2 to m basis vectors, a bound on the error of the
    # smaller basis: the m-vector error is not above it by more than a small factor (3 is
    # allowed; measured at most 1.7 here, 2.3 over 15 seeds).
    assert error <= 3 * estimate, f"error {error:.3g} K, estimate {estimate:.3g} K"

    for name, row in rows.items():
        scale = float(np.abs(row).sum())  # |row . e| <= scale max|e|
        value = approximation.functional(row, PENCIL_TAUS)
        assert np.abs(value - values @ row).max() <= scale * tolerance, name
        # The error is a sum of e^(-lambda tau) terms with lambda tau spread over the checked
        # decades, so it changes on the scale of tau itself: its rate is about error / tau.
        # Allowed scale * tolerance / tau; measured at most 0.2 of that.
        rate = approximation.functional(row, PENCIL_TAUS, "rate")
        rate_error = np.abs(rate - right_side @ row) * PENCIL_TAUS
        assert rate_error.max() <= scale * tolerance, f"{name}: rate {rate_error.max():.3g}"
        # The integral of an error below the tolerance over (0, tau) is below tau * tolerance;
        # measured at most 0.007 of that.
        integral = approximation.functional(row, PENCIL_TAUS, "integral")
        exact = np.array(
            [
                quad(
                    lambda s, row=row: float(row @ eigen_state(s)),
                    0.0,
                    tau,
                    points=[p for p in (1e-4, 1e-3, 1e-2, 1e-1, 1.0) if p < tau],
                    limit=400,
                    epsabs=0.0,
                    epsrel=1e-12,
                )[0]
                for tau in PENCIL_TAUS
            ]
        )
        integral_error = np.abs(integral - exact) / PENCIL_TAUS
        assert integral_error.max() <= scale * tolerance, f"{name}: {integral_error.max():.3g}"


# =================================================================================================
# 2. phi1 and phi2 across the switch from series to closed form
# =================================================================================================

mpmath.mp.dps = 50
PHI_ARGUMENTS = np.unique(
    np.concatenate(
        [
            np.logspace(-10.0, 3.0, 131),
            SMALL * (1.0 + np.linspace(-1e-3, 1e-3, 21)),
            [np.nextafter(SMALL, 0.0), SMALL, np.nextafter(SMALL, 1.0)],
            np.logspace(np.log10(SMALL) - 0.5, np.log10(SMALL) + 0.5, 41),
        ]
    )
)


def phi_references(tau: float, rate: float) -> tuple[float, float]:
    """(1 - e^(-tau lambda)) / lambda and (tau lambda + e^(-tau lambda) - 1) / lambda^2, that is
    tau phi1(-tau lambda) and tau^2 phi2(-tau lambda) (Hochbruck & Ostermann 2010, from memory),
    at 50 digits from the binary values of tau and lambda."""
    t, r = mpmath.mpf(tau), mpmath.mpf(rate)
    x = t * r
    return float(-mpmath.expm1(-x) / r), float((x + mpmath.expm1(-x)) / r**2)


@pytest.mark.parametrize("tau", [1e-3, 1.0, 3.7e4])
def test_phi_functions_match_mpmath_across_the_switch(tau):
    rates = PHI_ARGUMENTS / tau
    taus = np.full_like(rates, tau)
    first, second = phi1(taus, rates), phi2(taus, rates)
    reference = np.array([phi_references(tau, r) for r in rates])
    x = taus * rates
    below = x < SMALL
    # Below the switch both are the first three terms of alternating series with decreasing
    # terms: the error is below the first omitted term, x^3/24 of phi1 ~ 1 and x^3/120 of
    # phi2 ~ 1/2 (relative x^3/60), plus a few roundings. Above it phi1 = -expm1(-x)/lambda
    # is good to a few roundings, while phi2 = (x + expm1(-x))/lambda^2 cancels: expm1's
    # rounding, eps x, over a result of x^2/2 gives a relative 2 eps / x (4.4e-12 at the
    # switch).
    bound_first = np.where(below, x**3 / 24 * (1 + x), 0.0) + 8 * EPS
    bound_second = np.where(below, x**3 / 60 * (1 + x), 2 * EPS / x * (1 + x)) + 8 * EPS
    error_first = np.abs(first - reference[:, 0]) / reference[:, 0]
    error_second = np.abs(second - reference[:, 1]) / reference[:, 1]
    assert np.all(error_first <= bound_first), (
        f"phi1 off by {error_first.max():.2e} relative at x = {x[np.argmax(error_first)]:.6g}"
    )
    assert np.all(error_second <= bound_second), (
        f"phi2 off by {error_second.max():.2e} relative at x = {x[np.argmax(error_second)]:.6g}"
    )
    # Measured worst cases: 4.2e-14 (phi1, just below the switch, the series' truncation) and
    # 1.1e-12 (phi2, just above it, the cancellation).
    # The limits at lambda = 0: tau and tau^2 / 2.
    assert phi1(np.array([tau]), np.array([0.0]))[0] == tau
    assert phi2(np.array([tau]), np.array([0.0]))[0] == 0.5 * tau * tau


# =================================================================================================
# 3. Plane wall: exact in time, so only the mesh's error remains
# =================================================================================================

WALL_END = max(FOURIER_NUMBERS) * DIFFUSION_TIME
WALL_OUTPUTS = [f * DIFFUSION_TIME for f in FOURIER_NUMBERS]
# K: 1e-5 of the initial difference (2e-3 K), at most the smallest mesh error met below (1.6e-5
# of it, plane wall at Bi = 0.1) and a tenth of it or less elsewhere.
KRYLOV_TOLERANCE = 1e-5 * SPAN


def semi_discrete_histories(model: ThermalModel, times: np.ndarray) -> dict[str, np.ndarray]:
    """Probes, mean and extremes of the exact-in-time solution of M T' + A T = b on the
    model's own mesh, for constant coefficients, a uniform start at INITIAL and constant fixed
    temperatures (set at t = 0). On the free unknowns f, with the fixed ones x held:
    T_f = S_f + sum_i e^(-lambda_i t) phi_i phi_i^T M_ff (T_f(0) - S_f), with M_ff-orthonormal
    phi_i from scipy.linalg.eigh(A_ff, M_ff) and the steady state
    S_f = A_ff^-1 (b_f - A_fx T_x)."""
    system = assemble(model)
    operator = system.exchange_operator(0.0).toarray()
    capacity = system.capacity.toarray()
    start = np.full(system.size, INITIAL)
    for name, condition in model.fixed.items():
        start[system.fixed_dofs[name]] = condition.temperature(0.0)
    free = system.free_dofs
    held = np.setdiff1d(np.arange(system.size), free)
    block = operator[np.ix_(free, free)]
    steady = np.linalg.solve(
        block, system.load(0.0)[free] - operator[np.ix_(free, held)] @ start[held]
    )
    values, vectors = scipy.linalg.eigh(block, capacity[np.ix_(free, free)])
    amplitudes = vectors.T @ (capacity[np.ix_(free, free)] @ (start[free] - steady))
    fields = np.tile(start, (len(times), 1))
    fields[:, free] = steady + (np.exp(-np.outer(times, values)) * amplitudes) @ vectors.T
    rows = system.probe_matrix.toarray()
    histories = {name: fields @ row for name, row in zip(model.probes, rows, strict=True)}
    histories["mean"] = fields @ system.volume_weights
    histories["minimum"], histories["maximum"] = fields.min(axis=1), fields.max(axis=1)
    return histories


def own_excursion(histories: dict[str, np.ndarray], low: float, high: float) -> float:
    """How far the extremes go outside [low, high], K."""
    return float(max(low - histories["minimum"].min(), histories["maximum"].max() - high, 0.0))


def assert_only_its_own_overshoot(solution, reference, low: float, high: float, tolerance):
    """The run's checks on a linear run without sources: no energy-balance warning; the
    excursion reported is the semi-discrete solution's own (to the tolerance); and the only
    warning, if any, is that excursion's, when it exceeds the check's share of the span."""
    excursion = own_excursion(reference, low, high)
    checks = solution.checks
    assert checks.temperature_excursion == pytest.approx(excursion, abs=tolerance)
    expected = 1 if excursion > EXCURSION_TOLERANCE * (high - low) + tolerance else 0
    assert len(checks.warnings) == expected, checks.warnings
    assert all("left the range" in w for w in checks.warnings), checks.warnings


def largest_gap(solution, reference: dict[str, np.ndarray]) -> float:
    """Largest |solution - reference| over the recorded times, probes and mean, K."""
    gaps = [np.abs(solution.mean - reference["mean"]).max()]
    gaps += [np.abs(solution.probes[name] - reference[name]).max() for name in solution.probes]
    return float(max(gaps))


@pytest.mark.parametrize("biot", BIOT_NUMBERS)
def test_plane_wall_is_exact_in_time_and_as_close_to_the_series_as_small_steps(biot):
    model = strip_model(biot, strip_mesh(20))
    solution = solve(
        model,
        WALL_END,
        method="exponential",
        tolerance=KRYLOV_TOLERANCE,
        output_times=WALL_OUTPUTS,
    )
    stats = solution.stats
    # No breakpoint: one step over the whole run from one factorisation of M + gamma A.
    assert (stats.method, stats.steps, stats.factorisations) == ("exponential", 1, 1)
    assert stats.solves == stats.krylov_dimension + 1  # one per basis vector and the start
    assert stats.error_estimate <= KRYLOV_TOLERANCE
    for time in WALL_OUTPUTS:
        time_index(solution.output_times, time)

    # Against the exact solution of the same semi-discrete system at every recorded time (500
    # records, refined down to 1/1024 of the record step after the start): within the
    # tolerance. Measured at most 0.27 of it (Bi = 0.1).
    reference = semi_discrete_histories(model, solution.times)
    gap = largest_gap(solution, reference)
    assert gap <= KRYLOV_TOLERANCE, f"Bi = {biot}: {gap:.3g} K off the semi-discrete solution"
    # The run's excursion check reports the semi-discrete system's own overshoot at the
    # records: with a consistent capacity matrix the field leaves [T_inf, T_i] at times far
    # below the surface elements' diffusion time, where the records do not go.
    assert_only_its_own_overshoot(solution, reference, AMBIENT, INITIAL, KRYLOV_TOLERANCE)

    # Against the series: the mesh's error alone, below the bound the Crank-Nicolson test
    # derives for this mesh, and at least as close as Crank-Nicolson with 400 steps of
    # L^2/alpha / 200 on the same mesh. Its time error can cancel part of the space error at
    # some points, so the exponential run may be up to 1.25 times further off (measured
    # 0.40, 0.36, 1.11 times the Crank-Nicolson error at Bi = 0.1, 1, 10; errors 1.6e-5,
    # 1.1e-4, 3.6e-4 of the initial difference).
    fine_steps = solve(model, WALL_END, time_step=DIFFUSION_TIME / 200, output_times=WALL_OUTPUTS)

    def worst(run) -> float:
        return max(errors_at_fourier_numbers(run, lambda fo: wall_exact(biot, fo)).values())

    exponential, crank_nicolson = worst(solution), worst(fine_steps)
    assert exponential < WALL_TOLERANCE
    assert exponential <= 1.25 * crank_nicolson + KRYLOV_TOLERANCE / SPAN, (
        f"Bi = {biot}: exponential {exponential:.2e}, Crank-Nicolson {crank_nicolson:.2e}"
    )


# =================================================================================================
# 4. Stepped schedules at small Biot number against the lumped exponentials
# =================================================================================================


@cache
def bar_section():
    """The quarter bar of test_solver_conditions (24 mm x 16 mm, Bi = 0.005 on V/A_s)."""
    return Rectangle(
        BAR_HALF_WIDTH,
        BAR_HALF_HEIGHT,
        edge_names={"left": "symmetry", "bottom": "symmetry", "right": "cooled", "top": "cooled"},
    ).mesh(BAR_HALF_HEIGHT / 8)


PERIOD, ON = 0.8 * BAR_TAU, 0.3 * 0.8 * BAR_TAU
STEPPED_CASES = {
    # name: (end, start, switching times, ambients, lumped time constants, coefficients)
    "ambient": (
        4 * BAR_TAU,
        320.0,
        (0.0, 1.37 * BAR_TAU),
        (20.0, 200.0),
        (BAR_TAU, BAR_TAU),
        (BAR_H, BAR_H),
    ),
    "coefficient": (
        3 * BAR_TAU,
        320.0,
        (0.0, 0.73 * BAR_TAU),
        (20.0, 20.0),
        (BAR_TAU, 2 * BAR_TAU),  # h halved: tau = rho c V / (h A) doubled
        (BAR_H, BAR_H / 2),
    ),
    "periodic ambient": (
        4 * BAR_TAU,
        20.0,
        tuple(sorted({k * PERIOD + s for k in range(5) for s in (0.0, ON)})),
        (100.0, 300.0) * 5,
        (BAR_TAU,) * 10,
        (BAR_H,) * 10,
    ),
}


def stepped_model(name: str) -> ThermalModel:
    _, start, switches, ambients, _, coefficients = STEPPED_CASES[name]
    if name == "periodic ambient":
        ambient = Periodic(Steps((0.0, ON), (100.0, 300.0)), PERIOD)
        return bar_model(bar_section(), ambient, start)
    ambient = Steps(switches, ambients) if len(set(ambients)) > 1 else ambients[0]
    h = Steps(switches, coefficients) if len(set(coefficients)) > 1 else coefficients[0]
    return bar_model(bar_section(), ambient, start, h=h)


@pytest.mark.parametrize("name", list(STEPPED_CASES))
def test_stepped_schedules_follow_the_lumped_exponentials_in_one_step_per_interval(name):
    end, start, switches, ambients, taus, coefficients = STEPPED_CASES[name]
    tolerance = 1e-5 * 300.0
    solution = solve(stepped_model(name), end, method="exponential", tolerance=tolerance)
    stats = solution.stats
    intervals = np.diff([*switches, end])
    assert stats.steps == len(intervals)  # one step from breakpoint to breakpoint
    for switch in switches[1:]:  # every switch is a recorded time
        assert np.abs(solution.times - switch).min() <= 1e-9 * switch
    # One factorisation of M + gamma A per distinct (interval length, coefficient): the shift
    # gamma follows the interval length. Measured 2 in every case (10 steps when periodic).
    distinct = {
        (round(float(d) / end, 9), h) for d, h in zip(intervals, coefficients, strict=True)
    }
    assert stats.factorisations <= len(distinct), (stats.factorisations, distinct)
    assert stats.error_estimate <= tolerance
    assert solution.checks.warnings == ()

    # Lumped model (Incropera §5.1-5.3, from memory), an exponential approach on each
    # interval; within Bi/2 of the driving difference, as for the time-stepped runs in
    # test_solver_conditions. Measured 0.37, 0.35 and 0.31 K of 0.75, 0.75 and 0.70 K (Crank-
    # Nicolson there: 0.39, 0.38, 0.31 K): the gap is the lumped model's, not the steps'.
    exact = lumped_piecewise(solution.times, start, switches, ambients, taus)
    driving = max(abs(start - a) for a in ambients)
    gap = float(np.abs(solution.mean - exact).max())
    assert gap < LUMPED_SHARE * driving, f"{name}: gap {gap:.3g} K"


# =================================================================================================
# 5. A fixed-temperature face: the series, the semi-discrete solution and the heat it passes
# =================================================================================================

HELD_DIVISIONS = 40  # P1 of size L/40: nodal error O((l/L)^2) = 6.3e-4 of the difference
HELD_END = 2 * DIFFUSION_TIME
HELD_SWITCH = 0.6 * DIFFUSION_TIME  # the stepped case raises the face from here on
HELD_RISE = 100.0  # K
SERIES_ORDERS = np.arange(400)
HALF_ROOTS = (2 * SERIES_ORDERS + 1) * math.pi / 2  # (2n + 1) pi / 2


@cache
def held_strip():
    """The wall of half-thickness L again, its face at y = L held, y = 0 insulated."""
    strip = Rectangle(
        STRIP_WIDTH,
        LENGTH,
        edge_names={"bottom": "far", "top": "held", "left": "ends", "right": "ends"},
    )
    return strip.mesh(LENGTH / HELD_DIVISIONS)


def held_model(face) -> ThermalModel:
    return ThermalModel(
        held_strip(),
        MATERIAL,
        boundaries={"far": Insulated(), "ends": Insulated(), "held": FixedTemperature(face)},
        initial_temperature=INITIAL,
        probes={"far": (STRIP_WIDTH / 2, 0.0), "middle": (STRIP_WIDTH / 2, LENGTH / 2)},
    )


def held_series(fourier: np.ndarray, depth: float | None, derivative: int = 0) -> np.ndarray:
    """d^k/dFo^k of theta = (T - T_face) / (T_i - T_face) of a slab with one face held at
    T_face from t = 0 and the other insulated, at depth xi = (distance from the held face) / L,
    or of its mean when ``depth`` is None (Carslaw & Jaeger, 2nd ed., §3.3, from memory; the
    same as Incropera §5.5.1 with Bi -> infinity):
    theta = sum 4 / ((2n + 1) pi) sin((2n + 1) pi xi / 2) exp(-((2n + 1) pi / 2)^2 Fo),
    mean = sum 8 / ((2n + 1) pi)^2 exp(-((2n + 1) pi / 2)^2 Fo). 400 terms: for Fo >= 0.01
    the omitted ones are below exp(-(400 pi)^2 0.01), nothing."""
    fourier = np.asarray(fourier, dtype=float)
    assert fourier.min() >= 0.01
    if depth is None:
        weights = 8 / (2 * SERIES_ORDERS + 1) ** 2 / math.pi**2
    else:
        weights = 4 / ((2 * SERIES_ORDERS + 1) * math.pi) * np.sin(HALF_ROOTS * depth)
    weights = weights * (-(HALF_ROOTS**2)) ** derivative
    return np.exp(-np.outer(fourier, HALF_ROOTS**2)) @ weights


def held_exact(times: np.ndarray, stepped: bool, depth: float | None, derivative: int = 0):
    """T (or its k-th time derivative) of the held-face slab; the stepped face adds, by
    Duhamel's superposition (Carslaw & Jaeger §1.14, from memory), HELD_RISE (1 - theta) from
    HELD_SWITCH on."""
    scale = DIFFUSION_TIME**-derivative
    value = SPAN * held_series(times / DIFFUSION_TIME, depth, derivative) * scale
    if derivative == 0:
        value = value + AMBIENT
    if stepped:
        after = times >= HELD_SWITCH
        since = (times[after] - HELD_SWITCH) / DIFFUSION_TIME
        extra = -HELD_RISE * held_series(since, depth, derivative) * scale
        value[after] += extra + (HELD_RISE if derivative == 0 else 0.0)
    return value


@pytest.mark.parametrize("stepped", [False, True], ids=["constant-face", "stepped-face"])
def test_fixed_face_matches_the_series_and_passes_the_heat_it_stores(stepped):
    face = Steps((0.0, HELD_SWITCH), (AMBIENT, AMBIENT + HELD_RISE)) if stepped else AMBIENT
    model = held_model(face)
    tolerance = KRYLOV_TOLERANCE
    solution = solve(model, HELD_END, method="exponential", tolerance=tolerance)
    times = solution.times
    stats = solution.stats
    assert stats.steps == (2 if stepped else 1)
    assert stats.error_estimate <= tolerance
    # Away from each jump, where the mesh resolves the boundary layer (Fo >= 0.05 since it).
    settled = times >= 0.05 * DIFFUSION_TIME
    if stepped:
        settled &= (times < HELD_SWITCH) | (times >= HELD_SWITCH + 0.05 * DIFFUSION_TIME)

    # The series: P1's nodal error, (l/L)^2 = 6.3e-4 of the difference. Measured 9.6e-5 (far
    # face), 2.3e-4 (middle) and 2.3e-4 (mean), with either face.
    bound = (1 / HELD_DIVISIONS) ** 2 * SPAN
    for name, values, depth in (
        ("far face", solution.probes["far"], 1.0),
        ("middle", solution.probes["middle"], 0.5),
        ("mean", solution.mean, None),
    ):
        exact = held_exact(times[settled], stepped, depth)
        gap = float(np.abs(values[settled] - exact).max())
        assert gap < bound, f"{name}: {gap:.3g} K off the series (bound {bound:.3g} K)"

    # The semi-discrete solution (constant face only: the stepped one changes the held values):
    # within the tolerance at every record, and its own overshoot is the excursion reported.
    if not stepped:
        reference = semi_discrete_histories(model, times)
        gap = largest_gap(solution, reference)
        assert gap <= tolerance, f"{gap:.3g} K off the semi-discrete solution"
        assert_only_its_own_overshoot(solution, reference, AMBIENT, INITIAL, tolerance)

    # Energy. All heat enters through the held face. The ledger (heat absorbed, from the
    # closed-form integrals of the approximation, with the heat a jump of the held face stores
    # at once) equals the stored energy to the approximation's error: each is within
    # C tolerance of the exact value, C = rho c V (measured 1.8e-8 J/m, stepped 1.5e-7 J/m, of
    # 0.25 J/m allowed; before commit a8b1418 booked the jump's heat it was off by 64 J/m).
    heat_capacity = DENSITY * SPECIFIC_HEAT * STRIP_WIDTH * LENGTH  # J/(m K)
    ledger = float(np.abs(solution.stored_energy - solution.absorbed_heat).max())
    assert ledger <= 2 * heat_capacity * tolerance, f"ledger off by {ledger:.3g} J/m"
    assert solution.checks.energy_balance_error <= tolerance / SPAN
    assert not any("energy balance" in w for w in solution.checks.warnings)
    # The held face's heat-flow history is the rate of change of the stored energy: its
    # trapezoidal integral between the records of the settled times matches the stored
    # energy's change to the rule's error, sum h^3 / 12 max|Q''| over the intervals, with
    # Q'' bounded from the series (each superposed part's |Q''| falls in time, so its value
    # at an interval's start bounds it there), times 1.5 for the mesh, plus twice the
    # approximation's C tolerance. Measured 0.39 J/m of 1.1 J/m (3.2e-5 of the stored change),
    # stepped 0.38 of 1.4 J/m.
    flow = solution.heat_flow["held"]
    pairs = settled[:-1] & settled[1:]
    steps = np.diff(times)[pairs]
    trapezoid = 0.5 * (flow[:-1] + flow[1:])[pairs] * steps
    stored = np.diff(solution.stored_energy)[pairs]
    starts = times[:-1][pairs]
    curvature = heat_capacity * SPAN * np.abs(held_series(starts / DIFFUSION_TIME, None, 3))
    if stepped:
        after = starts >= HELD_SWITCH
        since = (starts[after] - HELD_SWITCH) / DIFFUSION_TIME
        curvature[after] += heat_capacity * HELD_RISE * np.abs(held_series(since, None, 3))
    curvature /= DIFFUSION_TIME**3
    allowed = 1.5 * float(np.sum(steps**3 / 12 * curvature)) + 4 * heat_capacity * tolerance
    mismatch = float(np.abs(np.cumsum(trapezoid - stored)).max())
    assert mismatch <= allowed, f"flow integral off by {mismatch:.3g} J/m ({allowed:.3g})"
    # ... and it is the series' rate rho c V d(mean)/dt, to 1 % of its largest value (the
    # mesh's error in a derivative; measured 8.7e-4).
    rate = heat_capacity * held_exact(times[settled], stepped, None, derivative=1)
    gap = float(np.abs(flow[settled] - rate).max())
    assert gap < 0.01 * float(np.abs(rate).max()), f"flow off by {gap:.3g} W/m"


# =================================================================================================
# 6. A heat source: the steady profile of a slab with generation
# =================================================================================================


@pytest.mark.parametrize("order", [1, 2])
def test_slab_with_generation_settles_on_the_parabola_in_one_step(order):
    # The slab of test_slab_with_generation_reaches_the_steady_profile.
    width, half, size = SLAB_WIDTH, SLAB_HALF, SLAB_SIZE
    k, rho, c = SLAB.conductivity, SLAB.density, SLAB.specific_heat
    h, ambient, q = SLAB_H, SLAB_AMBIENT, SLAB_SOURCE
    model = generating_slab(order)
    section = model.section
    # The slowest mode's time constant (98 s); after 100 of them the transient is e^-100 of
    # the rise: the end state is the steady one, reached in one step from the start.
    tau_1 = half**2 * rho * c / k / plane_wall_first_root(h * half / k) ** 2
    rise = q * half / h + q * half**2 / (2 * k)  # 40 K + 10 K
    tolerance = 1e-7 * rise
    solution = solve(
        model, 100 * tau_1, method="exponential", tolerance=tolerance, output_interval=10 * tau_1
    )
    assert (solution.stats.steps, solution.stats.factorisations) == (1, 1)
    assert solution.stats.error_estimate <= tolerance
    assert solution.checks.warnings == ()

    # Incropera §3.5 (from memory): T(y) = T_inf + q L / h + q (L^2 - y^2) / (2 k). P2 holds
    # the parabola exactly, so only the tolerance and round-off remain (1e-6 of the rise is
    # allowed; measured 8e-12 K); P1's nodal error is that of interpolating the parabola,
    # l^2 q / (8 k) = 0.025 K (measured 6.0e-3 K).
    y = section.vertices[1]
    exact = ambient + q * half / h + q * (half**2 - y**2) / (2 * k)
    allowed = 1e-6 * rise if order == 2 else size**2 * (q / k) / 8
    gap = float(np.abs(solution.fields[-1] - exact).max())
    assert gap < allowed + tolerance, f"P{order}: {gap:.3g} K off the parabola"
    # All the heat generated leaves through the cooled face (per metre of depth).
    assert solution.generated[-1] == pytest.approx(q * width * half, rel=1e-9)
    assert solution.heat_flow["cooled"][-1] == pytest.approx(-q * width * half, rel=1e-6)


# =================================================================================================
# 7. Stop conditions located on the approximation itself
# =================================================================================================

STOP_TARGET = AMBIENT + 0.5 * SPAN  # 120 degC: halfway to the ambient


def wall_mean_series(biot: float, fourier: float, derivative: int = 0) -> float:
    """d^k/dFo^k of the plane wall's mean theta, sum C_n (-zeta_n^2)^k exp(-zeta_n^2 Fo)
    sin(zeta_n) / zeta_n (Incropera §5.5.3, from memory), from exact_series' roots."""
    roots = plane_wall_roots(biot, SERIES_TERMS)
    weights = plane_wall_coefficients(roots) * np.sin(roots) / roots * (-(roots**2)) ** derivative
    return float(np.exp(-(roots**2) * fourier) @ weights)


@pytest.mark.parametrize("quantity", ["centre", "mean"])
def test_stop_time_matches_the_series_crossing(quantity):
    biot = 1.0
    series = WallSeries(biot)

    def exact_theta(fourier: float, derivative: int = 0) -> float:
        if quantity == "mean":
            return wall_mean_series(biot, fourier, derivative)
        return float(series.theta(fourier, 0.0, derivative)[0])

    crossing = DIFFUSION_TIME * brentq(lambda fo: exact_theta(fo) - 0.5, 0.01, 20.0, xtol=1e-14)
    tolerance = KRYLOV_TOLERANCE
    end = 10 * DIFFUSION_TIME
    solution = solve(
        strip_model(biot, strip_mesh(20)),
        end,
        method="exponential",
        tolerance=tolerance,
        stop=StopWhen(quantity, STOP_TARGET),
    )
    values = solution.mean if quantity == "mean" else solution.probes[quantity]
    times = solution.times
    # The run ends at the crossing, found by bisection on the approximation: the last record
    # is the stop time, where the quantity is the target (to far below the tolerance), and
    # its field is stored.
    assert solution.stop_time is not None and solution.stop_time < end
    assert times[-1] == pytest.approx(solution.stop_time, rel=1e-12)
    assert abs(values[-1] - STOP_TARGET) <= 1e-3 * tolerance
    assert values[-2] > STOP_TARGET
    assert solution.output_times[-1] == pytest.approx(solution.stop_time, rel=1e-12)
    reference = semi_discrete_histories(strip_model(biot, strip_mesh(20)), times)
    assert_only_its_own_overshoot(solution, reference, AMBIENT, INITIAL, tolerance)
    # Time is exact to the tolerance, so the stop is off the series' crossing by the field's
    # error there over the rate: (space error + tolerance) / |dT/dt|, the space error measured
    # against the series at the record before the crossing, 1.2 times for its change up to the
    # crossing. Measured 4.2e-4 s (centre) and 2.1e-3 s (mean) of 1.2e-3 s and 3.2e-3 s.
    fourier = times[-2] / DIFFUSION_TIME
    space_error = SPAN * abs(float(theta(values[-2])) - exact_theta(fourier))
    slope = SPAN * abs(exact_theta(crossing / DIFFUSION_TIME, 1)) / DIFFUSION_TIME
    allowed = 1.2 * (space_error + tolerance) / slope
    assert abs(solution.stop_time - crossing) <= allowed, (
        f"{quantity}: stop at {solution.stop_time:.6f} s, series {crossing:.6f} s "
        f"(allowed {allowed:.2e} s)"
    )


def test_stop_in_a_later_interval_matches_the_lumped_crossing():
    # The bar heats towards 100 degC, then from the switch towards 300 degC, and stops when its
    # mean reaches 150 degC, in the second interval.
    switch, start, target = 0.9 * BAR_TAU, 20.0, 150.0
    model = bar_model(bar_section(), Steps((0.0, switch), (100.0, 300.0)), start)
    tolerance = 1e-5 * 280.0
    solution = solve(
        model,
        5 * BAR_TAU,
        method="exponential",
        tolerance=tolerance,
        stop=StopWhen("mean", target),
    )
    # Lumped (Incropera §5.1, from memory): T(switch) = 100 - 80 e^(-switch / tau), then
    # 300 - (300 - T(switch)) e^(-(t - switch) / tau) = target.
    at_switch = 100.0 - 80.0 * math.exp(-switch / BAR_TAU)
    crossing = switch + BAR_TAU * math.log((300.0 - at_switch) / (300.0 - target))
    assert solution.stats.steps == 2  # stopped in the second interval
    assert solution.stop_time > switch
    assert abs(solution.mean[-1] - target) <= 1e-3 * tolerance
    # The lumped mean is within Bi/2 of the driving difference (280 K), a time gap of that over
    # the heating rate (300 - target) / tau at the crossing. Measured 0.62 s of 1.5 s.
    allowed = LUMPED_SHARE * 280.0 / ((300.0 - target) / BAR_TAU)
    assert abs(solution.stop_time - crossing) <= allowed, (solution.stop_time, crossing)


# =================================================================================================
# 8. An axisymmetric section: the sphere
# =================================================================================================


def test_sphere_matches_the_series_better_than_small_steps():
    # P2 on the curved half-disk of test_radial_solid_matches_series (R/8), revolved about the
    # axis, at Bi = 10, the hardest case for the time error of stepping.
    biot = 10.0
    model = radial_model("sphere", biot, divisions=8)
    tolerance = KRYLOV_TOLERANCE
    solution = solve(
        model, WALL_END, method="exponential", tolerance=tolerance, output_times=WALL_OUTPUTS
    )
    assert (solution.stats.steps, solution.stats.factorisations) == (1, 1)
    assert solution.stats.error_estimate <= tolerance
    # The semi-discrete solution of the revolved section (measured 0.75 of the tolerance).
    reference = semi_discrete_histories(model, solution.times)
    gap = largest_gap(solution, reference)
    assert gap <= tolerance, f"{gap:.3g} K off the semi-discrete solution"
    assert_only_its_own_overshoot(solution, reference, AMBIENT, INITIAL, tolerance)
    fine_steps = solve(model, WALL_END, time_step=DIFFUSION_TIME / 400, output_times=WALL_OUTPUTS)

    def worst(run) -> float:
        return max(errors_at_fourier_numbers(run, lambda fo: sphere_exact(biot, fo)).values())

    # P2's nodal error O((1/8)^3) = 2e-3 times a small constant: 3e-4 of the difference is
    # allowed (measured 9.4e-5). Crank-Nicolson's time error dominates its 4.3e-4 (that test
    # allows 1e-3): the exponential run must be closer.
    exponential, crank_nicolson = worst(solution), worst(fine_steps)
    assert exponential < 3e-4, f"{exponential:.2e} of the initial difference"
    assert exponential < crank_nicolson, (exponential, crank_nicolson)


# =================================================================================================
# 9. What exponential steps refuse
# =================================================================================================


def refused_model(kind: str) -> ThermalModel:
    section = Rectangle(
        0.010,
        0.005,
        edge_names={"left": "heated", "right": "cooled", "top": "sides", "bottom": "sides"},
    ).mesh(0.0025)
    boundaries = {"heated": Insulated(), "sides": Insulated(), "cooled": Convection(100.0, 20.0)}
    material, sources = MATERIAL, {}
    if kind == "radiation":
        boundaries["cooled"] = (Convection(100.0, 20.0), Radiation(0.8, 20.0))
    elif kind == "conductivity table":
        material = Material(PropertyTable((0.0, 500.0), (10.0, 15.0)), DENSITY, SPECIFIC_HEAT)
    elif kind == "specific heat table":
        material = Material(CONDUCTIVITY, DENSITY, PropertyTable((0.0, 500.0), (600.0, 700.0)))
    elif kind == "ramped ambient":
        boundaries["cooled"] = Convection(100.0, PiecewiseLinear((0.0, 10.0), (20.0, 80.0)))
    elif kind == "sinusoidal ambient":
        boundaries["cooled"] = Convection(100.0, Sinusoid(50.0, 20.0, 60.0))
    elif kind == "sinusoidal coefficient":
        boundaries["cooled"] = Convection(Sinusoid(100.0, 20.0, 60.0), 20.0)
    elif kind == "periodic ramp":
        ramp = PiecewiseLinear((0.0, 10.0), (20.0, 80.0))
        boundaries["cooled"] = Convection(100.0, Periodic(ramp, 20.0))
    elif kind == "ramped flux":
        boundaries["heated"] = HeatFlux(PiecewiseLinear((0.0, 10.0), (0.0, 1e4)))
    elif kind == "sinusoidal face":
        boundaries["heated"] = FixedTemperature(Sinusoid(100.0, 20.0, 60.0))
    elif kind == "ramped source":
        sources = {"solid": PiecewiseLinear((0.0, 10.0), (0.0, 1e6))}
    return ThermalModel(
        section, material, boundaries, initial_temperature=200.0, heat_sources=sources
    )


@pytest.mark.parametrize(
    ("kind", "pattern"),
    [
        ("radiation", r"linear model.*no radiation"),
        ("conductivity table", r"linear model.*constant properties"),
        ("specific heat table", r"linear model.*constant properties"),
        ("ramped ambient", r"the ambient of 'cooled' is PiecewiseLinear"),
        ("sinusoidal ambient", r"the ambient of 'cooled' is Sinusoid"),
        ("sinusoidal coefficient", r"the heat_transfer_coefficient of 'cooled' is Sinusoid"),
        ("periodic ramp", r"the ambient of 'cooled' is Periodic"),
        ("ramped flux", r"the flux of 'heated' is PiecewiseLinear"),
        ("sinusoidal face", r"the temperature of 'heated' is Sinusoid"),
        ("ramped source", r"the heat source of 'solid' is PiecewiseLinear"),
    ],
)
def test_nonlinear_models_and_changing_schedules_are_refused(kind, pattern):
    model = refused_model(kind)
    with pytest.raises(ModelError, match=pattern) as refusal:
        solve(model, 30.0, method="exponential")
    assert "crank-nicolson" in str(refusal.value)  # and what to use instead


# =================================================================================================
# 10. The run's own checks on ordinary runs
# =================================================================================================


def plate_model() -> ThermalModel:
    """The plate of test_energy_balance_is_round_off_for_linear_runs: 2L x L, a face held at
    220 degC on the left, convection at Bi = 3 on top, insulated elsewhere, starting at 80."""
    plate = Rectangle(
        2 * LENGTH,
        LENGTH,
        edge_names={"left": "heated", "top": "cooled", "right": "ends", "bottom": "ends"},
    )
    return ThermalModel(
        plate.mesh(LENGTH / 8),
        MATERIAL,
        boundaries={
            "heated": FixedTemperature(INITIAL),
            "cooled": Convection(3.0 * CONDUCTIVITY / LENGTH, AMBIENT),
            "ends": Insulated(),
        },
        initial_temperature=80.0,
    )


@pytest.mark.parametrize("tolerance", [None, 1e-2, 1e-4, 1e-6])
def test_ordinary_run_passes_its_own_checks(tolerance):
    end = 3 * DIFFUSION_TIME
    solution = solve(
        plate_model(), end, method="exponential", tolerance=tolerance, output_interval=end / 7
    )
    # The default tolerance is 1e-4 of the temperature span (220 - 20 K).
    asked = 1e-4 * SPAN if tolerance is None else tolerance
    stats = solution.stats
    assert stats.error_estimate <= asked
    assert stats.krylov_dimension >= 1 and stats.solves == stats.krylov_dimension + 1
    assert solution.checks.warnings == ()
    # The energy ledger is the approximation's own (closed-form integrals of it), so it meets
    # the stored energy to the approximation's error, C tolerance each (C = rho c V); the
    # run's check divides by C times the span. Measured at most 6.4e-5 of the allowance; the
    # check 1.3e-8 (default tolerance, 0.02 K) to 5e-14 (1e-6 K). Estimates: at most 0.57 of
    # the tolerance.
    heat_capacity = DENSITY * SPECIFIC_HEAT * 2 * LENGTH * LENGTH
    ledger = float(np.abs(solution.stored_energy - solution.absorbed_heat).max())
    assert ledger <= 2 * heat_capacity * asked
    assert solution.checks.energy_balance_error <= 2 * asked / SPAN


def test_insulated_body_stores_exactly_the_heat_put_in():
    # No exchange: A is singular (the uniform field is its null vector), the path where the
    # phi functions take their lambda = 0 limits. A flux of 4e5 W/m^2 on one edge for 47.3 s,
    # then nothing: the body stores q H t_on and ends uniform at T0 + q H t_on / (rho c V)
    # (conservation of energy), and before the switch it stores q H t exactly.
    width, height, flux, heating, start = 0.020, 0.010, 4.0e5, 47.3, 20.0
    section = Rectangle(
        width,
        height,
        edge_names={"left": "heated", "right": "closed", "top": "closed", "bottom": "closed"},
    ).mesh(0.002)
    model = ThermalModel(
        section,
        MATERIAL,
        boundaries={"heated": HeatFlux(Steps((0.0, heating), (flux, 0.0))), "closed": Insulated()},
        initial_temperature=start,
    )
    end = 300.0  # the slowest mode, width^2 / (pi^2 alpha) = 8 s, has died out
    tolerance = 1e-6
    solution = solve(model, end, method="exponential", tolerance=tolerance, output_interval=end)
    heat_in = flux * height * heating
    heat_capacity = DENSITY * SPECIFIC_HEAT * width * height  # J/(m K)
    final = start + heat_in / heat_capacity  # 378 K up
    assert solution.stats.steps == 2
    assert solution.stats.error_estimate <= tolerance
    # Every node within the tolerance: the mean too, the spread within twice it, and the stored
    # energy within C tolerance (5e-4 J/m of 1.9e5 J/m; measured 1e-8 J/m, round-off).
    assert solution.mean[-1] == pytest.approx(final, abs=tolerance)
    assert solution.maximum[-1] - solution.minimum[-1] < 2 * tolerance
    assert solution.stored_energy[-1] == pytest.approx(heat_in, abs=heat_capacity * tolerance)
    before = solution.times <= heating
    np.testing.assert_allclose(
        solution.stored_energy[before],
        flux * height * solution.times[before],
        rtol=0.0,
        atol=heat_capacity * tolerance,
    )
    assert solution.checks.warnings == ()


def test_a_start_at_rest_waits_for_the_first_jump():
    """Nothing happens until the ambient steps up (the approximation of a state at rest is
    the state itself); afterwards the part heats like small Crank–Nicolson steps. Both are
    integrations of one semi-discrete system: at 0.05 s steps Crank–Nicolson's time error is
    far below the 0.01 K compared."""
    section = Rectangle(0.01, 0.004).mesh(0.001)
    ambient = Steps((0.0, 10.0), (0.0, 50.0))
    model = ThermalModel(
        section,
        Material(20.0, 8000.0, 500.0),
        {group: Convection(200.0, ambient) for group in section.edge_groups},
        0.0,
    )
    solution = solve(model, 40.0, method="exponential", tolerance=1e-3)
    assert solution.stats.steps == 2
    before = solution.times <= 10.0
    assert np.all(solution.mean[before] == 0.0)
    stepped = solve(model, 40.0, time_step=0.05)
    assert solution.mean[-1] > 10.0  # it did heat
    assert solution.mean[-1] == pytest.approx(stepped.mean[-1], abs=0.01)


def test_a_breakpoint_a_rounding_error_before_the_end_is_no_step():
    """k·period and end_time computed another way differ in the last bit: no sliver step and
    no doubled output at the end."""
    section = Rectangle(0.01, 0.004).mesh(0.002)
    ambient = Periodic(Steps((0.0, 24.0), (100.0, 300.0)), 80.0)
    model = ThermalModel(
        section,
        Material(20.0, 8000.0, 500.0),
        {group: Convection(50.0, ambient) for group in section.edge_groups},
        20.0,
    )
    end = (3 * 0.8) * 100  # 240.00000000000003
    assert end != 240.0
    solution = solve(model, end, method="exponential", output_interval=60.0)
    assert solution.stats.steps == 6  # two per period
    assert solution.stats.smallest_step > 1.0
    assert len(solution.output_times) == len(set(np.round(solution.output_times, 6))) == 5
