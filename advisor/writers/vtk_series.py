"""Field files for outside viewers: a VTK series (one unstructured grid per output time, .vtu,
and a .pvd collection carrying the physical times), a small legend of the ids they use, and an
optional XDMF/HDF5 time series.

Every .vtu holds the triangles and the boundary edges as line cells (one mixed grid) with

- point data ``temperature`` (°C) and ``heat_flux`` (W/m², the vector −k∇T: the gradient of
  the linear interpolant on each triangle, k at the triangle's mean temperature, averaged to
  the vertices with area weights; third component 0; (r, z) components for axisymmetric
  sections);
- cell data ``region`` (region id; −1 on line cells) and ``edge_group`` (edge group id; −1 on
  triangles).

The ids are positions in the sorted names; ``legend.json`` beside the files maps them back.
"""

from __future__ import annotations

import json
import os
import shutil
import tempfile
from pathlib import Path
from xml.sax.saxutils import quoteattr

import meshio
import numpy as np

from fem import Solution

from .atomic import write_text, write_with
from .section_fields import (
    NO_ID,
    boundary_lines,
    edge_group_names,
    region_names,
    triangle_regions,
    vertex_heat_flux,
)

LEGEND_NAME = "legend.json"


def _points(solution: Solution) -> np.ndarray:
    vertices = solution.model.section.vertices
    return np.column_stack([vertices.T, np.zeros(vertices.shape[1])])


def write_field_legend(solution: Solution, path: Path) -> None:
    """Write the id → name tables of the field files (and the units of their arrays)."""
    section = solution.model.section
    legend = {
        "region": {str(i): name for i, name in enumerate(region_names(section))},
        "edge_group": {str(i): name for i, name in enumerate(edge_group_names(section))},
        "no_id": NO_ID,
        "no_id_means": "region of a boundary line cell, edge_group of a triangle",
        "point_data": {
            "temperature": "degC",
            "heat_flux": "W/m^2, -k grad T averaged to the vertices, components (x, y, 0)"
            + (" = (r, z, 0)" if section.axisymmetric else ""),
        },
        "cell_data": {"region": "region id", "edge_group": "edge group id"},
    }
    write_text(Path(path), json.dumps(legend, indent=2, ensure_ascii=False) + "\n")


def write_vtk_series(solution: Solution, folder: Path, stem: str = "temperature") -> list[Path]:
    """Write the solution's output fields to ``folder`` as a VTK series with its legend.

    Writes ``{stem}_NNNN.vtu`` for every output time (the first is the initial state at
    t = 0), ``{stem}.pvd`` listing them with their times in s, and ``legend.json``. Returns the
    written paths: the .pvd first, then the legend, then the grids in time order.
    """
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    model = solution.model
    section = model.section
    points = _points(solution)
    lines, line_groups = boundary_lines(section)
    triangles = section.mesh.t.T.astype(np.int64)
    cells = [("triangle", triangles), ("line", lines)]
    cell_data = {
        "region": [triangle_regions(section), np.full(len(lines), NO_ID, dtype=np.int32)],
        "edge_group": [np.full(len(triangles), NO_ID, dtype=np.int32), line_groups],
    }

    paths = []
    for k, field in enumerate(solution.fields):
        temperature = np.asarray(field, dtype=np.float64)
        grid = meshio.Mesh(
            points,
            cells,
            point_data={
                "temperature": temperature,
                "heat_flux": vertex_heat_flux(model, temperature),
            },
            cell_data=cell_data,
        )
        path = folder / f"{stem}_{k:04d}.vtu"
        # Uncompressed binary: meshio's zlib compression makes each file several times slower
        # to write (about 7x on the demonstration's mesh) for a modest saving in size.
        write_with(
            path,
            lambda p, g=grid: meshio.write(p, g, file_format="vtu", binary=True, compression=None),
        )
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
    legend = folder / LEGEND_NAME
    write_field_legend(solution, legend)
    return [collection, legend, *paths]


def write_xdmf_series(solution: Solution, folder: Path, stem: str = "temperature") -> list[Path]:
    """Write the output fields as one XDMF time series, ``{stem}.xdmf`` with ``{stem}.h5``.

    Needs h5py (the ``xdmf`` extra). The grid holds the triangles only, with point data
    ``temperature`` and ``heat_flux`` and cell data ``region`` as in the .vtu files: meshio's
    XDMF writer cannot mix line cells with triangles. Returns the two paths, the .xdmf first.

    Raises
    ------
    ModuleNotFoundError
        If h5py is not installed.
    """
    import h5py  # noqa: F401  (fail here, before anything is written)

    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    model = solution.model
    section = model.section
    xdmf, h5 = folder / f"{stem}.xdmf", folder / f"{stem}.h5"
    staging = Path(tempfile.mkdtemp(dir=folder, prefix=f".{stem}.xdmf.", suffix=".part"))
    try:
        with _TimeSeriesBeside(staging / xdmf.name) as writer:
            writer.write_points_cells(
                _points(solution), [("triangle", section.mesh.t.T.astype(np.int64))]
            )
            regions = triangle_regions(section)
            for time, field in zip(solution.output_times.tolist(), solution.fields, strict=True):
                temperature = np.asarray(field, dtype=np.float64)
                writer.write_data(
                    time,
                    point_data={
                        "temperature": temperature,
                        "heat_flux": vertex_heat_flux(model, temperature),
                    },
                    cell_data={"region": [regions]},
                )
        os.replace(staging / h5.name, h5)  # the data first, then the file that points at it
        os.replace(staging / xdmf.name, xdmf)
    finally:
        shutil.rmtree(staging, ignore_errors=True)
    return [xdmf, h5]


class _TimeSeriesBeside(meshio.xdmf.TimeSeriesWriter):
    """meshio's XDMF time-series writer with its HDF5 file beside the .xdmf file.

    meshio opens the .h5 file in the current working directory; changing directory in a
    library is not an option, so this opens it next to the .xdmf file (the .xdmf refers to it
    by its bare name, which then resolves).
    """

    def __enter__(self):
        import h5py

        self.h5_filename = str(self.filename.with_suffix(".h5"))
        self.h5_file = h5py.File(self.h5_filename, "w")
        return self
