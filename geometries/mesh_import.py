"""Sections from mesh files that meshio reads (gmsh .msh, .vtu, .xdmf, ...).

Labels become edge groups (on line cells) and regions (on triangle cells). They are taken from
gmsh physical groups (``gmsh:physical`` with the names in ``field_data``), from meshio cell
sets, or from an integer cell-data array the caller names (groups are then called
``<array>_<id>``). Every boundary segment must carry a label; a file whose boundary is
partly unlabelled is refused, naming where.
"""

from __future__ import annotations

from pathlib import Path

import meshio
import numpy as np

from .errors import GeometryError
from .mesh_arrays import section_mesh_from_arrays
from .section_mesh import SectionMesh

UNITS = {"m": 1.0, "cm": 1e-2, "mm": 1e-3, "um": 1e-6, "in": 0.0254, "ft": 0.3048}
_TRIANGLES = {"triangle": 3, "triangle6": 6}
_LINES = {"line": 2, "line3": 3}


def read_section_mesh(
    path: str | Path,
    *,
    units: str = "m",
    axisymmetric: bool = False,
    label_array: str | None = None,
) -> SectionMesh:
    """Read a triangle mesh with labelled boundary lines as a :class:`SectionMesh`.

    Parameters
    ----------
    path : str or Path
        Mesh file; the format follows from the extension, as meshio decides.
    units : str
        Length unit of the file's coordinates: one of ``m, cm, mm, um, in, ft``.
    axisymmetric : bool
        Whether x is the radius of a solid of revolution (x >= 0 required).
    label_array : str, optional
        Name of an integer cell-data array to use as labels when the file has neither gmsh
        physical groups nor cell sets.

    Returns
    -------
    SectionMesh
    """
    path = Path(path)
    if units not in UNITS:
        raise GeometryError(f"units must be one of {sorted(UNITS)}, got {units!r}")
    if not path.is_file():
        raise GeometryError(f"mesh file {str(path)!r} does not exist")
    try:
        mesh = meshio.read(path)
    except (Exception, SystemExit) as error:  # meshio may even exit for unreadable files
        reason = "no reader accepts it" if isinstance(error, SystemExit) else str(error)
        raise GeometryError(f"meshio cannot read {str(path)!r}: {reason}") from None

    points = _planar_points(mesh, path.name) * UNITS[units]
    labels = _labels(mesh, label_array, path.name)
    triangles, regions = _triangles(mesh, labels, path.name)
    edge_lines = _edge_lines(mesh, labels, path.name)
    return section_mesh_from_arrays(
        points, triangles, edge_lines, regions, axisymmetric=axisymmetric
    )


def _planar_points(mesh: meshio.Mesh, name: str) -> np.ndarray:
    """The nodes as (n, 2) coordinates in the file's unit; a z that varies is refused."""
    points = np.asarray(mesh.points, dtype=float)
    if points.shape[1] == 3:
        if np.abs(points[:, 2]).max(initial=0.0) > 1e-12 * max(np.ptp(points[:, :2]), 1e-300):
            raise GeometryError(f"{name}: the mesh is not planar (z varies)")
        points = points[:, :2]
    return points


def _triangles(
    mesh: meshio.Mesh, labels: list[np.ndarray] | None, name: str
) -> tuple[np.ndarray, dict[str, np.ndarray]]:
    """All triangles (one kind, linear or quadratic) and the triangle indices of each region
    (one region ``solid`` when the triangles carry no labels)."""
    other = sorted({b.type for b in mesh.cells} - set(_TRIANGLES) - set(_LINES) - {"vertex"})
    if other:
        raise GeometryError(
            f"{name}: cells of type {other} are not supported; "
            "soakwise reads triangles with boundary lines"
        )
    blocks = [i for i, b in enumerate(mesh.cells) if b.type in _TRIANGLES]
    if not blocks:
        raise GeometryError(f"{name}: the file has no triangles")
    if len({mesh.cells[i].type for i in blocks}) > 1:
        raise GeometryError(f"{name}: linear and quadratic triangles are mixed")
    triangles, triangle_labels = _gather(mesh, blocks, labels)
    if triangle_labels is None:
        return triangles, {"solid": np.arange(len(triangles))}
    return triangles, {
        region: np.flatnonzero(triangle_labels == region)
        for region in dict.fromkeys(triangle_labels)
    }


def _edge_lines(
    mesh: meshio.Mesh, labels: list[np.ndarray] | None, name: str
) -> dict[str, np.ndarray]:
    """The boundary lines of each edge group; every line must carry a label."""
    blocks = [i for i, b in enumerate(mesh.cells) if b.type in _LINES]
    lines, line_labels = _gather(mesh, blocks, labels)
    if line_labels is None:
        raise GeometryError(
            f"{name}: the boundary lines carry no labels; name them (gmsh physical "
            "groups, cell sets or label_array) so no edge silently becomes insulated"
        )
    edge_lines = {group: lines[line_labels == group] for group in dict.fromkeys(line_labels)}
    if "" in edge_lines:
        raise GeometryError(f"{name}: {len(edge_lines['']):d} boundary line(s) carry no label")
    if not lines.size:
        raise GeometryError(f"{name}: the file has no boundary lines to name the edges")
    return edge_lines


def _labels(mesh: meshio.Mesh, label_array: str | None, name: str) -> list[np.ndarray] | None:
    """One array of label names per cell block ("" where unlabelled), or None."""
    blocks = len(mesh.cells)
    if label_array is not None:
        if label_array not in mesh.cell_data:
            raise GeometryError(
                f"{name}: no cell-data array {label_array!r}; the file has "
                f"{sorted(mesh.cell_data)}"
            )
        return [
            np.array([f"{label_array}_{int(v)}" for v in values], dtype=object)
            for values in mesh.cell_data[label_array]
        ]
    if "gmsh:physical" in mesh.cell_data:
        names = {(int(tag), int(dim)): n for n, (tag, dim) in mesh.field_data.items()}
        result = []
        for block, tags in zip(mesh.cells, mesh.cell_data["gmsh:physical"], strict=True):
            dim = 2 if block.type in _TRIANGLES else 1
            result.append(
                np.array(
                    [names.get((int(t), dim), f"physical_{int(t)}") for t in tags], dtype=object
                )
            )
        return result
    if mesh.cell_sets:
        result = [np.full(len(b.data), "", dtype=object) for b in mesh.cells]
        for set_name, members in mesh.cell_sets.items():
            for k, indices in enumerate(members[:blocks]):
                if indices is not None and len(indices):
                    result[k][np.asarray(indices, dtype=np.int64)] = set_name
        return result
    return None


def _gather(mesh, block_indices, labels):
    if not block_indices:
        return np.empty((0, 2), np.int64), None
    cells = np.vstack([mesh.cells[i].data for i in block_indices]).astype(np.int64)
    if labels is None:
        return cells, None
    names = np.concatenate([labels[i] for i in block_indices])
    if np.all(names == ""):
        return cells, None
    return cells, names
