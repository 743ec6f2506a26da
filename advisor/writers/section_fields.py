"""What the field writers share: ids of regions and edge groups, the section's outline and the
heat flux recovered from a temperature field at the vertices.

Ids are positions in the sorted names, so the same section always gets the same ids; the
VTK files, the legend and the plots all take them from here.
"""

from __future__ import annotations

import numpy as np

from fem import ThermalModel
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


def element_conductivity(model: ThermalModel, field: np.ndarray) -> np.ndarray:
    """Conductivity k in W/(m·K) of every triangle at its mean vertex temperature."""
    section = model.section
    triangles = section.mesh.t
    mean_temperature = np.asarray(field, dtype=float)[triangles].mean(axis=0)
    k = np.empty(triangles.shape[1])
    for name, material in model.materials.items():
        cells = section.regions[name]
        k[cells] = material.conductivity_at(mean_temperature[cells])
    return k


def element_heat_flux(model: ThermalModel, field: np.ndarray) -> np.ndarray:
    """Heat flux −k∇T in W/m² on every triangle, shape (n_triangles, 2).

    ∇T is the (constant) gradient of the linear interpolant of the vertex temperatures
    ``field`` (°C) on the triangle's corners; k is taken at the triangle's mean temperature.
    Axisymmetric sections give the (r, z) components.
    """
    section = model.section
    x, y = section.vertices
    t = section.mesh.t
    temperature = np.asarray(field, dtype=float)
    # Corner differences d1 = p1 − p0, d2 = p2 − p0 and a = T1 − T0, b = T2 − T0; with the
    # Jacobian J = [d1 d2], ∇T = J⁻ᵀ (a, b).
    d1x, d1y = x[t[1]] - x[t[0]], y[t[1]] - y[t[0]]
    d2x, d2y = x[t[2]] - x[t[0]], y[t[2]] - y[t[0]]
    a = temperature[t[1]] - temperature[t[0]]
    b = temperature[t[2]] - temperature[t[0]]
    det = d1x * d2y - d1y * d2x
    gradient = np.column_stack([(d2y * a - d1y * b) / det, (d1x * b - d2x * a) / det])
    return -element_conductivity(model, temperature)[:, None] * gradient


def vertex_heat_flux(model: ThermalModel, field: np.ndarray) -> np.ndarray:
    """Heat flux −k∇T in W/m² at the vertices, shape (n_vertices, 3), the third component 0.

    Each vertex gets the area-weighted mean of :func:`element_heat_flux` over the triangles
    that share it; a linear field with one conductivity is reproduced exactly.
    """
    section = model.section
    x, y = section.vertices
    t = section.mesh.t
    flux = element_heat_flux(model, field)
    area = 0.5 * np.abs(
        (x[t[1]] - x[t[0]]) * (y[t[2]] - y[t[0]]) - (y[t[1]] - y[t[0]]) * (x[t[2]] - x[t[0]])
    )
    n = x.size
    corners = t.ravel()
    weights = np.tile(area, 3)
    total = np.bincount(corners, weights=weights, minlength=n)
    result = np.zeros((n, 3))
    for component in range(2):
        summed = np.bincount(
            corners, weights=weights * np.tile(flux[:, component], 3), minlength=n
        )
        result[:, component] = summed / total
    return result


def outline_segments(section: SectionMesh) -> np.ndarray:
    """The section's boundary as line segments in m, shape (n, 2, 2), for drawing."""
    pairs, _ = boundary_lines(section)
    vertices = section.vertices.T
    return vertices[pairs]
