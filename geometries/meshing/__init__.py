"""Meshing a section with gmsh: the one gateway from a :class:`~geometries.Section` to a
:class:`~geometries.SectionMesh`.

Every gmsh call of the project lives in this package, and only this package imports gmsh;
the rest of :mod:`geometries` reaches it on call, so importing :mod:`geometries` does
not load gmsh. Its rooms:

- :mod:`.session`: the lock and start/finalise guard around gmsh's global state;
- :mod:`.occ_geometry`: shape trees built in the OCC kernel, booleans included;
- :mod:`.edge_naming`: edge groups assigned *after* the booleans, every curve matched;
- :mod:`.sizes`: the triangle-count estimate and limit, global, curvature and ramp sizes;
- :mod:`.readback`: the finished mesh read back into a :class:`~geometries.SectionMesh`.
"""

from __future__ import annotations

import gmsh

from ..errors import GeometryError
from ..mesh_options import DEFAULT_MAX_ELEMENTS, check_mesh_options
from ..section import Section
from ..section_mesh import SectionMesh
from ..shape_tree import Shape
from .edge_naming import name_curves
from .occ_geometry import build_regions
from .readback import read_mesh
from .session import gmsh_session
from .sizes import check_element_count, set_sizes

# Frontal-Delaunay's cost per triangle grows with the count (23 us at 100k, 39 us at 1M), while
# splitting every triangle into four similar ones (gmsh's refine, new boundary nodes put on the
# true curves) is cheap and keeps the element shapes. A request estimated above this count is
# therefore meshed at 2^k times the size and split k times, the fewest splits that bring the
# coarse mesh to this count or below. Measured on a 50 mm square (gmsh 4.15, one core) at 1M
# triangles: 1 split, 9 s in gmsh instead of 39 s, 1.001 times the estimate, radius ratio min
# 0.71, mean 0.9993 (2 splits: 4 s, min 0.76, mean 0.998). Curvature sizes stay as requested
# on the coarse mesh, so split curved edges have twice the requested elements per turn rather
# than coarser chords.
_SPLIT_ABOVE = 250_000


def mesh_section(
    section: Section | Shape,
    size: float,
    *,
    order: int = 1,
    refine: dict[str, tuple[float, float]] | None = None,
    max_elements: int = DEFAULT_MAX_ELEMENTS,
    curvature_elements: int = 12,
) -> SectionMesh:
    """Mesh a section into triangles with gmsh.

    Parameters
    ----------
    section : Section or Shape
        What to mesh (a bare shape is a planar section).
    size : float
        Largest element size in m; > 0 and not above the section's extent.
    order : int
        1 for straight-sided triangles, 2 for quadratic ones that follow curved edges.
    refine : dict of str to (float, float), optional
        Per edge group, ``(size, growth)``: element size in m at the group's edges and how fast
        it grows with distance from them (1.2 means each element about 20 % larger than the
        one before), up to ``size``.
    max_elements : int
        Refuse, before meshing, a request whose estimated triangle count exceeds this.
    curvature_elements : int
        Elements at least per full turn of a curved edge (0 to switch off).

    Returns
    -------
    SectionMesh

    Notes
    -----
    gmsh's Frontal-Delaunay algorithm makes the triangles. A request estimated above 250,000
    triangles is meshed at 2^k times ``size`` (and the ``refine`` sizes) and every triangle
    is then split into four, k times, the fewest splits that bring the first mesh to 250,000
    triangles or below; the new edge nodes lie on the true edges. Element sizes, counts and
    shapes stay those of a direct mesh, in a fraction of the time; curved edges limited by
    ``curvature_elements`` end up with twice that many elements per turn.

    Examples
    --------
    >>> from geometries import Rectangle
    >>> plate = Rectangle(0.04, 0.02)
    >>> mesh = plate.mesh(size=0.005)
    >>> sorted(mesh.edge_groups)
    ['bottom', 'left', 'right', 'top']
    >>> round(mesh.facts.area * 1e6, 6)  # mm²
    800.0
    """
    if not isinstance(section, Section):
        section = Section(section)
    shape = section.shape
    check_mesh_options(
        shape,
        size,
        order=order,
        refine=refine,
        max_elements=max_elements,
        curvature_elements=curvature_elements,
    )

    with gmsh_session():
        regions = build_regions(shape)
        gmsh.model.occ.synchronize()
        curve_groups = name_curves(section, regions)
        unknown = sorted(set(refine or {}) - set(curve_groups))
        if unknown:
            raise GeometryError(
                f"refine names edge group(s) {unknown} that the section does not have; its "
                f"groups are {sorted(curve_groups)}"
            )
        estimate = check_element_count(regions, curve_groups, size, refine or {}, max_elements)
        splits = _splits(estimate)
        set_sizes(size, curve_groups, refine or {}, curvature_elements, 2**splits)
        gmsh.model.mesh.generate(2)
        for _ in range(splits):
            gmsh.model.mesh.refine()
        if order == 2:
            gmsh.model.mesh.setOrder(2)
        return read_mesh(
            curve_groups,
            regions,
            order,
            section.axisymmetric,
            shape.symmetry_multiplier(axisymmetric=section.axisymmetric),
        )


def boundary_groups(section: Section | Shape) -> set[str]:
    """The edge groups the section's boundary will have, found by building its geometry
    (booleans included) without meshing it: edges that end up inside the part are absent."""
    if not isinstance(section, Section):
        section = Section(section)
    with gmsh_session():
        regions = build_regions(section.shape)
        gmsh.model.occ.synchronize()
        return set(name_curves(section, regions))


def region_contacts(section: Section | Shape) -> set[frozenset[str]]:
    """The pairs of regions that share an edge, found by building the section's geometry
    (booleans included) without meshing it."""
    if not isinstance(section, Section):
        section = Section(section)
    with gmsh_session():
        regions = build_regions(section.shape)
        gmsh.model.occ.synchronize()
        curves = {
            name: {
                abs(tag)
                for _, tag in gmsh.model.getBoundary(
                    [(2, s) for s in surfaces], combined=False, oriented=False
                )
            }
            for name, surfaces in regions.items()
        }
    names = sorted(curves)
    return {
        frozenset((a, b))
        for i, a in enumerate(names)
        for b in names[i + 1 :]
        if curves[a] & curves[b]
    }


def _splits(estimate: float) -> int:
    """How many times to split every triangle into four after meshing at ``2**splits`` times
    the size: the fewest that bring the coarse mesh to at most ``_SPLIT_ABOVE`` triangles."""
    splits = 0
    while estimate > _SPLIT_ABOVE * 4**splits:
        splits += 1
    return splits
