"""The mesh gmsh made, read back as arrays and handed to
:func:`~geometries.mesh_arrays.section_mesh_from_arrays`."""

from __future__ import annotations

import gmsh
import numpy as np

from ..mesh_arrays import section_mesh_from_arrays
from ..section_mesh import SectionMesh


def read_mesh(
    curve_groups: dict[str, list[int]],
    regions: dict[str, list[int]],
    order: int,
    axisymmetric: bool,
    multiplier: int,
) -> SectionMesh:
    """The current gmsh mesh as a :class:`SectionMesh`: triangles of the ``regions``'
    surfaces, boundary lines of the ``curve_groups``' curves (``order`` 1 or 2)."""
    node_tags, coordinates, _ = gmsh.model.mesh.getNodes(returnParametricCoord=False)
    index = np.full(int(node_tags.max()) + 1, -1, dtype=np.int64)
    index[node_tags.astype(np.int64)] = np.arange(len(node_tags))
    points = np.reshape(coordinates, (-1, 3))[:, :2]
    triangle_nodes = 3 if order == 1 else 6
    line_nodes = 2 if order == 1 else 3

    def connectivity(dim: int, tag: int, nodes_per_element: int) -> np.ndarray:
        types, _, nodes = gmsh.model.mesh.getElements(dim, tag)
        blocks = [
            index[np.asarray(n, dtype=np.int64)].reshape(-1, nodes_per_element)
            for kind, n in zip(types, nodes, strict=True)
            if gmsh.model.mesh.getElementProperties(kind)[3] == nodes_per_element
        ]
        return np.vstack(blocks) if blocks else np.empty((0, nodes_per_element), np.int64)

    triangle_blocks, triangle_regions, count = [], {}, 0
    for region, surfaces in regions.items():
        blocks = [connectivity(2, s, triangle_nodes) for s in surfaces]
        n = sum(len(b) for b in blocks)
        triangle_blocks.extend(blocks)
        triangle_regions[region] = np.arange(count, count + n)
        count += n
    edge_lines = {
        name: np.vstack([connectivity(1, c, line_nodes) for c in curves])
        for name, curves in curve_groups.items()
    }
    return section_mesh_from_arrays(
        points,
        np.vstack(triangle_blocks),
        edge_lines,
        triangle_regions,
        axisymmetric=axisymmetric,
        symmetry_multiplier=multiplier,
    )
