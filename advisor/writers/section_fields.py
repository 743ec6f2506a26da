"""What the field writers share: ids of regions and edge groups and the section's outline.

Ids are positions in the sorted names, so the same section always gets the same ids; the
VTK files, the legend and the plots all take them from here.
"""

from __future__ import annotations

import numpy as np

from geometries import SectionMesh

NO_ID = -1  # region of a boundary line cell, edge group of a triangle


def region_names(section: SectionMesh) -> list[str]:
    """Region names in id order."""
    return sorted(section.regions)


def edge_group_names(section: SectionMesh) -> list[str]:
    """Edge group names in id order."""
    return sorted(section.edge_groups)


def triangle_regions(section: SectionMesh) -> np.ndarray:
    """Region id of every triangle, shape (n_triangles,), int32."""
    ids = np.full(section.mesh.t.shape[1], NO_ID, dtype=np.int32)
    for i, name in enumerate(region_names(section)):
        ids[section.regions[name]] = i
    return ids


def boundary_lines(section: SectionMesh) -> tuple[np.ndarray, np.ndarray]:
    """The boundary edges as vertex pairs, shape (n, 2), and their edge group ids, shape (n,).

    Quadratic edges are given by their end vertices (their midpoints are not vertices).
    """
    mesh = section.mesh
    pairs, ids = [], []
    for i, name in enumerate(edge_group_names(section)):
        facets = np.asarray(section.edge_groups[name], dtype=np.int64)
        pairs.append(mesh.facets[:, facets].T)
        ids.append(np.full(facets.size, i, dtype=np.int32))
    if not pairs:
        return np.zeros((0, 2), dtype=np.int64), np.zeros(0, dtype=np.int32)
    return np.concatenate(pairs).astype(np.int64), np.concatenate(ids)


def outline_segments(section: SectionMesh) -> np.ndarray:
    """The section's boundary as line segments in m, shape (n, 2, 2), for drawing."""
    pairs, _ = boundary_lines(section)
    vertices = section.vertices.T
    return vertices[pairs]
