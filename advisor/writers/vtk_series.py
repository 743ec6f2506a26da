"""VTK series for outside viewers: one unstructured grid (.vtu) per output time and a .pvd
collection that carries the physical times."""

from __future__ import annotations

from pathlib import Path
from xml.sax.saxutils import quoteattr

import meshio
import numpy as np

from fem import Solution

from .atomic import write_text, write_with


def write_vtk_series(solution: Solution, folder: Path, stem: str = "temperature") -> list[Path]:
    """Write the solution's output fields to ``folder``.

    Each ``{stem}_NNNN.vtu`` holds the triangles with the point field ``temperature`` (°C) and
    the cell field ``region`` (index into the sorted region names); ``{stem}.pvd`` lists them
    with their times in s. Returns the written paths, the .pvd first.
    """
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    section = solution.model.section
    mesh = section.mesh
    vertices = section.vertices
    points = np.column_stack([vertices.T, np.zeros(vertices.shape[1])])
    region_id = np.zeros(mesh.t.shape[1], dtype=np.int32)
    for i, name in enumerate(sorted(mesh.subdomains)):
        region_id[mesh.subdomains[name]] = i

    paths = []
    for k, field in enumerate(solution.fields):
        grid = meshio.Mesh(
            points,
            [("triangle", mesh.t.T.astype(np.int64))],
            point_data={"temperature": np.asarray(field, dtype=np.float64)},
            cell_data={"region": [region_id]},
        )
        path = folder / f"{stem}_{k:04d}.vtu"
        write_with(path, lambda p, g=grid: meshio.write(p, g, file_format="vtu"))
        paths.append(path)

    entries = "\n".join(
        f'    <DataSet timestep="{t!r}" group="" part="0" file={quoteattr(p.name)}/>'
        for t, p in zip(solution.output_times.tolist(), paths, strict=True)
    )
    collection = folder / f"{stem}.pvd"
    write_text(
        collection,
        '<?xml version="1.0"?>\n'
        '<VTKFile type="Collection" version="0.1" byte_order="LittleEndian">\n'
        f"  <Collection>\n{entries}\n  </Collection>\n</VTKFile>\n",
    )
    return [collection, *paths]
