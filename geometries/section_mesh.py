"""The meshed section handed to the solver: a scikit-fem mesh, named edge groups and regions,
and the geometric facts the advisor needs."""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass

import numpy as np
from scipy.spatial import cKDTree
from skfem import MeshTri

from .errors import GeometryError


@dataclass(frozen=True)
class SectionFacts:
    """Geometric facts of a planar section, per metre of depth.

    Attributes
    ----------
    area : float
        Cross-section area in m² (volume per metre of depth, m³/m).
    centroid : tuple of float
        Area centroid (x, y) in m.
    edge_lengths : dict of str to float
        Length of each edge group in m (surface area per metre of depth, m²/m).
    region_areas : dict of str to float
        Area of each region in m².
    """

    area: float
    centroid: tuple[float, float]
    edge_lengths: dict[str, float]
    region_areas: dict[str, float]

    def perimeter(self, groups: Iterable[str] | None = None) -> float:
        """Total length in m of the named edge groups (all groups when ``None``)."""
        names = self.edge_lengths if groups is None else list(groups)
        return float(sum(self.edge_lengths[name] for name in names))


@dataclass(frozen=True)
class SectionMesh:
    """A triangulated section with named edge groups and regions.

    Attributes
    ----------
    mesh : skfem.MeshTri
        The triangulation (coordinates in m). ``mesh.boundaries`` holds the facet indices of
        every edge group, ``mesh.subdomains`` the element indices of every region.
    facts : SectionFacts
        Area, centroid, edge lengths and region areas.
    """

    mesh: MeshTri
    facts: SectionFacts

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

    def max_distance_to(self, groups: Iterable[str]) -> float:
        """The largest distance in m from any mesh node to the nearest edge of ``groups``.

        This is the maximum conduction distance when ``groups`` are the edges that exchange
        heat. It is evaluated at the mesh nodes, so it may fall short by up to about one
        element size.
        """
        groups = list(groups)
        self.check_edge_groups(groups)
        if not groups:
            raise GeometryError("max_distance_to needs at least one edge group")
        facets = np.concatenate([self.mesh.boundaries[g] for g in groups])
        ends = self.mesh.p[:, self.mesh.facets[:, facets]]  # (2, 2, n): coordinate, end, facet
        fractions = np.linspace(0.0, 1.0, 5)
        samples = (
            ends[:, 0, None, :] + fractions[None, :, None] * (ends[:, 1] - ends[:, 0])[:, None, :]
        )
        tree = cKDTree(samples.reshape(2, -1).T)
        distance, _ = tree.query(self.mesh.p.T)
        return float(distance.max())


def section_mesh_from_arrays(
    points: np.ndarray,
    triangles: np.ndarray,
    edge_lines: Mapping[str, np.ndarray],
    triangle_regions: Mapping[str, np.ndarray],
) -> SectionMesh:
    """Build a :class:`SectionMesh` from plain arrays, checking that the labels are complete.

    Parameters
    ----------
    points : ndarray, shape (n, 2)
        Node coordinates in m.
    triangles : ndarray, shape (m, 3)
        Node indices of each triangle.
    edge_lines : dict of str to ndarray of shape (k, 2)
        For each edge group, the node pairs of its boundary segments.
    triangle_regions : dict of str to ndarray
        For each region, the indices of its triangles.

    Raises
    ------
    GeometryError
        If a group is empty, a boundary facet belongs to no group or to more than one, a
        labelled segment is not on the boundary, or a triangle has no region.
    """
    mesh = MeshTri(np.ascontiguousarray(points.T, dtype=float), np.ascontiguousarray(triangles.T))
    n_nodes = mesh.p.shape[1]
    facet_key = {int(k): i for i, k in enumerate(_pair_keys(mesh.facets.T, n_nodes))}
    boundary = set(int(f) for f in mesh.boundary_facets())

    boundaries: dict[str, np.ndarray] = {}
    owner: dict[int, str] = {}
    for name, lines in edge_lines.items():
        lines = np.asarray(lines).reshape(-1, 2)
        if len(lines) == 0:
            raise GeometryError(f"edge group {name!r} has no boundary segments")
        facets = np.array([facet_key.get(int(k), -1) for k in _pair_keys(lines, n_nodes)])
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

    mesh = mesh.with_boundaries(boundaries).with_subdomains(subdomains)
    return SectionMesh(mesh=mesh, facts=_facts(mesh))


def _pair_keys(pairs: np.ndarray, n_nodes: int) -> np.ndarray:
    pairs = np.sort(np.asarray(pairs, dtype=np.int64), axis=1)
    return pairs[:, 0] * n_nodes + pairs[:, 1]


def _facet_midpoint(mesh: MeshTri, facet: int) -> tuple[float, float]:
    x, y = mesh.p[:, mesh.facets[:, facet]].mean(axis=1)
    return (round(float(x), 6), round(float(y), 6))


def _facts(mesh: MeshTri) -> SectionFacts:
    corners = mesh.p[:, mesh.t]  # (2, 3, m)
    e1 = corners[:, 1] - corners[:, 0]
    e2 = corners[:, 2] - corners[:, 0]
    areas = 0.5 * np.abs(e1[0] * e2[1] - e1[1] * e2[0])
    centres = corners.mean(axis=1)
    area = float(areas.sum())
    centroid = (float(centres[0] @ areas / area), float(centres[1] @ areas / area))
    facet_lengths = np.linalg.norm(mesh.p[:, mesh.facets[0]] - mesh.p[:, mesh.facets[1]], axis=0)
    return SectionFacts(
        area=area,
        centroid=centroid,
        edge_lengths={n: float(facet_lengths[f].sum()) for n, f in mesh.boundaries.items()},
        region_areas={n: float(areas[e].sum()) for n, e in mesh.subdomains.items()},
    )
