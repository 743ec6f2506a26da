"""Contact resistance between regions at steady state, against the series-resistance solution.

Source: Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass Transfer, 6th ed.,
§3.1.4 (contact resistance) and §3.3.1 (the cylindrical wall), from memory: in a plane wall
the resistances per unit area add, L1/k1 + R_c + L2/k2 (with 1/h at each convective face),
the flux is ΔT over their sum and the jump at the contact is q·R_c; per unit length of a
cylinder they are ln(r2/r1)/(2πk) and, for the contact at radius r, 1/(2π r h_c).

A 1-D linear profile lies in the P1 space, so on a planar strip the finite-element solution is
the exact one at every node, up to round-off (relative 1e-10 asked). The logarithmic profile of
the cylinder is not: its P1 error falls as h² (checked by the observed order).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.sparse.linalg as spla

from fem import (
    Convection,
    FixedTemperature,
    Insulated,
    Interface,
    Material,
    PropertyTable,
    ThermalModel,
    assemble,
    solve,
)
from fem.heat_flux import vertex_heat_flux
from fem.interface_mesh import SplitSectionMesh
from fem.interfaces import probe_sides
from geometries import Composite, Rectangle, Section

L1, L2, HEIGHT = 0.01, 0.02, 0.002  # m
K1, K2 = 10.0, 2.0  # W/(m K)
H_HOT, H_COLD = 100.0, 50.0  # W/(m² K)
T_HOT, T_COLD = 100.0, 0.0  # °C
FIRST = Material(K1, 2000.0, 900.0)
SECOND = Material(K2, 1500.0, 1200.0)


def two_layers(order: int = 1, size: float = 0.001, first_region="a", second_region="b"):
    """A strip of two layers, region ``a`` on x in [0, L1], ``b`` on [L1, L1 + L2]."""
    return Composite(
        (
            Rectangle(
                L1,
                HEIGHT,
                edge_names={"left": "hot", "bottom": "sides", "top": "sides", "right": "joint"},
                region=first_region,
            ),
            Rectangle(
                L2,
                HEIGHT,
                corner=(L1, 0.0),
                edge_names={"left": "joint", "bottom": "sides", "top": "sides", "right": "cold"},
                region=second_region,
            ),
        )
    ).mesh(size, order=order)


BOUNDARIES = {
    "hot": Convection(H_HOT, T_HOT),
    "cold": Convection(H_COLD, T_COLD),
    "sides": Insulated(),
}


def wall_model(conductance: float, order: int = 1, section=None, **kwargs) -> ThermalModel:
    return ThermalModel(
        section or two_layers(order),
        {"a": FIRST, "b": SECOND},
        BOUNDARIES,
        20.0,
        element_order=order,
        interfaces={"contact": Interface(("a", "b"), conductance=conductance)},
        **kwargs,
    )


def steady(system) -> np.ndarray:
    """The steady field of the assembled operator the solver steps with: A T = b."""
    return spla.spsolve(system.exchange_operator(0.0).tocsc(), system.load(0.0))


def series_wall(conductance: float):
    """Flux (W/m²), and the exact temperature (°C) of each layer as a function of x."""
    resistance = 1 / H_HOT + L1 / K1 + 1 / conductance + L2 / K2 + 1 / H_COLD
    q = (T_HOT - T_COLD) / resistance

    def first(x):
        return T_HOT - q * (1 / H_HOT + x / K1)

    def second(x):
        return T_HOT - q * (1 / H_HOT + L1 / K1 + 1 / conductance + (x - L1) / K2)

    return q, first, second


def vertex_regions(section) -> np.ndarray:
    """The region name of each mesh vertex (each vertex of a cut mesh has one region here)."""
    owner = np.empty(section.mesh.nvertices, dtype=object)
    for name, cells in section.regions.items():
        owner[section.mesh.t[:, cells].ravel()] = name
    return owner


@pytest.mark.parametrize("order", [1, 2])
def test_two_layer_wall_matches_the_series_resistance_at_every_node(order):
    conductance = 500.0
    model = wall_model(conductance, order)
    system = assemble(model)
    field = steady(system)
    q, first, second = series_wall(conductance)
    x = model.section.vertices[0]
    owner = vertex_regions(model.section)
    exact = np.where(owner == "a", first(x), second(x))
    at_vertices = field[system.vertex_dofs]
    # a linear profile is in the space of P1 and P2: exact up to round-off
    assert np.max(np.abs(at_vertices - exact)) <= 1e-10 * (T_HOT - T_COLD)
    jump, flow = system.interface_states(field)["contact"]
    assert jump == pytest.approx(q / conductance, rel=1e-10)  # the jump is q·R_c
    assert flow == pytest.approx(q * HEIGHT, rel=1e-10)  # W per metre of depth
    # the interface carries as much as leaves the cold face: nothing made or lost
    cold_flow = system.edge_heat_flows(field, 0.0)["cold"]
    assert -cold_flow == pytest.approx(flow, rel=1e-10)


def test_the_cut_doubles_the_interface_nodes_and_keeps_the_groups():
    section = two_layers()
    model = wall_model(500.0, section=section)
    split = model.section
    assert isinstance(split, SplitSectionMesh) and split.parent is section
    on_joint = np.isclose(section.vertices[0], L1, atol=1e-12)
    # every node on the joint has a copy, its two ends on the outer boundary included
    assert split.mesh.nvertices == section.mesh.nvertices + int(on_joint.sum())
    assert split.edge_groups.keys() == section.edge_groups.keys()
    for name, facets in section.edge_groups.items():
        assert len(split.edge_groups[name]) == len(facets)
    assert split.facts is section.facts
    # the same pairs give the same cut mesh (an assembled system serves other conductances)
    again = wall_model(900.0, section=section)
    assert again.section is split


def test_the_heat_flux_recovered_on_each_side_is_the_series_flux():
    conductance = 500.0
    model = wall_model(conductance)
    system = assemble(model)
    field = steady(system)[system.vertex_dofs]
    q, _, _ = series_wall(conductance)
    flux = vertex_heat_flux(model, field)
    # a linear field per region: −k∇T is exact on every triangle and so at every vertex
    assert np.allclose(flux[:, 0], q, rtol=1e-9, atol=0)
    assert np.allclose(flux[:, 1], 0.0, atol=1e-9 * q)


def test_a_transient_run_settles_on_the_series_solution():
    conductance = 500.0
    model = wall_model(conductance)
    solution = solve(model, 20_000.0, method="exponential", tolerance=1e-6)
    q, _, _ = series_wall(conductance)
    assert solution.interface_jump["contact"][-1] == pytest.approx(q / conductance, rel=1e-7)
    assert solution.interface_heat_flow["contact"][-1] == pytest.approx(q * HEIGHT, rel=1e-7)


def test_a_large_conductance_approaches_perfect_contact():
    section = two_layers()
    perfect = ThermalModel(section, {"a": FIRST, "b": SECOND}, BOUNDARIES, 20.0)
    reference = steady(assemble(perfect))
    original = section.mesh.nvertices  # the first copy of every node keeps its number
    _, first_perfect, second_perfect = series_wall(math.inf)
    gaps = []
    for conductance in (1e4, 1e6, 1e8):
        model = wall_model(conductance, section=section)
        field = steady(assemble(model))
        gap = np.max(np.abs(field[:original] - reference))
        # the exact change: the jump q/h_c and the smaller flux through the extra resistance
        x = section.vertices[0]
        owner = vertex_regions(model.section)[:original]
        _, first, second = series_wall(conductance)
        change = np.where(owner == "a", first(x) - first_perfect(x), second(x) - second_perfect(x))
        # round-off grows with h_c·Δx/k (the matrix's conditioning): 1e-8 K at h_c = 1e8
        assert gap == pytest.approx(np.max(np.abs(change)), rel=1e-6, abs=1e-8)
        gaps.append(gap)
    # the field tends to the perfect-contact one as 1/h_c
    assert gaps[0] / gaps[1] > 99.0 and gaps[1] / gaps[2] > 99.0
    assert gaps[2] < 1e-6 * (T_HOT - T_COLD)


def test_a_fixed_temperature_splits_with_the_end_of_the_interface():
    # hot face held, cold face convective: q = ΔT/(L1/k1 + R_c + L2/k2 + 1/h)
    conductance = 800.0
    boundaries = dict(BOUNDARIES, hot=FixedTemperature(T_HOT))
    model = ThermalModel(
        two_layers(),
        {"a": FIRST, "b": SECOND},
        boundaries,
        20.0,
        interfaces={"contact": Interface(("a", "b"), conductance=conductance)},
    )
    solution = solve(model, 20_000.0, method="backward-euler", time_step=2000.0)
    q = (T_HOT - T_COLD) / (L1 / K1 + 1 / conductance + L2 / K2 + 1 / H_COLD)
    assert solution.interface_jump["contact"][-1] == pytest.approx(q / conductance, rel=1e-6)


def test_the_jump_follows_the_order_the_interface_names_its_regions():
    conductance = 500.0
    forwards = assemble(wall_model(conductance))
    backwards_model = ThermalModel(
        two_layers(),
        {"a": FIRST, "b": SECOND},
        BOUNDARIES,
        20.0,
        interfaces={"contact": Interface(("b", "a"), resistance=1 / conductance)},
    )
    backwards = assemble(backwards_model)
    jump, flow = forwards.interface_states(steady(forwards))["contact"]
    back_jump, back_flow = backwards.interface_states(steady(backwards))["contact"]
    assert back_jump == pytest.approx(-jump, rel=1e-10)
    assert back_flow == pytest.approx(-flow, rel=1e-10)


def test_another_conductance_reuses_the_assembled_system():
    section = two_layers()
    system = assemble(wall_model(500.0, section=section))
    other = wall_model(2000.0, section=section)
    reused = system.for_model(other)
    fresh = assemble(other)
    assert abs(reused.stiffness - fresh.stiffness).max() <= 1e-12 * abs(fresh.stiffness).max()
    q, _, _ = series_wall(2000.0)
    assert reused.interface_states(steady(reused))["contact"][0] == pytest.approx(
        q / 2000.0, rel=1e-10
    )


def test_a_probe_on_the_interface_reads_the_first_regions_side():
    conductance = 500.0
    model = wall_model(conductance, probes={"joint": (L1, HEIGHT / 2)})
    assert probe_sides(model) == {"joint": ("contact", "a")}
    system = assemble(model)
    _, first, _ = series_wall(conductance)
    assert (system.probe_matrix @ steady(system))[0] == pytest.approx(first(L1), rel=1e-10)


def test_axisymmetric_two_layer_cylinder_against_the_log_series():
    r_in, r_contact, r_out, height = 0.01, 0.02, 0.03, 0.005  # m
    k_in, k_out, h_bore, h_out, h_c = 20.0, 5.0, 300.0, 40.0, 800.0

    def model_at(size, order):
        shape = Composite(
            (
                Rectangle(
                    r_contact - r_in,
                    height,
                    corner=(r_in, 0.0),
                    edge_names={"left": "bore", "bottom": "ends", "top": "ends", "right": "j"},
                    region="inner",
                ),
                Rectangle(
                    r_out - r_contact,
                    height,
                    corner=(r_contact, 0.0),
                    edge_names={"left": "j", "bottom": "ends", "top": "ends", "right": "outer"},
                    region="outer",
                ),
            )
        )
        section = Section(shape, axisymmetric=True).mesh(size, order=order)
        return ThermalModel(
            section,
            {"inner": Material(k_in, 1000.0, 1000.0), "outer": Material(k_out, 1000.0, 1000.0)},
            {
                "bore": Convection(h_bore, 100.0),
                "outer": Convection(h_out, 0.0),
                "ends": Insulated(),
            },
            20.0,
            element_order=order,
            interfaces={"contact": Interface(("inner", "outer"), conductance=h_c)},
        )

    # per unit length: 1/(2π r h) at each face, ln(r2/r1)/(2πk) per layer, 1/(2π r h_c)
    per_length = (
        1 / (2 * math.pi * r_in * h_bore)
        + math.log(r_contact / r_in) / (2 * math.pi * k_in)
        + 1 / (2 * math.pi * r_contact * h_c)
        + math.log(r_out / r_contact) / (2 * math.pi * k_out)
        + 1 / (2 * math.pi * r_out * h_out)
    )
    heat = 100.0 / per_length * height  # W through the ring of this height
    jump = heat / (2 * math.pi * r_contact * height * h_c)
    errors = []
    for size in (0.002, 0.001, 0.0005):
        system = assemble(model_at(size, 1))
        found_jump, found_heat = system.interface_states(steady(system))["contact"]
        errors.append(abs(found_heat / heat - 1))
        assert found_jump == pytest.approx(jump, rel=50 * (size / r_out) ** 2)
    orders = np.log2(np.array(errors[:-1]) / np.array(errors[1:]))
    assert np.all(orders > 1.8), orders  # P1: second order in the mesh size
    assert errors[-1] < 1e-5
    system = assemble(model_at(0.001, 2))
    found_jump, found_heat = system.interface_states(steady(system))["contact"]
    assert found_heat == pytest.approx(heat, rel=1e-8)  # P2 on a fine mesh
    assert found_jump == pytest.approx(jump, rel=1e-5)


def test_conductivity_tables_take_the_nonlinear_path_to_the_same_answer():
    """k given as a (flat) table of temperature: the residual and tangent are assembled at the
    field's temperatures, the interface term with the constant parts; the steady state is the
    series solution all the same."""
    conductance = 500.0
    flat = {
        name: Material(
            PropertyTable((0.0, 200.0), (m.conductivity, m.conductivity)),
            m.density,
            m.specific_heat,
        )
        for name, m in (("a", FIRST), ("b", SECOND))
    }
    model = ThermalModel(
        two_layers(),
        flat,
        BOUNDARIES,
        20.0,
        interfaces={"contact": Interface(("a", "b"), conductance=conductance)},
    )
    assert not model.is_linear
    solution = solve(model, 40_000.0, method="backward-euler", time_step=2000.0)
    q, _, _ = series_wall(conductance)
    assert solution.interface_jump["contact"][-1] == pytest.approx(q / conductance, rel=1e-6)
    assert solution.checks.energy_balance_error <= 1e-6
