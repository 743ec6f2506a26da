"""The advisor (lumped models, Biot numbers, slowest mode, time to target, verdict) against
exact solutions of the plane wall, the long cylinder and the sphere.

The bodies start at a uniform temperature and meet a fluid at t = 0 (a plunge):

- plane wall: a narrow strip of half-thickness L, convection on top, symmetry at the bottom,
  insulated ends (a 1-D field in a 2-D mesh);
- long cylinder: a planar quarter disk of radius L with two symmetry cuts (a whole disk for the
  slowest mode);
- sphere: an axisymmetric half disk of radius L (x is the radius of revolution).

References, computed in this file from the roots and coefficients of ``tests/exact_series.py``
(its own ``brentq`` root-finding), never by the code under test:

- the series: Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*,
  6th ed., §5.5.1 (plane wall, eq. 5.39-5.42), §5.6.1 (cylinder, sphere) and §5.5.3/§5.6.3
  (energy, i.e. the mean); Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §3.10,
  ch. VII and ch. IX; all from memory;
- the lumped model T - T_inf = (T_i - T_inf) exp(-t/tau), tau = rho c V / (h A_s), and its
  time to target t = tau ln(theta_i/theta): Incropera et al., 6th ed., §5.1, eq. 5.5-5.6 (from
  memory);
- the corrected (improved) lumped model h_eff = h / (1 + Bi/beta), beta = 3, 4, 5 for slab,
  cylinder and sphere: Cotta & Mikhailov, *Heat Conduction: Lumped Analysis, Integral
  Transforms, Symbolic Computation*, Wiley 1997, ch. 2 (from memory). In dimensionless form the
  classical mean is exp(-(n+1) Bi Fo) and the corrected one exp(-(n+1) Bi Fo / (1 + Bi/(n+3)))
  with n = 0, 1, 2 for slab, cylinder, sphere (V/A_s = L/(n+1));
- P1 eigenvalue error O(h^2) (twice the energy-norm order) and eigenvalues from above for a
  conforming Galerkin method on the exact domain: Strang & Fix, *An Analysis of the Finite
  Element Method*, ch. 6 (from memory);
- "Bi < 0.1 and the lumped model is fine; the surface then differs from the centre by about
  5 %": common practice.

The material is invented for these tests.
"""

from __future__ import annotations

import math
from functools import cache

import numpy as np
import pytest
from exact_series import (
    cylinder_coefficients,
    cylinder_mean,
    cylinder_roots,
    cylinder_tail_bound,
    plane_wall_coefficients,
    plane_wall_mean,
    plane_wall_roots,
    plane_wall_tail_bound,
    sphere_coefficients,
    sphere_mean,
    sphere_roots,
    sphere_tail_bound,
)
from scipy.optimize import brentq, minimize_scalar
from scipy.special import j0, j1

from advisor import AdvisorError, assess
from advisor.analysis.modes import slowest_mode
from fem import Convection, Insulated, Material, ThermalModel, solve
from geometries import Circle, Rectangle, Section

# --- The problem ------------------------------------------------------------------------------

CONDUCTIVITY = 20.0  # W/(m*K), invented
DENSITY = 5000.0  # kg/m^3, invented
SPECIFIC_HEAT = 800.0  # J/(kg*K), invented
MATERIAL = Material(CONDUCTIVITY, DENSITY, SPECIFIC_HEAT)
DIFFUSIVITY = CONDUCTIVITY / (DENSITY * SPECIFIC_HEAT)  # 5e-6 m^2/s
LENGTH = 0.020  # m: half-thickness of the wall, radius of the cylinder and the sphere
DIFFUSION_TIME = LENGTH**2 / DIFFUSIVITY  # 80 s: t = Fo * DIFFUSION_TIME
STRIP_WIDTH = LENGTH / 4  # m: the strip is a 1-D wall; its width only costs elements

INITIAL, AMBIENT = 220.0, 20.0  # degC, the cooling plunge of most tests
SPAN = INITIAL - AMBIENT

SHAPES = ("slab", "cylinder", "sphere")
SHAPE_INDEX = {"slab": 0, "cylinder": 1, "sphere": 2}  # n: V/A_s = L/(n+1), beta = n + 3

SERIES_TERMS = 200
FO_MIN = 1e-3  # below this Fo the series is not evaluated (tail bound checked above it)
TAIL_LIMIT = 1e-12

# P2 meshes of size L/16 (curved edges) and the default adaptive steps, with fields stored
# every 1/100 of the run (a step never jumps an output time): measured field-mean error at
# most 1.3e-4 of the initial difference over all six runs of test 2 (sphere, Bi = 1).
DIVISIONS = 16
OUTPUTS = 100


# --- Exact references (vectorised over Fo) ----------------------------------------------------


class Series:
    """theta* = sum C_k exp(-zeta_k^2 Fo) X(zeta_k r*) of one shape at one Bi, from the roots
    and coefficients of ``exact_series`` (Incropera 6th ed. §5.5.1, §5.6.1; from memory)."""

    def __init__(self, shape: str, biot: float):
        self.shape, self.biot = shape, biot
        if shape == "slab":
            z = plane_wall_roots(biot, SERIES_TERMS)
            self.c = plane_wall_coefficients(z)
            self.mean_factor = np.sin(z) / z
            self.surface_factor = np.cos(z)
        elif shape == "cylinder":
            z = cylinder_roots(biot, SERIES_TERMS)
            self.c = cylinder_coefficients(z)
            self.mean_factor = 2.0 * j1(z) / z
            self.surface_factor = j0(z)
        else:
            z = sphere_roots(biot, SERIES_TERMS)
            self.c = sphere_coefficients(z)
            self.mean_factor = 3.0 * (np.sin(z) - z * np.cos(z)) / z**3
            self.surface_factor = np.sin(z) / z
        self.roots = z

    def _tail(self, fourier: float) -> float:
        if self.shape == "slab":
            return plane_wall_tail_bound(fourier, SERIES_TERMS)
        if self.shape == "cylinder":
            return cylinder_tail_bound(fourier, SERIES_TERMS)
        return sphere_tail_bound(self.biot, fourier, SERIES_TERMS)

    def _sum(self, fourier, factor) -> np.ndarray:
        fourier = np.atleast_1d(np.asarray(fourier, dtype=float))
        assert fourier.min() >= FO_MIN
        assert self._tail(float(fourier.min())) < TAIL_LIMIT
        return np.exp(-np.multiply.outer(fourier, self.roots**2)) @ (self.c * factor)

    def centre(self, fourier) -> np.ndarray:
        return self._sum(fourier, 1.0)  # cos(0) = J0(0) = sinc(0) = 1

    def surface(self, fourier) -> np.ndarray:
        return self._sum(fourier, self.surface_factor)

    def mean(self, fourier) -> np.ndarray:
        return self._sum(fourier, self.mean_factor)

    def time_to(self, which: str, theta: float) -> float:
        """Fo at which the centre or the mean reaches theta* (brentq on the series)."""
        curve = getattr(self, which)
        return brentq(lambda fo: float(curve(fo)[0]) - theta, FO_MIN, 1e3, xtol=1e-14)


def classical(shape: str, biot: float, fourier) -> np.ndarray:
    """The classical lumped mean exp(-(n+1) Bi Fo) (Incropera 6th ed. eq. 5.6, from memory)."""
    return np.exp(-(SHAPE_INDEX[shape] + 1) * biot * np.asarray(fourier))


def corrected(shape: str, biot: float, fourier) -> np.ndarray:
    """exp(-(n+1) Bi Fo / (1 + Bi/(n+3))) (Cotta & Mikhailov 1997, ch. 2, from memory)."""
    n = SHAPE_INDEX[shape]
    return np.exp(-(n + 1) * biot * np.asarray(fourier) / (1.0 + biot / (n + 3)))


def test_vectorised_series_matches_exact_series_module():
    for shape, scalar in (("slab", plane_wall_mean), ("cylinder", cylinder_mean)):
        for fo in (0.01, 0.3, 2.0):
            assert Series(shape, 0.7).mean(fo)[0] == pytest.approx(
                scalar(0.7, fo, terms=SERIES_TERMS), abs=1e-13
            )
    assert Series("sphere", 0.7).mean(0.3)[0] == pytest.approx(
        sphere_mean(0.7, 0.3, terms=SERIES_TERMS), abs=1e-13
    )


# --- Sections, models, runs -------------------------------------------------------------------


@cache
def section(shape: str, divisions: int, order: int):
    size = LENGTH / divisions
    if shape == "slab":
        strip = Rectangle(
            STRIP_WIDTH,
            LENGTH,
            edge_names={"bottom": "symmetry", "top": "cooled", "left": "ends", "right": "ends"},
        )
        return strip.mesh(size, order=order)
    if shape == "cylinder":
        quarter = Circle(LENGTH, name="cooled").symmetry_cut((0.0, 0.0), (1.0, 0.0))
        return quarter.symmetry_cut((0.0, 0.0), (0.0, 1.0)).mesh(size, order=order)
    if shape == "disk":
        return Circle(LENGTH, name="cooled").mesh(size, order=order)
    half = Circle(LENGTH, name="cooled").symmetry_cut((0.0, 0.0), (1.0, 0.0))
    return Section(half, axisymmetric=True).mesh(size, order=order)  # the cut is the axis


PROBES = {
    "slab": {"centre": (STRIP_WIDTH / 2, 0.0), "surface": (STRIP_WIDTH / 2, LENGTH)},
    "cylinder": {"centre": (0.0, 0.0)},
    "disk": {},
    "sphere": {"centre": (0.0, 0.0)},
}


def model(shape, biot, *, divisions=DIVISIONS, order=2, initial=INITIAL, ambient=AMBIENT):
    """Bi = h L / k on the conduction distance L (half-thickness or radius)."""
    mesh = section(shape, divisions, order)
    fluid = Convection(heat_transfer_coefficient=biot * CONDUCTIVITY / LENGTH, ambient=ambient)
    boundaries = {"cooled": fluid}
    for group, reason in (("symmetry", "symmetry"), ("ends", "insulated")):
        if group in mesh.edge_groups:
            boundaries[group] = Insulated(reason)
    return ThermalModel(
        mesh,
        MATERIAL,
        boundaries=boundaries,
        initial_temperature=initial,
        probes=PROBES[shape],
        element_order=order,
    )


@cache
def plunge(
    shape, biot, end_fourier, *, divisions=DIVISIONS, order=2, initial=INITIAL, ambient=AMBIENT
):
    end = end_fourier * DIFFUSION_TIME
    return solve(
        model(shape, biot, divisions=divisions, order=order, initial=initial, ambient=ambient),
        end,
        output_interval=end / OUTPUTS,
    )


def theta(values, initial=INITIAL, ambient=AMBIENT) -> np.ndarray:
    return (np.asarray(values, dtype=float) - ambient) / (initial - ambient)


def standard_run(shape: str, biot: float):
    """Test 2's runs: long enough for the classical model to fall to e^-6."""
    return plunge(shape, biot, 6.0 / ((SHAPE_INDEX[shape] + 1) * biot))


# =============================================================================================
# 1. Small Biot numbers: the rules of thumb
# =============================================================================================


def test_lumped_mean_within_one_percent_at_biot_001():
    # Exact series: the largest |exp(-Bi Fo) - mean theta*| of a plane wall at Bi = 0.01.
    # First order it is (Bi/3)/e = 1.2e-3; measured 1.2e-3. The rule "Bi < 0.1 is lumped"
    # (common practice) is far inside 1 % here.
    biot = 0.01
    fo = np.linspace(FO_MIN, 600.0, 6001)
    exact_error = np.abs(classical("slab", biot, fo) - Series("slab", biot).mean(fo)).max()
    assert exact_error < 0.01
    assert exact_error == pytest.approx(biot / 3 / math.e, rel=0.05)

    # The same from a field run through the advisor (P1, L/8: the field mean is within 5e-5
    # of the series at this Bi, measured; the advisor reports 1.18e-3). Required 2e-4.
    solution = plunge("slab", biot, 400.0, divisions=8, order=1)
    error = assess(solution, quantity="mean").errors["classical vs mean"]
    assert error.fraction < 0.01
    assert error.fraction == pytest.approx(exact_error, abs=2e-4)


def test_surface_to_centre_ratio_is_about_095_at_biot_01():
    # One term of the plane-wall series (Incropera 6th ed. §5.5.2, from memory): once the
    # higher terms have died, theta_surface / theta_centre = cos(zeta_1), zeta_1 tan zeta_1 = Bi.
    # Since zeta_1^2 ~ Bi, cos(zeta_1) ~ 1 - Bi/2 = 0.95: the "about 5 %" of common practice.
    biot = 0.1
    zeta = plane_wall_roots(biot, 1)[0]
    one_term = math.cos(zeta)
    assert one_term == pytest.approx(0.95, abs=0.005)  # 0.9521
    assert one_term == pytest.approx(1 - biot / 2, abs=0.005)

    # The field at Fo = 3: the second term is exp(-(zeta_2^2 - zeta_1^2) Fo) ~ e^-30 of the
    # first, so the ratio is the one-term value. P1 on L/10 with adaptive steps: nodal errors
    # O((h/L)^2) times a small constant; measured |ratio - cos(zeta_1)| = 2e-7. Required 1e-4.
    solution = plunge("slab", biot, 3.0, divisions=10, order=1)
    ratio = theta(solution.probes["surface"][-1]) / theta(solution.probes["centre"][-1])
    assert ratio == pytest.approx(one_term, abs=1e-4)
    # and the exact series agrees that Fo = 3 is "late"
    series = Series("slab", biot)
    assert series.surface(3.0)[0] / series.centre(3.0)[0] == pytest.approx(one_term, abs=1e-12)


# =============================================================================================
# 2. The corrected lumped model against the exact series
# =============================================================================================


@pytest.mark.parametrize("shape", SHAPES)
def test_correction_matches_first_eigenvalue_to_second_order(shape):
    # The analysis: with n = 0, 1, 2 the exact slowest rate is zeta_1^2 = (n+1) Bi (1 - Bi/beta
    # + O(Bi^2)), so the classical rate (n+1) Bi is off by a relative Bi/beta + O(Bi^2) and the
    # corrected rate (n+1) Bi / (1 + Bi/beta) by O(Bi^2) (Cotta & Mikhailov 1997, ch. 2, from
    # memory). Expanding the eigenvalue equations gives the leading terms Bi^2/45, Bi^2/48 and
    # 3 Bi^2/175 for slab, cylinder, sphere (worked out for this test and checked here).
    # Fitted here from the exact roots over Bi = 0.01 ... 0.04: orders 1 and 2.
    n = SHAPE_INDEX[shape]
    beta = n + 3
    roots = {"slab": plane_wall_roots, "cylinder": cylinder_roots, "sphere": sphere_roots}[shape]
    biots = np.array([0.01, 0.02, 0.04])
    rate = np.array([roots(b, 1)[0] ** 2 for b in biots])
    classical_error = (n + 1) * biots / rate - 1
    corrected_error = (n + 1) * biots / (1 + biots / beta) / rate - 1
    order_classical = np.polyfit(np.log(biots), np.log(classical_error), 1)[0]
    order_corrected = np.polyfit(np.log(biots), np.log(corrected_error), 1)[0]
    assert order_classical == pytest.approx(1.0, abs=0.05)
    assert order_corrected == pytest.approx(2.0, abs=0.05)
    leading = {"slab": 1 / 45, "cylinder": 1 / 48, "sphere": 3 / 175}[shape]
    assert corrected_error[0] / biots[0] ** 2 == pytest.approx(leading, rel=0.02)
    assert classical_error[0] / biots[0] == pytest.approx(1 / beta, rel=0.02)


# Largest |lumped - exact mean| over time, as a fraction of the initial difference, from the
# exact series on a fine Fo grid (measured in this file):
#             Bi = 0.5: classical  corrected  ratio     Bi = 1: classical  corrected  ratio
#   slab                0.0565     0.00327    17.3              0.104      0.00913    11.4
#   cylinder            0.0431     0.00310    13.9              0.0809     0.00890     9.1
#   sphere              0.0349     0.00261    13.4              0.0661     0.00768     8.6
# The classical error is first order, about (Bi/beta)/e (the rate error Bi/beta times the
# largest x e^-x): measured 5 % to 17 % below it, more at Bi = 1; required within 20 %.
# The prediction of the analysis is a reduction of the decay-rate error from Bi/beta to
# c Bi^2 (c = 1/45, 1/48, 3/175), a factor of order 1/(beta c Bi): from the exact zeta_1,
# 40, 30, 28 at Bi = 0.5 and 26, 18, 16 at Bi = 1. The reduction of the largest error is
# smaller (8.6 to 17) because the corrected model's error is set by the early transient,
# which no single exponential follows, not by its rate; it still falls roughly like 1/Bi.
# Asserted: a reduction of at least 5, below the rate-error reduction, larger at Bi = 0.5.
@cache
def exact_lumped_errors(shape: str, biot: float) -> tuple[float, float]:
    """Largest |classical - mean| and |corrected - mean| of the exact series over Fo."""
    n = SHAPE_INDEX[shape]
    fo = np.linspace(FO_MIN, 6.0 / ((n + 1) * biot), 20001)
    exact = Series(shape, biot).mean(fo)
    return (
        float(np.abs(classical(shape, biot, fo) - exact).max()),
        float(np.abs(corrected(shape, biot, fo) - exact).max()),
    )


@pytest.mark.parametrize("shape", SHAPES)
def test_reduction_grows_as_biot_falls(shape):
    reductions = [np.divide(*exact_lumped_errors(shape, biot)) for biot in (0.5, 1.0)]
    assert reductions[0] > 1.3 * reductions[1]  # measured 1.51, 1.53, 1.55


@pytest.mark.parametrize("biot", [0.5, 1.0])
@pytest.mark.parametrize("shape", SHAPES)
def test_corrected_model_against_exact_series(shape, biot):
    n = SHAPE_INDEX[shape]
    beta = n + 3
    series = Series(shape, biot)
    classical_error, corrected_error = exact_lumped_errors(shape, biot)
    reduction = classical_error / corrected_error
    assert classical_error == pytest.approx(biot / beta / math.e, rel=0.2)
    assert reduction > 5.0
    rate_reduction = ((n + 1) * biot / series.roots[0] ** 2 - 1) / (
        (n + 1) * biot / (1 + biot / beta) / series.roots[0] ** 2 - 1
    )
    assert reduction < rate_reduction

    # The solver and the advisor.
    solution = standard_run(shape, biot)
    a = assess(solution, quantity="mean")
    # beta = d/s with s the correction length of one steady solve on the mesh and d from mesh
    # nodes and edge samples: on a curved P2 mesh of size h the chord sag makes d short by about
    # R (h/R)^2 / 8 = 5e-4 R; required 0.2 %.
    assert a.correction_shape == pytest.approx(beta, rel=2e-3)
    biot_by_name = {b.name: b for b in a.biot}
    assert biot_by_name["conduction_distance"].length == pytest.approx(LENGTH, rel=1e-3)
    assert biot_by_name["conduction_distance"].value == pytest.approx(biot, rel=1e-3)
    assert biot_by_name["volume_to_surface"].length == pytest.approx(LENGTH / (n + 1), rel=1e-6)
    assert biot_by_name["volume_to_surface"].value == pytest.approx(biot / (n + 1), rel=1e-6)
    assert a.corrected.coefficient_scale == pytest.approx(1 / (1 + biot / beta), rel=1e-3)
    assert a.corrected.time_constant == pytest.approx(
        a.lumped.time_constant * (1 + biot / beta), rel=1e-3
    )

    # The same errors on the solver's own time grid. |E_advisor - E_exact| is bounded by the
    # field-mean error plus the gap between the advisor's lumped curves (mesh V, A_s, d) and the
    # exact-geometry curves (the triangle inequality), evaluated here.
    fo_grid = solution.times / DIFFUSION_TIME
    late = fo_grid >= FO_MIN
    exact_grid = series.mean(fo_grid[late])
    field_error = np.abs(theta(solution.mean[late]) - exact_grid).max()
    assert field_error < 5e-4  # the solver's accuracy, measured at most 1.3e-4
    ratios = {}
    for name, curve in (("classical", classical), ("corrected", corrected)):
        reference = curve(shape, biot, fo_grid[late])
        expected = np.abs(reference - exact_grid).max()
        found = a.errors[f"{name} vs mean"]
        assert found.time / DIFFUSION_TIME >= FO_MIN  # the maximum is inside the checked range
        model_gap = np.abs(theta(a.model_temperatures[name][late]) - reference).max()
        assert abs(found.fraction - expected) <= field_error + model_gap + 1e-12
        ratios[name] = (found.fraction, expected)
    advisor_reduction = ratios["classical"][0] / ratios["corrected"][0]
    grid_reduction = ratios["classical"][1] / ratios["corrected"][1]
    assert grid_reduction == pytest.approx(reduction, rel=0.01)  # the grid resolves the peaks
    # Measured within 0.45 % (the field-mean error is under 1/20 of the corrected error).
    assert advisor_reduction == pytest.approx(reduction, rel=0.03)


# =============================================================================================
# 3. The slowest mode against the first eigenvalue
# =============================================================================================

# P1 meshes of size L/8, L/16, L/32 at Bi = 1. Measured relative errors: strip 6.4e-4, 1.9e-4,
# 4.6e-5 (order 1.9); whole disk 2.6e-3, 6.4e-4, 1.6e-4 (order 2.0). The mode shape's peak to
# mean, cos -> zeta/sin(zeta) for the slab and J0 -> zeta/(2 J1(zeta)) for the disk (Incropera
# 6th ed. §5.5.1, §5.6.1, from memory), measured within 7e-5 and 8e-5 on L/32.
MODE_DIVISIONS = (8, 16, 32)


@pytest.mark.parametrize(
    ("shape", "roots", "n"), [("slab", plane_wall_roots, 0), ("disk", cylinder_roots, 1)]
)
def test_slowest_mode_converges_to_first_eigenvalue(shape, roots, n):
    biot = 1.0
    zeta = roots(biot, 1)[0]
    exact = zeta**2 * DIFFUSIVITY / LENGTH**2
    modes = [
        slowest_mode(model(shape, biot, divisions=d, order=1, initial=INITIAL))
        for d in MODE_DIVISIONS
    ]
    errors = np.array([m.rate / exact - 1 for m in modes])
    sizes = LENGTH / np.array(MODE_DIVISIONS)
    order = np.polyfit(np.log(sizes), np.log(np.abs(errors)), 1)[0]
    assert order == pytest.approx(2.0, abs=0.4)
    assert abs(errors[-1]) < 5e-4
    if shape == "slab":  # Rayleigh-Ritz on the exact domain: from above (Strang & Fix)
        assert np.all(errors > 0)
    finest = modes[-1]
    # The lumped rate is h A_s/(rho c V) = (n+1) Bi alpha/L^2 and the ratio zeta^2/((n+1) Bi).
    lumped_rate = (n + 1) * biot * DIFFUSIVITY / LENGTH**2
    tolerance = 1e-12 if shape == "slab" else 2e-3  # the disk: polygon area and perimeter
    assert finest.lumped_rate == pytest.approx(lumped_rate, rel=tolerance)
    assert finest.ratio == pytest.approx(zeta**2 / ((n + 1) * biot), rel=1e-3)
    h = biot * CONDUCTIVITY / LENGTH
    assert finest.equivalent_coefficient == pytest.approx(h * finest.ratio, rel=tolerance)
    peak_to_mean = zeta / math.sin(zeta) if shape == "slab" else zeta / (2 * j1(zeta))
    assert finest.core_to_mean == pytest.approx(peak_to_mean, rel=1e-3)


# =============================================================================================
# 4. Time to target
# =============================================================================================


@pytest.mark.parametrize("shape", ["slab", "cylinder"])
def test_time_to_target_against_exact_series_and_closed_form(shape):
    biot = 1.0
    n = SHAPE_INDEX[shape]
    target = 70.0  # degC: theta* = 0.25
    goal = theta(target)
    series = Series(shape, biot)
    centre_time = series.time_to("centre", goal) * DIFFUSION_TIME
    mean_time = series.time_to("mean", goal) * DIFFUSION_TIME

    solution = standard_run(shape, biot)
    a = assess(solution, target=target, quantity="time_to_target")
    times = a.time_to_target
    # Field: P2 on L/16 and steps of at most 1/100 of the run, crossing times interpolated
    # linearly within a step. Measured within 0.01 % of the series; required 0.1 %.
    assert times["slowest"] == pytest.approx(centre_time, rel=1e-3)
    assert times["probe:centre"] == pytest.approx(centre_time, rel=1e-3)
    assert times["mean"] == pytest.approx(mean_time, rel=1e-3)

    # Lumped closed form t = tau ln(theta_i/theta), tau = rho c (V/A_s) / h, V/A_s = L/(n+1)
    # (Incropera 6th ed. eq. 5.5, from memory). The strip's V/A_s is exact; the curved P2
    # quarter disk's V/A_s is within 1.4e-8, measured (required 1e-4).
    h = biot * CONDUCTIVITY / LENGTH
    tau = DENSITY * SPECIFIC_HEAT * LENGTH / ((n + 1) * h)
    tolerance = 1e-9 if shape == "slab" else 1e-4
    assert times["classical"] == pytest.approx(tau * math.log(1 / goal), rel=tolerance)
    beta = n + 3
    corrected_time = tau * (1 + biot / beta) * math.log(1 / goal)
    assert times["corrected"] == pytest.approx(corrected_time, rel=2e-3)  # beta from the mesh
    # The corrected model follows the mean: its time is nearer the exact mean's than the
    # classical one's (measured: 0.3 % early against 25 % early for the slab, 20 % for the
    # cylinder).
    assert abs(times["corrected"] - mean_time) < 0.05 * abs(times["classical"] - mean_time)
    # The verdict judges the time against the slowest point's.
    assert a.verdict.error == pytest.approx(
        abs(times["classical"] - times["slowest"]) / times["slowest"], rel=1e-12
    )


# =============================================================================================
# 5. The verdict's direction
# =============================================================================================


def test_high_biot_heating_is_non_conservative_for_a_soak():
    # A slab heated in a furnace by convection at Bi = 2 (h L/k = V/A_s h/k): the lumped model
    # heats the whole part at the surface's rate, so it says "done" before the core is.
    biot, start, furnace, target = 2.0, 20.0, 900.0, 850.0
    series = Series("slab", biot)
    goal = (target - furnace) / (start - furnace)
    centre_time = series.time_to("centre", goal) * DIFFUSION_TIME  # Fo = 2.6
    solution = plunge("slab", biot, 4.0, initial=start, ambient=furnace)
    a = assess(solution, target=target, quantity="slowest")
    times = a.time_to_target
    assert times["slowest"] == pytest.approx(centre_time, rel=1e-3)  # measured 8e-5
    tau = DENSITY * SPECIFIC_HEAT * LENGTH / (biot * CONDUCTIVITY / LENGTH)
    assert times["classical"] == pytest.approx(tau * math.log(1 / goal), rel=1e-9)
    assert times["classical"] < times["slowest"]  # measured 1.4 against 2.6 diffusion times

    error = a.errors["classical vs slowest"]
    assert error.lumped_ahead
    # The exact largest gap between exp(-Bi Fo) and the centre's theta*, on the run's grid.
    fo = solution.times / DIFFUSION_TIME
    late = fo >= FO_MIN
    expected = np.abs(classical("slab", biot, fo[late]) - series.centre(fo[late])).max()
    # 0.292 of the initial difference; the field's centre is within 7e-5 of the series.
    assert error.fraction == pytest.approx(expected, abs=1e-3)
    assert a.verdict.rating == "inadequate"
    assert "non-conservative for a soak or hold time" in a.verdict.direction
    assert "heats faster than it does" in a.verdict.direction

    by_time = assess(solution, target=target, quantity="time_to_target").verdict
    assert by_time.rating != "adequate"
    assert "too early" in by_time.direction
    assert "non-conservative" in by_time.direction


def test_high_biot_quench_is_non_conservative_for_the_end_of_a_quench():
    # A long round quenched in oil at Bi = h R/k = 2 (Bi on V/A_s = 1).
    biot, start, oil, target = 2.0, 850.0, 60.0, 200.0
    series = Series("cylinder", biot)
    goal = (target - oil) / (start - oil)
    solution = plunge("cylinder", biot, 2.0, initial=start, ambient=oil)
    a = assess(solution, target=target, quantity="slowest")
    times = a.time_to_target
    assert times["slowest"] == pytest.approx(
        series.time_to("centre", goal) * DIFFUSION_TIME, rel=1e-3
    )  # measured 5e-6; the lumped time is 0.43 against 0.79 diffusion times
    assert times["classical"] < times["slowest"]
    assert a.errors["classical vs slowest"].lumped_ahead
    assert a.verdict.rating == "inadequate"
    assert "non-conservative for the end of a quench" in a.verdict.direction
    assert "cools faster than it does" in a.verdict.direction


@pytest.mark.parametrize("quantity", ["slowest", "mean", "time_to_target"])
def test_small_biot_is_adequate(quantity):
    # Bi = 0.005: the lumped error is about (Bi/3)/e = 6e-4 of the initial difference for the
    # mean and, from the one-term centre C_1 exp(-zeta_1^2 Fo) with C_1 ~ 1 + Bi/6 and
    # zeta_1^2 ~ Bi (1 - Bi/3), max over x of e^-x (1/6 + x/3) Bi = 0.2 Bi = 1e-3 for the
    # centre; the time to theta* = 0.5 is early by about 0.3 %. Measured 6.1e-4, 1.0e-3 and
    # 0.29 %. The default tolerance is 5 %.
    biot, target = 0.005, 120.0
    solution = plunge("slab", biot, 200.0, divisions=8, order=1)
    a = assess(solution, target=target, quantity=quantity)
    assert a.verdict.rating == "adequate"
    assert a.verdict.error < 0.01
    centre_time = Series("slab", biot).time_to("centre", theta(target)) * DIFFUSION_TIME
    assert a.time_to_target["slowest"] == pytest.approx(centre_time, rel=2e-4)  # measured 1.5e-5


# =============================================================================================
# 6. The peak internal difference and a refused request
# =============================================================================================


def test_peak_difference_rating_uses_peak_over_driving_difference():
    # The exact peak of theta*(centre) - theta*(surface) of a plane wall at Bi = 1 (maximised
    # over Fo with the series): 0.308 at Fo = 0.227. The P2 run's nodal spread agrees within
    # 1.1e-4, measured; required 1e-3 (the stored steps straddle the flat peak: the recorded
    # peak is at Fo = 0.24, required within 0.05).
    biot = 1.0
    series = Series("slab", biot)
    peak = minimize_scalar(
        lambda fo: -(series.centre(fo)[0] - series.surface(fo)[0]),
        bounds=(0.01, 2.0),
        method="bounded",
        options={"xatol": 1e-10},
    )
    exact_peak = -peak.fun
    solution = standard_run("slab", biot)
    a = assess(solution, quantity="peak_difference")
    assert a.peak_internal_difference / SPAN == pytest.approx(exact_peak, abs=1e-3)
    assert a.peak_internal_difference_time / DIFFUSION_TIME == pytest.approx(peak.x, abs=0.05)
    assert a.verdict.error == pytest.approx(a.peak_internal_difference / SPAN, rel=1e-12)
    assert "uniform" in a.verdict.direction

    ratio = a.verdict.error
    ratings = {
        tolerance: assess(solution, quantity="peak_difference", tolerance=tolerance).verdict
        for tolerance in (1.05 * ratio, ratio / 1.5, ratio / 2.5)
    }
    assert [v.rating for v in ratings.values()] == ["adequate", "marginal", "inadequate"]
    assert all(v.error == pytest.approx(ratio, rel=1e-12) for v in ratings.values())


def test_time_to_target_without_target_is_refused():
    solution = standard_run("slab", 1.0)
    with pytest.raises(AdvisorError, match="needs a target"):
        assess(solution, quantity="time_to_target")
