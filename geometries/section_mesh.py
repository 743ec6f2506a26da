"""The meshed section handed to the solver: a scikit-fem mesh, named edge groups and regions,
and the geometric facts the advisor needs."""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass

import numpy as np
from scipy.spatial import cKDTree
from skfem import MeshTri, MeshTri2

from .errors import GeometryError

# Degree-4 rule on the reference triangle (Dunavant 1985, 6 points; weights sum to 1).
_A, _B = 0.445948490915965, 0.091576213509771
FEW_POINTS = 32  # up to this many points are located without building a search tree
_QUAD_POINTS = np.array(
    [[_A, _A], [1 - 2 * _A, _A], [_A, 1 - 2 * _A], [_B, _B], [1 - 2 * _B, _B], [_B, 1 - 2 * _B]]
)
_QUAD_WEIGHTS = np.array([0.223381589678011] * 3 + [0.109951743655322] * 3)
# Gauss–Legendre on [0, 1] for edges.
_GL_X, _GL_W = np.polynomial.legendre.leggauss(6)
_GL_X, _GL_W = 0.5 * (_GL_X + 1), 0.5 * _GL_W


@dataclass(frozen=True)
class SectionFacts:
    """Geometric facts of the modelled section (computed on the mesh, curved edges included).

    Planar sections are per metre of depth: ``volume`` is the area times 1 m and each
    ``surface_areas`` entry the edge length times 1 m. Axisymmetric sections report the solid
    of revolution: ``volume`` = 2π∫r dA and surface areas 2π∫r ds.

    Attributes
    ----------
    area : float
        Area of the (half-)section in m².
    centroid : tuple of float
        Area centroid (x, y) in m.
    edge_lengths : dict of str to float
        Length of each edge group in m.
    region_areas : dict of str to float
        Area of each region in m².
    volume : float
        Volume in m³ (planar: m³ per m of depth).
    surface_areas : dict of str to float
        Surface area of each edge group in m² (planar: m² per m of depth).
    region_volumes : dict of str to float
        Volume of each region in m³ (planar: per m of depth).
    axisymmetric : bool
        Whether the section is revolved about x = 0.
    symmetry_multiplier : int
        How many copies of the modelled section make the whole part (2 per symmetry cut).
    """

    area: float
    centroid: tuple[float, float]
    edge_lengths: dict[str, float]
    region_areas: dict[str, float]
    volume: float
    surface_areas: dict[str, float]
    region_volumes: dict[str, float]
    axisymmetric: bool = False
    symmetry_multiplier: int = 1

    def perimeter(self, groups: Iterable[str] | None = None) -> float:
        """Total length in m of the named edge groups (all groups when ``None``)."""
        names = self.edge_lengths if groups is None else list(groups)
        return float(sum(self.edge_lengths[name] for name in names))

    def surface_area(self, groups: Iterable[str] | None = None) -> float:
        """Total surface area in m² of the named edge groups (all when ``None``)."""
        names = self.surface_areas if groups is None else list(groups)
        return float(sum(self.surface_areas[name] for name in names))

    @property
    def part_volume(self) -> float:
        """Volume of the whole part, symmetric copies included, in m³ (planar: per m)."""
        return self.volume * self.symmetry_multiplier

    def part_surface_area(self, groups: Iterable[str] | None = None) -> float:
        """Surface area of the named groups over the whole part, in m² (planar: per m)."""
        return self.surface_area(groups) * self.symmetry_multiplier


@dataclass(frozen=True)
class SectionMesh:
    """A triangulated section with named edge groups and regions.

    Attributes
    ----------
    mesh : skfem.MeshTri or skfem.MeshTri2
        The triangulation (coordinates in m; quadratic triangles follow curved edges).
        ``mesh.boundaries`` holds the facet indices of every edge group, ``mesh.subdomains``
        the element indices of every region. The first ``mesh.nvertices`` columns of
        ``mesh.p`` are the triangle corners.
    facts : SectionFacts
        Area, volume, centroid, edge lengths, surface areas, region sizes.
    """

    mesh: MeshTri
    facts: SectionFacts

    @property
    def axisymmetric(self) -> bool:
        return self.facts.axisymmetric

    @property
    def vertices(self) -> np.ndarray:
        """Triangle corner coordinates, shape (2, n_vertices), m."""
        return self.mesh.p[:, : self.mesh.nvertices]

    @property
    def edge_groups(self) -> dict[str, np.ndarray]:
        """Facet indices of each edge group."""
        return dict(self.mesh.boundaries)

    @property
    def regions(self) -> dict[str, np.ndarray]:
        """Element indices of each region."""
        return dict(self.mesh.subdomains)

    def check_edge_groups(self, names: Iterable[str]) -> None:
        """Raise :class:`GeometryError` unless every name is an edge group of this section."""
        unknown = sorted(set(names) - set(self.mesh.boundaries))
        if unknown:
            raise GeometryError(
                f"edge group(s) {unknown} are not in the section; "
                f"its edge groups are {sorted(self.mesh.boundaries)}"
            )

    def locate(self, points: np.ndarray) -> np.ndarray:
        """Index of the triangle that contains each of the (2, n) ``points`` (m).

        Curved triangles of quadratic meshes are searched by inverting their mapping, so a
        point between a curved edge and its chord is found too.

        Raises
        ------
        GeometryError
            Naming the first point that lies outside the section.
        """
        points = np.asarray(points, dtype=float).reshape(2, -1)
        cells = np.full(points.shape[1], -1, dtype=np.int64)
        if points.shape[1] <= FEW_POINTS:  # a few probes: one pass over the triangles each
            for i, point in enumerate(points.T):
                cells[i] = self._straight_triangle_of(point)
        if np.any(cells < 0):
            finder = MeshTri(self.vertices, self.mesh.t, sort_t=False).element_finder()
            centres = self.mesh.p[:, self.mesh.t].mean(axis=1)
            tree = cKDTree(centres.T)
            mapping = self.mesh.mapping()
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

    def _straight_triangle_of(self, point: np.ndarray) -> int:
        """The first triangle whose corners enclose ``point`` (barycentric coordinates ≥
        −1e-12), or −1."""
        t = self.mesh.t[:3]
        a, b, c = (self.vertices[:, t[k]] for k in range(3))
        area = (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])
        u = ((b[0] - point[0]) * (c[1] - point[1]) - (b[1] - point[1]) * (c[0] - point[0])) / area
        v = ((c[0] - point[0]) * (a[1] - point[1]) - (c[1] - point[1]) * (a[0] - point[0])) / area
        inside = np.flatnonzero((u >= -1e-12) & (v >= -1e-12) & (1.0 - u - v >= -1e-12))
        return int(inside[0]) if inside.size else -1

    def max_distance_to(self, groups: Iterable[str]) -> float:
        """The largest distance in m from the section to the nearest edge of ``groups``.

        This is the maximum conduction distance when ``groups`` are the edges that exchange
        heat. It is evaluated at the mesh nodes and element centres against the edges sampled
        at a quarter of their length, so it is accurate to a fraction of the element size.
        """
        groups = list(groups)
        if not groups:
            raise GeometryError("max_distance_to needs at least one edge group")
        self.check_edge_groups(groups)
        mesh = self.mesh
        facets = np.concatenate([mesh.boundaries[g] for g in groups])
        ends = mesh.p[:, mesh.facets[:, facets]]  # (2, 2, n): coordinate, end, facet
        fractions = np.linspace(0.0, 1.0, 5)[None, :, None]
        samples = ends[:, 0, None, :] + fractions * (ends[:, 1] - ends[:, 0])[:, None, :]
        tree = cKDTree(samples.reshape(2, -1).T)
        centres = mesh.p[:, mesh.t].mean(axis=1)
        distance, _ = tree.query(np.hstack([mesh.p, centres]).T)
        return float(distance.max())


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
    quadratic = triangles.shape[1] == 6
    corners = triangles[:, :3]
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
    topology = _Topology.of(t, len(used))

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

    subdomains: dict[str, np.ndarray] = {}
    covered = np.zeros(t.shape[1], dtype=int)
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
    if not (isinstance(symmetry_multiplier, int) and symmetry_multiplier >= 1):
        raise GeometryError(
            f"symmetry_multiplier must be a whole number >= 1, got {symmetry_multiplier!r}"
        )

    if quadratic:
        doflocs = np.hstack([vertices, _mid_edge_nodes(points, triangles, topology)])
        mesh = MeshTri2(
            doflocs=np.ascontiguousarray(doflocs),
            t=t,
            _boundaries=boundaries,
            _subdomains=subdomains,
            sort_t=False,
        )
    else:
        mesh = MeshTri(vertices, t, _boundaries=boundaries, _subdomains=subdomains, sort_t=False)
    topology.attach(mesh)
    return SectionMesh(mesh=mesh, facts=_facts(mesh, axisymmetric, symmetry_multiplier))


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


def _facts(mesh: MeshTri, axisymmetric: bool, multiplier: int) -> SectionFacts:
    x = mesh.p[:, mesh.t]  # (2, 3, m)
    if isinstance(mesh, MeshTri2):
        element_area, moments = _curved_integrals(x, mesh.doflocs[:, mesh.nvertices + mesh.t2f])
    else:
        # Straight triangles: the area is half the cross product of two sides and the first
        # moments are the area times the mean of the corners, exactly what the quadratic map
        # and degree-4 rule of ``_curved_integrals`` give for them (to round-off), with a
        # quarter of the temporary arrays.
        d1, d2 = x[:, 1] - x[:, 0], x[:, 2] - x[:, 0]
        element_area = 0.5 * np.abs(d1[0] * d2[1] - d1[1] * d2[0])
        moments = element_area * x.mean(axis=1)
    element_volume = 2 * np.pi * moments[0] if axisymmetric else element_area
    area = float(element_area.sum())
    centroid = (float(moments[0].sum() / area), float(moments[1].sum() / area))

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
