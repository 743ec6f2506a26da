"""How large meshes are made (a coarser gmsh mesh split into four, k times) and the facet
topology handed to scikit-fem.

Large requests are meshed at 2^k times the size and every triangle split into four; the tests
lower the threshold so that small meshes take that path. The references are elementary
geometry (areas and lengths from the dimensions, points on a circle), scikit-fem's own facet
construction, and a direct mesh of the same section. The dimensions are invented.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from skfem import MeshTri

import geometries.meshing as meshing
from geometries import (
    Annulus,
    Circle,
    Composite,
    GeometryError,
    Rectangle,
    SectionMesh,
    section_mesh_from_arrays,
)

ROUND_OFF = 1e-12  # relative, for what the mesh represents exactly
SIDES = ("bottom", "right", "top", "left")
PLATE = (0.04, 0.02)  # width, height, m
BORE_CENTRE, BORE_RADIUS = (0.015, 0.01), 0.005
SIZE = 0.0005  # m: about 6,700 triangles estimated on the plate with its bore


def plate_with_bore():
    return Rectangle(*PLATE) - Circle(BORE_RADIUS, BORE_CENTRE, name="bore")


@pytest.fixture
def split_above(monkeypatch):
    """Set the estimated count above which meshes are made by splitting."""

    def setter(count: int) -> None:
        monkeypatch.setattr(meshing, "_SPLIT_ABOVE", count)

    return setter


def radius_ratios(section: SectionMesh) -> np.ndarray:
    """2 r_in / r_circ of every triangle's corners: 1 for an equilateral triangle."""
    mesh = section.mesh
    x = mesh.p[:, mesh.t]
    sides = np.stack([x[:, 1] - x[:, 0], x[:, 2] - x[:, 1], x[:, 0] - x[:, 2]], axis=1)
    lengths = np.hypot(sides[0], sides[1])
    area = 0.5 * np.abs(sides[0, 0] * sides[1, 2] - sides[1, 0] * sides[0, 2])
    # r_in = A / s (s the half perimeter), r_circ = abc / (4A): elementary geometry.
    return 16 * area**2 / (lengths.sum(axis=0) * lengths.prod(axis=0))


def facet_lengths(section: SectionMesh, group: str) -> np.ndarray:
    mesh = section.mesh
    ends = mesh.p[:, mesh.facets[:, section.edge_groups[group]]]
    return np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0)


def rows(points: np.ndarray) -> set[tuple[float, float]]:
    return {(float(x), float(y)) for x, y in np.round(points.T, 12)}


# ---------------------------------------------------------------------------------------------
# Split meshes
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("splits", [1, 2])
def test_a_split_mesh_is_the_coarse_mesh_split_into_fours(split_above, splits):
    coarse_size = SIZE * 2**splits
    coarse = plate_with_bore().mesh(coarse_size)  # below the threshold: meshed directly
    estimate = (PLATE[0] * PLATE[1] - math.pi * BORE_RADIUS**2) / (math.sqrt(3) / 4 * SIZE**2)
    # The fewest splits that bring the estimate to the threshold or below.
    split_above(math.ceil(estimate / 4**splits))
    split = plate_with_bore().mesh(SIZE)
    assert split.mesh.t.shape[1] == 4**splits * coarse.mesh.t.shape[1]
    # Every node of the coarse mesh is a node of the split one, and each split adds one node
    # per edge: V' = V + E.
    assert rows(coarse.mesh.p) <= rows(split.mesh.p)
    vertices, edges = coarse.mesh.p.shape[1], coarse.mesh.facets.shape[1]
    if splits == 1:
        assert split.mesh.p.shape[1] == vertices + edges
    assert sorted(split.edge_groups) == sorted(coarse.edge_groups)


def test_a_split_mesh_has_the_sizes_and_count_of_a_direct_one(split_above):
    direct = plate_with_bore().mesh(SIZE)
    split_above(2_000)  # one split
    split = plate_with_bore().mesh(SIZE)
    # gmsh divides each straight edge into equal parts no longer than the size; splitting
    # halves edges of twice the size.
    for section in (direct, split):
        assert facet_lengths(section, "right").mean() == pytest.approx(SIZE, rel=0.05)
        assert facet_lengths(section, "top").mean() == pytest.approx(SIZE, rel=0.05)
    # The first mesh of a split one is coarser, so its boundary rows weigh more: measured
    # 1.3 % more triangles than the direct mesh here, 7 % at twice the size, 0.1 % at 1M
    # triangles on a square.
    assert split.mesh.t.shape[1] == pytest.approx(direct.mesh.t.shape[1], rel=0.03)


def test_split_triangles_keep_their_shapes(split_above):
    direct = radius_ratios(plate_with_bore().mesh(SIZE))
    split_above(2_000)
    split = radius_ratios(plate_with_bore().mesh(SIZE))
    # Splitting a triangle at its edge midpoints gives four triangles similar to it; only next
    # to the bore does a new node move from the chord onto the arc. Measured here: direct
    # min 0.76, mean 0.993; split min 0.75, mean 0.984 (the first mesh is coarser, so more
    # of it is boundary rows). Delaunay meshes (gmsh algorithm 5) of such sections have means
    # near 0.94, and slivers have ratios near 0.
    assert split.min() >= 0.6
    assert split.mean() >= 0.97
    assert split.mean() >= direct.mean() - 0.02


def test_split_nodes_lie_on_the_curved_edges(split_above):
    radius, centre = 0.01, (0.003, 0.002)
    split_above(500)  # about 730 estimated: one split
    for order in (1, 2):
        section = Circle(radius, centre).mesh(0.001, order=order)
        mesh = section.mesh
        facets = section.edge_groups["outline"]
        ends = mesh.p[:, np.unique(mesh.facets[:, facets])]
        on_circle = [np.hypot(ends[0] - centre[0], ends[1] - centre[1])]
        if order == 2:
            middles = mesh.doflocs[:, mesh.nvertices + facets]
            on_circle.append(np.hypot(middles[0] - centre[0], middles[1] - centre[1]))
        # A node at a chord's midpoint would lie inside by r (1 - cos(theta / 2)), about
        # 1e-6 m for 1 mm chords: these are on the circle to round-off.
        for distances in on_circle:
            np.testing.assert_allclose(distances, radius, rtol=ROUND_OFF)


def test_split_curved_edges_keep_at_least_the_requested_elements_per_turn(split_above):
    # A 2 mm bore in 0.5 mm elements with 40 elements per turn: curvature, not size, limits
    # the chords there (2 pi r / 40 = 0.31 mm).
    radius = 0.002
    split_above(5_000)  # about 11,500 estimated: one split
    section = Annulus(0.02, radius).mesh(0.0005, curvature_elements=40)
    chords = facet_lengths(section, "bore")
    assert len(chords) >= 40
    assert chords.max() <= 2 * math.pi * radius / 40 * 1.05  # a chord is shorter than its arc


def test_refinement_ramps_are_kept_in_split_meshes(split_above):
    size, local = 0.002, 0.0004
    split_above(500)  # about 1,100 estimated: one split
    refined = plate_with_bore().mesh(size, refine={"bore": (local, 1.2)})
    # As for a direct mesh (tests/test_section_edges.py): gmsh's sizes are targets, here met
    # within 7 % (measured: 1.01 times the local size direct, 0.93 split); far from the bore
    # (0.4 mm + 0.2 x 20 mm > 2 mm) the global size rules.
    assert 0.8 * local <= facet_lengths(refined, "bore").mean() <= 1.25 * local
    assert facet_lengths(refined, "right").mean() == pytest.approx(size, rel=0.05)


def test_split_meshes_have_exact_facts_where_the_geometry_is_straight(split_above):
    width, height, corner = 0.03, 0.012, (0.001, -0.002)
    split_above(1_000)  # about 3,300 estimated: one split
    section = Rectangle(width, height, corner).mesh(0.0005)
    facts = section.facts
    assert facts.area == pytest.approx(width * height, rel=ROUND_OFF)
    assert facts.centroid == pytest.approx(
        (corner[0] + width / 2, corner[1] + height / 2), rel=ROUND_OFF
    )
    for side, length in {"bottom": width, "top": width, "left": height, "right": height}.items():
        assert facts.edge_lengths[side] == pytest.approx(length, rel=ROUND_OFF)


def test_split_composites_keep_their_regions_and_shared_interfaces(split_above):
    substrate = Rectangle(0.04, 0.01, region="steel")
    coating = Rectangle(0.03, 0.002, (0.005, 0.01), dict.fromkeys(SIDES, "coat"), region="coat")
    split_above(500)  # about 2,700 estimated: two splits
    section = Composite((substrate, coating)).mesh(0.0005)
    # An interface split differently on its two sides would leave unnamed boundary facets
    # along it, which meshing refuses; the region areas are those of the rectangles.
    assert section.facts.region_areas == pytest.approx(
        {"steel": 0.04 * 0.01, "coat": 0.03 * 0.002}, rel=ROUND_OFF
    )
    assert section.facts.edge_lengths["coat"] == pytest.approx(0.03 + 2 * 0.002, rel=ROUND_OFF)


# ---------------------------------------------------------------------------------------------
# Facet topology
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "make",
    [
        lambda: plate_with_bore().mesh(0.002),
        lambda: Annulus(0.02, 0.008).mesh(0.003, order=2),
    ],
    ids=["P1 plate with bore", "P2 annulus"],
)
def test_facets_and_incidences_are_those_scikit_fem_builds(make):
    section = make()
    mesh = section.mesh
    reference = MeshTri(mesh.p[:, : mesh.nvertices], mesh.t, sort_t=False)  # builds its own
    for name in ("facets", "t2f", "f2t"):
        given, own = getattr(mesh, name), getattr(reference, name)
        assert given.dtype == own.dtype, name
        np.testing.assert_array_equal(given, own, err_msg=name)
    np.testing.assert_array_equal(mesh.boundary_facets(), reference.boundary_facets())


# A unit square split into two triangles, and a fifth node that no triangle uses.
SQUARE_POINTS = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0], [2.0, 2.0]])
SQUARE_TRIANGLES = np.array([[0, 1, 2], [0, 2, 3]])


def test_segments_are_found_in_either_direction():
    lines = {"low": np.array([[1, 0], [1, 2]]), "high": np.array([[3, 2], [0, 3]])}
    section = section_mesh_from_arrays(SQUARE_POINTS, SQUARE_TRIANGLES, lines, {"solid": [0, 1]})
    mesh = section.mesh
    for name, segments in lines.items():
        found = {tuple(sorted(pair)) for pair in mesh.facets[:, section.edge_groups[name]].T}
        assert found == {tuple(sorted(pair)) for pair in segments.tolist()}
    assert section.facts.edge_lengths == pytest.approx({"low": 2.0, "high": 2.0})


def test_a_segment_listed_twice_in_one_group_is_an_error():
    lines = {"all": np.array([[0, 1], [1, 2], [2, 3], [3, 0], [1, 0]])}
    with pytest.raises(GeometryError, match=r"\(0\.5, 0\.0\) m belongs to both 'all' and 'all'"):
        section_mesh_from_arrays(SQUARE_POINTS, SQUARE_TRIANGLES, lines, {"solid": [0, 1]})


def test_a_segment_to_a_node_no_triangle_uses_is_off_the_boundary():
    lines = {"all": np.array([[0, 1], [1, 2], [2, 3], [3, 0], [2, 4]])}
    with pytest.raises(GeometryError, match="1 segment\\(s\\) that are not on the section's"):
        section_mesh_from_arrays(SQUARE_POINTS, SQUARE_TRIANGLES, lines, {"solid": [0, 1]})


def test_no_triangles_is_an_error():
    with pytest.raises(GeometryError, match="at least one triangle"):
        section_mesh_from_arrays(
            SQUARE_POINTS, np.empty((0, 3), int), {"all": np.array([[0, 1]])}, {}
        )


@pytest.mark.skipif(not hasattr(__import__("signal"), "SIGPIPE"), reason="no SIGPIPE here")
def test_after_meshing_a_closed_pipe_is_an_error_not_the_end_of_the_process():
    import subprocess
    import sys
    from pathlib import Path

    # gmsh's start sets SIGPIPE back to ending the process; the session puts Python's
    # handling back, under which a write to a closed pipe raises BrokenPipeError
    script = (
        "import os\n"
        "from geometries import Rectangle\n"
        "Rectangle(0.02, 0.01).mesh(0.005)\n"
        "reading, writing = os.pipe()\n"
        "os.close(reading)\n"
        "try:\n"
        "    os.write(writing, b'x')\n"
        "except BrokenPipeError:\n"
        "    print('refused')\n"
    )
    root = Path(__file__).resolve().parent.parent  # this checkout, not an installed copy
    done = subprocess.run(
        [sys.executable, "-c", script], cwd=root, capture_output=True, text=True, timeout=120
    )
    assert (done.returncode, done.stdout.strip()) == (0, "refused"), done.stderr[-2000:]


@pytest.mark.parametrize("start", ["default", "ignored"])
def test_meshing_keeps_the_interrupt_handling_it_found(start):
    """While gmsh meshes, Ctrl-C keeps the handling the process started with: Python's
    KeyboardInterrupt for a run started from a terminal (raised when gmsh returns), ignored for
    a background job — never the system default that ends the process without cleaning up."""
    import signal

    from geometries.meshing.session import gmsh_session

    before = signal.getsignal(signal.SIGINT)
    wanted = signal.default_int_handler if start == "default" else signal.SIG_IGN
    signal.signal(signal.SIGINT, wanted)
    try:
        with gmsh_session():
            during = signal.getsignal(signal.SIGINT)
        after = signal.getsignal(signal.SIGINT)
    finally:
        signal.signal(signal.SIGINT, before)
    assert (during, after) == (wanted, wanted)
