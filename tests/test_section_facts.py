"""Section facts (area, edge lengths, centroid, revolved volume and surfaces) against closed forms.

Every expected value is computed here from the dimensions by elementary geometry, Pappus's
centroid theorems or quadrature of an arc-length integral, never by the code under test. Straight
edges are meshed exactly, so straight-edged quantities are checked to round-off.

Curved edges are where the mesh differs from the part, and the tolerances follow from how:

- P1 (straight-sided triangles): a chord of angle theta on an arc of radius r cuts off the
  circular segment r^2 (theta - sin theta) / 2 and is shorter than the arc by
  r (theta - 2 sin(theta/2)) (elementary geometry). Per radian of turning these grow with theta,
  so with theta_max the angle of the group's longest facet an arc turning through Theta loses at
  most r^2 Theta (theta - sin theta) / (2 theta) of area (about r^2 Theta theta^2 / 12, the
  O(h^2 / R^2) of the method) and r Theta (1 - sin(theta/2) / (theta/2)) of length.
- P2 (quadratic triangles): gmsh puts each boundary mid-edge node on the arc at the mid-angle.
  The quadratic through the ends and the mid-node of an arc of half-angle alpha = theta / 2
  bounds, with the centre, the area r^2 sin(alpha) (4 - cos(alpha)) / 3 instead of r^2 alpha
  (derived in ``p2_arc_area``): short by r^2 alpha^5 / 30 to leading order, a relative error
  theta^4 / 480, the O(h^4 / R^4) of the method. Its length is found by numerical quadrature of
  its arc-length integral (``p2_arc_length_bound``).
- Centroids: if the mesh region differs from the part by a total area a lying within rho of the
  true centroid, the mesh centroid moves by at most a rho / A_mesh (first moments).

The dimensions are invented: they are our own parts, not catalogue sections.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad

from geometries import (
    Annulus,
    Circle,
    EdgeArc,
    EdgeSegment,
    Ellipse,
    Outline,
    Rectangle,
    Section,
    SectionMesh,
    profiles,
)

ROUND_OFF = 1e-12  # relative, for quantities the mesh represents exactly (straight edges)
# The chord bounds are attained when all chords of an arc are equal (a circle meshed uniformly),
# so they are compared with this much room for the round-off of evaluating them.
BOUND_ROUND_OFF = 1 + 1e-9


# ---------------------------------------------------------------------------------------------
# Error bounds of the method (derivations in the module docstring)
# ---------------------------------------------------------------------------------------------


def longest_chord(section_mesh: SectionMesh, groups) -> float:
    """Longest boundary facet (straight chord between its end nodes) of ``groups``, m."""
    mesh = section_mesh.mesh
    facets = np.concatenate([section_mesh.edge_groups[g] for g in groups])
    ends = mesh.p[:, mesh.facets[:, facets]]
    return float(np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0).max())


def chord_angle(chord: float, radius: float) -> float:
    """Angle subtended at the centre by a chord of an arc of ``radius`` (elementary geometry)."""
    assert chord < 2 * radius, "mesh too coarse for the bound: chord longer than a diameter"
    return 2 * math.asin(chord / (2 * radius))


def p1_arc_area_bound(radius: float, turning: float, chord: float) -> float:
    """Largest area between an arc (radius, total turning in rad) and its P1 chords, m^2."""
    theta = chord_angle(chord, radius)
    return BOUND_ROUND_OFF * radius**2 * turning * (theta - math.sin(theta)) / (2 * theta)


def p1_arc_length_bound(radius: float, turning: float, chord: float) -> float:
    """Largest amount by which the P1 chords of an arc are shorter than the arc, m."""
    theta = chord_angle(chord, radius)
    return BOUND_ROUND_OFF * radius * turning * (1 - math.sin(theta / 2) / (theta / 2))


def p2_arc_area(alpha: float) -> float:
    """Area (per r^2) between the centre and the quadratic through an arc's ends and mid-angle
    point, half-angle ``alpha``.

    In the arc's own frame, with u in [-1/2, 1/2]: x(u) = 1 + 4u^2 (cos(alpha) - 1),
    y(u) = 2u sin(alpha); the area 1/2 * integral of (x y' - y x') du is
    sin(alpha) (4 - cos(alpha)) / 3 (elementary calculus).
    """
    return math.sin(alpha) * (4 - math.cos(alpha)) / 3


def p2_arc_area_bound(radius: float, turning: float, chord: float) -> float:
    """Largest area between an arc and its P2 edges (mid-nodes at mid-angle), m^2."""
    alpha = chord_angle(chord, radius) / 2
    return BOUND_ROUND_OFF * radius**2 * turning * (alpha - p2_arc_area(alpha)) / (2 * alpha)


def p2_arc_length_bound(radius: float, turning: float, chord: float) -> float:
    """Largest amount by which the P2 edges of an arc are shorter than the arc, m.

    The quadratic of ``p2_arc_area`` has speed |(x', y')| = sqrt(4 sin^2(alpha) +
    64 u^2 (1 - cos(alpha))^2); its length is integrated numerically here.
    """
    alpha = chord_angle(chord, radius) / 2
    speed = lambda u: math.hypot(2 * math.sin(alpha), 8 * u * (1 - math.cos(alpha)))  # noqa: E731
    length, _ = quad(speed, -0.5, 0.5, epsabs=0.0, epsrel=1e-13)
    return BOUND_ROUND_OFF * radius * turning * (1 - length / (2 * alpha))


AREA_BOUND = {1: p1_arc_area_bound, 2: p2_arc_area_bound}
LENGTH_BOUND = {1: p1_arc_length_bound, 2: p2_arc_length_bound}


def centroid_bound(area_change: float, reach: float, mesh_area: float) -> float:
    """Largest centroid shift when ``area_change`` within ``reach`` of it is lost or gained."""
    return area_change * reach / mesh_area


def assert_between(low, value, high, scale):
    """low <= value <= high, allowing round-off of the size ``scale``."""
    slack = ROUND_OFF * abs(scale)
    assert low - slack <= value <= high + slack, (low, value, high)


def assert_centroid(facts, expected, tolerance):
    shift = math.dist(facts.centroid, expected)
    assert shift <= tolerance + ROUND_OFF * math.hypot(*expected), (facts.centroid, expected)


# ---------------------------------------------------------------------------------------------
# Circles and rings
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("order", [1, 2])
def test_circle(order):
    radius, centre = 0.012, (0.003, -0.004)
    section = Circle(radius, centre).mesh(0.0015, order=order)
    facts = section.facts
    chord = longest_chord(section, ["outline"])
    area_loss = AREA_BOUND[order](radius, 2 * math.pi, chord)
    exact_area = math.pi * radius**2  # elementary geometry
    # Nodes lie on the circle, so the mesh is inside it: the area can only be short.
    assert_between(exact_area - area_loss, facts.area, exact_area, exact_area)
    exact_length = 2 * math.pi * radius  # elementary geometry
    length_loss = LENGTH_BOUND[order](radius, 2 * math.pi, chord)
    assert_between(
        exact_length - length_loss, facts.edge_lengths["outline"], exact_length, exact_length
    )
    assert_centroid(facts, centre, centroid_bound(area_loss, radius, facts.area))
    assert facts.region_areas == {"solid": pytest.approx(facts.area, rel=ROUND_OFF)}


@pytest.mark.parametrize("order", [1, 2])
def test_annulus(order):
    outer, inner, centre = 0.015, 0.006, (0.002, 0.001)
    section = Annulus(outer, inner, centre).mesh(0.0015, order=order)
    facts = section.facts
    outer_chord = longest_chord(section, ["outer"])
    bore_chord = longest_chord(section, ["bore"])
    outer_loss = AREA_BOUND[order](outer, 2 * math.pi, outer_chord)
    bore_gain = AREA_BOUND[order](inner, 2 * math.pi, bore_chord)  # the hole is too small
    exact_area = math.pi * (outer**2 - inner**2)  # elementary geometry
    assert_between(
        exact_area - outer_loss, facts.area, exact_area + bore_gain, exact_area + bore_gain
    )
    for group, radius, chord in (("outer", outer, outer_chord), ("bore", inner, bore_chord)):
        exact = 2 * math.pi * radius  # elementary geometry
        loss = LENGTH_BOUND[order](radius, 2 * math.pi, chord)
        assert_between(exact - loss, facts.edge_lengths[group], exact, exact)
    reach = centroid_bound(outer_loss + bore_gain, outer, facts.area)
    assert_centroid(facts, centre, reach)


def test_round_tube():
    outer_diameter, wall = 0.05, 0.003
    section = profiles.round_tube(outer_diameter, wall).mesh(0.002)
    facts = section.facts
    outer, inner = outer_diameter / 2, outer_diameter / 2 - wall
    outer_loss = p1_arc_area_bound(outer, 2 * math.pi, longest_chord(section, ["outer"]))
    bore_gain = p1_arc_area_bound(inner, 2 * math.pi, longest_chord(section, ["bore"]))
    exact_area = math.pi * (outer**2 - inner**2)  # elementary geometry
    assert_between(
        exact_area - outer_loss, facts.area, exact_area + bore_gain, exact_area + bore_gain
    )
    for group, radius in (("outer", outer), ("bore", inner)):
        exact = 2 * math.pi * radius  # elementary geometry
        loss = p1_arc_length_bound(radius, 2 * math.pi, longest_chord(section, [group]))
        assert_between(exact - loss, facts.edge_lengths[group], exact, exact)
    assert_centroid(facts, (0.0, 0.0), centroid_bound(outer_loss + bore_gain, outer, facts.area))


# ---------------------------------------------------------------------------------------------
# Filleted shapes and profiles
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("order", [1, 2])
def test_filleted_rectangle(order):
    width, height, radius, corner = 0.05, 0.03, 0.006, (0.01, 0.02)
    section = Rectangle(width, height, corner, corner_radius=radius).mesh(0.002, order=order)
    facts = section.facts
    # Elementary geometry: each rounded corner removes a square r^2 less a quarter disk.
    exact_area = width * height - 4 * radius**2 * (1 - math.pi / 4)
    area_loss = AREA_BOUND[order](radius, 2 * math.pi, longest_chord(section, ["corners"]))
    assert_between(exact_area - area_loss, facts.area, exact_area, exact_area)
    # The sides are straight and shortened by r at each end; the arcs make one full circle.
    for side, length in (("bottom", width), ("top", width), ("left", height), ("right", height)):
        assert facts.edge_lengths[side] == pytest.approx(length - 2 * radius, rel=ROUND_OFF)
    exact_arcs = 2 * math.pi * radius
    arc_loss = LENGTH_BOUND[order](radius, 2 * math.pi, longest_chord(section, ["corners"]))
    assert_between(exact_arcs - arc_loss, facts.edge_lengths["corners"], exact_arcs, exact_arcs)
    centre = (corner[0] + width / 2, corner[1] + height / 2)
    reach = math.hypot(width / 2, height / 2)
    assert_centroid(facts, centre, centroid_bound(area_loss, reach, facts.area))


@pytest.mark.parametrize("order", [1, 2])
def test_rotated_ellipse(order):
    semi_x, semi_y, centre, degrees = 0.02, 0.008, (0.01, -0.005), 30.0
    section = Ellipse(semi_x, semi_y, centre, degrees).mesh(0.001, order=order)
    facts = section.facts
    mesh = section.mesh
    exact_area = math.pi * semi_x * semi_y  # elementary geometry

    # Perimeter: the arc-length integral of (a cos t, b sin t), by adaptive quadrature.
    perimeter, _ = quad(
        lambda t: math.hypot(semi_x * math.sin(t), semi_y * math.cos(t)), 0, 2 * math.pi
    )

    # Bounds: an arc whose curvature nowhere exceeds kappa cuts off no more area under a chord,
    # and is no longer, than an arc of the circle of radius 1/kappa with the same chord
    # (comparison with the circle of largest curvature; the ellipse's largest curvature is
    # a / b^2, at the ends of the major axis).
    sharpest = semi_y**2 / semi_x
    facets = section.edge_groups["outline"]
    ends = mesh.p[:, mesh.facets[:, facets]]
    chords = np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0)
    turnings = [chord_angle(c, sharpest) for c in chords]  # on the comparison circle
    # Each facet taken as an arc of that circle turning through its own chord angle. For P1
    # this is a bound. For P2 it is an estimate: on an ellipse gmsh puts the mid-node at the
    # mid-parameter rather than at a circle's mid-angle.
    area_loss = sum(
        AREA_BOUND[order](sharpest, t, c) for t, c in zip(turnings, chords, strict=True)
    )
    length_loss = sum(
        LENGTH_BOUND[order](sharpest, t, c) for t, c in zip(turnings, chords, strict=True)
    )
    assert_between(perimeter - length_loss, facts.edge_lengths["outline"], perimeter, perimeter)
    assert_between(exact_area - area_loss, facts.area, exact_area, exact_area)
    assert_centroid(facts, centre, centroid_bound(area_loss, semi_x, facts.area))

    # The turn is applied: the extents of the nodes along x and y are those of the rotated
    # ellipse, sqrt(a^2 cos^2 phi + b^2 sin^2 phi) (elementary geometry), less at most the sag
    # kappa c^2 / 8 of the longest chord c between the extreme point and its nearest node.
    phi = math.radians(degrees)
    half_x = math.hypot(semi_x * math.cos(phi), semi_y * math.sin(phi))
    half_y = math.hypot(semi_x * math.sin(phi), semi_y * math.cos(phi))
    sag = chords.max() ** 2 / (8 * sharpest)
    vertices = section.vertices
    for axis, half in ((0, half_x), (1, half_y)):
        reach = np.abs(vertices[axis] - centre[axis]).max()
        assert half - sag <= reach <= half * (1 + ROUND_OFF)


def i_section_area(depth, width, web, flange, root):
    """Elementary geometry: two flanges, the web between them and four root fillets, each the
    square r^2 less a quarter disk."""
    return 2 * width * flange + (depth - 2 * flange) * web + 4 * root**2 * (1 - math.pi / 4)


I_DIMENSIONS = {"depth": 0.1, "width": 0.06, "web": 0.006, "flange": 0.01, "root": 0.008}


def i_section():
    d = I_DIMENSIONS
    return profiles.i_section(d["depth"], d["width"], d["web"], d["flange"], root_radius=d["root"])


@pytest.mark.parametrize("order", [1, 2])
def test_i_section_with_root_radii(order):
    d = I_DIMENSIONS
    section = i_section().mesh(0.003, order=order)
    facts = section.facts
    # The root fillets are concave: their chords lie in the air, so the mesh has extra area.
    chord = longest_chord(section, ["inner"])
    area_gain = AREA_BOUND[order](d["root"], 2 * math.pi, chord)
    exact_area = i_section_area(d["depth"], d["width"], d["web"], d["flange"], d["root"])
    assert_between(exact_area, facts.area, exact_area + area_gain, exact_area + area_gain)
    assert facts.edge_lengths["outer"] == pytest.approx(2 * d["width"], rel=ROUND_OFF)
    assert facts.edge_lengths["tips"] == pytest.approx(4 * d["flange"], rel=ROUND_OFF)
    # Inner faces: four flange faces (b - tw)/2 and two web faces h - 2 tf, each shortened by
    # r at its fillet ends, plus four quarter circles (elementary geometry).
    straight = 2 * (d["width"] - d["web"]) + 2 * (d["depth"] - 2 * d["flange"]) - 8 * d["root"]
    exact_inner = straight + 2 * math.pi * d["root"]
    loss = LENGTH_BOUND[order](d["root"], 2 * math.pi, chord)
    assert_between(exact_inner - loss, facts.edge_lengths["inner"], exact_inner, exact_inner)
    reach = math.hypot(d["web"] / 2 + d["root"], d["depth"] / 2 - d["flange"])
    assert_centroid(facts, (0.0, 0.0), centroid_bound(area_gain, reach, facts.area))


def test_quarter_i_section_by_symmetry():
    d = I_DIMENSIONS
    quarter = i_section().symmetry_cut((0, 0), (1, 0)).symmetry_cut((0, 0), (0, 1))
    section = quarter.mesh(0.003)
    facts = section.facts
    exact_full = i_section_area(d["depth"], d["width"], d["web"], d["flange"], d["root"])
    # The quarter holds one root fillet (a quarter turn).
    gain = p1_arc_area_bound(d["root"], math.pi / 2, longest_chord(section, ["inner"]))
    assert_between(exact_full / 4, facts.area, exact_full / 4 + gain, exact_full / 4 + gain)
    assert facts.symmetry_multiplier == 4
    # Planar: the part's volume per metre of depth is its full area times 1 m.
    assert_between(exact_full, facts.part_volume, exact_full + 4 * gain, exact_full + 4 * gain)
    # The cuts run along the web's mid-line (half the depth) and across the web (half its
    # thickness).
    symmetry = d["depth"] / 2 + d["web"] / 2
    assert facts.edge_lengths["symmetry"] == pytest.approx(symmetry, rel=ROUND_OFF)
    assert facts.edge_lengths["outer"] == pytest.approx(d["width"] / 2, rel=ROUND_OFF)
    assert facts.edge_lengths["tips"] == pytest.approx(d["flange"], rel=ROUND_OFF)


@pytest.mark.parametrize("order", [1, 2])
def test_rectangular_tube_with_outer_radius(order):
    width, height, wall, outer_radius = 0.06, 0.04, 0.004, 0.01
    inner_radius = outer_radius - wall  # the profile's documented default
    tube = profiles.rectangular_tube(width, height, wall, outer_radius=outer_radius)
    section = tube.mesh(0.002, order=order)
    facts = section.facts

    def rounded_rectangle(b, h, r):  # elementary geometry: area and perimeter
        return b * h - 4 * r**2 * (1 - math.pi / 4), 2 * (b + h) - 8 * r + 2 * math.pi * r

    outside_area, outside_length = rounded_rectangle(width, height, outer_radius)
    bore_area, bore_length = rounded_rectangle(width - 2 * wall, height - 2 * wall, inner_radius)
    outer_chord = longest_chord(section, ["outer"])
    bore_chord = longest_chord(section, ["bore"])
    loss = AREA_BOUND[order](outer_radius, 2 * math.pi, outer_chord)
    gain = AREA_BOUND[order](inner_radius, 2 * math.pi, bore_chord)
    exact_area = outside_area - bore_area
    assert_between(exact_area - loss, facts.area, exact_area + gain, exact_area + gain)
    for group, exact, radius, chord in (
        ("outer", outside_length, outer_radius, outer_chord),
        ("bore", bore_length, inner_radius, bore_chord),
    ):
        shortfall = LENGTH_BOUND[order](radius, 2 * math.pi, chord)
        assert_between(exact - shortfall, facts.edge_lengths[group], exact, exact)
    reach = math.hypot(width / 2, height / 2)
    assert_centroid(facts, (0.0, 0.0), centroid_bound(loss + gain, reach, facts.area))


# ---------------------------------------------------------------------------------------------
# Axisymmetric sections
# ---------------------------------------------------------------------------------------------


def test_axisymmetric_ring():
    inner, outer, height, foot = 0.01, 0.025, 0.03, 0.005
    ring = Rectangle(outer - inner, height, corner=(inner, foot))
    facts = Section(ring, axisymmetric=True).mesh(0.002).facts
    area = (outer - inner) * height
    centroid_r = (inner + outer) / 2
    # Pappus's centroid theorem: V = 2 pi r_c A; for this ring pi (R2^2 - R1^2) H.
    assert facts.volume == pytest.approx(2 * math.pi * centroid_r * area, rel=ROUND_OFF)
    assert facts.volume == pytest.approx(math.pi * (outer**2 - inner**2) * height, rel=ROUND_OFF)
    assert facts.region_volumes["solid"] == pytest.approx(facts.volume, rel=ROUND_OFF)
    assert facts.area == pytest.approx(area, rel=ROUND_OFF)
    assert facts.centroid == pytest.approx((centroid_r, foot + height / 2), rel=ROUND_OFF)
    # Pappus for surfaces, 2 pi r_c L for each edge: the two cylinders and two annular ends.
    expected = {
        "left": 2 * math.pi * inner * height,
        "right": 2 * math.pi * outer * height,
        "bottom": 2 * math.pi * centroid_r * (outer - inner),
        "top": 2 * math.pi * centroid_r * (outer - inner),
    }
    assert facts.surface_areas == pytest.approx(expected, rel=ROUND_OFF)
    assert facts.surface_area(["top"]) == pytest.approx(math.pi * (outer**2 - inner**2))
    assert "axis" not in facts.edge_lengths  # the ring does not reach r = 0
    assert facts.axisymmetric
    assert facts.part_volume == facts.volume


SPHERE_RADIUS = 0.015


def half_disk_outline() -> Outline:
    """The sphere's half-section as one outline: a half circle and its diameter on r = 0."""
    r = SPHERE_RADIUS
    return Outline(
        (
            EdgeArc("surface", (0.0, 0.0), r, -math.pi / 2, math.pi),
            EdgeSegment("diameter", (0.0, r), (0.0, -r)),
        )
    )


def check_sphere(facts, section):
    """Volume 4/3 pi R^3 and surface 4 pi R^2 of the sphere, within the P1 bounds."""
    r = SPHERE_RADIUS
    exact_volume = 4 / 3 * math.pi * r**3  # elementary geometry (Archimedes)
    chord = longest_chord(section, ["surface"])
    # Pappus: the area lost under the chords lies at r <= R, so it revolves to at most
    # 2 pi R times that area.
    lost_volume = 2 * math.pi * r * p1_arc_area_bound(r, math.pi, chord)
    assert_between(exact_volume - lost_volume, facts.volume, exact_volume, exact_volume)
    # A chord from latitude phi1 to phi2 revolves to a frustum 2 pi r_mid c, which is
    # 2 pi R cos(theta/2) times its height; the sphere's zone between the same latitudes is
    # 2 pi R times the height (Archimedes' hat-box theorem). Hence
    # 4 pi R^2 cos(theta_max / 2) <= S_mesh <= 4 pi R^2.
    exact_surface = 4 * math.pi * r**2
    low = exact_surface * math.cos(chord_angle(chord, r) / 2)
    assert_between(low, facts.surface_areas["surface"], exact_surface, exact_surface)
    assert facts.edge_lengths["axis"] == pytest.approx(2 * r, rel=ROUND_OFF)
    assert facts.surface_areas["axis"] == pytest.approx(0.0, abs=ROUND_OFF * exact_surface)
    return exact_volume, lost_volume


def test_axisymmetric_half_disk_is_a_sphere():
    section = Section(half_disk_outline(), axisymmetric=True).mesh(0.001)
    facts = section.facts
    exact_volume, lost_volume = check_sphere(facts, section)
    assert "diameter" not in facts.edge_lengths  # the edge on r = 0 became the axis
    assert facts.symmetry_multiplier == 1
    assert_between(exact_volume - lost_volume, facts.part_volume, exact_volume, exact_volume)


def test_axisymmetric_half_disk_by_symmetry_cut_is_one_sphere():
    half = Circle(SPHERE_RADIUS, name="surface").symmetry_cut((0.0, 0.0), (1.0, 0.0))
    section = Section(half, axisymmetric=True).mesh(0.001)
    facts = section.facts
    exact_volume, lost_volume = check_sphere(facts, section)  # the revolved half is right
    assert_between(exact_volume - lost_volume, facts.part_volume, exact_volume, exact_volume)


# ---------------------------------------------------------------------------------------------
# Convergence of the area with mesh size
# ---------------------------------------------------------------------------------------------

CONVERGENCE_SIZES = (0.001, 0.0005, 0.00025)  # m, for a disk of radius 10 mm


@pytest.fixture(scope="module")
def circle_errors():
    """Relative area and perimeter errors of a disk at each size, for P1 and P2."""
    radius = 0.01
    errors = {}
    for order in (1, 2):
        area, length = [], []
        for size in CONVERGENCE_SIZES:
            facts = Circle(radius).mesh(size, order=order).facts
            area.append(abs(facts.area / (math.pi * radius**2) - 1))  # elementary geometry
            length.append(abs(facts.edge_lengths["outline"] / (2 * math.pi * radius) - 1))
        errors[order] = (np.array(area), np.array(length))
    return errors


def observed_order(errors) -> float:
    """Least-squares slope of log(error) against log(size)."""
    slope, _ = np.polyfit(np.log(CONVERGENCE_SIZES), np.log(errors), 1)
    return float(slope)


def test_area_converges_at_second_order_for_p1(circle_errors):
    # Segment area r^2 theta^3 / 12 per chord, with theta ~ h / R: relative error theta^2 / 6.
    area, length = circle_errors[1]
    assert 1.8 <= observed_order(area) <= 2.2
    assert 1.8 <= observed_order(length) <= 2.2


def test_area_converges_at_fourth_order_for_p2(circle_errors):
    # Quadratic-arc deficit r^2 alpha^5 / 30 per edge: relative error theta^4 / 480.
    area, length = circle_errors[2]
    assert 3.5 <= observed_order(area) <= 4.5
    assert 3.5 <= observed_order(length) <= 4.5


def test_p2_is_more_accurate_than_p1_at_every_size(circle_errors):
    assert np.all(circle_errors[2][0] < circle_errors[1][0])
    assert np.all(circle_errors[2][1] < circle_errors[1][1])
