"""Labels that say what they measure: Biot numbers per region kept apart from their change
over the run, the conduction distance counting a nearly insulated edge as insulated, and the
verdict's words chosen by the kind of process.

References: Bi = h·L/k (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed.,
§5.1, eq. 5.10, from memory), with L and k computed here by hand; the largest distance from a
ring's wall to its outer circle is the wall thickness, and to the nearer of its two circles
half of it (elementary geometry).
The 5 % threshold for an exposed edge is our own rule, stated in the report.
"""

from __future__ import annotations

import math

import pytest

from advisor import assess
from advisor.analysis.biot import EXPOSED_SHARE, biot_numbers
from advisor.analysis.process_words import infer_process
from fem import Convection, Material, ThermalModel, solve
from geometries import Annulus, Composite, Rectangle

ROUND_OFF = 1e-9


def two_layers() -> ThermalModel:
    # A 10 mm steel plate under a 2 mm layer of a poor conductor, both 20 mm wide (invented);
    # the top and the sides of both exchange heat, the plate's bottom too.
    steel = Rectangle(0.02, 0.01, edge_names=dict.fromkeys(("left", "right", "bottom"), "air"))
    layer = Rectangle(
        0.02,
        0.002,
        (0.0, 0.01),
        {"left": "air", "right": "air", "top": "air", "bottom": "joint"},
        region="layer",
    )
    section = Composite((steel.renamed({"top": "joint"}), layer)).mesh(0.002)
    air = Convection(heat_transfer_coefficient=50.0, ambient=20.0)
    return ThermalModel(
        section,
        {"solid": Material(40.0, 7800.0, 500.0), "layer": Material(0.5, 2000.0, 900.0)},
        boundaries={"air": air},
        initial_temperature=200.0,
    )


def test_biot_numbers_per_region_are_apart_from_the_run():
    model = two_layers()
    volume_to_surface = next(
        b for b in biot_numbers(model, end_time=600.0) if b.name == "volume_to_surface"
    )
    # V/A by hand: area 20 mm x 12 mm over the exposed perimeter 20 + 2·12 + 20 mm.
    length = (0.02 * 0.012) / (0.02 + 2 * 0.012 + 0.02)
    assert volume_to_surface.length == pytest.approx(length, rel=1e-9)
    assert volume_to_surface.regions == pytest.approx(
        {"solid": 50.0 * length / 40.0, "layer": 50.0 * length / 0.5}, rel=1e-9
    )
    # Constant h and k: the number does not change over the run; the spread across the
    # regions (a factor 80 here) is not a range over time.
    worst = 50.0 * length / 0.5
    assert volume_to_surface.value == pytest.approx(worst, rel=1e-9)
    assert volume_to_surface.low == pytest.approx(worst, rel=1e-9)
    assert volume_to_surface.high == pytest.approx(worst, rel=1e-9)


@pytest.mark.parametrize("inside", [5.0, 200.0])
def test_a_nearly_insulated_bore_does_not_count_for_the_conduction_distance(inside):
    outer, bore, size = 0.02, 0.016, 0.0005  # m: a 4 mm wall
    wall = outer - bore
    tube = Annulus(outer, bore).mesh(size)
    model = ThermalModel(
        tube,
        Material(200.0, 2700.0, 900.0),
        boundaries={
            "outer": Convection(heat_transfer_coefficient=800.0, ambient=20.0),
            "bore": Convection(heat_transfer_coefficient=inside, ambient=20.0),
        },
        initial_temperature=480.0,
    )
    distance = next(b for b in biot_numbers(model) if b.name == "conduction_distance")
    # The outer circle is meshed as chords; a chord of length c sags c²/(8R) inside the arc
    # (elementary geometry), which moves the distance by at most that much.
    sag = (2 * outer * math.sin(size / outer)) ** 2 / (8 * outer)
    if inside < EXPOSED_SHARE * 800.0:
        # Only the outer face counts: the farthest points are on the bore, one wall away,
        # and the bore's nodes lie on it.
        assert distance.length == pytest.approx(wall, abs=sag + ROUND_OFF)
        assert "bore (h = 5 W/(m²·K))" in distance.explanation
        assert "count as insulated" in distance.explanation
    else:
        # Both faces count: half a wall, found at the nodes nearest mid-wall (within half
        # an element of it).
        assert wall / 2 - size / 2 - sag <= distance.length <= wall / 2 + sag
        assert "insulated" not in distance.explanation


def small_plate(initial: float, ambient: float, sources: dict | None = None) -> ThermalModel:
    section = Rectangle(0.02, 0.01).mesh(0.0025)
    air = Convection(heat_transfer_coefficient=300.0, ambient=ambient)
    return ThermalModel(
        section,
        Material(15.0, 7900.0, 500.0),
        boundaries={s: air for s in ("left", "right", "top", "bottom")},
        initial_temperature=initial,
        heat_sources=sources or {},
    )


def test_the_kind_of_process_is_inferred_by_the_stated_rules():
    assert infer_process(small_plate(850.0, 60.0), 850.0, 60.0, 200.0) == "heat-treatment"
    assert infer_process(small_plate(80.0, 0.0), 80.0, 0.0, 5.0) == "food"
    assert infer_process(small_plate(60.0, 20.0), 60.0, 20.0, 30.0) == "general"
    heated = small_plate(25.0, 25.0, {"solid": 1e6})
    assert infer_process(heated, 25.0, 40.0, None) == "electronics"


@pytest.mark.parametrize(
    ("process", "words", "not_words"),
    [
        ("electronics", "hot spots", "cracking"),
        ("heat-treatment", "distortion and cracking", "hot spots"),
        ("food", "under-processed centre", "cracking"),
    ],
)
def test_the_verdict_speaks_the_process(process, words, not_words):
    solution = solve(small_plate(120.0, 20.0), end_time=300.0, time_step=5.0)
    verdict = assess(solution, quantity="peak_difference", process=process).verdict
    assert words in verdict.direction and not_words not in verdict.direction
    assert verdict.process == process and not verdict.process_inferred
    default = assess(solution, quantity="peak_difference").verdict
    assert default.process == "general" and default.process_inferred
    with pytest.raises(ValueError, match="process must be one of"):
        assess(solution, process="forging")
