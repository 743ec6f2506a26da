"""Every gmsh call of the project: build a section's geometry, mesh it, read the mesh back.

gmsh keeps one global state per process. All access goes through :func:`_gmsh_session`, which
holds a lock, starts gmsh quietly and always finalises it, so repeated meshing in one process is
safe and parallel meshing runs in separate processes. Edge groups are assigned *after* gmsh has
built the geometry, by matching each boundary curve to the shape's named edge primitives, and
every curve must be matched: an unnamed edge is an error, never a silent insulated boundary.
"""

from __future__ import annotations

import threading
from collections.abc import Iterator
from contextlib import contextmanager

import gmsh
import numpy as np
import pygmsh

from .errors import GeometryError
from .section_mesh import SectionMesh, section_mesh_from_arrays
from .shapes import EdgeSegment, Rectangle

_GMSH_LOCK = threading.Lock()
_CURVE_SAMPLES = 7
_MATCH_TOLERANCE = 1e-7  # relative to the section size


@contextmanager
def _gmsh_session() -> Iterator[pygmsh.occ.Geometry]:
    with _GMSH_LOCK, pygmsh.occ.Geometry() as geometry:
        gmsh.option.setNumber("General.Terminal", 0)
        yield geometry


def mesh_section(section: Rectangle, size: float) -> SectionMesh:
    """Mesh a section into P1 triangles with gmsh.

    Parameters
    ----------
    section : Rectangle
        The section to mesh.
    size : float
        Target element size in m; > 0 and smaller than the section.

    Returns
    -------
    SectionMesh
        Triangulation with the section's edge groups and region.

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
    if not np.isfinite(size) or size <= 0:
        raise GeometryError(f"mesh size must be a finite length > 0 m, got {size!r}")
    if size > section.size:
        raise GeometryError(
            f"mesh size {size} m is larger than the section ({section.size} m); "
            "choose a size below the section's smallest feature"
        )
    with _gmsh_session() as geometry:
        x0, y0 = section.corner
        geometry.add_rectangle([x0, y0, 0.0], section.width, section.height)
        geometry.synchronize()
        curve_groups = _name_curves(section.edges(), section.size)
        surfaces = [tag for _, tag in gmsh.model.getEntities(2)]

        gmsh.option.setNumber("Mesh.MeshSizeMax", size)
        gmsh.option.setNumber("Mesh.MeshSizeMin", 0.0)
        gmsh.option.setNumber("Mesh.MeshSizeFromPoints", 0)
        gmsh.option.setNumber("Mesh.MeshSizeExtendFromBoundary", 0)
        gmsh.model.mesh.generate(2)
        return _read_mesh(curve_groups, {section.region: surfaces})


def _name_curves(edges: list[EdgeSegment], scale: float) -> dict[str, list[int]]:
    """Assign every boundary curve of the current model to the edge group it lies on."""
    tolerance = _MATCH_TOLERANCE * scale
    groups: dict[str, list[int]] = {}
    for _, tag in gmsh.model.getEntities(1):
        low, high = gmsh.model.getParametrizationBounds(1, tag)
        t = np.linspace(low[0], high[0], _CURVE_SAMPLES)
        points = np.reshape(gmsh.model.getValue(1, tag, t), (-1, 3))[:, :2]
        matches = {e.group for e in edges if e.distance(points).max() <= tolerance}
        midpoint = tuple(np.round(points[_CURVE_SAMPLES // 2], 6))
        if not matches:
            raise GeometryError(f"the boundary curve through {midpoint} m matches no named edge")
        if len(matches) > 1:
            raise GeometryError(
                f"the boundary curve through {midpoint} m lies on edges of several groups "
                f"{sorted(matches)}; give overlapping edges one name"
            )
        groups.setdefault(matches.pop(), []).append(tag)
    return groups


def _read_mesh(curve_groups: dict[str, list[int]], region_surfaces: dict[str, list[int]]):
    node_tags, coordinates, _ = gmsh.model.mesh.getNodes()
    index = np.full(int(node_tags.max()) + 1, -1, dtype=np.int64)
    index[node_tags.astype(np.int64)] = np.arange(len(node_tags))
    points = np.reshape(coordinates, (-1, 3))[:, :2]

    def connectivity(dim: int, tag: int, nodes_per_element: int) -> np.ndarray:
        types, _, nodes = gmsh.model.mesh.getElements(dim, tag)
        blocks = [
            index[np.asarray(n, dtype=np.int64)].reshape(-1, nodes_per_element)
            for kind, n in zip(types, nodes, strict=True)
            if gmsh.model.mesh.getElementProperties(kind)[3] == nodes_per_element
        ]
        return np.vstack(blocks) if blocks else np.empty((0, nodes_per_element), dtype=np.int64)

    triangle_blocks, triangle_regions, count = [], {}, 0
    for region, surfaces in region_surfaces.items():
        blocks = [connectivity(2, s, 3) for s in surfaces]
        n = sum(len(b) for b in blocks)
        triangle_blocks.extend(blocks)
        triangle_regions[region] = np.arange(count, count + n)
        count += n
    edge_lines = {
        name: np.vstack([connectivity(1, c, 2) for c in curves])
        for name, curves in curve_groups.items()
    }
    return section_mesh_from_arrays(
        points, np.vstack(triangle_blocks), edge_lines, triangle_regions
    )
