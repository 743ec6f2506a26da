"""Nested symmetry cuts: a quarter of a disk cut in either order has the quarter's bounds and area.

The expected values come from elementary geometry: the quarter of a disk of radius r is the
square [0, r] x [0, r] at its extremes and has area pi r^2 / 4. A P1 mesh replaces the arc by
chords whose end nodes lie on it; each chord subtending an angle theta at the centre cuts off the
circular segment r^2 (theta - sin theta) / 2 (elementary geometry), so the mesh area is
pi r^2 / 4 minus the sum of those segments, to round-off.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from geometries import Circle, Ellipse, Section

RADIUS = 0.02  # m
ROUND_OFF = 1e-12
HORIZONTAL = ((0.0, 0.0), (1.0, 0.0))  # keep x >= 0
VERTICAL = ((0.0, 0.0), (0.0, 1.0))  # keep y >= 0


def quarter(first, second):
    return Circle(RADIUS, name="surface").symmetry_cut(*first).symmetry_cut(*second)


@pytest.mark.parametrize("order", [(HORIZONTAL, VERTICAL), (VERTICAL, HORIZONTAL)])
def test_nested_cuts_bound_the_quarter(order):
    bounds = quarter(*order).bounds()
    assert bounds == pytest.approx((0.0, 0.0, RADIUS, RADIUS), abs=ROUND_OFF * RADIUS)


@pytest.mark.parametrize("order", [(HORIZONTAL, VERTICAL), (VERTICAL, HORIZONTAL)])
def test_nested_cuts_mesh_the_quarter(order):
    section = quarter(*order).mesh(RADIUS / 10)
    mesh = section.mesh
    facets = section.edge_groups["surface"]
    ends = mesh.p[:, mesh.facets[:, facets]]
    assert np.allclose(np.hypot(*ends[:, 0]), RADIUS, rtol=1e-9)  # nodes on the arc
    chords = np.linalg.norm(ends[:, 0] - ends[:, 1], axis=0)
    theta = 2 * np.arcsin(chords / (2 * RADIUS))
    assert theta.sum() == pytest.approx(math.pi / 2, rel=1e-9)  # the arc is a quarter turn
    segments = float(np.sum(RADIUS**2 * (theta - np.sin(theta)) / 2))
    exact = math.pi * RADIUS**2 / 4
    assert section.facts.area == pytest.approx(exact - segments, rel=1e-10)
    assert section.facts.symmetry_multiplier == 4
    assert section.facts.edge_lengths["symmetry"] == pytest.approx(2 * RADIUS, rel=1e-12)


def test_nested_cuts_are_a_valid_axisymmetric_section():
    # The quarter lies in r >= 0, so it is accepted as an r-z section (a half sphere cut at
    # its equator); before the fix the bounds reached r = -0.0198 m and it was refused.
    section = Section(quarter(HORIZONTAL, VERTICAL), axisymmetric=True)
    assert section.shape.bounds()[0] == pytest.approx(0.0, abs=ROUND_OFF)
    groups = section.boundary_groups()
    assert "surface" in groups


def test_ellipse_bounds_are_its_extremes():
    # A turned ellipse reaches x = +-sqrt((a cos phi)^2 + (b sin phi)^2) (elementary geometry).
    a, b, phi = 0.03, 0.01, math.radians(30)
    x_max = math.hypot(a * math.cos(phi), b * math.sin(phi))
    y_max = math.hypot(a * math.sin(phi), b * math.cos(phi))
    bounds = Ellipse(a, b, degrees=30).bounds()
    assert bounds == pytest.approx((-x_max, -y_max, x_max, y_max), abs=ROUND_OFF)
