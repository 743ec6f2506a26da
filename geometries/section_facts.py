"""The geometric facts of a section mesh, integrated on the mesh itself: areas, volumes,
centroid, edge lengths and surface areas (curved edges of quadratic meshes included)."""

from __future__ import annotations

import numpy as np
from skfem import MeshTri, MeshTri2

from .section_mesh import SectionFacts

# Degree-4 rule on the reference triangle (Dunavant 1985, 6 points; weights sum to 1).
_A, _B = 0.445948490915965, 0.091576213509771
_QUAD_POINTS = np.array(
    [[_A, _A], [1 - 2 * _A, _A], [_A, 1 - 2 * _A], [_B, _B], [1 - 2 * _B, _B], [_B, 1 - 2 * _B]]
)
_QUAD_WEIGHTS = np.array([0.223381589678011] * 3 + [0.109951743655322] * 3)
# Gauss–Legendre on [0, 1] for edges.
_GL_X, _GL_W = np.polynomial.legendre.leggauss(6)
_GL_X, _GL_W = 0.5 * (_GL_X + 1), 0.5 * _GL_W


def section_facts(mesh: MeshTri, axisymmetric: bool, multiplier: int) -> SectionFacts:
    """The facts of ``mesh`` (boundaries and subdomains set), planar per metre of depth or
    revolved about x = 0; ``multiplier`` copies make the whole part."""
    element_area, moments = _element_integrals(mesh)
    element_volume = 2 * np.pi * moments[0] if axisymmetric else element_area
    area = float(element_area.sum())
    centroid = (float(moments[0].sum() / area), float(moments[1].sum() / area))
    lengths, surfaces = _edge_integrals(mesh, axisymmetric)
    return SectionFacts(
        area=area,
        centroid=centroid,
        edge_lengths=lengths,
        region_areas={n: float(element_area[e].sum()) for n, e in mesh.subdomains.items()},
        volume=float(element_volume.sum()),
        surface_areas=surfaces,
        region_volumes={n: float(element_volume[e].sum()) for n, e in mesh.subdomains.items()},
        axisymmetric=axisymmetric,
        symmetry_multiplier=multiplier,
    )


def _element_integrals(mesh: MeshTri) -> tuple[np.ndarray, np.ndarray]:
    """Area (m,) in m² and first moments (2, m) in m³ of every triangle."""
    x = mesh.p[:, mesh.t]  # (2, 3, m)
    if isinstance(mesh, MeshTri2):
        return _curved_integrals(x, mesh.doflocs[:, mesh.nvertices + mesh.t2f])
    # Straight triangles: the area is half the cross product of two sides and the first
    # moments are the area times the mean of the corners, exactly what the quadratic map
    # and degree-4 rule of ``_curved_integrals`` give for them (to round-off), with a
    # quarter of the temporary arrays.
    d1, d2 = x[:, 1] - x[:, 0], x[:, 2] - x[:, 0]
    element_area = 0.5 * np.abs(d1[0] * d2[1] - d1[1] * d2[0])
    return element_area, element_area * x.mean(axis=1)


def _edge_integrals(
    mesh: MeshTri, axisymmetric: bool
) -> tuple[dict[str, float], dict[str, float]]:
    """Length (m) and surface area (m², planar per metre of depth) of every edge group, each
    facet integrated along its quadratic curve through its mid-edge node."""
    lengths, surfaces = {}, {}
    for name, facets in mesh.boundaries.items():
        a, b = mesh.p[:, mesh.facets[0, facets]], mesh.p[:, mesh.facets[1, facets]]
        m = _mid_nodes(mesh, facets)
        s = _GL_X[:, None]
        position = (
            a[:, None] * (1 - s) * (1 - 2 * s)
            + b[:, None] * s * (2 * s - 1)
            + m[:, None] * 4 * s * (1 - s)
        )
        tangent = a[:, None] * (4 * s - 3) + b[:, None] * (4 * s - 1) + m[:, None] * (4 - 8 * s)
        ds = _GL_W[:, None] * np.hypot(tangent[0], tangent[1])
        lengths[name] = float(ds.sum())
        radius = np.maximum(position[0], 0.0)  # r ≈ −1e−19 on the axis
        surfaces[name] = float((ds * (2 * np.pi * radius if axisymmetric else 1.0)).sum())
    return lengths, surfaces


def _mid_nodes(mesh: MeshTri, facets: np.ndarray) -> np.ndarray:
    """Mid-edge node coordinates of ``facets``: the curved ones of a quadratic mesh, else the
    midpoints. Shape (2, len(facets))."""
    if isinstance(mesh, MeshTri2):
        return mesh.doflocs[:, mesh.nvertices + facets]
    return mesh.p[:, mesh.facets[:, facets]].mean(axis=1)


def _curved_integrals(corners: np.ndarray, mids: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Area (m,) and first moments (2, m) of quadratic triangles from their corners and the
    mid-edge nodes of edges 01, 12, 02 (each (2, 3, m), m).

    The quadratic map of each triangle through its six nodes is integrated with a degree-4
    rule: exact for the area and first moments of quadratic triangles.
    """
    xi, eta = _QUAD_POINTS[:, 0], _QUAD_POINTS[:, 1]
    l0, l1, l2 = 1 - xi - eta, xi, eta
    shape = np.array(
        [
            l0 * (2 * l0 - 1),
            l1 * (2 * l1 - 1),
            l2 * (2 * l2 - 1),
            4 * l0 * l1,
            4 * l1 * l2,
            4 * l0 * l2,
        ]
    )  # (6, q)
    d_xi = np.array([1 - 4 * l0, 4 * l1 - 1, 0 * xi, 4 * (l0 - l1), 4 * l2, -4 * l2])
    d_eta = np.array([1 - 4 * l0, 0 * xi, 4 * l2 - 1, -4 * l1, 4 * l1, 4 * (l0 - l2)])
    nodes = np.concatenate([corners, mids], axis=1)  # (2, 6, m)
    # (3q, 6) @ (2, 6, m): one small matrix product per coordinate gives the quadrature
    # points and both columns of the Jacobian, each (2, q, m).
    at, jx, jy = np.split(np.vstack([shape.T, d_xi.T, d_eta.T]) @ nodes, 3, axis=1)
    det = np.abs(jx[0] * jy[1] - jx[1] * jy[0])
    weight = 0.5 * _QUAD_WEIGHTS[:, None] * det  # (q, m): dA at each quadrature point
    return weight.sum(axis=0), (weight * at).sum(axis=1)
