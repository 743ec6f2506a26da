"""Plain arrays (points, triangles, labelled boundary lines, regions) made into a
:class:`~geometries.SectionMesh`, checking that the labels are complete: every boundary facet in
exactly one edge group, every triangle in exactly one region.

The facets and their incidences are built here once, with one sort, and handed to scikit-fem.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
from skfem import MeshTri, MeshTri2

from .errors import GeometryError
from .section_facts import section_facts
from .section_mesh import SectionMesh


def section_mesh_from_arrays(
    points: np.ndarray,
    triangles: np.ndarray,
    edge_lines: Mapping[str, np.ndarray],
    triangle_regions: Mapping[str, np.ndarray],
    *,
    axisymmetric: bool = False,
    symmetry_multiplier: int = 1,
) -> SectionMesh:
    """Build a :class:`SectionMesh` from plain arrays, checking that the labels are complete.

    Parameters
    ----------
    points : ndarray, shape (n, 2)
        Node coordinates in m.
    triangles : ndarray, shape (m, 3) or (m, 6)
        Node indices of each triangle: three corners, then (for quadratic triangles) the
        mid-edge nodes of edges 0–1, 1–2 and 2–0.
    edge_lines : dict of str to ndarray of shape (k, 2) or (k, 3)
        For each edge group, its boundary segments (end nodes first).
    triangle_regions : dict of str to ndarray
        For each region, the indices of its triangles.
    axisymmetric : bool
        Whether x is the radius of a solid of revolution (x >= 0 required).
    symmetry_multiplier : int
        Copies of this section that make the whole part.

    Raises
    ------
    GeometryError
        If there are no triangles, a group is empty, a boundary facet belongs to no group or to
        more than one, a labelled segment is not on the boundary, a triangle has no region, or
        an axisymmetric mesh reaches x < 0.
    """
    points = np.asarray(points, dtype=float)
    triangles = np.asarray(triangles, dtype=np.int64)
    if len(triangles) == 0:
        raise GeometryError("a section mesh needs at least one triangle, got none")
    vertices, t, renumber = _corner_vertices(points, triangles[:, :3], axisymmetric)
    topology = _Topology.of(t, vertices.shape[1])
    boundaries = _edge_group_facets(edge_lines, renumber, vertices, topology)
    subdomains = _region_elements(triangle_regions, t.shape[1])
    if not (isinstance(symmetry_multiplier, int) and symmetry_multiplier >= 1):
        raise GeometryError(
            f"symmetry_multiplier must be a whole number >= 1, got {symmetry_multiplier!r}"
        )

    middle = None
    if triangles.shape[1] == 6:  # quadratic: the mid-edge nodes follow the corners
        middle = _mid_edge_nodes(points, triangles, topology)
    mesh = scikit_mesh(vertices, t, boundaries, subdomains, middle)
    topology.attach(mesh)
    return SectionMesh(mesh=mesh, facts=section_facts(mesh, axisymmetric, symmetry_multiplier))


def _corner_vertices(
    points: np.ndarray, corners: np.ndarray, axisymmetric: bool
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The triangle corners as scikit-fem vertices (2, n) with the triangles ``t`` (3, m) on
    them, and the new index of every point (-1 for points that are no corner)."""
    used = np.zeros(len(points), dtype=bool)
    used[corners] = True
    used = np.flatnonzero(used)  # the corner nodes, ascending
    renumber = np.full(len(points), -1, dtype=np.int64)
    renumber[used] = np.arange(len(used))
    vertices = np.ascontiguousarray(points[used].T)
    t = np.ascontiguousarray(renumber[corners].T, dtype=np.int32)
    if axisymmetric and vertices[0].min() < -1e-12 * np.ptp(vertices):
        raise GeometryError(
            f"an axisymmetric mesh must lie in r >= 0; it reaches r = {vertices[0].min():.6g} m"
        )
    return vertices, t, renumber


def _edge_group_facets(
    edge_lines: Mapping[str, np.ndarray],
    renumber: np.ndarray,
    vertices: np.ndarray,
    topology: _Topology,
) -> dict[str, np.ndarray]:
    """The facet indices of every edge group, checking that each boundary facet has exactly
    one group and that every labelled segment is a boundary facet."""
    boundary = topology.f2t[1] == -1
    owner = np.full(topology.facets.shape[1], -1, dtype=np.int64)  # index into ``names``
    names = list(edge_lines)
    boundaries: dict[str, np.ndarray] = {}
    for index, name in enumerate(names):
        lines = np.asarray(edge_lines[name], dtype=np.int64)
        if len(lines) == 0:
            raise GeometryError(f"edge group {name!r} has no boundary segments")
        facets = topology.find(renumber[lines[:, :2]])
        off_boundary = int(np.sum((facets < 0) | ~boundary[facets]))
        if off_boundary:
            raise GeometryError(
                f"edge group {name!r} has {off_boundary} segment(s) that are not on the "
                "section's outer boundary"
            )
        # A facet is claimed twice when an earlier group holds it or it comes earlier in this
        # one; the first such segment is reported.
        repeated = np.ones(len(facets), dtype=bool)
        repeated[np.unique(facets, return_index=True)[1]] = False
        clash = np.flatnonzero(repeated | (owner[facets] >= 0))
        if len(clash):
            facet = int(facets[clash[0]])
            other = names[owner[facet]] if owner[facet] >= 0 else name
            raise GeometryError(
                f"boundary facet at {_facet_midpoint(vertices, topology.facets, facet)} m "
                f"belongs to both {other!r} and {name!r}; each boundary edge needs exactly one "
                "group"
            )
        owner[facets] = index
        boundaries[name] = np.sort(facets).astype(np.int64)

    unclaimed = np.flatnonzero(boundary & (owner < 0))
    if len(unclaimed):
        where = ", ".join(
            str(_facet_midpoint(vertices, topology.facets, int(f))) for f in unclaimed[:3]
        )
        raise GeometryError(
            f"{len(unclaimed)} boundary facet(s) belong to no edge group (first at {where} m); "
            "name every edge so none silently becomes insulated"
        )
    return boundaries


def _region_elements(
    triangle_regions: Mapping[str, np.ndarray], n_triangles: int
) -> dict[str, np.ndarray]:
    """The sorted triangle indices of every region, checking that each triangle has exactly
    one region."""
    subdomains: dict[str, np.ndarray] = {}
    covered = np.zeros(n_triangles, dtype=int)
    for name, elements in triangle_regions.items():
        elements = np.asarray(elements, dtype=np.int64)
        if len(elements) == 0:
            raise GeometryError(f"region {name!r} has no triangles")
        covered[elements] += 1
        subdomains[name] = np.sort(elements)
    if np.any(covered != 1):
        raise GeometryError(
            f"{int(np.sum(covered == 0))} triangle(s) have no region and "
            f"{int(np.sum(covered > 1))} have several; each triangle needs exactly one region"
        )
    return subdomains


def scikit_mesh(
    vertices: np.ndarray,
    t: np.ndarray,
    boundaries: Mapping[str, np.ndarray],
    subdomains: Mapping[str, np.ndarray],
    middle: np.ndarray | None = None,
) -> MeshTri:
    """scikit-fem's triangle mesh of ``vertices`` (2, n) and corners ``t`` (3, m) as given (not
    re-sorted), with its named facets and elements; quadratic when ``middle`` holds the
    mid-edge nodes (2, n_facets) in the mesh's facet order."""
    if middle is None:
        return MeshTri(
            vertices, t, _boundaries=dict(boundaries), _subdomains=dict(subdomains), sort_t=False
        )
    return MeshTri2(
        doflocs=np.ascontiguousarray(np.hstack([vertices, middle])),
        t=t,
        _boundaries=dict(boundaries),
        _subdomains=dict(subdomains),
        sort_t=False,
    )


def triangle_topology(t: np.ndarray, n_vertices: int) -> _Topology:
    """The facets and incidences of the triangles ``t`` (3, n_triangles), as scikit-fem
    builds them but with one sort; ``.attach(mesh)`` hands them to a mesh made from ``t``."""
    return _Topology.of(t, n_vertices)


# Local corner pairs of a triangle's facets, in scikit-fem's order (``MeshTri.t2f`` rows).
_TRIANGLE_FACETS = ((0, 1), (1, 2), (0, 2))


@dataclass(frozen=True)
class _Topology:
    """The facets of a triangulation and their incidences, built as scikit-fem builds them.

    ``facets`` (2, n_facets) holds each facet's end vertices, lower index first, the facets in
    ascending (lower, higher) order; ``t2f`` (3, n_triangles) the facets of each triangle's
    edges 0-1, 1-2, 0-2; ``f2t`` (2, n_facets) the first and last triangle using each facet
    (in the order of ``t2f`` read row by row), the second -1 on the boundary. These are
    scikit-fem's ``Mesh.facets``, ``Mesh.t2f`` and ``Mesh.f2t``, which it computes lazily by
    sorting the facets' vertex pairs as rows (``np.unique(axis=1)``, then two more
    ``np.unique`` for ``f2t``); here one stable argsort of integer keys gives all three, and
    :meth:`attach` hands them to the mesh so that neither this module nor the solver builds
    them again.
    """

    facets: np.ndarray
    t2f: np.ndarray
    f2t: np.ndarray
    keys: np.ndarray  # lower * n_vertices + higher of each facet, ascending
    n_vertices: int

    @classmethod
    def of(cls, t: np.ndarray, n_vertices: int) -> _Topology:
        """The topology of the triangles ``t`` (3, n_triangles) on ``n_vertices`` vertices."""
        n_triangles = t.shape[1]
        start = np.concatenate([t[a] for a, _ in _TRIANGLE_FACETS]).astype(np.int64)
        end = np.concatenate([t[b] for _, b in _TRIANGLE_FACETS]).astype(np.int64)
        low, high = np.minimum(start, end), np.maximum(start, end)
        keys = low * n_vertices + high
        order = np.argsort(keys, kind="stable")  # equal keys keep their t2f order
        ordered = keys[order]
        new = np.ones(len(keys), dtype=bool)
        new[1:] = ordered[1:] != ordered[:-1]
        starts = np.flatnonzero(new)
        t2f = np.empty(len(keys), dtype=np.int64)
        t2f[order] = np.cumsum(new) - 1
        head = order[starts]  # first use of each facet (k * n_triangles + triangle)
        tail = order[np.append(starts[1:], len(keys)) - 1]  # last use
        first, last = head % n_triangles, tail % n_triangles
        f2t = np.vstack([first, np.where(last == first, -1, last)])
        return cls(
            facets=np.vstack([low[head], high[head]]).astype(t.dtype),
            t2f=t2f.reshape(len(_TRIANGLE_FACETS), n_triangles),
            f2t=f2t.astype(np.int32),
            keys=ordered[starts],
            n_vertices=n_vertices,
        )

    def find(self, pairs: np.ndarray) -> np.ndarray:
        """Facet index of each vertex pair (k, 2), either order; -1 where there is none or a
        vertex is -1."""
        pairs = np.sort(pairs, axis=1)
        keys = pairs[:, 0] * self.n_vertices + pairs[:, 1]
        at = np.minimum(np.searchsorted(self.keys, keys), len(self.keys) - 1)
        found = (pairs[:, 0] >= 0) & (self.keys[at] == keys)
        return np.where(found, at, -1)

    def attach(self, mesh: MeshTri) -> None:
        """Give ``mesh`` (whose ``t`` these were built from) its facets and incidences."""
        mesh._facets, mesh._t2f, mesh._f2t = self.facets, self.t2f, self.f2t


def _mid_edge_nodes(points: np.ndarray, triangles: np.ndarray, topology: _Topology) -> np.ndarray:
    """Coordinates (2, n_facets) of each facet's mid-edge node, from quadratic ``triangles``
    (corners, then the nodes of edges 0-1, 1-2, 2-0)."""
    middle = np.full(topology.facets.shape[1], -1, dtype=np.int64)
    for k, column in enumerate((3, 4, 5)):  # the nodes of edges 0-1, 1-2, 0-2
        middle[topology.t2f[k]] = triangles[:, column]
    if np.any(middle < 0):
        raise GeometryError("a quadratic mesh has an edge without its mid-edge node")
    return points[middle].T


def _facet_midpoint(vertices: np.ndarray, facets: np.ndarray, facet: int) -> tuple[float, float]:
    x, y = vertices[:, facets[:, facet]].mean(axis=1)
    return (round(float(x), 6), round(float(y), 6))
