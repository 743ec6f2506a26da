"""Contact interfaces in the model: where the mesh is cut (a node shared with a third region,
a closed interface around an embedded region) and the checks of the interfaces given.

The physics checks are energy balances: at steady state what enters leaves, and the heat
crossing a closed interface around a heated region is the heat generated in it.
"""

from __future__ import annotations

import numpy as np
import pytest
from test_contact_steady import BOUNDARIES, FIRST, SECOND, steady, two_layers

from fem import (
    Convection,
    HeatFlux,
    Insulated,
    Interface,
    Material,
    ModelError,
    ThermalModel,
    assemble,
)
from geometries import Composite, Rectangle


def three_regions():
    """Regions a (left) and b (right) side by side under c, which covers both: the a|b
    interface ends at a node that c shares with both."""
    return Composite(
        (
            Rectangle(
                0.01,
                0.005,
                edge_names={"left": "left", "bottom": "bottom", "top": "x", "right": "x"},
                region="a",
            ),
            Rectangle(
                0.01,
                0.005,
                corner=(0.01, 0.0),
                edge_names={"left": "x", "bottom": "bottom", "top": "x", "right": "right"},
                region="b",
            ),
            Rectangle(
                0.02,
                0.003,
                corner=(0.0, 0.005),
                edge_names={"left": "left", "bottom": "x", "top": "top", "right": "right"},
                region="c",
            ),
        )
    ).mesh(0.001)


@pytest.mark.parametrize(("pairs", "joined"), [((("a", "b"),), 1), ((("a", "b"), ("a", "c")), 0)])
def test_a_node_shared_with_a_third_region(pairs, joined):
    """Where the a|b interface meets c, bonded to both, the node stays one (the field is
    continuous there); when a|c is cut too, a is cut off at that node and it splits."""
    section = three_regions()
    steel = Material(40.0, 7800.0, 460.0)
    interfaces = {f"{a}{b}": Interface((a, b), conductance=300.0) for a, b in pairs}
    model = ThermalModel(
        section,
        dict.fromkeys("abc", steel),
        {
            "left": HeatFlux(5000.0),
            "right": Convection(200.0, 20.0),
            "top": Insulated(),
            "bottom": Insulated(),
        },
        20.0,
        interfaces=interfaces,
    )
    sides = model.section.sides[("a", "b")]
    corner = np.isclose(model.section.mesh.p[0, sides.node_pairs[:, 0]], 0.01) & np.isclose(
        model.section.mesh.p[1, sides.node_pairs[:, 0]], 0.005
    )
    assert int(np.sum(sides.node_pairs[corner, 0] == sides.node_pairs[corner, 1])) == joined
    system = assemble(model)
    field = steady(system)
    # energy: what the flux brings in leaves through the convective edge, and no more
    flows = system.edge_heat_flows(field, 0.0)
    assert flows["left"] + flows["right"] == pytest.approx(0.0, abs=1e-9 * flows["left"])
    for name, (jump, _) in system.interface_states(field).items():
        assert abs(jump) > 0.0, name


@pytest.mark.parametrize(
    ("interfaces", "wanted"),
    [
        ({"c": Interface(("a", "z"), conductance=1.0)}, "'z'"),
        ({"c": Interface(("a", "a"), conductance=1.0)}, "two different regions"),
        (
            {"c": Interface(("a", "b"), conductance=1.0), "d": Interface(("b", "a"), 1.0)},
            "both join",
        ),
        ({"c": ("a", "b")}, "must be a fem.Interface"),
    ],
)
def test_bad_interfaces_are_refused_with_the_interface_named(interfaces, wanted):
    with pytest.raises(ModelError, match=wanted) as caught:
        ThermalModel(
            two_layers(), {"a": FIRST, "b": SECOND}, BOUNDARIES, 20.0, interfaces=interfaces
        )
    assert caught.value.argument.startswith("interfaces.")


def test_regions_that_do_not_touch_are_refused():
    sides = dict.fromkeys(("left", "right", "top", "bottom"), "out")
    section = Composite(
        (
            Rectangle(0.01, 0.01, edge_names=sides, region="a"),
            Rectangle(0.01, 0.01, corner=(0.02, 0.0), edge_names=sides, region="b"),
        )
    ).mesh(0.002)
    with pytest.raises(ModelError, match="do not touch"):
        ThermalModel(
            section,
            {"a": FIRST, "b": SECOND},
            {"out": Insulated()},
            20.0,
            interfaces={"gap": Interface(("a", "b"), conductance=10.0)},
        )


@pytest.mark.parametrize(
    ("kwargs", "wanted"),
    [
        ({"conductance": 1.0, "resistance": 1.0}, "one of them"),
        ({}, "one of them"),
        ({"conductance": -5.0}, "> 0"),
        ({"resistance": float("inf")}, "> 0 and finite"),
        ({"conductance": "5"}, "a number"),
    ],
)
def test_an_interface_needs_one_positive_value(kwargs, wanted):
    with pytest.raises(ModelError, match=wanted):
        Interface(("a", "b"), **kwargs)


def test_resistance_and_conductance_are_reciprocal():
    assert Interface(("a", "b"), resistance=2e-4).conductance == pytest.approx(5000.0)
    assert Interface(("a", "b"), conductance=250.0).resistance == pytest.approx(4e-3)


def test_the_interface_module_examples_run():
    import doctest

    import fem.interfaces

    result = doctest.testmod(fem.interfaces)
    assert result.attempted > 0 and result.failed == 0


def test_an_embedded_region_is_cut_all_round_and_passes_on_its_heat():
    """A heated insert inside a block: the interface is a closed loop, every node on it
    splits, and at steady state the heat crossing it is the heat generated (energy)."""
    block = Rectangle(
        0.03, 0.02, edge_names=dict.fromkeys(("left", "right", "top", "bottom"), "out")
    )
    insert = Rectangle(0.01, 0.006, corner=(0.01, 0.007), region="insert")
    section = Composite((block, insert)).mesh(0.001)
    model = ThermalModel(
        section,
        {"solid": Material(15.0, 7900.0, 500.0), "insert": Material(150.0, 2330.0, 700.0)},
        {"out": Convection(30.0, 20.0)},
        20.0,
        heat_sources={"insert": 2e6},
        interfaces={"bond": Interface(("insert", "solid"), conductance=2000.0)},
    )
    split_nodes = model.section.sides[("insert", "solid")].node_pairs
    assert np.all(split_nodes[:, 0] != split_nodes[:, 1])  # no node stays joined
    assert model.section.mesh.nvertices == section.mesh.nvertices + len(split_nodes)
    system = assemble(model)
    field = steady(system)
    jump, flow = system.interface_states(field)["bond"]
    generated = 2e6 * 0.01 * 0.006  # W per metre of depth
    assert flow == pytest.approx(generated, rel=1e-10)
    assert -system.edge_heat_flows(field, 0.0)["out"] == pytest.approx(generated, rel=1e-10)
    assert jump > 0.0  # the insert is the hotter side


def test_a_curved_interface_on_quadratic_triangles():
    """A heated round core in a sleeve, meshed with curved (quadratic) triangles: the two
    faces' quadrature points are matched along the curved interface. Radial conduction
    (Incropera et al., 6th ed., §3.3.1, from memory): the heat generated per metre,
    Q' = q̇·πr₁², crosses the interface, and the jump is Q'/(2π r₁ h_c) all round."""
    from geometries import Circle

    core_radius, sleeve_radius, generation, conductance = 0.01, 0.02, 1e6, 3000.0
    section = Composite(
        (
            Circle(sleeve_radius, name="outside", region="sleeve"),
            Circle(core_radius, name="joint", region="core"),
        )
    ).mesh(0.002, order=2)
    model = ThermalModel(
        section,
        {"sleeve": Material(15.0, 7900.0, 500.0), "core": Material(40.0, 7800.0, 460.0)},
        {"outside": Convection(200.0, 20.0)},
        20.0,
        element_order=2,
        heat_sources={"core": generation},
        interfaces={"contact": Interface(("core", "sleeve"), conductance=conductance)},
    )
    system = assemble(model)
    field = steady(system)
    jump, flow = system.interface_states(field)["contact"]
    generated = system.generated(0.0)  # q̇ times the meshed core's area
    assert generated == pytest.approx(generation * np.pi * core_radius**2, rel=1e-5)
    assert flow == pytest.approx(generated, rel=1e-10)  # energy: all of it crosses
    expected = generation * np.pi * core_radius**2 / (2 * np.pi * core_radius * conductance)
    jumps = system.interfaces["contact"].node_difference @ field
    # uniform round the circle, to the mesh's error: measured 1.2e-3, 1.8e-4, 2.8e-5 at sizes
    # 4, 2, 1 mm (an observed order of about 2.7 for P2 on curved triangles)
    assert np.allclose(jumps, expected, rtol=5e-4, atol=0)
