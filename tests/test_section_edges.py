"""Edge groups and regions of meshed sections: after booleans, placements, renaming, rules,
symmetry cuts and on the axis; refinement; conduction distance; errors; repeatable meshing.

Expected lengths and areas are computed here by elementary geometry from the dimensions.
Straight edges are meshed exactly, so their lengths are checked to round-off; a circle of radius
r meshed with P1 chords of angle at most theta is short by at most
2 pi r (1 - sin(theta/2) / (theta/2)) in length and r^2 (theta - sin theta) pi / theta in area
(elementary geometry: arc against chord, circular segment). The dimensions are invented.
"""

from __future__ import annotations

import math
import pickle
from concurrent.futures import ProcessPoolExecutor
from functools import cache

import numpy as np
import pytest

from geometries import (
    Annulus,
    Circle,
    Composite,
    Ellipse,
    GeometryError,
    Polygon,
    Rectangle,
    Section,
    SectionMesh,
    profiles,
)
from geometries.point_location import FEW_POINTS

ROUND_OFF = 1e-12  # relative, for what the mesh represents exactly
SIDES = ("bottom", "right", "top", "left")


def all_sides(group: str) -> dict[str, str]:
    return dict.fromkeys(SIDES, group)


def facet_lengths(section_mesh: SectionMesh, group: str) -> np.ndarray:
    mesh = section_mesh.mesh
    ends = mesh.p[:, mesh.facets[:, section_mesh.edge_groups[group]]]
    return np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0)


def group_nodes(section_mesh: SectionMesh, group: str) -> np.ndarray:
    """Coordinates (2, n) of the end nodes of a group's facets."""
    mesh = section_mesh.mesh
    return mesh.p[:, np.unique(mesh.facets[:, section_mesh.edge_groups[group]])]


def p1_circle_shortfall(radius: float, chord: float) -> tuple[float, float]:
    """(length, area) by which P1 chords of angle <= theta fall short of a whole circle."""
    theta = 2 * math.asin(chord / (2 * radius))
    length = 2 * math.pi * radius * (1 - math.sin(theta / 2) / (theta / 2))
    area = math.pi * radius**2 * (theta - math.sin(theta)) / theta
    return length * (1 + 1e-9), area * (1 + 1e-9)  # the bounds are attained: allow round-off


# ---------------------------------------------------------------------------------------------
# The sections used by several tests
# ---------------------------------------------------------------------------------------------

PLATE = (0.04, 0.02)  # width, height, m
BORE_CENTRE, BORE_RADIUS = (0.015, 0.01), 0.005


def plate_with_bore():
    return Rectangle(*PLATE) - Circle(BORE_RADIUS, BORE_CENTRE, name="bore")


def substrate_and_coating():
    substrate = Rectangle(0.04, 0.01, region="steel")
    coating = Rectangle(0.03, 0.002, (0.005, 0.01), all_sides("coating"), region="coat")
    return Composite((substrate, coating))


SECTIONS = {
    "plate with bore": lambda: Section(plate_with_bore()),
    "union": lambda: Section(
        Rectangle(0.04, 0.02, edge_names=all_sides("a"))
        | Rectangle(0.02, 0.04, (0.01, -0.01), all_sides("c"))
    ),
    "notched": lambda: Section(
        Rectangle(0.04, 0.02) - Rectangle(0.01, 0.01, (0.015, 0.015), all_sides("notch"))
    ),
    "intersection": lambda: Section(Circle(0.02, (0.0, 0.0)) & Rectangle(0.03, 0.03)),
    "annulus": lambda: Section(Annulus(0.02, 0.008, (0.001, 0.002))),
    "channel": lambda: Section(profiles.channel(0.06, 0.03, 0.005, 0.006, root_radius=0.004)),
    "composite": lambda: Section(substrate_and_coating()),
    "quarter tube": lambda: Section(
        profiles.rectangular_tube(0.05, 0.03, 0.004, outer_radius=0.008)
        .symmetry_cut((0, 0), (1, 0))
        .symmetry_cut((0, 0), (0, 1))
    ),
    "axisymmetric cylinder": lambda: Section(Rectangle(0.02, 0.05), axisymmetric=True),
    "named by rules": lambda: (
        Section(Rectangle(0.04, 0.02))
        .name_edges("clamp", box=(-0.001, -0.001, 0.041, 0.001))
        .name_edges("hot", where=lambda x, y: np.abs(x - 0.04) < 1e-9)
    ),
}


@cache
def meshed(name: str, order: int = 1) -> SectionMesh:
    return SECTIONS[name]().mesh(0.002, order=order)


@pytest.mark.parametrize(
    ("name", "order"),
    [(name, 1) for name in sorted(SECTIONS)] + [("channel", 2), ("composite", 2)],
)
def test_every_boundary_facet_is_in_exactly_one_non_empty_group(name, order):
    section = meshed(name, order)
    groups = section.edge_groups
    assert groups, "no edge groups"
    for group, facets in groups.items():
        assert len(facets) > 0, f"group {group!r} is empty"
    claimed = np.concatenate(list(groups.values()))
    assert len(np.unique(claimed)) == len(claimed), "a facet is in two groups"
    np.testing.assert_array_equal(np.sort(claimed), np.sort(section.mesh.boundary_facets()))


# ---------------------------------------------------------------------------------------------
# Booleans and their naming priority
# ---------------------------------------------------------------------------------------------


def test_bore_keeps_its_name_and_length_after_the_difference():
    section = meshed("plate with bore")
    lengths = section.facts.edge_lengths
    assert sorted(lengths) == ["bore", "bottom", "left", "right", "top"]
    width, height = PLATE
    for side, exact in (("bottom", width), ("top", width), ("left", height), ("right", height)):
        assert lengths[side] == pytest.approx(exact, rel=ROUND_OFF)
    exact_bore = 2 * math.pi * BORE_RADIUS  # elementary geometry
    shortfall, area_gain = p1_circle_shortfall(BORE_RADIUS, facet_lengths(section, "bore").max())
    assert exact_bore - shortfall <= lengths["bore"] <= exact_bore
    # The bore's nodes lie on its circle.
    nodes = group_nodes(section, "bore")
    distance = np.hypot(nodes[0] - BORE_CENTRE[0], nodes[1] - BORE_CENTRE[1])
    np.testing.assert_allclose(distance, BORE_RADIUS, rtol=1e-9)
    exact_area = width * height - math.pi * BORE_RADIUS**2
    assert exact_area <= section.facts.area <= exact_area + area_gain


def test_union_of_overlapping_rectangles_keeps_the_exposed_parts_of_each_outline():
    # a: 40 x 20 mm from the origin; c: 20 x 40 mm crossing it, from (10, -10) mm.
    lengths = meshed("union").facts.edge_lengths
    # a keeps its two ends (2 x 20) and the parts of its long sides outside c (4 x 10);
    # c keeps its two ends (2 x 20) and the parts of its long sides outside a (4 x 10).
    assert lengths == {
        "a": pytest.approx(2 * 0.02 + 4 * 0.01, rel=ROUND_OFF),
        "c": pytest.approx(2 * 0.02 + 4 * 0.01, rel=ROUND_OFF),
    }
    assert meshed("union").facts.area == pytest.approx(0.04 * 0.02 * 2 - 0.02**2, rel=ROUND_OFF)


def test_later_union_operand_names_a_shared_edge():
    # b (40 x 10 mm) lies inside a (40 x 20 mm) and shares its bottom edge.
    a = Rectangle(0.04, 0.02, edge_names=all_sides("a"))
    b = Rectangle(0.04, 0.01, edge_names=all_sides("b"))
    later_b = (a | b).mesh(0.004).facts.edge_lengths
    # The bottom lies on both outlines: the later operand b names it. Each side is one curve
    # from y = 0 to 20 mm, lying on a's outline only, so it stays a.
    assert later_b == {
        "b": pytest.approx(0.04, rel=ROUND_OFF),
        "a": pytest.approx(0.04 + 2 * 0.02, rel=ROUND_OFF),
    }
    later_a = (b | a).mesh(0.004).facts.edge_lengths
    assert later_a == {"a": pytest.approx(2 * 0.04 + 2 * 0.02, rel=ROUND_OFF)}


def test_difference_tool_names_the_new_edges():
    # A 10 x 10 mm notch cut 5 mm deep into the middle of the top of a 40 x 20 mm plate.
    section = meshed("notched")
    lengths = section.facts.edge_lengths
    assert lengths["notch"] == pytest.approx(0.005 + 0.01 + 0.005, rel=ROUND_OFF)
    assert lengths["top"] == pytest.approx(0.04 - 0.01, rel=ROUND_OFF)
    assert lengths["bottom"] == pytest.approx(0.04, rel=ROUND_OFF)
    assert section.facts.area == pytest.approx(0.04 * 0.02 - 0.01 * 0.005, rel=ROUND_OFF)
    nodes = group_nodes(section, "notch")
    assert np.all((nodes[0] >= 0.015 - 1e-12) & (nodes[0] <= 0.025 + 1e-12))
    assert np.all((nodes[1] >= 0.015 - 1e-12) & (nodes[1] <= 0.02 + 1e-12))


def test_intersection_names_each_edge_by_the_outline_it_lies_on():
    # A disk of radius 20 mm about the origin cut to the 30 x 30 mm square in x, y >= 0: the
    # square's left and bottom sides (20 mm each inside the disk) and a quarter circle.
    section = meshed("intersection")
    lengths = section.facts.edge_lengths
    assert sorted(lengths) == ["bottom", "left", "outline"]
    assert lengths["left"] == pytest.approx(0.02, rel=ROUND_OFF)
    assert lengths["bottom"] == pytest.approx(0.02, rel=ROUND_OFF)
    quarter = math.pi / 2 * 0.02
    shortfall, _ = p1_circle_shortfall(0.02, facet_lengths(section, "outline").max())
    assert quarter - shortfall / 4 <= lengths["outline"] <= quarter


# ---------------------------------------------------------------------------------------------
# Naming rules and renaming
# ---------------------------------------------------------------------------------------------


def test_name_edges_by_box_and_by_predicate():
    section = meshed("named by rules")
    lengths = section.facts.edge_lengths
    assert sorted(lengths) == ["clamp", "hot", "left", "top"]
    assert lengths["clamp"] == pytest.approx(0.04, rel=ROUND_OFF)
    assert lengths["hot"] == pytest.approx(0.02, rel=ROUND_OFF)
    np.testing.assert_allclose(group_nodes(section, "clamp")[1], 0.0, atol=1e-15)
    np.testing.assert_allclose(group_nodes(section, "hot")[0], 0.04, rtol=ROUND_OFF)


def test_later_rule_wins():
    section = (
        Section(Rectangle(0.04, 0.02))
        .name_edges("first", where=lambda x, y: y < 1e-9)
        .name_edges("second", box=(0.0, 0.0, 0.04, 0.0))
        .mesh(0.004)
    )
    assert section.facts.edge_lengths["second"] == pytest.approx(0.04, rel=ROUND_OFF)
    assert "first" not in section.edge_groups


def test_rule_that_names_no_edge_is_refused():
    section = Section(Rectangle(0.04, 0.02)).name_edges("clamp", box=(0.0, 0.0, 0.02, 0.0))
    with pytest.raises(GeometryError, match="clamp"):
        section.mesh(0.004)


def test_renamed_groups_merge_and_keep_lengths():
    plate = Rectangle(0.04, 0.02).renamed({"top": "cooled", "right": "cooled"})
    lengths = plate.mesh(0.004).facts.edge_lengths
    assert sorted(lengths) == ["bottom", "cooled", "left"]
    assert lengths["cooled"] == pytest.approx(0.04 + 0.02, rel=ROUND_OFF)
    bored = plate_with_bore().renamed({"bore": "hole"}).mesh(0.002)
    assert "bore" not in bored.edge_groups
    ref = meshed("plate with bore")
    assert bored.facts.edge_lengths["hole"] == pytest.approx(
        ref.facts.edge_lengths["bore"], rel=1e-9
    )


# ---------------------------------------------------------------------------------------------
# Placements
# ---------------------------------------------------------------------------------------------


def rotation(degrees, about):
    c, s = math.cos(math.radians(degrees)), math.sin(math.radians(degrees))
    matrix = np.array([[c, -s], [s, c]])
    centre = np.asarray(about, dtype=float)
    return lambda p: matrix @ (np.asarray(p, dtype=float) - centre[:, None]) + centre[:, None]


def reflection(point, direction):
    d = np.asarray(direction, dtype=float) / math.hypot(*direction)
    matrix = 2 * np.outer(d, d) - np.eye(2)  # reflection in the line along d
    q = np.asarray(point, dtype=float)[:, None]
    return lambda p: matrix @ (np.asarray(p, dtype=float) - q) + q


PLACEMENTS = {
    "rotated 30 deg": (lambda s: s.rotated(30.0, (0.01, 0.0)), rotation(30.0, (0.01, 0.0))),
    "mirrored": (lambda s: s.mirrored((0.05, 0.0), (1.0, 1.0)), reflection((0.05, 0), (1, 1))),
    "moved": (lambda s: s.moved(0.1, -0.2), lambda p: np.asarray(p) + np.array([[0.1], [-0.2]])),
}


@pytest.mark.parametrize("name", sorted(PLACEMENTS))
def test_placements_keep_names_lengths_and_positions(name):
    place_shape, place_points = PLACEMENTS[name]
    section = place_shape(plate_with_bore()).mesh(0.002)
    width, height = PLATE
    lengths = section.facts.edge_lengths
    assert sorted(lengths) == ["bore", "bottom", "left", "right", "top"]
    corners = {"bottom": [(0, 0), (width, 0)], "right": [(width, 0), (width, height)]}
    corners |= {"top": [(width, height), (0, height)], "left": [(0, height), (0, 0)]}
    size = math.hypot(width, height)
    for side, ends in corners.items():
        a, b = place_points(np.array(ends, dtype=float).T).T
        assert lengths[side] == pytest.approx(math.dist(a, b), rel=ROUND_OFF)
        # Every node of the group lies on the placed side.
        nodes = group_nodes(section, side)
        along = b - a
        offset = nodes - a[:, None]
        cross = np.abs(along[0] * offset[1] - along[1] * offset[0]) / np.linalg.norm(along)
        assert cross.max() <= ROUND_OFF * size, side
    centre = place_points(np.array(BORE_CENTRE)[:, None])[:, 0]
    nodes = group_nodes(section, "bore")
    np.testing.assert_allclose(np.hypot(*(nodes - centre[:, None])), BORE_RADIUS, rtol=1e-9)
    shortfall, area_gain = p1_circle_shortfall(BORE_RADIUS, facet_lengths(section, "bore").max())
    exact_bore = 2 * math.pi * BORE_RADIUS
    assert exact_bore - shortfall <= lengths["bore"] <= exact_bore
    # Centroid of plate less disk by first moments (elementary geometry), placed; the mesh's
    # bore polygon adds at most area_gain within (distance to the bore centre + r) of it.
    plate_area, bore_area = width * height, math.pi * BORE_RADIUS**2
    exact = (
        np.array([width / 2, height / 2]) * plate_area - np.array(BORE_CENTRE) * bore_area
    ) / (plate_area - bore_area)
    reach = math.dist(exact, BORE_CENTRE) + BORE_RADIUS
    expected = place_points(exact[:, None])[:, 0]
    shift = math.dist(section.facts.centroid, expected)
    assert shift <= area_gain * reach / section.facts.area + ROUND_OFF * size


# ---------------------------------------------------------------------------------------------
# Composite sections
# ---------------------------------------------------------------------------------------------


def test_composite_has_two_regions_and_a_conforming_interface():
    section = meshed("composite")
    mesh = section.mesh
    facts = section.facts
    assert facts.region_areas == {
        "steel": pytest.approx(0.04 * 0.01, rel=ROUND_OFF),
        "coat": pytest.approx(0.03 * 0.002, rel=ROUND_OFF),
    }
    # The outer boundary: the coating's exposed sides and top, the steel's top either side of
    # it (2 x 5 mm), and the steel's other sides.
    assert facts.edge_lengths == {
        "coating": pytest.approx(0.03 + 2 * 0.002, rel=ROUND_OFF),
        "top": pytest.approx(2 * 0.005, rel=ROUND_OFF),
        "bottom": pytest.approx(0.04, rel=ROUND_OFF),
        "left": pytest.approx(0.01, rel=ROUND_OFF),
        "right": pytest.approx(0.01, rel=ROUND_OFF),
    }
    regions = section.regions
    steel_facets = set(np.unique(mesh.t2f[:, regions["steel"]]).tolist())
    coat_facets = set(np.unique(mesh.t2f[:, regions["coat"]]).tolist())
    interface = np.array(sorted(steel_facets & coat_facets))
    assert len(interface) > 0
    # Interface facets are interior facets of one mesh: two triangles, one of each region.
    assert not set(interface.tolist()) & set(mesh.boundary_facets().tolist())
    neighbours = mesh.f2t[:, interface]
    assert np.all(neighbours >= 0)
    in_coat = np.isin(neighbours, regions["coat"])
    assert np.all(in_coat.sum(axis=0) == 1)
    # They cover the whole 30 mm interface at y = 10 mm.
    ends = mesh.p[:, mesh.facets[:, interface]]
    np.testing.assert_allclose(ends[1], 0.01, rtol=ROUND_OFF)
    assert np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0).sum() == pytest.approx(0.03)
    # No node is duplicated (a non-conforming interface would have two copies of each).
    rounded = np.round(mesh.p.T / 1e-12).astype(np.int64)
    assert len(np.unique(rounded, axis=0)) == mesh.p.shape[1]


def test_later_composite_part_owns_the_overlap():
    substrate = Rectangle(0.04, 0.01, region="steel")
    coating = Rectangle(0.03, 0.004, (0.005, 0.008), all_sides("coating"), region="coat")
    overlap = 0.03 * 0.002
    later_coat = Composite((substrate, coating)).mesh(0.002).facts.region_areas
    assert later_coat == {
        "steel": pytest.approx(0.04 * 0.01 - overlap, rel=ROUND_OFF),
        "coat": pytest.approx(0.03 * 0.004, rel=ROUND_OFF),
    }
    later_steel = Composite((coating, substrate)).mesh(0.002).facts.region_areas
    assert later_steel == {
        "steel": pytest.approx(0.04 * 0.01, rel=ROUND_OFF),
        "coat": pytest.approx(0.03 * 0.004 - overlap, rel=ROUND_OFF),
    }


def coated_bar():
    """A 40 x 20 mm core under a 2 mm coat, centred on the origin."""
    coat = Rectangle(0.044, 0.024, (-0.022, -0.012), all_sides("coating"), region="coat")
    core = Rectangle(0.04, 0.02, (-0.02, -0.01), region="core")
    return Composite((coat, core))


def test_half_of_a_composite_keeps_both_regions():
    facts = coated_bar().symmetry_cut((0, 0), (1, 0)).mesh(0.002).facts
    assert facts.region_areas == {
        "core": pytest.approx(0.02 * 0.02, rel=ROUND_OFF),
        "coat": pytest.approx(0.022 * 0.024 - 0.02 * 0.02, rel=ROUND_OFF),
    }
    assert facts.symmetry_multiplier == 2


@pytest.mark.parametrize(
    ("wrap", "fraction", "bore"),
    [
        (lambda s: s.symmetry_cut((0, 0), (1, 0)).symmetry_cut((0, 0), (0, 1)), 0.25, False),
        (lambda s: s.renamed({"coating": "skin"}).symmetry_cut((0, 0), (1, 0)), 0.5, False),
        (lambda s: s - Circle(0.003, name="bore"), 1.0, True),
    ],
    ids=["quarter", "renamed half", "bored"],
)
def test_wrapped_composite_keeps_both_regions(wrap, fraction, bore):
    section = wrap(coated_bar()).mesh(0.002)
    areas = section.facts.region_areas
    assert sorted(areas) == ["coat", "core"]
    coat = fraction * (0.044 * 0.024 - 0.04 * 0.02)
    assert areas["coat"] == pytest.approx(coat, rel=ROUND_OFF)
    core = fraction * 0.04 * 0.02
    if bore:
        _, gain = p1_circle_shortfall(0.003, facet_lengths(section, "bore").max())
        core_bored = core - math.pi * 0.003**2
        assert core_bored <= areas["core"] <= core_bored + gain
    else:
        assert areas["core"] == pytest.approx(core, rel=ROUND_OFF)


def test_composite_part_covered_by_a_later_part_is_refused():
    insert = Rectangle(0.01, 0.01, (0.005, 0.005), region="insert")
    body = Rectangle(0.02, 0.02, region="body")
    with pytest.raises(GeometryError, match="insert"):
        Composite((insert, body)).mesh(0.002)


# ---------------------------------------------------------------------------------------------
# Axisymmetric sections and symmetry cuts
# ---------------------------------------------------------------------------------------------


def test_axisymmetric_section_gets_an_axis_group_exactly_on_r_zero():
    section = meshed("axisymmetric cylinder")
    mesh = section.mesh
    assert sorted(section.edge_groups) == ["axis", "bottom", "right", "top"]
    assert section.facts.edge_lengths["axis"] == pytest.approx(0.05, rel=ROUND_OFF)
    np.testing.assert_array_equal(group_nodes(section, "axis")[0], 0.0)
    # Every boundary facet with both ends on r = 0 is in the axis group, and no other.
    boundary = mesh.boundary_facets()
    on_axis = boundary[np.all(mesh.p[0, mesh.facets[:, boundary]] == 0.0, axis=0)]
    np.testing.assert_array_equal(np.sort(on_axis), np.sort(section.edge_groups["axis"]))
    # A section clear of the axis has no axis group.
    ring = Section(Rectangle(0.01, 0.02, corner=(0.005, 0.0)), axisymmetric=True).mesh(0.002)
    assert "axis" not in ring.edge_groups


def test_axisymmetric_section_refuses_negative_radius():
    with pytest.raises(GeometryError, match=r"r >= 0.*r = -0\.001"):
        Section(Rectangle(0.02, 0.05, corner=(-0.001, 0.0)), axisymmetric=True)
    with pytest.raises(GeometryError, match="r >= 0"):
        Section(Circle(0.01, (0.005, 0.0)), axisymmetric=True)


def test_symmetry_cut_edges_are_named_symmetry():
    bar = Rectangle(0.04, 0.02, corner=(-0.02, -0.01))
    half = bar.symmetry_cut((0.0, 0.0), (1.0, 0.0)).mesh(0.002)
    lengths = half.facts.edge_lengths
    assert sorted(lengths) == ["bottom", "right", "symmetry", "top"]
    assert lengths["symmetry"] == pytest.approx(0.02, rel=ROUND_OFF)
    assert lengths["top"] == pytest.approx(0.02, rel=ROUND_OFF)
    np.testing.assert_allclose(group_nodes(half, "symmetry")[0], 0.0, atol=1e-15)
    assert half.facts.area == pytest.approx(0.02 * 0.02, rel=ROUND_OFF)
    assert half.facts.symmetry_multiplier == 2
    # A square cut on its diagonal y = x, keeping the side below it.
    square = Rectangle(0.02, 0.02, corner=(-0.01, -0.01))
    triangle = square.symmetry_cut((0.0, 0.0), (1.0, -1.0)).mesh(0.002)
    lengths = triangle.facts.edge_lengths
    assert sorted(lengths) == ["bottom", "right", "symmetry"]
    assert lengths["symmetry"] == pytest.approx(0.02 * math.sqrt(2), rel=ROUND_OFF)
    nodes = group_nodes(triangle, "symmetry")
    np.testing.assert_allclose(nodes[0] - nodes[1], 0.0, atol=1e-15)


def test_cut_off_the_symmetry_line_is_refused():
    bar = Rectangle(0.04, 0.01)
    with pytest.raises(GeometryError, match="not symmetric"):
        bar.symmetry_cut((0.01, 0.0), (1.0, 0.0)).mesh(0.002)


def test_cut_through_a_parallelogram_is_refused():
    parallelogram = Polygon([(0.0, 0.0), (0.04, 0.0), (0.05, 0.01), (0.01, 0.01)])
    with pytest.raises(GeometryError, match="not symmetric"):
        parallelogram.symmetry_cut((0.025, 0.0), (1.0, 0.0)).mesh(0.002)


# ---------------------------------------------------------------------------------------------
# Refinement and conduction distance
# ---------------------------------------------------------------------------------------------


def test_refinement_makes_elements_near_the_group_smaller():
    size, local = 0.002, 0.0004
    plain = meshed("plate with bore")
    refined = plate_with_bore().mesh(size, refine={"bore": (local, 1.2)})
    bore = facet_lengths(refined, "bore").mean()
    assert bore <= 1.25 * local  # gmsh's sizes are targets, not limits
    assert facet_lengths(plain, "bore").mean() >= 0.8 * size
    # Far from the bore the global size rules: the right side (20 mm from the bore's edge,
    # where the ramp 0.4 mm + 0.2 x 20 mm exceeds 2 mm) is still in 2 mm facets.
    assert facet_lengths(refined, "right").mean() == pytest.approx(size, rel=0.05)

    # The triangles touching the bore are smaller, by about (size / local)^2 in area.
    def touching_area(section):
        mesh = section.mesh
        cells = mesh.f2t[0, section.edge_groups["bore"]]
        x = mesh.p[:, mesh.t[:, cells]]
        d1, d2 = x[:, 1] - x[:, 0], x[:, 2] - x[:, 0]
        return np.mean(np.abs(d1[0] * d2[1] - d1[1] * d2[0]) / 2)

    assert touching_area(refined) < touching_area(plain) / 10


def test_refining_an_unknown_group_is_refused():
    with pytest.raises(GeometryError, match=r"refine names edge group\(s\) \['hole'\]"):
        plate_with_bore().mesh(0.002, refine={"hole": (0.0005, 1.2)})


def longest_mesh_edge(section: SectionMesh) -> float:
    mesh = section.mesh
    ends = mesh.p[:, mesh.facets]
    return float(np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0).max())


def test_max_distance_of_a_rectangle_cooled_all_round_is_half_the_short_side():
    section = Rectangle(0.03, 0.012, corner=(0.001, 0.002)).mesh(0.0015)
    distance = section.max_distance_to(section.edge_groups)
    exact = 0.012 / 2  # elementary geometry
    # Evaluated at nodes and element centres: every point is within the longest mesh edge of
    # a node, so the estimate falls short by at most that. The edges are sampled every quarter
    # facet, which can add at most sqrt(D^2 + (s/8)^2) - D for facets of length s.
    s = max(facet_lengths(section, g).max() for g in section.edge_groups)
    assert exact - longest_mesh_edge(section) <= distance <= math.hypot(exact, s / 8)


def test_max_distance_of_a_disk_is_its_radius():
    radius = 0.01
    section = Circle(radius, (0.003, 0.002)).mesh(0.001)
    distance = section.max_distance_to(["outline"])
    # The P1 outline lies within R (1 - cos(theta/2)) inside the circle, and every point is
    # within the longest mesh edge of a node. Any point of the disk is within R of a node of
    # the outline, so the estimate cannot exceed R.
    theta = 2 * math.asin(facet_lengths(section, "outline").max() / (2 * radius))
    low = radius * math.cos(theta / 2) - longest_mesh_edge(section)
    assert low <= distance <= radius * (1 + ROUND_OFF)


# ---------------------------------------------------------------------------------------------
# Errors for bad input
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("build", "message"),
    [
        (lambda: Polygon([(0, 0), (0.01, 0), (0, 0.01), (0.01, 0.01)]), "crosses itself"),
        (lambda: Polygon([(0, 0), (0.01, 0), (0.02, 0)]), "encloses no area"),
        (lambda: Rectangle(0.0, 0.01), r"width must be a finite length > 0 m, got 0\.0"),
        (lambda: Rectangle(0.01, -0.01), r"height must be a finite length > 0 m, got -0\.01"),
        (lambda: Circle(0.0), "radius must be a finite length > 0"),
        (lambda: Annulus(0.01, 0.01), "inner_radius 0.01 m must be below the outer_radius"),
        (lambda: Ellipse(0.01, -0.002), "semi_y must be a finite length > 0"),
        (lambda: profiles.i_section(0.1, 0.05, -0.005, 0.01), "web_thickness must be"),
        (lambda: profiles.round_tube(0.02, 0.01), "leaves no bore"),
        (lambda: Rectangle(0.02, 0.01).renamed({"north": "x"}), r"cannot rename.*north"),
        (lambda: Rectangle(0.02, 0.01, corner_radius=0.006), "more than half the shorter side"),
    ],
    ids=[
        "self-intersecting polygon",
        "zero-area outline",
        "zero width",
        "negative height",
        "zero radius",
        "bore as large as the tube",
        "negative semi-axis",
        "negative web",
        "wall leaves no bore",
        "unknown rename",
        "fillet too large",
    ],
)
def test_bad_shapes_are_refused(build, message):
    with pytest.raises(GeometryError, match=message):
        build()


@pytest.mark.parametrize(
    ("shape", "options", "message"),
    [
        (
            Rectangle(0.02, 0.01) - Circle(0.002, (0.1, 0.1), name="stray"),
            {"size": 0.002},
            r"removed from the part \(edges \['stray'\]\) lies outside it",
        ),
        (Rectangle(0.02, 0.01), {"size": 0.05}, "larger than the section"),
        (Rectangle(0.02, 0.01), {"size": 0.0}, "mesh size must be a finite length > 0"),
        (Rectangle(0.02, 0.01), {"size": 0.002, "order": 3}, "order must be 1 or 2"),
    ],
    ids=["hole outside the part", "size above the part", "zero size", "order 3"],
)
def test_bad_meshing_requests_are_refused(shape, options, message):
    with pytest.raises(GeometryError, match=message):
        shape.mesh(**options)


def test_element_count_over_max_elements_is_refused_before_meshing():
    # A 1 m square in 10 um triangles is about 2.3e10 of them: if it were meshed rather than
    # refused from the estimate, this test would not finish.
    with pytest.raises(GeometryError, match=r"about [\d,]+ triangles, more than max_elements"):
        Rectangle(1.0, 1.0).mesh(1e-5, max_elements=100_000)


def test_locate_finds_inside_points_and_refuses_outside_ones():
    section = meshed("plate with bore")
    mesh = section.mesh
    points = np.array([[0.002, 0.035, 0.015], [0.002, 0.018, 0.0025]])
    cells = section.locate(points)
    for (x, y), cell in zip(points.T, cells, strict=True):
        corners = mesh.p[:, mesh.t[:, cell]]
        jacobian = np.column_stack([corners[:, 1] - corners[:, 0], corners[:, 2] - corners[:, 0]])
        local = np.linalg.solve(jacobian, np.array([x, y]) - corners[:, 0])
        assert local.min() >= -1e-9 and local.sum() <= 1 + 1e-9
    with pytest.raises(GeometryError, match=r"\(0\.05, 0\.01\) m lies outside"):
        section.locate(np.array([[0.05], [0.01]]))
    with pytest.raises(GeometryError, match="lies outside"):
        section.locate(np.array([[BORE_CENTRE[0]], [BORE_CENTRE[1]]]))  # in the bore


def test_few_and_many_points_are_located_alike():
    """A few points are found by a pass over the triangles, many through a search tree: on
    the same points both give a triangle that holds the point (its barycentric coordinates,
    solved here, lie in [0, 1])."""
    section = meshed("plate with bore")
    mesh = section.mesh
    rng = np.random.default_rng(7)
    candidates = rng.uniform([0.0, 0.0], PLATE, size=(400, 2)).T
    outside_bore = np.hypot(candidates[0] - BORE_CENTRE[0], candidates[1] - BORE_CENTRE[1])
    points = candidates[:, outside_bore > 1.2 * BORE_RADIUS][:, : FEW_POINTS + 8]
    assert points.shape[1] == FEW_POINTS + 8
    many = section.locate(points)
    few = np.concatenate(
        [section.locate(points[:, k : k + 4]) for k in range(0, points.shape[1], 4)]
    )
    for cells in (many, few):
        for (x, y), cell in zip(points.T, cells, strict=True):
            corners = mesh.p[:, mesh.t[:, cell]]
            jacobian = np.column_stack(
                [corners[:, 1] - corners[:, 0], corners[:, 2] - corners[:, 0]]
            )
            local = np.linalg.solve(jacobian, np.array([x, y]) - corners[:, 0])
            assert local.min() >= -1e-9 and local.sum() <= 1 + 1e-9


# ---------------------------------------------------------------------------------------------
# Repeatable meshing, pickling, parallel processes
# ---------------------------------------------------------------------------------------------


def assert_same_mesh(first: SectionMesh, second: SectionMesh) -> None:
    np.testing.assert_array_equal(first.mesh.p, second.mesh.p)
    np.testing.assert_array_equal(first.mesh.t, second.mesh.t)
    assert sorted(first.edge_groups) == sorted(second.edge_groups)
    for group, facets in first.edge_groups.items():
        np.testing.assert_array_equal(facets, second.edge_groups[group])
    for region, cells in first.regions.items():
        np.testing.assert_array_equal(cells, second.regions[region])


def test_meshing_twice_in_one_process_gives_identical_meshes():
    first = plate_with_bore().mesh(0.002)
    # A different request in between, with a refinement field, must leave no gmsh state behind.
    other = substrate_and_coating().mesh(0.001, order=2, refine={"coating": (0.0005, 1.3)})
    assert other.mesh.p.shape[1] != first.mesh.p.shape[1]
    second = plate_with_bore().mesh(0.002)
    assert_same_mesh(first, second)


def test_section_mesh_pickles():
    section = meshed("composite")
    copy = pickle.loads(pickle.dumps(section))
    assert isinstance(copy, SectionMesh)
    assert_same_mesh(section, copy)
    assert copy.facts == section.facts


def mesh_in_worker(shape, size: float) -> tuple[int, SectionMesh]:
    section = shape.mesh(size)
    return section.mesh.p.shape[1], section


def test_meshing_in_two_worker_processes():
    shapes = [(plate_with_bore(), 0.002), (Annulus(0.02, 0.008), 0.002)]
    with ProcessPoolExecutor(max_workers=2) as pool:
        results = list(pool.map(mesh_in_worker, *zip(*shapes, strict=True)))
    for (shape, size), (nodes, section) in zip(shapes, results, strict=True):
        here = shape.mesh(size)
        assert nodes == here.mesh.p.shape[1] == section.mesh.p.shape[1]
        assert_same_mesh(section, here)
