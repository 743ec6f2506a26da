"""Orthotropic conductivity against separable exact solutions.

With the principal directions along the sides of a square bar (or along r and z of a finite
cylinder), ρc ∂T/∂t = k₁ ∂²T/∂ξ² + k₂ ∂²T/∂η² with convection −k_n ∂T/∂n = h (T − T∞) on
each face separates: θ = X(ξ, t)·Y(η, t), each factor the plane-wall (or long-cylinder)
series with its own Biot number h·a/k and Fourier number k·t/(ρc·a²). Sources:

- product solutions: Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §1.16
  (anisotropic solids: principal axes reduce the equation to one with different
  diffusivities along them) and §3.10, §5.3 (the plane-wall and cylinder series), from memory;
  Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed.,
  §5.5 and §5.8 (the series and their products), from memory.

The series are summed in ``tests/exact_series.py`` with its own root-finding; nothing of the
reference comes from the code under test. Material values are invented.

Tolerances: P1 triangles of size a/24 and Crank–Nicolson steps of a²/α₁/200. The nodal error
is O(h²) with (h/a)² = 1.7e-3 times constants of order 0.1–1 (the stiff direction has
Bi = 2.5, so steeper gradients near its faces), the time error O(Δt²) ≈ 2.5e-5: 0.2 % of the
initial difference covers the top of that estimate (1.6e-4 was measured) and is exceeded a
hundredfold by principal values swapped or direction 1 turned 10° off the side (checked
below).
"""

from __future__ import annotations

import math
from functools import cache

import numpy as np
import pytest
from exact_series import (
    cylinder_profile,
    cylinder_tail_bound,
    plane_wall_profile,
    plane_wall_tail_bound,
)

from fem import Convection, Insulated, Material, ModelError, Orthotropic, ThermalModel, solve
from geometries import Rectangle, Section

HALF = 0.010  # a, m: the square's half-side, the cylinder's radius and half-length
DENSITY, SPECIFIC_HEAT = 4000.0, 1000.0  # invented: ρc = 4e6 J/(m³·K)
ALONG, ACROSS = 40.0, 4.0  # k₁, k₂ in W/(m·K), invented (a laminate's ratio of 10)
COEFFICIENT = 1000.0  # h, W/(m²·K): Bi₁ = h·a/k₁ = 0.25, Bi₂ = 2.5
SLOW_TIME = HALF**2 * DENSITY * SPECIFIC_HEAT / ACROSS  # a²/α₂ = 100 s
FAST_TIME = HALF**2 * DENSITY * SPECIFIC_HEAT / ALONG  # a²/α₁ = 10 s
CHECK_TIMES = (0.05 * SLOW_TIME, 0.2 * SLOW_TIME, 0.5 * SLOW_TIME)
MESH_SIZE = HALF / 24
TIME_STEP = FAST_TIME / 200
TOLERANCE = 0.002  # of the initial difference
TERMS = 60
INITIAL, AMBIENT = 100.0, 0.0

# points in the bar's own frame (ξ, η)/a: centre, on the principal axes, inside, a face, a corner
LOCAL_POINTS = {
    "centre": (0.0, 0.0),
    "along": (0.6, 0.0),
    "across": (0.0, 0.6),
    "inside": (0.5, -0.7),
    "face": (1.0, 0.3),
    "corner": (1.0, 1.0),
}


def wall(biot: float, fourier: float, x_star: float) -> float:
    """Plane-wall θ* (Carslaw & Jaeger §3.10; Incropera §5.5; from memory)."""
    assert plane_wall_tail_bound(fourier, TERMS) < 1e-10
    return float(plane_wall_profile(biot, fourier, [x_star], terms=TERMS)[0])


def bar_exact(xi: float, eta: float, time: float) -> float:
    """θ* of the orthotropic bar: the product of the two walls, each with its own k."""
    rho_c = DENSITY * SPECIFIC_HEAT
    along = wall(COEFFICIENT * HALF / ALONG, ALONG * time / (rho_c * HALF**2), abs(xi))
    across = wall(COEFFICIENT * HALF / ACROSS, ACROSS * time / (rho_c * HALF**2), abs(eta))
    return along * across


def rotation(degrees: float) -> np.ndarray:
    c, s = math.cos(math.radians(degrees)), math.sin(math.radians(degrees))
    return np.array([[c, -s], [s, c]])


def probes(degrees: float) -> dict[str, tuple[float, float]]:
    """The local points placed in the section turned by ``degrees`` (slightly inside the
    corner, so that the probe lies in a triangle whatever the round-off)."""
    turn = rotation(degrees)
    return {
        name: tuple(float(v) for v in turn @ (np.array(p) * HALF * (1 - 1e-9)))
        for name, p in LOCAL_POINTS.items()
    }


def solve_bar(degrees: float, material: Material, end: float = CHECK_TIMES[-1]):
    square = Rectangle(
        2 * HALF,
        2 * HALF,
        corner=(-HALF, -HALF),
        edge_names={side: "surface" for side in ("left", "right", "top", "bottom")},
    ).rotated(degrees)
    model = ThermalModel(
        square.mesh(MESH_SIZE),
        material,
        boundaries={"surface": Convection(heat_transfer_coefficient=COEFFICIENT, ambient=AMBIENT)},
        initial_temperature=INITIAL,
        probes=probes(degrees),
    )
    return solve(model, end, time_step=TIME_STEP, output_interval=CHECK_TIMES[0])


def laminate(angle: float, first: float = ALONG, second: float = ACROSS) -> Material:
    return Material(Orthotropic(first, second, angle=angle), DENSITY, SPECIFIC_HEAT)


def at(solution, time: float) -> int:
    hits = np.flatnonzero(np.abs(solution.times - time) <= 1e-9 * time)
    assert len(hits) == 1, f"t = {time} s is not on the time grid"
    return int(hits[0])


def bar_errors(solution) -> dict[tuple[float, str], float]:
    errors = {}
    for time in (t for t in CHECK_TIMES if t <= solution.times[-1]):
        i = at(solution, time)
        for name, (xi, eta) in LOCAL_POINTS.items():
            computed = (solution.probes[name][i] - AMBIENT) / (INITIAL - AMBIENT)
            errors[time, name] = abs(float(computed) - bar_exact(xi, eta, time))
    return errors


@cache
def turned_bar():
    """The square turned by 30°, its principal direction 1 along its turned x side."""
    return solve_bar(30.0, laminate(30.0))


def test_reference_product_is_sane():
    # Early the centre has not felt the faces; later every point lies between the ambient
    # and the start, the corner coolest and the centre warmest.
    assert bar_exact(0.0, 0.0, 0.1) == pytest.approx(1.0, abs=1e-9)
    for time in CHECK_TIMES:
        assert 0 < bar_exact(1, 1, time) < bar_exact(0.6, 0, time) < bar_exact(0, 0, time) < 1
        assert bar_exact(1, 1, time) < bar_exact(0, 0.6, time) < bar_exact(0, 0, time)


def test_turned_square_matches_the_product_of_two_walls():
    errors = bar_errors(turned_bar())
    worst = max(errors, key=errors.get)
    assert errors[worst] < TOLERANCE, f"largest error {errors[worst]:.2e} at {worst}"


def test_the_check_can_fail():
    # The same bar with the principal values swapped, or direction 1 turned 10° away from the
    # side, misses the product solution by more than the tolerance.
    swapped = bar_errors(solve_bar(30.0, laminate(30.0, ACROSS, ALONG), CHECK_TIMES[1]))
    assert max(swapped.values()) > 20 * TOLERANCE
    turned = bar_errors(solve_bar(30.0, laminate(40.0), CHECK_TIMES[1]))
    assert max(turned.values()) > 20 * TOLERANCE


def test_turning_section_and_tensor_together_changes_nothing():
    """A square with direction 1 at 20° from x, and the same square turned by 45° with its
    tensor turned alike (given as the full tensor R·K·Rᵀ computed here): the fields agree at
    corresponding points. Each lies within the product test's discretisation error of the
    true field (same mesh size and material), so they agree within twice that tolerance."""
    tensor = np.diag([ALONG, ACROSS])
    original = rotation(20.0) @ tensor @ rotation(20.0).T
    turned = rotation(45.0) @ original @ rotation(45.0).T
    straight = solve_bar(0.0, laminate(20.0), CHECK_TIMES[1])
    material = Material(Orthotropic.from_tensor(turned), DENSITY, SPECIFIC_HEAT)
    assert material.orthotropic.angle == pytest.approx(65.0, abs=1e-9)
    rotated = solve_bar(45.0, material, CHECK_TIMES[1])
    differences = [
        np.max(np.abs(straight.probes[name] - rotated.probes[name])) / (INITIAL - AMBIENT)
        for name in LOCAL_POINTS
    ]
    assert max(differences) < 2 * TOLERANCE
    # the check can fail: the turned square with the tensor left unturned differs
    unturned = solve_bar(45.0, laminate(20.0), CHECK_TIMES[1])
    missed = max(
        np.max(np.abs(straight.probes[name] - unturned.probes[name])) / (INITIAL - AMBIENT)
        for name in LOCAL_POINTS
    )
    assert missed > 20 * TOLERANCE


def test_energy_is_conserved():
    """Heat stored (∫ρc(T − T₀) dA, the P1 field integrated exactly per triangle here) equals
    the heat that entered (the recorded edge heat flows integrated by the trapezoidal rule,
    which is Crank–Nicolson's own quadrature; the start-up backward-Euler half-steps use the
    end value instead, so the rule differs there by at most half the step times the change of
    the flow, summed over those steps)."""
    solution = turned_bar()
    mesh = solution.model.section.mesh
    corners = mesh.p[:, mesh.t[:3]]
    areas = 0.5 * np.abs(
        (corners[0, 1] - corners[0, 0]) * (corners[1, 2] - corners[1, 0])
        - (corners[0, 2] - corners[0, 0]) * (corners[1, 1] - corners[1, 0])
    )
    field = solution.final_state[: mesh.p.shape[1]]
    stored = DENSITY * SPECIFIC_HEAT * np.sum(areas * (field[mesh.t[:3]].mean(axis=0) - INITIAL))
    flow = sum(solution.heat_flow.values())
    times = solution.times
    entered = float(np.sum(0.5 * (flow[1:] + flow[:-1]) * np.diff(times)))
    startup = solution.stats.startup_steps
    slack = float(
        np.sum(0.5 * np.abs(np.diff(flow[: startup + 2])) * np.diff(times[: startup + 2]))
    )
    assert abs(stored - entered) <= slack + 1e-9 * abs(entered), (stored, entered, slack)
    assert solution.checks.energy_balance_error < 1e-8


def test_axisymmetric_cylinder_with_radial_and_axial_conductivities():
    """A finite cylinder (radius a, half-length a, mid-plane symmetry) with k_r = k₁ and
    k_z = k₂: θ = C(r)·X(z), the long cylinder's series with Bi = h·a/k_r times the wall's
    with Bi = h·a/k_z (Carslaw & Jaeger §5.3 and §3.10; Incropera §5.8; from memory)."""
    profile = Rectangle(HALF, HALF, edge_names={"bottom": "mid", "right": "mantle", "top": "end"})
    fluid = Convection(heat_transfer_coefficient=COEFFICIENT, ambient=AMBIENT)
    points = {"centre": (0.0, 0.0), "rim": (HALF, HALF), "inside": (0.5 * HALF, 0.6 * HALF)}
    model = ThermalModel(
        Section(profile, axisymmetric=True).mesh(MESH_SIZE),
        laminate(0.0),
        boundaries={"mid": Insulated("symmetry"), "mantle": fluid, "end": fluid},
        initial_temperature=INITIAL,
        probes={k: (x * (1 - 1e-9), z * (1 - 1e-9)) for k, (x, z) in points.items()},
    )
    solution = solve(model, CHECK_TIMES[-1], time_step=TIME_STEP, output_interval=CHECK_TIMES[0])
    rho_c = DENSITY * SPECIFIC_HEAT
    for time in CHECK_TIMES:
        i = at(solution, time)
        fourier_r = ALONG * time / (rho_c * HALF**2)
        assert cylinder_tail_bound(fourier_r, TERMS) < 1e-10
        for name, (r, z) in points.items():
            radial = cylinder_profile(
                COEFFICIENT * HALF / ALONG, fourier_r, [r / HALF], terms=TERMS
            )
            axial = wall(COEFFICIENT * HALF / ACROSS, ACROSS * time / (rho_c * HALF**2), z / HALF)
            computed = (solution.probes[name][i] - AMBIENT) / (INITIAL - AMBIENT)
            error = abs(computed - float(radial[0]) * axial)
            assert error < TOLERANCE, f"{name} at t = {time} s: error {error:.2e}"
    assert solution.checks.energy_balance_error < 1e-8


def test_temperature_dependent_principal_values_at_steady_state():
    """Principal values k₁(T) = κ₁(1 + βT), k₂(T) = κ₂(1 + βT) (tables, linear in T) on the
    square turned by 30°, direction 1 along its turned x side, one face held at T_h, the
    opposite at T_c, the other two insulated. With U = ∫(1 + βT) dT = T + βT²/2 (Kirchhoff's
    transformation, Carslaw & Jaeger 2nd ed. §1.7, from memory) the steady equation becomes
    ∇·(K₀∇U) = 0 with U linear across the faces, so T(ξ) = (√(1 + 2βU(ξ)) − 1)/β exactly and
    the heat flow per metre is κ₁·(U_h − U_c). In the x, y frame K has k_xy(T) ≠ 0, so the
    whole tensor path (residual and tangent with K'(T)) is used. A run of 30 slow diffusion
    times leaves exp(−π²/4·30) of the start; the tables' linear interpolation is exact for a
    linear k, so what remains is the O(h²) error of P1 for the nonlinear T(ξ) (β·ΔT ≈ 1 makes
    its curvature mild) and the quadrature of k(T): 2e-4 of T_h − T_c (3.4e-5 measured) and
    1e-4 of the heat flow (round-off measured) are the tolerances."""
    from fem import FixedTemperature, PropertyTable

    beta, hot, cold = 0.004, 300.0, 20.0  # 1/K, °C (invented)
    temperatures = (-100.0, 1000.0)  # wide: Newton's first iterates overshoot the range
    first = PropertyTable(temperatures, tuple(ALONG * (1 + beta * t) for t in temperatures))
    second = PropertyTable(temperatures, tuple(ACROSS * (1 + beta * t) for t in temperatures))
    material = Material(Orthotropic(first, second, angle=30.0), DENSITY, SPECIFIC_HEAT)
    square = Rectangle(
        2 * HALF,
        2 * HALF,
        corner=(-HALF, -HALF),
        edge_names={"left": "hot", "right": "cold", "top": "sides", "bottom": "sides"},
    ).rotated(30.0)
    model = ThermalModel(
        square.mesh(MESH_SIZE),
        material,
        boundaries={
            "hot": FixedTemperature(hot),
            "cold": FixedTemperature(cold),
            "sides": Insulated("insulated"),
        },
        initial_temperature=cold,
        probes=probes(30.0),
    )
    end = 30 * SLOW_TIME * (1 + beta * cold)  # the slowest diffusion is at the lowest k
    solution = solve(model, end, time_step=end / 300)

    def kirchhoff(t):
        return t + beta * t * t / 2

    for name, (xi, _) in LOCAL_POINTS.items():
        u = kirchhoff(hot) + (kirchhoff(cold) - kirchhoff(hot)) * (xi + 1) / 2
        exact = (math.sqrt(1 + 2 * beta * u) - 1) / beta
        error = abs(solution.probes[name][-1] - exact) / (hot - cold)
        assert error < 2e-4, f"{name}: {solution.probes[name][-1]:.4f} against {exact:.4f} degC"
    flow = ALONG * (kirchhoff(hot) - kirchhoff(cold))  # W per metre of depth
    assert solution.heat_flow["hot"][-1] == pytest.approx(flow, rel=1e-4)
    assert solution.heat_flow["cold"][-1] == pytest.approx(-flow, rel=1e-4)
    assert solution.stats.newton_iterations > solution.stats.steps  # it is nonlinear


def test_correction_length_solves_with_the_tensor():
    """A square turned by 30° cooled only on the two faces across principal direction 2 (the
    others insulated) is a slab of half-thickness a in that direction with conductivity k₂:
    its correction length is s = a/3 quoted with k₂ (the improved lumped model, Cotta &
    Mikhailov 1997, ch. 2, from memory), i.e. the internal resistance R = s/k₂ = a/(3·k₂).
    k₁ along the faces carries no heat in that problem, so a solve that ignored the tensor
    (taking k₁, or the scalar k₂ on a rotated field) would be off by up to ten times. P1 of
    size a/24: w is quadratic, caught to (h/a)² ≈ 2e-3 (4e-4 measured); 0.5 % is required."""
    from fem.correction_length import correction_length

    square = Rectangle(
        2 * HALF,
        2 * HALF,
        corner=(-HALF, -HALF),
        edge_names={"left": "sides", "right": "sides", "top": "cooled", "bottom": "cooled"},
    ).rotated(30.0)
    mesh = square.mesh(MESH_SIZE)

    def resistance(angle: float) -> float:
        model = ThermalModel(
            mesh,
            laminate(angle),
            boundaries={
                "cooled": Convection(heat_transfer_coefficient=COEFFICIENT, ambient=AMBIENT),
                "sides": Insulated("insulated"),
            },
            initial_temperature=INITIAL,
        )
        return correction_length(model, INITIAL).resistance

    assert resistance(30.0) == pytest.approx(HALF / (3 * ACROSS), rel=5e-3)
    # direction 1 across the cooled faces instead: the slab conducts with k₁
    assert resistance(120.0) == pytest.approx(HALF / (3 * ALONG), rel=5e-3)


# -- the value object and the scalar it stands for -------------------------------------------


def test_principal_form_and_tensor_agree():
    # K = R diag(k1, k2) Rᵀ written out for 30°: k_xx = k1 c² + k2 s², k_xy = (k1 − k2) c s
    c, s = math.cos(math.radians(30)), math.sin(math.radians(30))
    expected = [
        [ALONG * c * c + ACROSS * s * s, (ALONG - ACROSS) * c * s],
        [(ALONG - ACROSS) * c * s, ALONG * s * s + ACROSS * c * c],
    ]
    assert np.allclose(Orthotropic(ALONG, ACROSS, 30.0).tensor(), expected, rtol=1e-14)
    back = Orthotropic.from_tensor(expected)
    assert (back.first, back.second, back.angle) == pytest.approx((ALONG, ACROSS, 30.0))


@pytest.mark.parametrize(
    ("tensor", "words"),
    [
        ([[2.0, 1.0], [0.5, 2.0]], "symmetric"),
        ([[1.0, 2.0], [2.0, 1.0]], "positive definite"),
        ([1.0, 2.0], r"\[\[k_xx, k_xy\], \[k_xy, k_yy\]\]"),
    ],
)
def test_bad_tensors_are_refused(tensor, words):
    with pytest.raises(ModelError, match=words):
        Orthotropic.from_tensor(tensor)


def test_bad_principal_values_are_refused():
    with pytest.raises(ModelError, match=r"second principal conductivity must be .* > 0"):
        Orthotropic(20.0, -1.0)


def test_scalar_uses_take_the_smaller_principal_value():
    """Biot numbers, diffusion times and lumped models take k₂ = min(k₁, k₂); Bi on V/A_s is
    h·(V/A_s)/k computed here from the square's closed-form area and perimeter."""
    from advisor.analysis.biot import biot_numbers

    material = laminate(30.0)
    assert material.conductivity == ACROSS
    assert material.diffusivity == pytest.approx(ACROSS / (DENSITY * SPECIFIC_HEAT))
    model = turned_bar().model
    by_volume = next(b for b in biot_numbers(model) if b.name == "volume_to_surface")
    # V/A_s of a square of side 2a is a/2; the mesh's straight sides give it to round-off
    assert by_volume.length == pytest.approx(HALF / 2, rel=1e-9)
    assert by_volume.value == pytest.approx(COEFFICIENT * (HALF / 2) / ACROSS, rel=1e-9)


def test_the_docstring_examples_run():
    import doctest

    import fem.orthotropic

    result = doctest.testmod(fem.orthotropic)
    assert result.attempted > 0 and result.failed == 0


def test_the_lower_principal_value_of_crossing_tables():
    # Both tables are piecewise linear, so the lower of them is piecewise linear with corners
    # at their points and where they cross: compared on a fine grid with numpy's minimum.
    from fem import PropertyTable

    first = PropertyTable((0.0, 500.0, 1000.0), (30.0, 10.0, 12.0))
    second = PropertyTable((0.0, 1000.0), (15.0, 25.0))
    lower = Orthotropic(first, second).smallest
    grid = np.linspace(0.0, 1000.0, 2001)
    expected = np.minimum(np.interp(grid, first.temperatures, first.values), 15.0 + grid / 100)
    assert np.allclose(lower(grid), expected, rtol=1e-12, atol=1e-12)


def test_heat_flux_of_a_linear_field_is_minus_k_times_the_gradient():
    """A linear field T = g·x has ∇T = g on every triangle, so the recovered flux is −K·g
    exactly, K written out from the principal values here."""
    from fem.heat_flux import vertex_heat_flux

    model = turned_bar().model
    gradient = np.array([300.0, -200.0])  # K/m
    x, y = model.section.mesh.p
    flux = vertex_heat_flux(model, gradient[0] * x + gradient[1] * y)
    c, s = math.cos(math.radians(30)), math.sin(math.radians(30))
    tensor = np.array(
        [
            [ALONG * c * c + ACROSS * s * s, (ALONG - ACROSS) * c * s],
            [(ALONG - ACROSS) * c * s, ALONG * s * s + ACROSS * c * c],
        ]
    )
    assert np.allclose(flux[:, :2], -(tensor @ gradient), rtol=1e-9)


# -- the case file -----------------------------------------------------------------------------

CASE = """
[section]
mesh_size = "2 mm"
[[section.shape]]
kind = "rectangle"
width = "20 mm"
height = "20 mm"
edges = { left = "outline", right = "outline", top = "outline", bottom = "outline" }
[material]
conductivity = CONDUCTIVITY
density = "4000 kg/m^3"
specific_heat = "1000 J/(kg*K)"
[boundaries.outline]
convection = { coefficient = "1000 W/(m^2*K)", ambient = "0 degC" }
[initial]
temperature = "100 degC"
[run]
end_time = "1 min"
"""


def _case(tmp_path, conductivity: str):
    from advisor.casefile import load_case

    path = tmp_path / "case.toml"
    path.write_text(CASE.replace("CONDUCTIVITY", conductivity))
    return load_case(path)


def test_case_file_takes_principal_values_or_a_tensor(tmp_path):
    principal = _case(tmp_path, '{ principal = ["40 W/(m*K)", "4 W/(m*K)"], angle = "30 deg" }')
    material = next(iter(principal.materials.values()))
    assert material.orthotropic == Orthotropic(40.0, 4.0, 30.0)
    assert material.conductivity == 4.0
    tensor = Orthotropic(40.0, 4.0, 30.0).tensor()
    rows = ", ".join(
        "[" + ", ".join(f'"{v!r} W/(m*K)"' for v in row) + "]" for row in tensor.tolist()
    )
    given = _case(tmp_path, f"{{ tensor = [{rows}] }}")
    back = next(iter(given.materials.values())).orthotropic
    assert (back.first, back.second, back.angle) == pytest.approx((40.0, 4.0, 30.0))
    table = '{ temperatures = ["0 degC", "400 degC"], values = ["40 W/(m*K)", "30 W/(m*K)"] }'
    tabled = _case(tmp_path, f'{{ principal = [{table}, "4 W/(m*K)"], angle = "90 deg" }}')
    material = next(iter(tabled.materials.values()))
    assert material.orthotropic.first(200.0) == pytest.approx(35.0)
    assert material.conductivity(200.0) == pytest.approx(4.0)  # the lower at every T


@pytest.mark.parametrize(
    ("conductivity", "message"),
    [
        (
            '{ principal = ["40 W/(m*K)"] }',
            r"line 10: material\.conductivity\.principal: expected two conductivities",
        ),
        (
            '{ principal = ["40 W/(m*K)", "0 W/(m*K)"] }',
            r"material\.conductivity\.principal: conductivities must be > 0",
        ),
        (
            '{ principal = ["40 W/(m*K)", "4 W/(m*K)"], angle = "3 m" }',
            r"material\.conductivity\.angle: expected an angle",
        ),
        (
            '{ tensor = [["1 W/(m*K)", "2 W/(m*K)"], ["2 W/(m*K)", "1 W/(m*K)"]] }',
            r"material\.conductivity\.tensor: .*positive definite",
        ),
        (
            '{ principal = ["40 W/(m*K)", "4 W/(m*K)"], angel = "3 deg" }',
            r"material\.conductivity\.angel",
        ),
    ],
)
def test_case_file_errors_name_the_key(tmp_path, conductivity, message):
    from advisor.casefile import CaseError

    with pytest.raises(CaseError, match=message):
        _case(tmp_path, conductivity)
