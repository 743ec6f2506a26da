"""Searching a section mesh: the triangle that holds a point (curved triangles included) and
the largest distance from the section to a set of boundary edges."""

from __future__ import annotations

import numpy as np
from scipy.spatial import cKDTree
from skfem import MeshTri

from .errors import GeometryError

FEW_POINTS = 32  # up to this many points are located without building a search tree


def locate(mesh: MeshTri, points: np.ndarray) -> np.ndarray:
    """Index of the triangle of ``mesh`` that contains each of the (2, n) ``points`` (m).

    Curved triangles of quadratic meshes are searched by inverting their mapping, so a
    point between a curved edge and its chord is found too.

    Raises
    ------
    GeometryError
        Naming the first point that lies outside the section.
    """
    points = np.asarray(points, dtype=float).reshape(2, -1)
    vertices = mesh.p[:, : mesh.nvertices]
    cells = np.full(points.shape[1], -1, dtype=np.int64)
    if points.shape[1] <= FEW_POINTS:  # a few probes: one pass over the triangles each
        for i, point in enumerate(points.T):
            cells[i] = _straight_triangle_of(mesh, vertices, point)
    if np.any(cells < 0):
        finder = MeshTri(vertices, mesh.t, sort_t=False).element_finder()
        centres = mesh.p[:, mesh.t].mean(axis=1)
        tree = cKDTree(centres.T)
        mapping = mesh.mapping()
    for i, (x, y) in enumerate(points.T):
        if cells[i] >= 0:
            continue
        try:
            cells[i] = finder(np.array([x]), np.array([y]))[0]
            continue
        except ValueError:
            pass
        _, nearby = tree.query([x, y], k=min(8, len(centres.T)))
        for cell in np.atleast_1d(nearby):
            ref = mapping.invF(np.array([[[x]], [[y]]]), tind=np.array([cell]))[:, 0, 0]
            if ref.min() >= -1e-9 and ref.sum() <= 1 + 1e-9:
                cells[i] = cell
                break
        else:
            raise GeometryError(f"the point ({x:.6g}, {y:.6g}) m lies outside the section")
    return cells


def _straight_triangle_of(mesh: MeshTri, vertices: np.ndarray, point: np.ndarray) -> int:
    """The first triangle whose corners enclose ``point`` (barycentric coordinates ≥
    −1e-12), or −1."""
    t = mesh.t[:3]
    a, b, c = (vertices[:, t[k]] for k in range(3))
    area = (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])
    u = ((b[0] - point[0]) * (c[1] - point[1]) - (b[1] - point[1]) * (c[0] - point[0])) / area
    v = ((c[0] - point[0]) * (a[1] - point[1]) - (c[1] - point[1]) * (a[0] - point[0])) / area
    inside = np.flatnonzero((u >= -1e-12) & (v >= -1e-12) & (1.0 - u - v >= -1e-12))
    return int(inside[0]) if inside.size else -1


def max_distance_to_facets(mesh: MeshTri, facets: np.ndarray) -> float:
    """The largest distance in m from the nodes and element centres of ``mesh`` to the nearest
    of the boundary ``facets``, each sampled at a quarter of its length."""
    ends = mesh.p[:, mesh.facets[:, facets]]  # (2, 2, n): coordinate, end, facet
    fractions = np.linspace(0.0, 1.0, 5)[None, :, None]
    samples = ends[:, 0, None, :] + fractions * (ends[:, 1] - ends[:, 0])[:, None, :]
    tree = cKDTree(samples.reshape(2, -1).T)
    centres = mesh.p[:, mesh.t].mean(axis=1)
    distance, _ = tree.query(np.hstack([mesh.p, centres]).T)
    return float(distance.max())
