"""Contact resistance in a transient: a two-layer wall heated on one face, insulated on the
other, against two independent 1-D solutions computed here.

1. The exact orthogonal expansion for a composite slab with a contact resistance (Özişik,
   Heat Conduction, 2nd ed., 1993, the chapter on composite media; from memory): in each layer
   X₁ = cos(μ₁x) + (h/(k₁μ₁)) sin(μ₁x) and X₂ = C cos(μ₂(L − x)), μᵢ = λ/√αᵢ, the interface
   conditions k₁X₁' = k₂X₂' and −k₁X₁' = h_c(X₁ − X₂) giving C and the eigenvalues λ (roots
   found here by a scan and Brent's method), the modes orthogonal with weight ρc. Terms with
   λ > 3 1/s are below e⁻⁴⁵ of the first after 5 s and are left out.
2. A finite-volume method of lines (cell-centred, the contact resistance in series between the
   two cells beside the interface, half-cell resistances at the faces), exact in time by the
   eigen-decomposition of the symmetric scaled system (scipy.linalg.eigh) — the usual
   conduction network, e.g. Patankar, Numerical Heat Transfer and Fluid Flow (1980), ch. 4,
   from memory. With 200 cells a layer it agrees with the series to 1.0e-5 of the largest
   jump (4.1e-5 with 100: second order).

Neither shares code with the project.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.linalg import eigh
from scipy.optimize import brentq

from fem import Convection, Insulated, Interface, Material, ThermalModel, solve
from geometries import Composite, Rectangle

L1, L2, HEIGHT = 0.01, 0.02, 0.001  # m
FIRST = Material(10.0, 2000.0, 900.0)  # alpha = 5.6e-6 m²/s: L1²/alpha = 18 s
SECOND = Material(2.0, 1500.0, 1200.0)  # alpha = 1.1e-6 m²/s: L2²/alpha = 360 s
H, AMBIENT, START = 100.0, 100.0, 20.0  # W/(m² K), °C, °C
CONDUCTANCE = 500.0  # W/(m² K)
END = 600.0  # s


def two_layer_model(order: int, size: float) -> ThermalModel:
    section = Composite(
        (
            Rectangle(
                L1,
                HEIGHT,
                edge_names={"left": "hot", "bottom": "sides", "top": "sides", "right": "j"},
                region="a",
            ),
            Rectangle(
                L2,
                HEIGHT,
                corner=(L1, 0.0),
                edge_names={"left": "j", "bottom": "sides", "top": "sides", "right": "far"},
                region="b",
            ),
        )
    ).mesh(size, order=order)
    return ThermalModel(
        section,
        {"a": FIRST, "b": SECOND},
        {"hot": Convection(H, AMBIENT), "sides": Insulated(), "far": Insulated()},
        START,
        element_order=order,
        interfaces={"contact": Interface(("a", "b"), conductance=CONDUCTANCE)},
        probes={"far": (L1 + L2, HEIGHT / 2)},
    )


class FiniteVolumeSlab:
    """The two-layer slab on ``cells`` cells per layer, exact in time."""

    def __init__(self, cells: int):
        dx1, dx2 = L1 / cells, L2 / cells
        k = np.r_[np.full(cells, FIRST.conductivity), np.full(cells, SECOND.conductivity)]
        dx = np.r_[np.full(cells, dx1), np.full(cells, dx2)]
        rho_c = np.r_[
            np.full(cells, FIRST.volumetric_heat_capacity),
            np.full(cells, SECOND.volumetric_heat_capacity),
        ]
        # conductance between neighbouring cells: half-cell resistances in series, plus the
        # contact resistance between cells (cells - 1) and (cells)
        resistance = dx[:-1] / (2 * k[:-1]) + dx[1:] / (2 * k[1:])
        resistance[cells - 1] += 1 / CONDUCTANCE
        g = 1 / resistance
        n = 2 * cells
        matrix = np.zeros((n, n))
        matrix[np.arange(n - 1), np.arange(n - 1)] += g
        matrix[np.arange(1, n), np.arange(1, n)] += g
        matrix[np.arange(n - 1), np.arange(1, n)] -= g
        matrix[np.arange(1, n), np.arange(n - 1)] -= g
        self.face = 1 / (1 / H + dx1 / (2 * k[0]))  # the convective face
        matrix[0, 0] += self.face
        self.capacity = rho_c * dx
        scale = 1 / np.sqrt(self.capacity)
        self.rates, self.modes = eigh(scale[:, None] * matrix * scale[None, :])
        self.scale, self.cells, self.g_contact, self.dx1 = scale, cells, g[cells - 1], dx1
        # every cell tends to the ambient (the far face is insulated)
        self.amplitudes = self.modes.T @ ((START - AMBIENT) / scale)

    def field(self, time: float) -> np.ndarray:
        return AMBIENT + self.scale * (self.modes @ (np.exp(-self.rates * time) * self.amplitudes))

    def jump_and_flow(self, time: float) -> tuple[float, float]:
        """T(a) − T(b) at the interface (K) and the heat crossing it (W/m² times the height)."""
        t = self.field(time)
        q = self.g_contact * (t[self.cells - 1] - t[self.cells])
        return q / CONDUCTANCE, q * HEIGHT


class CompositeSlabSeries:
    """The exact expansion of the two-layer slab's temperature in its eigenfunctions."""

    def __init__(self, largest_root: float = 3.0):
        k1, k2 = FIRST.conductivity, SECOND.conductivity
        c1, c2 = FIRST.volumetric_heat_capacity, SECOND.volumetric_heat_capacity
        root1, root2 = np.sqrt(k1 / c1), np.sqrt(k2 / c2)  # √α of each layer

        def first_layer(lam):  # μ₁, X₁(L1), X₁'(L1)
            m1 = lam / root1
            value = np.cos(m1 * L1) + H / (k1 * m1) * np.sin(m1 * L1)
            slope = -m1 * np.sin(m1 * L1) + H / k1 * np.cos(m1 * L1)
            return m1, value, slope

        def condition(lam):  # the contact condition times k₂μ₂ sin(μ₂L2): no poles
            _, value, slope = first_layer(lam)
            m2 = lam / root2
            s, c = np.sin(m2 * L2), np.cos(m2 * L2)
            return k1 * slope * s * k2 * m2 + CONDUCTANCE * (value * k2 * m2 * s - k1 * slope * c)

        grid = np.linspace(1e-6, largest_root, 300_001)
        signs = np.sign(condition(grid))
        changes = np.flatnonzero(signs[:-1] != signs[1:])
        self.roots = np.array(
            [brentq(condition, grid[i], grid[i + 1], xtol=1e-15) for i in changes]
        )
        rows = []
        for lam in self.roots:
            m1, value, slope = first_layer(lam)
            m2 = lam / root2
            c = k1 * slope / (k2 * m2 * np.sin(m2 * L2))

            def x1(x, m1=m1):
                return np.cos(m1 * x) + H / (k1 * m1) * np.sin(m1 * x)

            def x2(x, m2=m2, c=c):
                return c * np.cos(m2 * (L1 + L2 - x))

            weight = c1 * quad(x1, 0, L1)[0] + c2 * quad(x2, L1, L1 + L2)[0]
            norm = c1 * quad(lambda x: x1(x) ** 2, 0, L1)[0]
            norm += c2 * quad(lambda x: x2(x) ** 2, L1, L1 + L2)[0]
            # amplitude, jump X₁ − X₂ at L1, flux −k₁X₁' at L1, X₂ at the insulated face
            rows.append(((START - AMBIENT) * weight / norm, value - x2(L1), -k1 * slope, c))
        self.terms = np.array(rows)

    def _decayed(self, time: float) -> np.ndarray:
        return np.exp(-(self.roots**2) * time) * self.terms[:, 0]

    def jump_and_flow(self, time: float) -> tuple[float, float]:
        """T(a) − T(b) at the interface (K) and the heat crossing it (W/m² times the height)."""
        decayed = self._decayed(time)
        return float(decayed @ self.terms[:, 1]), float(decayed @ self.terms[:, 2]) * HEIGHT

    def far_face(self, time: float) -> float:
        return AMBIENT + float(self._decayed(time) @ self.terms[:, 3])


@pytest.fixture(scope="module")
def reference():
    return CompositeSlabSeries()


def test_the_two_references_agree(reference):
    volumes = FiniteVolumeSlab(200)
    times = np.array([5.0, 20.0, 100.0, 300.0, 600.0])
    series = np.array([reference.jump_and_flow(t) for t in times])
    network = np.array([volumes.jump_and_flow(t) for t in times])
    # per column (jump, flow): the network's O(Δx²) error, 1.0e-5 of the largest value
    assert np.all(np.abs(series - network) <= 5e-5 * np.abs(series).max(axis=0))
    far = [volumes.field(t)[-1] - reference.far_face(t) for t in times]
    assert np.max(np.abs(far)) <= 5e-6 * (AMBIENT - START)  # measured 1.1e-6


@pytest.mark.parametrize(("order", "size", "allowed"), [(1, 0.001, 1e-3), (2, 0.001, 1e-4)])
def test_the_jump_and_the_heat_across_follow_the_one_dimensional_solution(
    reference, order, size, allowed
):
    model = two_layer_model(order, size)
    solution = solve(model, END, method="exponential", tolerance=1e-5)
    times = solution.times[solution.times >= 5.0]
    expected = np.array([reference.jump_and_flow(t) for t in times])
    jump = np.interp(times, solution.times, solution.interface_jump["contact"])
    flow = np.interp(times, solution.times, solution.interface_heat_flow["contact"])
    largest_jump = np.abs(expected[:, 0]).max()
    largest_flow = np.abs(expected[:, 1]).max()
    # spatial error O(Δx²) (P1) or O(Δx³) here (P2); measured against the series 2.5e-4 (P1)
    # and 2.2e-5 (P2) of the largest jump, 2.5e-4 and 1.9e-7 of the largest flow
    assert np.max(np.abs(jump - expected[:, 0])) <= allowed * largest_jump
    assert np.max(np.abs(flow - expected[:, 1])) <= allowed * largest_flow
    far = np.array([reference.far_face(t) for t in times])
    probe = np.interp(times, solution.times, solution.probes["far"])
    assert np.max(np.abs(probe - far)) <= allowed * (AMBIENT - START)


def test_energy_is_conserved_across_the_interface():
    """Backward Euler stores C·(Tⁿ⁺¹ − Tⁿ) = Δt·F(Tⁿ⁺¹): the second layer, insulated but for
    the interface, gains exactly Σ Δt·Q(tⁿ⁺¹) of the recorded interface flows. Its energy is
    integrated here from the final P1 field (each triangle's area times its corner mean)."""
    model = two_layer_model(1, 0.001)
    solution = solve(model, END, method="backward-euler", time_step=5.0)
    assert solution.checks.energy_balance_error <= 1e-6
    absorbed = solution.absorbed_heat[-1]
    assert solution.stored_energy[-1] == pytest.approx(absorbed, rel=1e-6)
    section = model.section
    cells = section.regions["b"]
    corners = section.mesh.t[:, cells]
    x, y = section.vertices[:, corners]  # (3, cells) each
    area = 0.5 * np.abs((x[1] - x[0]) * (y[2] - y[0]) - (x[2] - x[0]) * (y[1] - y[0]))
    final = solution.final_state[corners].mean(axis=0)
    gained = SECOND.volumetric_heat_capacity * float(np.sum(area * (final - START)))
    crossed = float(np.sum(np.diff(solution.times) * solution.interface_heat_flow["contact"][1:]))
    assert crossed == pytest.approx(gained, rel=1e-9)
    assert 0.2 * absorbed < crossed < absorbed  # the far layer took a real share of it
