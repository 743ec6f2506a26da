"""Rectangular sections: named edge groups, complete labels, exact facts, clear errors.

The facts of a rectangle are exact by elementary geometry (area w·h, perimeter 2(w + h),
centroid at the centre), so they are checked to round-off.
"""

import numpy as np
import pytest

from geometries import GeometryError, Rectangle, section_mesh_from_arrays


@pytest.fixture(scope="module")
def plate():
    return Rectangle(0.05, 0.02, corner=(0.01, -0.01)).mesh(size=0.002)


def test_every_boundary_facet_has_exactly_one_group(plate):
    mesh = plate.mesh
    claimed = np.concatenate(list(plate.edge_groups.values()))
    assert sorted(claimed) == sorted(mesh.boundary_facets())
    assert len(np.unique(claimed)) == len(claimed)


def test_groups_lie_on_their_sides(plate):
    mesh = plate.mesh
    expected = {"left": (0, 0.01), "right": (0, 0.06), "bottom": (1, -0.01), "top": (1, 0.01)}
    for name, (axis, value) in expected.items():
        coordinates = mesh.p[axis, mesh.facets[:, plate.edge_groups[name]]]
        np.testing.assert_allclose(coordinates, value, atol=1e-12)


def test_facts_are_exact(plate):
    facts = plate.facts
    assert facts.area == pytest.approx(0.05 * 0.02, rel=1e-12)
    assert facts.centroid == pytest.approx((0.035, 0.0), abs=1e-12)
    assert facts.edge_lengths["bottom"] == pytest.approx(0.05, rel=1e-12)
    assert facts.edge_lengths["left"] == pytest.approx(0.02, rel=1e-12)
    assert facts.perimeter() == pytest.approx(0.14, rel=1e-12)
    assert facts.region_areas == pytest.approx({"solid": 0.001}, rel=1e-12)


def test_max_distance_to_cooled_edges(plate):
    # All edges cooled: the farthest point is on the mid-line, half the height from the edges.
    # Evaluated at nodes, so it may fall short by up to one element (2 mm).
    all_edges = plate.max_distance_to(plate.edge_groups)
    assert 0.010 - 0.002 <= all_edges <= 0.010 + 1e-12
    # Only the left edge cooled: the farthest points are on the right edge, 50 mm away.
    assert plate.max_distance_to(["left"]) == pytest.approx(0.05, rel=1e-9)


def test_shared_group_names_merge_sides():
    quarter = Rectangle(
        0.02, 0.01, edge_names={"left": "symmetry", "bottom": "symmetry", "right": "cooled"}
    ).mesh(size=0.002)
    assert sorted(quarter.edge_groups) == ["cooled", "symmetry", "top"]
    assert quarter.facts.edge_lengths["symmetry"] == pytest.approx(0.03, rel=1e-12)


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"width": 0.0, "height": 0.01}, "width must be a finite length > 0"),
        ({"width": 0.01, "height": float("nan")}, "height must be a finite length > 0"),
        ({"width": 0.01, "height": 0.01, "edge_names": {"north": "x"}}, "unknown side"),
        ({"width": 0.01, "height": 0.01, "edge_names": {"top": ""}}, "non-empty string"),
    ],
)
def test_invalid_rectangles_are_refused(kwargs, message):
    with pytest.raises(GeometryError, match=message):
        Rectangle(**kwargs)


def test_invalid_mesh_size_is_refused():
    with pytest.raises(GeometryError, match="mesh size must be"):
        Rectangle(0.01, 0.01).mesh(size=-1.0)
    with pytest.raises(GeometryError, match="larger than the section"):
        Rectangle(0.01, 0.01).mesh(size=0.1)


# A unit square split into two triangles: boundary segments (0,1), (1,2), (2,3), (3,0).
SQUARE_POINTS = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]])
SQUARE_TRIANGLES = np.array([[0, 1, 2], [0, 2, 3]])


def test_an_edge_no_group_claims_is_an_error():
    lines = {"cooled": np.array([[0, 1], [1, 2], [2, 3]])}  # (3, 0) left out
    with pytest.raises(GeometryError, match="1 boundary facet.*belong to no edge group"):
        section_mesh_from_arrays(SQUARE_POINTS, SQUARE_TRIANGLES, lines, {"solid": [0, 1]})


def test_an_edge_in_two_groups_is_an_error():
    lines = {"a": np.array([[0, 1], [1, 2]]), "b": np.array([[2, 1], [2, 3], [3, 0]])}
    with pytest.raises(GeometryError, match="belongs to both 'a' and 'b'"):
        section_mesh_from_arrays(SQUARE_POINTS, SQUARE_TRIANGLES, lines, {"solid": [0, 1]})


def test_an_interior_segment_in_a_group_is_an_error():
    lines = {"all": np.array([[0, 1], [1, 2], [2, 3], [3, 0], [0, 2]])}  # (0, 2) is interior
    with pytest.raises(GeometryError, match="not on the section's outer boundary"):
        section_mesh_from_arrays(SQUARE_POINTS, SQUARE_TRIANGLES, lines, {"solid": [0, 1]})


def test_a_triangle_without_region_is_an_error():
    lines = {"all": np.array([[0, 1], [1, 2], [2, 3], [3, 0]])}
    with pytest.raises(GeometryError, match="1 triangle\\(s\\) have no region"):
        section_mesh_from_arrays(SQUARE_POINTS, SQUARE_TRIANGLES, lines, {"solid": [0]})
