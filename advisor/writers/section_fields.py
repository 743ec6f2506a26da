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


def region_borders(section: SectionMesh) -> np.ndarray:
    """Edges between triangles of different regions as line segments in m, shape (n, 2, 2)."""
    mesh = section.mesh
    regions = triangle_regions(section)
    left, right = mesh.f2t
    inner = right >= 0
    differ = np.zeros(left.size, dtype=bool)
    differ[inner] = regions[left[inner]] != regions[right[inner]]
    return section.vertices.T[mesh.facets[:, differ].T]


def whole_part_lines(section: SectionMesh, mirrors) -> tuple[np.ndarray, ...]:
    """The outline, the region borders and the symmetry lines of the whole part, each a
    (n, 2, 2) array of segments in m: the modelled piece's lines copied across ``mirrors``
    (:mod:`advisor.whole_part`); boundary edges on a mirror line become symmetry lines."""
    from ..whole_part import unfold

    outline = outline_segments(section)
    borders = region_borders(section)
    size = float(np.ptp(section.vertices, axis=1).max())
    on_line = np.zeros(len(outline), dtype=bool)
    for mirror in mirrors:
        ends = outline.reshape(-1, 2).T
        near = np.abs(mirror.distance(ends)).reshape(-1, 2) <= 1e-9 * size
        on_line |= near.all(axis=1)
    pieces = []
    for segments in (outline[~on_line], borders, outline[on_line]):
        flat = segments.reshape(-1, 2).T
        copies = [c.T.reshape(-1, 2, 2) for c in unfold(flat, mirrors)]
        pieces.append(np.concatenate(copies) if copies else segments)
    return tuple(pieces)
