"""The transient solver against exact series, a handbook table and its own convergence.

Bodies at a uniform initial temperature plunged at t = 0 into a fluid (a sudden change of the
boundary data), each modelled as a 2-D section:

- plane wall: a narrow strip of half-thickness L, convection on top, symmetry at the bottom,
  insulated ends (a 1-D field in a 2-D mesh);
- long cylinder: a planar quarter disk of radius R with two symmetry cuts;
- sphere: an axisymmetric half-disk (x is the radius of revolution);
- short cylinder: an axisymmetric rectangle of radius R and half-height H, symmetry at z = 0.

References, computed here with their own root-finding and sums (``tests/exact_series.py``),
never by the code under test:

- plane wall, Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*,
  6th ed., §5.5.1, eq. 5.39-5.42 (from memory);
- cylinder and sphere, the same book, §5.6.1 (from memory);
- short cylinder, the product of the cylinder and plane-wall solutions, §5.8 (from memory);
- first eigenvalues and coefficients, the same book, Table 5.1 (values from memory);
- all series also in Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §3.10,
  ch. VII and ch. IX (from memory).

Time-accuracy tests compare runs with a much finer-step run on the same mesh (so the space
error cancels), cross-checked against the exact-in-time solution of the semi-discrete system
(its eigen-expansion). The material is invented for these tests.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field
from functools import cache

import numpy as np
import pytest
import scipy.linalg
import scipy.sparse.linalg as spla
from exact_series import (
    cylinder_coefficients,
    cylinder_mean,
    cylinder_profile,
    cylinder_roots,
    cylinder_tail_bound,
    plane_wall_coefficients,
    plane_wall_mean,
    plane_wall_profile,
    plane_wall_roots,
    plane_wall_tail_bound,
    sphere_coefficients,
    sphere_mean,
    sphere_profile,
    sphere_roots,
    sphere_tail_bound,
)
from scipy.optimize import brentq

from fem import (
    Constant,
    Convection,
    FixedTemperature,
    Insulated,
    Material,
    StopWhen,
    ThermalModel,
    assemble,
    solve,
)
from geometries import Circle, Rectangle, Section, SectionMesh

# --- The problem ------------------------------------------------------------------------------

CONDUCTIVITY = 12.5  # W/(m*K), invented
DENSITY = 4000.0  # kg/m^3, invented
SPECIFIC_HEAT = 625.0  # J/(kg*K), invented
DIFFUSIVITY = CONDUCTIVITY / (DENSITY * SPECIFIC_HEAT)  # 5e-6 m^2/s, computed here
MATERIAL = Material(CONDUCTIVITY, DENSITY, SPECIFIC_HEAT)

LENGTH = 0.010  # m: half-thickness L of the wall, radius R of the cylinders and the sphere
HALF_HEIGHT = 0.005  # m: half-height H of the short cylinder
DIFFUSION_TIME = LENGTH**2 / DIFFUSIVITY  # 20 s: t = Fo * DIFFUSION_TIME
STRIP_WIDTH = LENGTH / 4  # m: the strip is a 1-D wall; its width only costs elements

INITIAL = 220.0  # degC
AMBIENT = 20.0  # degC
SPAN = INITIAL - AMBIENT  # the initial difference; errors are fractions of it

FOURIER_NUMBERS = (0.05, 0.1, 0.5, 1.0, 2.0)
BIOT_NUMBERS = (0.1, 1.0, 10.0)
SERIES_TERMS = 60
TAIL_LIMIT = 1e-12  # bound on the omitted series terms, fraction of the initial difference


# --- Exact references ---------------------------------------------------------------------------


def _checked_tail(tail: float, fourier: float) -> None:
    assert tail < TAIL_LIMIT, f"series truncated too early at Fo = {fourier}: tail {tail:.1e}"


def wall_exact(biot: float, fourier: float) -> dict[str, float]:
    """Plane wall theta* at the mid-plane, the face and the mean (Incropera 6th ed. §5.5.1
    eq. 5.39-5.42 and §5.5.3, from memory)."""
    _checked_tail(plane_wall_tail_bound(fourier, SERIES_TERMS), fourier)
    centre, face = plane_wall_profile(biot, fourier, [0.0, 1.0], terms=SERIES_TERMS)
    mean = plane_wall_mean(biot, fourier, terms=SERIES_TERMS)
    return {"centre": float(centre), "surface": float(face), "mean": mean}


def cylinder_exact(biot: float, fourier: float) -> dict[str, float]:
    """Long cylinder theta* on the axis, at the surface and the mean (Incropera 6th ed.
    §5.6.1 and §5.6.3, from memory)."""
    _checked_tail(cylinder_tail_bound(fourier, SERIES_TERMS), fourier)
    centre, face = cylinder_profile(biot, fourier, [0.0, 1.0], terms=SERIES_TERMS)
    mean = cylinder_mean(biot, fourier, terms=SERIES_TERMS)
    return {"centre": float(centre), "surface": float(face), "mean": mean}


def sphere_exact(biot: float, fourier: float) -> dict[str, float]:
    """Sphere theta* at the centre, at the surface and the mean (Incropera 6th ed. §5.6.1 and
    §5.6.3, from memory)."""
    _checked_tail(sphere_tail_bound(biot, fourier, SERIES_TERMS), fourier)
    centre, face = sphere_profile(biot, fourier, [0.0, 1.0], terms=SERIES_TERMS)
    mean = sphere_mean(biot, fourier, terms=SERIES_TERMS)
    return {"centre": float(centre), "surface": float(face), "mean": mean}


def short_cylinder_exact(biot: float, fourier: float) -> dict[str, float]:
    """Short cylinder: the product of the long cylinder (Bi = hR/k, Fo = alpha t/R^2) and the
    plane wall of half-thickness H (Bi = hH/k, Fo = alpha t/H^2), Incropera 6th ed. §5.8
    (from memory). "surface" is the rim corner (r = R, z = H); the mean is the product of the
    means because the solution separates."""
    ratio = HALF_HEIGHT / LENGTH
    radial = cylinder_exact(biot, fourier)
    axial = wall_exact(biot * ratio, fourier / ratio**2)
    return {where: radial[where] * axial[where] for where in ("centre", "surface", "mean")}


class WallSeries:
    """The plane-wall series at many Fourier numbers at once, from the roots and coefficients
    of ``exact_series`` (Incropera 6th ed. §5.5.1 eq. 5.39-5.42, from memory)."""

    def __init__(self, biot: float, terms: int = SERIES_TERMS):
        self.terms = terms
        self.roots = plane_wall_roots(biot, terms)
        self.coefficients = plane_wall_coefficients(self.roots)

    def theta(self, fourier, x_star: float, derivative: int = 0) -> np.ndarray:
        """d^k theta*/dFo^k at x* for an array of Fo (k = ``derivative``)."""
        fourier = np.atleast_1d(np.asarray(fourier, dtype=float))
        assert fourier.min() > 0.0
        _checked_tail(plane_wall_tail_bound(float(fourier.min()), self.terms), fourier.min())
        weights = (
            self.coefficients * (-(self.roots**2)) ** derivative * np.cos(self.roots * x_star)
        )
        return np.exp(-np.multiply.outer(fourier, self.roots**2)) @ weights


# --- Sections and models ------------------------------------------------------------------------


def convection(biot: float, length: float = LENGTH, ambient=AMBIENT) -> Convection:
    """The fluid of a plunge at Bi = h length / k."""
    return Convection(heat_transfer_coefficient=biot * CONDUCTIVITY / length, ambient=ambient)


@cache
def strip_mesh(divisions: int, order: int = 1, refined: int = 0) -> SectionMesh:
    """The wall: x across the strip, y from the mid-plane (y = 0) to the cooled face (y = L).
    ``refined`` > 0 grades the mesh to L/refined at the cooled face."""
    strip = Rectangle(
        STRIP_WIDTH,
        LENGTH,
        edge_names={"bottom": "symmetry", "top": "cooled", "left": "ends", "right": "ends"},
    )
    refine = {"cooled": (LENGTH / refined, 1.25)} if refined else None
    return strip.mesh(LENGTH / divisions, order=order, refine=refine)


def strip_model(biot: float, section: SectionMesh, element_order: int = 1, ambient=AMBIENT):
    return ThermalModel(
        section,
        MATERIAL,
        boundaries={
            "symmetry": Insulated("symmetry"),
            "ends": Insulated(),
            "cooled": convection(biot, ambient=ambient),
        },
        initial_temperature=INITIAL,
        probes={"centre": (STRIP_WIDTH / 2, 0.0), "surface": (STRIP_WIDTH / 2, LENGTH)},
        element_order=element_order,
    )


@cache
def radial_mesh(kind: str, divisions: int) -> SectionMesh:
    """Quadratic (curved) meshes with target element size R/``divisions``."""
    size = LENGTH / divisions
    if kind == "cylinder":
        quarter = Circle(LENGTH, name="cooled").symmetry_cut((0.0, 0.0), (1.0, 0.0))
        return quarter.symmetry_cut((0.0, 0.0), (0.0, 1.0)).mesh(size, order=2)
    if kind == "sphere":
        half = Circle(LENGTH, name="cooled").symmetry_cut((0.0, 0.0), (1.0, 0.0))
        return Section(half, axisymmetric=True).mesh(size, order=2)
    if kind == "short cylinder":
        profile = Rectangle(
            LENGTH,
            HALF_HEIGHT,
            edge_names={"bottom": "symmetry", "right": "cooled", "top": "cooled"},
        )  # the left edge lies on x = 0 and becomes the axis
        return Section(profile, axisymmetric=True).mesh(size, order=2)
    raise ValueError(kind)


RADIAL_EXACT = {
    "cylinder": cylinder_exact,
    "sphere": sphere_exact,
    "short cylinder": short_cylinder_exact,
}
DIAGONAL = LENGTH / math.sqrt(2.0)  # a surface point of the disks that is not a mesh corner
RADIAL_PROBES = {
    "cylinder": {"centre": (0.0, 0.0), "surface": (DIAGONAL, DIAGONAL)},
    "sphere": {"centre": (0.0, 0.0), "surface": (DIAGONAL, DIAGONAL)},
    "short cylinder": {"centre": (0.0, 0.0), "surface": (LENGTH, HALF_HEIGHT)},
}


def radial_model(kind: str, biot: float, divisions: int, element_order: int = 2):
    section = radial_mesh(kind, divisions)
    boundaries = {"cooled": convection(biot)}
    if "symmetry" in section.edge_groups:
        boundaries["symmetry"] = Insulated("symmetry")
    return ThermalModel(
        section,
        MATERIAL,
        boundaries=boundaries,
        initial_temperature=INITIAL,
        probes=RADIAL_PROBES[kind],
        element_order=element_order,
    )


# --- Helpers ------------------------------------------------------------------------------------


def time_index(times: np.ndarray, time: float) -> int:
    """The index of ``time`` among the recorded times; fails unless it is hit exactly once."""
    hits = np.flatnonzero(np.abs(times - time) <= 1e-12 * max(times[-1], time))
    assert len(hits) == 1, f"t = {time!r} s is not on the time grid ({len(hits)} matches)"
    return int(hits[0])


def theta(values) -> np.ndarray:
    """(T - T_inf) / (T_i - T_inf)."""
    return (np.asarray(values, dtype=float) - AMBIENT) / SPAN


def errors_at_fourier_numbers(solution, exact, fouriers=FOURIER_NUMBERS) -> dict:
    """|theta*_FEM - theta*_exact| at the probes and of the mean at each Fourier number."""
    errors = {}
    for fourier in fouriers:
        i = time_index(solution.times, fourier * DIFFUSION_TIME)
        reference = exact(fourier)
        computed = {
            "centre": solution.probes["centre"][i],
            "surface": solution.probes["surface"][i],
            "mean": solution.mean[i],
        }
        for where, value in computed.items():
            errors[fourier, where] = abs(float(theta(value)) - reference[where])
    return errors


def fitted_order(steps, errors) -> float:
    """Least-squares slope of log(error) against log(step)."""
    slope, _ = np.polyfit(np.log(steps), np.log(errors), 1)
    return float(slope)


class RunawayError(RuntimeError):
    """The solver evaluated a watched schedule far more often than the run could need."""


@dataclass(frozen=True, eq=False)
class Watchdog(Constant):
    """A constant ambient that counts how often the solver evaluates it and raises
    :class:`RunawayError` beyond ``limit``, so a stepping loop that stops advancing (which calls no
    progress callback) fails quickly instead of hanging the test session. It changes no value:
    the solver sees the constant ``value``."""

    limit: int = 200_000
    calls: itertools.count = field(default_factory=itertools.count, repr=False)

    def __call__(self, time: float) -> float:
        if next(self.calls) >= self.limit:
            raise RunawayError(f"the ambient was evaluated more than {self.limit} times")
        return self.value


# =================================================================================================
# 1. Plane wall
# =================================================================================================

# P1 triangles of size L/20 and Crank-Nicolson steps of L^2/alpha / 200 (0.1 s), with the default
# backward-Euler start-up. Nodal P1 error is O(h^2): (1/20)^2 = 2.5e-3 times a constant of order
# 0.1 for these fields; the time error is O((alpha dt/L^2)^2) = 2.5e-5 times constants that are
# largest just after the plunge at Bi = 10. Measured: at most 3.3e-4 of the initial difference
# (Bi = 10, Fo = 0.05). The required 0.3 % keeps a margin of about 10.
WALL_TOLERANCE = 3e-3


@pytest.mark.parametrize("biot", BIOT_NUMBERS)
def test_plane_wall_matches_series(biot):
    model = strip_model(biot, strip_mesh(20))
    step = DIFFUSION_TIME / 200
    solution = solve(
        model,
        max(FOURIER_NUMBERS) * DIFFUSION_TIME,
        time_step=step,
        output_times=[f * DIFFUSION_TIME for f in FOURIER_NUMBERS],
    )
    assert solution.stats.time_step == pytest.approx(step, rel=1e-12)
    errors = errors_at_fourier_numbers(solution, lambda fo: wall_exact(biot, fo))
    worst = max(errors, key=errors.get)
    assert errors[worst] < WALL_TOLERANCE, (
        f"Bi = {biot}: {worst[1]} at Fo = {worst[0]} is off the series by {errors[worst]:.2e} "
        f"of the initial difference (tolerance {WALL_TOLERANCE})"
    )
    # The fields are stored at exactly the requested times.
    for fourier in FOURIER_NUMBERS:
        time_index(solution.output_times, fourier * DIFFUSION_TIME)
    assert solution.checks.warnings == ()


# =================================================================================================
# 2. Long cylinder, sphere and short cylinder
# =================================================================================================

# P2 elements on quadratic (curved-edge) meshes of size R/8, Crank-Nicolson steps of
# R^2/alpha / 400. P2 nodal error is O(h^3) ((1/8)^3 = 2e-3 times a small constant) and the
# curved edges are represented to O(h^3) too; the larger part of the error is the time error just
# after the plunge at Bi = 10 (it falls by 3-4 when the step is halved). Measured worst cases:
# 2.2e-4 (cylinder), 4.3e-4 (sphere), 2.3e-4 (short cylinder, its mean), all at Bi = 10 and
# Fo = 0.05. 0.1 % is required, a margin of at least 2.3; P1 would miss it at Bi = 10 even on
# R/10 (measured 3.9e-3 for the cylinder, 6.1e-3 for the sphere).
RADIAL_TOLERANCE = 1e-3


@pytest.mark.parametrize("biot", BIOT_NUMBERS)
@pytest.mark.parametrize("kind", ["cylinder", "sphere", "short cylinder"])
def test_radial_solid_matches_series(kind, biot):
    model = radial_model(kind, biot, divisions=8)
    step = DIFFUSION_TIME / 400
    solution = solve(
        model,
        max(FOURIER_NUMBERS) * DIFFUSION_TIME,
        time_step=step,
        output_times=[f * DIFFUSION_TIME for f in FOURIER_NUMBERS],
    )
    assert solution.stats.time_step == pytest.approx(step, rel=1e-12)
    exact = RADIAL_EXACT[kind]
    errors = errors_at_fourier_numbers(solution, lambda fo: exact(biot, fo))
    worst = max(errors, key=errors.get)
    assert errors[worst] < RADIAL_TOLERANCE, (
        f"{kind}, Bi = {biot}: {worst[1]} at Fo = {worst[0]} is off the series by "
        f"{errors[worst]:.2e} of the initial difference (tolerance {RADIAL_TOLERANCE})"
    )
    assert solution.checks.warnings == ()


# =================================================================================================
# 3. The slowest mode
# =================================================================================================

# First root zeta_1 and coefficient C_1 of the one-term approximations, Incropera, DeWitt,
# Bergman & Lavine, 6th ed., Table 5.1 (from memory), to the table's four decimals.
TABLE_5_1 = {
    ("wall", 0.1): (0.3111, 1.0161),
    ("wall", 1.0): (0.8603, 1.1191),
    ("wall", 10.0): (1.4289, 1.2620),
    ("cylinder", 0.1): (0.4417, 1.0246),
    ("cylinder", 1.0): (1.2558, 1.2071),
    ("cylinder", 10.0): (2.1795, 1.5677),
    ("sphere", 0.1): (0.5423, 1.0298),
    ("sphere", 1.0): (1.5708, 1.2732),
    ("sphere", 10.0): (2.8363, 1.9249),
}
TABLE_ROUNDING = 5e-5 + 1e-12  # half a unit in the fourth decimal
SERIES_FIRST = {
    "wall": (plane_wall_roots, plane_wall_coefficients),
    "cylinder": (cylinder_roots, cylinder_coefficients),
    "sphere": (sphere_roots, sphere_coefficients),
}


def eigen_model(kind: str, biot: float, section: SectionMesh, element_order: int):
    if kind == "wall":
        return strip_model(biot, section, element_order)
    boundaries = {"cooled": convection(biot)}
    if "symmetry" in section.edge_groups:
        boundaries["symmetry"] = Insulated("symmetry")
    return ThermalModel(
        section,
        MATERIAL,
        boundaries=boundaries,
        initial_temperature=INITIAL,
        probes={"centre": (0.0, 0.0)},
        element_order=element_order,
    )


def slowest_mode(model: ThermalModel) -> tuple[float, float]:
    """zeta_1 = sqrt(lambda_1 L^2 / alpha) of A phi = lambda M phi, and the mode's coefficient
    C_1 = phi(centre) (phi^T M 1) / (phi^T M phi): the amplitude at the centre of the slowest
    mode in a uniform initial excess temperature."""
    system = assemble(model)
    stiffness = system.exchange_operator(0.0).tocsc()
    capacity = system.capacity.tocsc()
    values, vectors = spla.eigsh(stiffness, k=2, M=capacity, sigma=0.0, which="LM")
    order = np.argsort(values)
    assert values[order[0]] > 0.0
    assert values[order[1]] > 1.5 * values[order[0]]  # a simple, well separated first mode
    phi = vectors[:, order[0]]
    ones = np.ones(system.size)
    amplitude = (phi @ (capacity @ ones)) / (phi @ (capacity @ phi))
    centre = float((system.probe_matrix @ phi)[0])
    return math.sqrt(values[order[0]] * LENGTH**2 / DIFFUSIVITY), amplitude * centre


# P2 on quadratic meshes of size L/8: the eigenvalue error of P2 is O(h^4) ((1/8)^4 = 2.4e-4
# times a constant well below 1 for the smooth first mode), the curved edge O(h^4) in the
# eigenvalue as well. Measured relative errors of zeta_1: at most 2.5e-7 (wall), 1.7e-6
# (cylinder), 2.2e-6 (sphere), at Bi = 10; 2e-5 is required. C_1 comes from the mode and its
# projection on the uniform field, O(h^3) at the centre node; measured at most 4.8e-5 (sphere,
# Bi = 10); 2e-4 is required.
ZETA_TOLERANCE = 2e-5
AMPLITUDE_TOLERANCE = 2e-4


@pytest.mark.parametrize("biot", BIOT_NUMBERS)
@pytest.mark.parametrize("kind", ["wall", "cylinder", "sphere"])
def test_slowest_mode_matches_table(kind, biot):
    roots, coefficients = SERIES_FIRST[kind]
    exact_zeta = float(roots(biot, 2)[0])
    exact_amplitude = float(coefficients(roots(biot, 2))[0])
    table_zeta, table_amplitude = TABLE_5_1[kind, biot]
    # The recalled table and the series agree to the table's rounding: both are right.
    assert abs(table_zeta - exact_zeta) <= TABLE_ROUNDING
    assert abs(table_amplitude - exact_amplitude) <= TABLE_ROUNDING

    section = strip_mesh(8, order=2) if kind == "wall" else radial_mesh(kind, 8)
    zeta, amplitude = slowest_mode(eigen_model(kind, biot, section, element_order=2))
    assert zeta == pytest.approx(exact_zeta, rel=ZETA_TOLERANCE), (
        f"{kind}, Bi = {biot}: zeta_1 = {zeta:.7f}, series {exact_zeta:.7f}"
    )
    assert abs(zeta - table_zeta) <= TABLE_ROUNDING + ZETA_TOLERANCE * exact_zeta
    assert amplitude == pytest.approx(exact_amplitude, rel=AMPLITUDE_TOLERANCE), (
        f"{kind}, Bi = {biot}: C_1 = {amplitude:.6f}, series {exact_amplitude:.6f}"
    )
    assert abs(amplitude - table_amplitude) <= TABLE_ROUNDING + AMPLITUDE_TOLERANCE * amplitude


def test_p1_wall_eigenvalue_is_an_upper_bound_converging_at_second_order():
    # On the straight-edged strip with P1 every integral (mass, stiffness, Robin) is exact, so
    # the discrete problem is a Rayleigh-Ritz approximation on a subspace of H^1: lambda_h >=
    # lambda on every mesh, with an error O(h^2) (twice the energy-norm order). A fit over three
    # meshes between 1.7 and 2.5 shows the order; round-off is far below the errors (>= 1e-5).
    biot = 1.0
    exact_zeta = float(plane_wall_roots(biot, 1)[0])
    divisions = (5, 10, 20)
    errors = []
    for n in divisions:
        zeta, _ = slowest_mode(eigen_model("wall", biot, strip_mesh(n), element_order=1))
        assert zeta >= exact_zeta * (1 - 1e-12), f"L/{n}: zeta_1 {zeta} below {exact_zeta}"
        errors.append(zeta / exact_zeta - 1.0)
    order = fitted_order([1.0 / n for n in divisions], errors)
    assert 1.7 <= order <= 2.5, f"eigenvalue order {order:.2f}; relative errors {errors}"


# =================================================================================================
# 4. Observed orders in time
# =================================================================================================

ORDER_FOURIER = 0.5  # compare at Fo = 0.5 (t = 10 s), Bi = 1, on the strip with P1 of size L/10
ORDER_TIME = ORDER_FOURIER * DIFFUSION_TIME
ORDER_STEPS = (10, 20, 40, 80)
REFERENCE_STEPS = 5120  # 64 times finer than the finest studied step


def fixed_step_field(method: str, steps: int) -> np.ndarray:
    model = strip_model(1.0, strip_mesh(10))
    solution = solve(
        model, ORDER_TIME, method=method, time_step=ORDER_TIME / steps, output_interval=ORDER_TIME
    )
    assert solution.stats.time_step == pytest.approx(ORDER_TIME / steps, rel=1e-12)
    time_index(solution.output_times, ORDER_TIME)
    return solution.fields[-1]


@cache
def reference_field() -> np.ndarray:
    return fixed_step_field("crank-nicolson", REFERENCE_STEPS)


@cache
def semi_discrete_field() -> np.ndarray:
    """The exact-in-time solution of M T' + A T = b on the same mesh at ORDER_TIME:
    T = T_inf + sum_i exp(-lambda_i t) phi_i phi_i^T M (T_0 - T_inf) 1 with M-orthonormal
    phi_i (A 1 = b / T_inf, so T_inf is the steady state)."""
    system = assemble(strip_model(1.0, strip_mesh(10)))
    stiffness = system.exchange_operator(0.0).toarray()
    capacity = system.capacity.toarray()
    values, vectors = scipy.linalg.eigh(stiffness, capacity)
    excess = vectors @ (
        np.exp(-values * ORDER_TIME) * (vectors.T @ (capacity @ np.ones(system.size)))
    )
    return (AMBIENT + SPAN * excess)[system.vertex_dofs]


@pytest.mark.parametrize(
    ("method", "lowest", "highest"),
    [
        # Crank-Nicolson with its backward-Euler start-up half-steps is second order; 1.9-2.1
        # (measured 2.00).
        ("crank-nicolson", 1.9, 2.1),
        # BDF2 with one backward-Euler start-up step is second order; the coarsest step (10 to
        # Fo = 0.5) is slightly pre-asymptotic, so 1.9-2.25 (measured 2.08).
        ("bdf2", 1.9, 2.25),
        # Backward Euler is first order; 0.9-1.1 (measured 1.01).
        ("backward-euler", 0.9, 1.1),
    ],
)
def test_observed_order_in_time(method, lowest, highest):
    reference = reference_field()
    errors = [float(np.abs(fixed_step_field(method, n) - reference).max()) for n in ORDER_STEPS]
    # The reference is itself converged: it agrees with the exact-in-time semi-discrete solution
    # far more closely than any studied run does, so it moves the fitted order by < 0.01.
    reference_error = float(np.abs(reference - semi_discrete_field()).max())
    assert reference_error < 1e-2 * min(errors), (reference_error, errors)
    order = fitted_order([ORDER_TIME / n for n in ORDER_STEPS], errors)
    assert lowest <= order <= highest, (
        f"{method}: time order {order:.2f}; errors {errors} K for {ORDER_STEPS} steps"
    )


# =================================================================================================
# 5. Adaptive steps
# =================================================================================================

ADAPTIVE_BIOT = 1.0
ADAPTIVE_SERIES = WallSeries(ADAPTIVE_BIOT)
# The run ends when the centre (the slowest point) is 99 % of the way to the ambient: found here
# by root-finding on the series (Fo = 6.374).
ADAPTIVE_END = DIFFUSION_TIME * brentq(
    lambda fo: float(ADAPTIVE_SERIES.theta(fo, 0.0)[0]) - 0.01, 1.0, 20.0, xtol=1e-14
)
# Errors are measured at every recorded time from Fo = 0.01 on. Before that the boundary layer
# (thickness ~ sqrt(alpha t) < 0.1 L) is thinner than a few surface elements, and the error is
# the mesh's, which no choice of step can remove.
ADAPTIVE_FROM = 0.01
ADAPTIVE_ACCURACY = 1e-3  # 0.1 % of the initial difference at both probes


@cache
def adaptive_section() -> SectionMesh:
    # P2, L/8, graded to L/80 at the cooled face: the space error stays below 6e-5 of the initial
    # difference over the window (measured with tight steps), far below the target.
    return strip_mesh(8, order=2, refined=80)


def adaptive_model() -> ThermalModel:
    return strip_model(ADAPTIVE_BIOT, adaptive_section(), 2, ambient=Watchdog(AMBIENT))


def whole_run_error(solution) -> float:
    """Largest |theta*_FEM - theta*_exact| at the centre and the surface over the recorded times
    with Fo >= ADAPTIVE_FROM."""
    fourier = solution.times / DIFFUSION_TIME
    keep = fourier >= ADAPTIVE_FROM
    error = 0.0
    for name, x_star in (("centre", 0.0), ("surface", 1.0)):
        exact = ADAPTIVE_SERIES.theta(fourier[keep], x_star)
        error = max(error, float(np.abs(theta(solution.probes[name][keep]) - exact).max()))
    return error


@pytest.mark.parametrize(
    ("method", "tolerance"),
    [("crank-nicolson", 3e-4 * SPAN), ("bdf2", 1e-4 * SPAN)],
)
def test_adaptive_steps_beat_the_fixed_step_of_equal_accuracy(method, tolerance):
    adaptive = solve(
        adaptive_model(),
        ADAPTIVE_END,
        method=method,
        tolerance=tolerance,
        output_interval=ADAPTIVE_END,
    )
    assert adaptive.stats.adaptive
    adaptive_error = whole_run_error(adaptive)
    assert adaptive_error <= ADAPTIVE_ACCURACY, (
        f"{method}: adaptive run (local tolerance {tolerance:.3g} K) is off the series by "
        f"{adaptive_error:.2e} of the initial difference"
    )
    # The fixed step that reaches the same accuracy, found by halving from the adaptive run's
    # average step. Fixed steps must resolve the first moments after the plunge all the way to
    # the end, so they need many more.
    steps = adaptive.stats.steps
    for _ in range(8):
        fixed = solve(
            adaptive_model(),
            ADAPTIVE_END,
            method=method,
            time_step=ADAPTIVE_END / steps,
            output_interval=ADAPTIVE_END,
        )
        assert fixed.stats.time_step == pytest.approx(ADAPTIVE_END / steps, rel=1e-12)
        if whole_run_error(fixed) <= ADAPTIVE_ACCURACY:
            break
        steps *= 2
    else:
        pytest.fail(f"no fixed step down to END/{steps} reached {ADAPTIVE_ACCURACY}")
    # Measured: Crank-Nicolson 68 adaptive steps (error 4.1e-4) against 2178 fixed ones (7.4e-4),
    # BDF2 113 (4.8e-4) against 3616 (1.8e-4). "Several times fewer" is required as 8 times.
    assert fixed.stats.steps >= 8 * adaptive.stats.steps, (
        f"{method}: {adaptive.stats.steps} adaptive steps, {fixed.stats.steps} fixed"
    )


@pytest.mark.parametrize("method", ["crank-nicolson", "bdf2", "backward-euler"])
def test_adaptive_steps_land_on_outputs_and_reuse_factorisations(method):
    # Irregular output times that no step ladder hits by chance.
    outputs = [f * DIFFUSION_TIME for f in (0.013, 0.1, 0.37, 1.0, 2.9)] + [ADAPTIVE_END]
    solution = solve(
        adaptive_model(), ADAPTIVE_END, method=method, tolerance=1e-5 * SPAN, output_times=outputs
    )
    stats = solution.stats
    # No step crosses an output time: each one is a recorded time, and the fields are stored
    # there (and at t = 0).
    for output in outputs:
        time_index(solution.times, output)
    np.testing.assert_allclose(solution.output_times, [0.0, *outputs], rtol=1e-12, atol=0.0)
    assert solution.times[-1] == pytest.approx(ADAPTIVE_END, rel=1e-12)
    # The steps really adapt: they grow by orders of magnitude as the field smooths out.
    assert stats.largest_step > 100 * stats.smallest_step
    # Steps on a ladder of powers of two make few distinct step matrices: the design factorises
    # once per matrix, so the count stays far below the number of steps (measured: 20 of 174
    # steps for Crank-Nicolson, 42 of 227 for BDF2, whose matrix also depends on the step
    # ratio, and 20 of 910 for backward Euler). At most a quarter of the steps is required.
    assert stats.factorisations <= stats.steps / 4, (stats.factorisations, stats.steps)
    if method != "bdf2":
        # One-step methods: the matrix depends on the step only (a Crank-Nicolson start-up
        # half-step shares the matrix of the full step), so at most one factorisation per
        # distinct step size tried: the recorded ones and those of rejected attempts.
        distinct = len(np.unique(np.round(np.diff(solution.times) / ADAPTIVE_END, 12)))
        assert stats.factorisations <= distinct + stats.rejected_steps, (
            stats.factorisations,
            distinct,
            stats.rejected_steps,
        )
    assert solution.checks.warnings == ()


# A body of tiny Biot number (invented: an excellent conductor, Bi = h a / k = 1e-6) stays
# uniform, and its temperature follows exp(-t / tau) with the lumped time constant
# tau = rho c V / (h A) (Incropera 6th ed. §5.2, from memory), to within O(Bi). For a one-step
# method the true local error of the step from t_n to t_n+1 is then
# T_n+1 - T_inf - (T_n - T_inf) exp(-(t_n+1 - t_n) / tau), which the adaptive control must keep
# below its tolerance (up to the asymptotic nature of the estimate; 1.5 times it is allowed).
# Measured: at most 0.62 times the tolerance for Crank-Nicolson, 1.17 for backward Euler (whose
# estimate, before commit 13a4c00, assumed second order and let local errors reach 12 times it).
LUMPED_SIDE = 0.01  # m
LUMPED_CONDUCTIVITY = 1000.0  # W/(m*K), invented
LUMPED_COEFFICIENT = 0.1  # W/(m^2*K)
LUMPED_RATE = (
    LUMPED_COEFFICIENT * 2 * LUMPED_SIDE / (DENSITY * SPECIFIC_HEAT * LUMPED_SIDE**2)
)  # 1 / tau, for a square cooled on two of its four sides


@pytest.mark.parametrize("method", ["crank-nicolson", "backward-euler"])
def test_adaptive_tolerance_bounds_the_true_local_error(method):
    square = Rectangle(
        LUMPED_SIDE,
        LUMPED_SIDE,
        edge_names={"left": "ends", "bottom": "ends", "right": "cooled", "top": "cooled"},
    )
    model = ThermalModel(
        square.mesh(LUMPED_SIDE / 2),
        Material(LUMPED_CONDUCTIVITY, DENSITY, SPECIFIC_HEAT),
        boundaries={
            "ends": Insulated(),
            "cooled": Convection(LUMPED_COEFFICIENT, Watchdog(AMBIENT)),
        },
        initial_temperature=INITIAL,
        probes={"middle": (LUMPED_SIDE / 2, LUMPED_SIDE / 2)},
    )
    tolerance = 1e-4 * SPAN
    end = 5.0 / LUMPED_RATE
    solution = solve(model, end, method=method, tolerance=tolerance, output_interval=end)
    excess = solution.probes["middle"] - AMBIENT
    steps = np.diff(solution.times)
    local = excess[1:] - excess[:-1] * np.exp(-LUMPED_RATE * steps)
    # The first intervals (start-up half-steps and the steps that build the history the
    # estimate needs) are not error-controlled.
    ratio = float(np.abs(local[4:]).max() / tolerance)
    assert ratio <= 1.5, (
        f"{method}: a step's local error is {ratio:.2f} times the tolerance {tolerance} K "
        f"({solution.stats.steps} steps, {solution.stats.rejected_steps} rejected)"
    )
    # The control is not idle either: the largest local error is a sizeable part of it.
    assert ratio >= 0.2


# Adaptive runs of a convectively cooled square with several output times, each of which made
# the step control of commit ab4dece retry the same over-long step forever (a step stretched to
# reach the next output, rejected, then stretched again; fixed in 13a4c00). The watchdog ambient
# turns such a loop into an error; the runs must end at end_time with every output on the grid.
@pytest.mark.parametrize(
    ("coefficient", "end_time", "outputs", "tolerance"),
    [(100.0, 60.0, 5, 3e-4), (1250.0, 100.0, 10, 1e-3), (1250.0, 60.0, 50, 1e-4)],
)
def test_adaptive_runs_with_many_outputs_finish(coefficient, end_time, outputs, tolerance):
    fluid = Convection(coefficient, Watchdog(0.0, limit=20_000))
    model = ThermalModel(
        Rectangle(0.01, 0.01).mesh(0.002),
        MATERIAL,
        boundaries={side: fluid for side in ("left", "right", "top", "bottom")},
        initial_temperature=1.0,
    )
    solution = solve(model, end_time, tolerance=tolerance, output_interval=end_time / outputs)
    assert solution.times[-1] == pytest.approx(end_time, rel=1e-12)
    for k in range(1, outputs + 1):
        time_index(solution.times, end_time * k / outputs)
    assert len(solution.output_times) == outputs + 1


# =================================================================================================
# 6. Energy balance
# =================================================================================================


def energy_model() -> ThermalModel:
    """A plate 2L x L: a fixed hot face on the left, convection on top, insulated elsewhere."""
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
            "cooled": convection(3.0, ambient=Watchdog(AMBIENT)),
            "ends": Insulated(),
        },
        initial_temperature=80.0,
    )


ENERGY_RUNS = [
    pytest.param(method, adaptive, id=f"{method}-{'adaptive' if adaptive else 'fixed'}")
    for method in ("crank-nicolson", "bdf2", "backward-euler")
    for adaptive in (False, True)
]


def energy_run(method: str, adaptive: bool):
    end = 3 * DIFFUSION_TIME
    return solve(
        energy_model(),
        end,
        method=method,
        time_step=None if adaptive else 0.5,
        output_interval=end / 7,
    )


@pytest.mark.parametrize(("method", "adaptive"), ENERGY_RUNS)
def test_energy_balance_is_round_off_for_linear_runs(method, adaptive):
    # Linear runs solve each step to round-off, so the discrete balance of every step (heat in
    # through convection and the fixed face equals the change of stored heat) holds to round-off
    # of the stored energy. The run's own check must say so: 1e-8 is far above double precision
    # and far below any inconsistency between the step matrices and the ledger.
    solution = energy_run(method, adaptive)
    assert solution.stats.adaptive == adaptive
    assert solution.checks.energy_balance_error < 1e-8
    assert not any("energy balance" in w for w in solution.checks.warnings)


@pytest.mark.parametrize(("method", "adaptive"), ENERGY_RUNS)
def test_absorbed_heat_equals_stored_energy(method, adaptive):
    # The energy ledger: the heat taken in since the start (absorbed_heat, integrated the way the
    # scheme integrates it) must equal the change of stored heat at every recorded time, to
    # round-off relative to the largest stored change, since the scheme's own balance holds to
    # round-off. (Before commit 6ed1b88 BDF2 booked h*G(T_n+1) per step, the right-endpoint
    # rule, and its ledger drifted from the stored energy by 16 % here, fixed, and 8 % adaptive;
    # Crank-Nicolson and backward Euler agreed to 5e-15.)
    solution = energy_run(method, adaptive)
    scale = float(np.abs(solution.stored_energy).max())
    mismatch = float(np.abs(solution.stored_energy - solution.absorbed_heat).max()) / scale
    assert mismatch < 1e-8, f"{method}: ledger off the stored energy by {mismatch:.1e}"


# =================================================================================================
# 7. Stop condition
# =================================================================================================

STOP_TARGET = AMBIENT + 0.5 * SPAN  # the centre halfway to the ambient (120 degC)


@pytest.mark.parametrize("time_step", [DIFFUSION_TIME / 200, None], ids=["fixed", "adaptive"])
def test_stop_time_matches_series(time_step):
    biot = 1.0
    series = WallSeries(biot)
    exact = DIFFUSION_TIME * brentq(
        lambda fo: float(series.theta(fo, 0.0)[0]) - 0.5, 0.01, 20.0, xtol=1e-14
    )
    model = strip_model(biot, strip_mesh(20), ambient=Watchdog(AMBIENT))
    end = 10 * DIFFUSION_TIME
    solution = solve(model, end, time_step=time_step, stop=StopWhen("centre", STOP_TARGET))
    assert solution.stop_time is not None
    # The run ends at the first step that crosses the target, and the stop time lies in it.
    times, centre = solution.times, solution.probes["centre"]
    assert times[-1] < end
    assert times[-2] < solution.stop_time <= times[-1]
    assert centre[-2] > STOP_TARGET >= centre[-1]
    # The stop time is interpolated linearly between the two states bracketing the crossing, so
    # its error is at most (their temperature error) / |dT/dt| plus the interpolation error
    # h^2/8 max|T''| / min|T'| over the step h (at Fo = 1.09 the first term of the series
    # dominates: T is convex and falling, |T''| largest at the step's start, |T'| smallest at its
    # end). Their temperature error is measured against the series (P1, L/20: about 1e-5 of the
    # initial difference at this Fo); the factor 1.2 covers the terms the leading-order
    # estimates leave out. Measured: 6.1e-4 s of 7.6e-4 s allowed with the fixed step (0.1 s;
    # the state error dominates), 1.6e-3 s of 1.9e-2 s with adaptive steps (1.6 s).
    step = times[-1] - times[-2]
    fouriers = times[-2:] / DIFFUSION_TIME
    state_error = SPAN * float(np.abs(theta(centre[-2:]) - series.theta(fouriers, 0.0)).max())
    slope = SPAN * abs(float(series.theta(fouriers[1], 0.0, derivative=1)[0])) / DIFFUSION_TIME
    curvature = (
        SPAN * abs(float(series.theta(fouriers[0], 0.0, derivative=2)[0])) / DIFFUSION_TIME**2
    )
    allowed = 1.2 * (state_error / slope + step**2 / 8 * curvature / slope)
    assert abs(solution.stop_time - exact) <= allowed, (
        f"stop at {solution.stop_time:.5f} s, series {exact:.5f} s (allowed {allowed:.2e} s, "
        f"step {step:.3g} s)"
    )
    # The stop is far more precise than the step itself.
    assert abs(solution.stop_time - exact) < 0.1 * step
