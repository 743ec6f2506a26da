"""DXF outlines: a drawing written with ezdxf (an independent DXF writer) against the same
section built with the geometry API and against its closed-form area and edge lengths; and
the malformed drawings refused with messages that say where.

The drawing (invented, lengths in mm): a 60 x 40 plate with a rounded corner (LINEs and an
ARC on layer "outline"), a half-round bump on its top edge (an open LWPOLYLINE with bulge 1,
layer "top"), and two holes on layer "holes": a CIRCLE and a slot drawn as a closed
LWPOLYLINE with two bulges. A LINE on layer "dimensions" and a TEXT are not chosen.

Tolerance: the mesh replaces each arc by chords whose ends lie on the arc (gmsh places
boundary nodes on the curve). A chord of length c on a circle of radius r subtends
θ = 2·asin(c/2r) and cuts off the circular segment r²(θ − sin θ)/2 (the sagitta formula,
e.g. Bronshtein & Semendyayev, *Handbook of Mathematics*, circular segment, from memory); its
length falls short of the arc by rθ − 2r·sin(θ/2). Both per unit angle grow with θ, so an
arc of sweep Θ meshed with chords no longer than the longest boundary edge h of the mesh
misses at most (Θ/θ_h)·r²(θ_h − sin θ_h)/2 of area and Θ·r·(1 − sin(θ_h/2)/(θ_h/2)) of
length, θ_h = 2·asin(h/2r). These bounds, summed over the arcs, are the tolerances.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from geometries import Circle, EdgeArc, EdgeSegment, GeometryError, Outline, Section, read_dxf

ezdxf = pytest.importorskip("ezdxf", reason="the DXF reader needs the 'dxf' extra (ezdxf)")

MESH_SIZE = 0.002  # m
MM = 1e-3


def _layer(name: str) -> dict:
    return {"layer": name}


def write_part(path) -> None:
    """The invented part, in mm, as a drawing program would save it."""
    drawing = ezdxf.new()
    drawing.header["$INSUNITS"] = 4  # millimetres
    space = drawing.modelspace()
    space.add_line((0, 0), (60, 0), dxfattribs=_layer("outline"))
    space.add_line((60, 0), (60, 30), dxfattribs=_layer("outline"))
    space.add_arc((50, 30), 10, 0, 90, dxfattribs=_layer("outline"))  # rounded corner
    space.add_line((20, 40), (50, 40), dxfattribs=_layer("outline"))  # drawn backwards
    # the bump: from (20, 40) to (0, 40), bulge 1 = a half circle turning counter-clockwise
    space.add_lwpolyline([(20, 40, 1.0), (0, 40, 0.0)], format="xyb", dxfattribs=_layer("top"))
    space.add_line((0, 40), (0, 0), dxfattribs=_layer("outline"))
    space.add_circle((20, 15), 5, dxfattribs=_layer("holes"))
    slot = [(35, 10, 0.0), (45, 10, 1.0), (45, 20, 0.0), (35, 20, 1.0)]  # 10 x 10 plus ends
    space.add_lwpolyline(slot, format="xyb", close=True, dxfattribs=_layer("holes"))
    space.add_line((0, -10), (60, -10), dxfattribs=_layer("dimensions"))
    space.add_text("PART 7", dxfattribs=_layer("outline"))
    drawing.saveas(path)


def part_from_api():
    """The same section from the geometry API, in m."""
    outline = Outline(
        (
            EdgeSegment("outline", (0.0, 0.0), (60 * MM, 0.0)),
            EdgeSegment("outline", (60 * MM, 0.0), (60 * MM, 30 * MM)),
            EdgeArc("outline", (50 * MM, 30 * MM), 10 * MM, 0.0, math.pi / 2),
            EdgeSegment("outline", (50 * MM, 40 * MM), (20 * MM, 40 * MM)),
            EdgeArc("top", (10 * MM, 40 * MM), 10 * MM, 0.0, math.pi),
            EdgeSegment("outline", (0.0, 40 * MM), (0.0, 0.0)),
        )
    )
    slot = Outline(
        (
            EdgeSegment("holes", (35 * MM, 10 * MM), (45 * MM, 10 * MM)),
            EdgeArc("holes", (45 * MM, 15 * MM), 5 * MM, -math.pi / 2, math.pi),
            EdgeSegment("holes", (45 * MM, 20 * MM), (35 * MM, 20 * MM)),
            EdgeArc("holes", (35 * MM, 15 * MM), 5 * MM, math.pi / 2, math.pi),
        )
    )
    return outline - Circle(5 * MM, (20 * MM, 15 * MM), name="holes") - slot


# Closed forms (mm): the plate less the corner's square-minus-quarter-disc, plus the half
# disc of the bump, less the round hole and the slot (a 10 x 10 square and a whole disc).
AREA = (
    60 * 40 - (100 - math.pi * 100 / 4) + math.pi * 100 / 2 - math.pi * 25 - (100 + 25 * math.pi)
) * MM**2
LENGTHS = {
    "outline": (60 + 30 + math.pi * 10 / 2 + 30 + 40) * MM,
    "top": math.pi * 10 * MM,
    "holes": (2 * math.pi * 5 + 20 + 2 * math.pi * 5) * MM,
}
# (radius, sweep) of every arc, per edge group, in m and rad
ARCS = {
    "outline": [(10 * MM, math.pi / 2)],
    "top": [(10 * MM, math.pi)],
    "holes": [(5 * MM, 2 * math.pi), (5 * MM, 2 * math.pi)],
}


def chord_bounds(longest_edge: float, arcs_by_group=None) -> tuple[float, dict[str, float]]:
    """The sagitta-formula bounds (module docstring) on the area and each group's length."""
    area, lengths = 0.0, {}
    for group, arcs in (arcs_by_group or ARCS).items():
        lengths[group] = 0.0
        for radius, sweep in arcs:
            theta = 2 * math.asin(min(longest_edge / (2 * radius), 1.0))
            area += sweep / theta * radius**2 * (theta - math.sin(theta)) / 2
            lengths[group] += sweep * radius * (1 - math.sin(theta / 2) / (theta / 2))
    return area, lengths


def longest_boundary_edge(mesh) -> float:
    facets = np.concatenate(list(mesh.edge_groups.values()))
    ends = mesh.mesh.p[:, mesh.mesh.facets[:, facets]]
    return float(np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0).max())


@pytest.fixture(scope="module")
def meshes(tmp_path_factory):
    path = tmp_path_factory.mktemp("dxf") / "part.dxf"
    write_part(path)
    drawn = read_dxf(path, layers=["outline", "top", "holes"])
    return Section(drawn).mesh(MESH_SIZE), Section(part_from_api()).mesh(MESH_SIZE)


def test_drawing_matches_the_api_section_and_the_closed_forms(meshes):
    drawn, built = meshes
    assert set(drawn.edge_groups) == set(built.edge_groups) == set(LENGTHS)
    longest = max(longest_boundary_edge(drawn), longest_boundary_edge(built))
    area_bound, length_bounds = chord_bounds(longest)
    # the chords of two meshes of the same curves differ by less than both bounds together
    assert abs(drawn.facts.area - built.facts.area) <= 2 * area_bound
    assert abs(drawn.facts.area - AREA) <= area_bound, (drawn.facts.area, AREA, area_bound)
    for group, length in LENGTHS.items():
        measured = drawn.facts.surface_areas[group]  # per metre of depth: the edge length
        assert abs(measured - length) <= length_bounds[group] + 1e-12, group
        assert abs(measured - built.facts.surface_areas[group]) <= 2 * length_bounds[group] + 1e-12
    assert drawn.facts.perimeter() == pytest.approx(
        sum(LENGTHS.values()), abs=sum(length_bounds.values())
    )


def test_units_from_the_header_and_from_the_caller(tmp_path):
    path = tmp_path / "part.dxf"
    write_part(path)
    in_mm = read_dxf(path, layers=["outline", "top", "holes"])
    in_cm = read_dxf(path, units="cm", layers=["outline", "top", "holes"])  # overrides
    # bounds() samples each arc at 24 points: the bump's top is found to within 0.1 %
    assert in_mm.bounds() == pytest.approx((0.0, 0.0, 0.06, 0.05), rel=1e-3, abs=1e-12)
    assert in_cm.bounds() == pytest.approx((0.0, 0.0, 0.6, 0.5), rel=1e-3, abs=1e-12)


def test_colours_name_the_edge_groups(tmp_path):
    drawing = ezdxf.new()
    space = drawing.modelspace()
    corners = [(0, 0), (2, 0), (2, 1), (0, 1)]
    for i in range(4):
        space.add_line(corners[i], corners[(i + 1) % 4], dxfattribs={"color": 1 if i else 5})
    path = tmp_path / "plate.dxf"
    drawing.saveas(path)
    shape = read_dxf(path, units="m", group_by="colour")
    assert sorted(e.group for e in shape.edges()) == ["colour_1"] * 3 + ["colour_5"]


def test_a_part_inside_a_hole_is_a_part_again(tmp_path):
    """A square with a round hole, a round core inside the hole and a separate round wire:
    loops alternate part, hole, part by nesting depth. Area: 40² − π·10² + π·4² + π·5² mm²,
    within the sagitta bound of the three circles' chords."""
    drawing = ezdxf.new()
    drawing.header["$INSUNITS"] = 4
    space = drawing.modelspace()
    space.add_lwpolyline([(0, 0), (40, 0), (40, 40), (0, 40)], close=True, dxfattribs=_layer("a"))
    space.add_circle((20, 20), 10, dxfattribs=_layer("hole"))
    space.add_circle((20, 20), 4, dxfattribs=_layer("core"))
    space.add_circle((60, 20), 5, dxfattribs=_layer("wire"))
    drawing.saveas(tmp_path / "nested.dxf")
    mesh = Section(read_dxf(tmp_path / "nested.dxf")).mesh(MESH_SIZE)
    assert set(mesh.edge_groups) == {"a", "hole", "core", "wire"}
    circles = {g: [(r * MM, 2 * math.pi)] for g, r in (("hole", 10), ("core", 4), ("wire", 5))}
    bound, _ = chord_bounds(longest_boundary_edge(mesh), circles)
    area = (40**2 - math.pi * 10**2 + math.pi * 4**2 + math.pi * 5**2) * MM**2
    assert abs(mesh.facts.area - area) <= bound


def test_entities_seen_from_below_are_mirrored(tmp_path):
    """Entities with extrusion (0, 0, −1) have their object x axis along −x (the DXF
    reference's arbitrary-axis rule, from memory): a circle at object (10, 0) lies at
    (−10, 0), and two half arcs about object (0, 5) close a circle about (0, 5)."""
    drawing = ezdxf.new()
    drawing.header["$INSUNITS"] = 4
    space = drawing.modelspace()
    below = {"extrusion": (0, 0, -1)}
    space.add_circle((10, 0), 3, dxfattribs=below)
    space.add_arc((0, 5), 2, 0, 180, dxfattribs=below)
    space.add_arc((0, 5), 2, 180, 360, dxfattribs=below)
    drawing.saveas(tmp_path / "below.dxf")
    shape = read_dxf(tmp_path / "below.dxf")
    arcs = list(shape.edges())
    assert sorted((round(a.centre[0] / MM, 9), round(a.centre[1] / MM, 9)) for a in arcs) == [
        (-10.0, 0.0),
        (0.0, 5.0),
        (0.0, 5.0),
    ]
    assert sum(a.sweep for a in arcs if not a.full) == pytest.approx(-2 * math.pi)


# -- malformed drawings ---------------------------------------------------------------------


def _saved(tmp_path, draw, units: int = 4):
    drawing = ezdxf.new()
    drawing.header["$INSUNITS"] = units
    draw(drawing.modelspace())
    path = tmp_path / "bad.dxf"
    drawing.saveas(path)
    return path


def test_an_open_outline_names_the_gap(tmp_path):
    def draw(space):
        for a, b in [((0, 0), (10, 0)), ((10, 0), (10, 10)), ((10, 10), (0, 10))]:
            space.add_line(a, b)
        space.add_line((0, 10), (0, 0.5))  # stops 0.5 mm short of the start

    with pytest.raises(GeometryError, match=r"open") as error:
        read_dxf(_saved(tmp_path, draw))
    message = str(error.value)
    assert "(0, 0.5) mm" in message and "a gap of 0.5 mm" in message, message
    assert error.value.argument == "path"
    # the same drawing joins when the tolerance spans the gap (0.6 mm)
    shape = read_dxf(_saved(tmp_path, draw), tolerance=0.6e-3)
    assert shape.bounds() == pytest.approx((0.0, 0.0, 0.01, 0.01))


def test_a_self_crossing_outline_names_the_crossing(tmp_path):
    def draw(space):
        space.add_lwpolyline([(0, 0), (10, 10), (10, 0), (0, 10)], close=True)  # a bow tie

    with pytest.raises(GeometryError, match=r"crosses itself near \(5, 5\) mm"):
        read_dxf(_saved(tmp_path, draw))


def test_crossing_outlines_name_the_crossing(tmp_path):
    def draw(space):
        space.add_lwpolyline([(0, 0), (10, 0), (10, 10), (0, 10)], close=True)
        space.add_circle((10, 5), 2)

    with pytest.raises(GeometryError, match=r"cross near \(10, [0-9.]+\) mm"):
        read_dxf(_saved(tmp_path, draw))


def test_no_entities_on_the_chosen_layers_lists_the_layers(tmp_path):
    def draw(space):
        space.add_circle((0, 0), 5, dxfattribs=_layer("sketch"))
        space.add_circle((0, 0), 2)  # layer "0"

    with pytest.raises(GeometryError, match=r"no lines.*\['outline'\].*\['0', 'sketch'\]"):
        read_dxf(_saved(tmp_path, draw), layers=["outline"])
    # a misspelt layer beside a right one is refused too, with a suggestion
    with pytest.raises(GeometryError, match=r"\['sketchs'\].*did you mean 'sketch'\?"):
        read_dxf(_saved(tmp_path, draw), layers=["0", "sketchs"])


def test_a_spline_is_refused_with_advice(tmp_path):
    def draw(space):
        space.add_spline([(0, 0), (5, 3), (10, 0)], dxfattribs=_layer("outline"))

    with pytest.raises(GeometryError, match=r"SPLINE .*convert the spline .*explode"):
        read_dxf(_saved(tmp_path, draw))


def test_a_drawing_without_units_needs_them(tmp_path):
    def draw(space):
        space.add_circle((0, 0), 5)

    path = _saved(tmp_path, draw, units=0)
    with pytest.raises(GeometryError, match=r"no units.*give its length unit") as error:
        read_dxf(path)
    assert error.value.argument == "units"
    radius = read_dxf(path, units="mm").edges()[0].radius
    assert radius == pytest.approx(0.005, rel=1e-12)


def test_branching_pieces_are_refused(tmp_path):
    def draw(space):
        for a, b in [
            ((0, 0), (10, 0)),
            ((10, 0), (10, 10)),
            ((10, 10), (0, 10)),
            ((0, 10), (0, 0)),
        ]:
            space.add_line(a, b)
        space.add_line((10, 0), (20, 0))  # a third piece at (10, 0)

    with pytest.raises(GeometryError, match=r"3 pieces meet at \(10, 0\) mm"):
        read_dxf(_saved(tmp_path, draw))


# -- the case file --------------------------------------------------------------------------

CASE = """
[section]
mesh_size = "2 mm"
[section.file]
path = "part.dxf"
layers = ["outline", "top", "holes"]
[[section.shape]]
kind = "circle"
radius = "3 mm"
centre = ["10 mm", "30 mm"]
edge = "bore"
combine = "subtract"
[material]
conductivity = "45 W/(m*K)"
density = "7850 kg/m^3"
specific_heat = "480 J/(kg*K)"
[boundaries.outline]
convection = { coefficient = "50 W/(m^2*K)", ambient = "20 degC" }
[boundaries.top]
convection = { coefficient = "50 W/(m^2*K)", ambient = "20 degC" }
[boundaries.holes]
insulated = true
[boundaries.bore]
insulated = true
[initial]
temperature = "200 degC"
[run]
end_time = "1 min"
"""


def test_a_case_file_reads_the_drawing(tmp_path):
    from advisor.casefile import CaseError, load_case

    write_part(tmp_path / "part.dxf")
    case_file = tmp_path / "case.toml"
    case_file.write_text(CASE)
    case = load_case(case_file)
    groups = case.section.boundary_groups()
    assert groups == {"outline", "top", "holes", "bore"}
    case_file.write_text(CASE.replace('"outline", "top", "holes"', '"outlines"'))
    with pytest.raises(
        CaseError,
        match=r"line 6: section\.file\.layers.*\['dimensions', 'holes', 'outline', 'top'\]"
        r".*did you mean 'outline'\?",
    ):
        load_case(case_file)


def test_the_docstring_example_runs():
    import doctest

    import geometries.dxf_import

    result = doctest.testmod(geometries.dxf_import)
    assert result.attempted > 0 and result.failed == 0
