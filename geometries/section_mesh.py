"""The meshed section handed to the solver: a scikit-fem mesh, named edge groups and regions,
and the geometric facts the advisor needs.

These are plain frozen dataclasses: building one from arrays is
:mod:`geometries.mesh_arrays`, computing its facts :mod:`geometries.section_facts`, searching
it :mod:`geometries.point_location` (which loads scipy's search tree on first use).
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from .errors import GeometryError

if TYPE_CHECKING:
    from skfem import MeshTri


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
        from .point_location import locate  # scipy's search tree, loaded when first needed

        return locate(self.mesh, points)

    def max_distance_to(self, groups: Iterable[str]) -> float:
        """The largest distance in m from the section to the nearest edge of ``groups``.

        This is the maximum conduction distance when ``groups`` are the edges that exchange
        heat. It is evaluated at the mesh nodes and element centres against the edges sampled
        at a quarter of their length, so it is accurate to a fraction of the element size.
        """
        from .point_location import max_distance_to_facets

        groups = list(groups)
        if not groups:
            raise GeometryError("max_distance_to needs at least one edge group")
        self.check_edge_groups(groups)
        facets = np.concatenate([self.mesh.boundaries[g] for g in groups])
        return max_distance_to_facets(self.mesh, facets)
