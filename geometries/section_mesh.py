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
        corners = MeshTri(self.vertices, self.mesh.t, sort_t=False)
        finder = corners.element_finder()
        centres = self.mesh.p[:, self.mesh.t].mean(axis=1)
        tree = cKDTree(centres.T)
        mapping = self.mesh.mapping()
        cells = np.empty(points.shape[1], dtype=np.int64)
        for i, (x, y) in enumerate(points.T):
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
        If a group is empty, a boundary facet belongs to no group or to more than one, a
        labelled segment is not on the boundary, a triangle has no region, or an axisymmetric
        mesh reaches x < 0.
    """
    points = np.asarray(points, dtype=float)
    triangles = np.asarray(triangles, dtype=np.int64)
    quadratic = triangles.shape[1] == 6
    corners = triangles[:, :3]
    used = np.unique(corners)
    renumber = np.full(len(points), -1, dtype=np.int64)
    renumber[used] = np.arange(len(used))
    mesh = MeshTri(
        np.ascontiguousarray(points[used].T),
        np.ascontiguousarray(renumber[corners].T),
        sort_t=False,
    )
    if axisymmetric and mesh.p[0].min() < -1e-12 * np.ptp(mesh.p):
        raise GeometryError(
            f"an axisymmetric mesh must lie in r >= 0; it reaches r = {mesh.p[0].min():.6g} m"
        )
    if quadratic:
        mesh = _quadratic(mesh, points, triangles, renumber)

    n_vertices = mesh.nvertices
    facet_key = {int(k): i for i, k in enumerate(_pair_keys(mesh.facets.T, n_vertices))}
    boundary = set(int(f) for f in mesh.boundary_facets())
    boundaries: dict[str, np.ndarray] = {}
    owner: dict[int, str] = {}
    for name, lines in edge_lines.items():
        lines = np.asarray(lines, dtype=np.int64)
        ends = renumber[lines[:, :2]] if len(lines) else np.empty((0, 2), np.int64)
        if len(ends) == 0:
            raise GeometryError(f"edge group {name!r} has no boundary segments")
        facets = np.array(
            [
                facet_key.get(int(k), -1) if min(pair) >= 0 else -1
                for k, pair in zip(_pair_keys(ends, n_vertices), ends, strict=True)
            ]
        )
        off_boundary = [int(f) for f in facets if f < 0 or int(f) not in boundary]
        if off_boundary:
            raise GeometryError(
                f"edge group {name!r} has {len(off_boundary)} segment(s) that are not on the "
                "section's outer boundary"
            )
        for f in facets:
            if int(f) in owner:
                raise GeometryError(
                    f"boundary facet at {_facet_midpoint(mesh, int(f))} m belongs to both "
                    f"{owner[int(f)]!r} and {name!r}; each boundary edge needs exactly one group"
                )
            owner[int(f)] = name
        boundaries[name] = np.sort(facets).astype(np.int64)

    unclaimed = sorted(boundary - set(owner))
    if unclaimed:
        where = ", ".join(str(_facet_midpoint(mesh, f)) for f in unclaimed[:3])
        raise GeometryError(
            f"{len(unclaimed)} boundary facet(s) belong to no edge group (first at {where} m); "
            "name every edge so none silently becomes insulated"
        )

    subdomains: dict[str, np.ndarray] = {}
    covered = np.zeros(mesh.t.shape[1], dtype=int)
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

    mesh = mesh.with_boundaries(boundaries).with_subdomains(subdomains)
    return SectionMesh(mesh=mesh, facts=_facts(mesh, axisymmetric, symmetry_multiplier))


def _quadratic(mesh: MeshTri, points, triangles, renumber) -> MeshTri2:
    """The quadratic mesh whose mid-edge nodes are the given ones (on the curved edges)."""
    middle = np.full(mesh.facets.shape[1], -1, dtype=np.int64)
    corners = renumber[triangles[:, :3]]
    t2f = mesh.t2f  # facets of each triangle: edges 0-1, 1-2, 0-2 of mesh.t
    for k, (a, b) in enumerate(((0, 1), (1, 2), (0, 2))):
        node = triangles[:, {(0, 1): 3, (1, 2): 4, (0, 2): 5}[(a, b)]]
        assert np.all(mesh.t[a] == corners[:, a]) and np.all(mesh.t[b] == corners[:, b])
        middle[t2f[k]] = node
    if np.any(middle < 0):
        raise GeometryError("a quadratic mesh has an edge without its mid-edge node")
    doflocs = np.hstack([mesh.p, points[middle].T])
    return MeshTri2(doflocs=np.ascontiguousarray(doflocs), t=mesh.t, sort_t=False)


def _pair_keys(pairs: np.ndarray, n_nodes: int) -> np.ndarray:
    pairs = np.sort(np.asarray(pairs, dtype=np.int64), axis=1)
    return pairs[:, 0] * n_nodes + pairs[:, 1]


def _facet_midpoint(mesh: MeshTri, facet: int) -> tuple[float, float]:
    x, y = mesh.p[:, mesh.facets[:, facet]].mean(axis=1)
    return (round(float(x), 6), round(float(y), 6))


def _mid_nodes(mesh: MeshTri, facets: np.ndarray) -> np.ndarray:
    """Mid-edge node coordinates of ``facets``: the curved ones of a quadratic mesh, else the
    midpoints. Shape (2, len(facets))."""
    if isinstance(mesh, MeshTri2):
        return mesh.doflocs[:, mesh.nvertices + facets]
    return mesh.p[:, mesh.facets[:, facets]].mean(axis=1)


def _facts(mesh: MeshTri, axisymmetric: bool, multiplier: int) -> SectionFacts:
    # Quadratic map of each triangle through its corners and mid-edge nodes (straight when
    # the mid-edge nodes are midpoints), integrated with a degree-4 rule: exact for the area
    # and first moments of quadratic triangles.
    x = mesh.p[:, mesh.t]  # (2, 3, m)
    mids = np.stack([_mid_nodes(mesh, mesh.t2f[k]) for k in range(3)], axis=1)  # 01, 12, 02
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
    nodes = np.concatenate([x, mids], axis=1)  # (2, 6, m)
    at = np.einsum("cnm,nq->cqm", nodes, shape)  # (2, q, m) quadrature point coordinates
    jx = np.einsum("cnm,nq->cqm", nodes, d_xi)
    jy = np.einsum("cnm,nq->cqm", nodes, d_eta)
    det = np.abs(jx[0] * jy[1] - jx[1] * jy[0])
    weight = 0.5 * _QUAD_WEIGHTS[:, None] * det  # (q, m): dA at each quadrature point
    element_area = weight.sum(axis=0)
    revolve = 2 * np.pi * at[0] if axisymmetric else np.ones_like(at[0])
    element_volume = (weight * revolve).sum(axis=0)
    area = float(element_area.sum())
    centroid = (float((weight * at[0]).sum() / area), float((weight * at[1]).sum() / area))

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
