"""The .vtu files of the VTK series read back with three readers the writer does not use, and
the heat flux they carry against a direct computation written here.

The readers: VTK's own ``vtkXMLUnstructuredGridReader``, meshio's VTU reader, and a decoder
of VTK's compressed appended layout in this module (zlib and numpy). The expected grid is
built in the test from the section's mesh, its edge groups and the sorted names. The heat flux
is recomputed triangle by triangle with ``numpy.linalg.solve`` on each triangle's Jacobian and
averaged with ``numpy.add.at``.
"""

from __future__ import annotations

import doctest
import os
import xml.etree.ElementTree as ET
import zlib
from pathlib import Path

import meshio
import numpy as np
import pytest
from vtkmodules.util.numpy_support import vtk_to_numpy
from vtkmodules.vtkCommonDataModel import VTK_LINE, VTK_TRIANGLE
from vtkmodules.vtkIOXML import vtkXMLUnstructuredGridReader

import fem.heat_flux
from advisor.writers import vtk_series
from fem import Convection, Insulated, Material, PropertyTable, ThermalModel, solve
from fem.heat_flux import HeatFluxRecovery, vertex_heat_flux
from geometries import Composite, Rectangle

# An invented conductivity falling with temperature (a demo table, not material data).
FALLING = PropertyTable((0.0, 300.0, 1000.0), (50.0, 38.0, 27.0))


def two_region_model(mesh_size: float = 0.003) -> ThermalModel:
    """A bar with a temperature-dependent conductivity under a constant-conductivity layer."""
    bar = Rectangle(
        0.03, 0.012, edge_names={"left": "axis", "bottom": "wet", "right": "wet"}, region="bar"
    )
    layer = Rectangle(
        0.03, 0.003, (0.0, 0.012), {"left": "axis", "top": "dry", "right": "dry"}, region="layer"
    )
    section = Composite((bar, layer)).mesh(mesh_size)
    return ThermalModel(
        section,
        {"bar": Material(FALLING, 7850.0, 500.0), "layer": Material(1.5, 2000.0, 900.0)},
        boundaries={
            "axis": Insulated("axis"),
            "wet": Convection(heat_transfer_coefficient=800.0, ambient=20.0),
            "dry": Convection(heat_transfer_coefficient=15.0, ambient=20.0),
        },
        initial_temperature=600.0,
    )


@pytest.fixture(scope="module")
def series(tmp_path_factory):
    # 0.4 mm: about 3000 points, so the larger arrays span several 64 KiB zlib blocks.
    solution = solve(two_region_model(0.0004), end_time=40.0, time_step=2.0, output_interval=20.0)
    folder = tmp_path_factory.mktemp("vtk")
    return solution, folder, vtk_series.write_vtk_series(solution, folder)


def expected_grid(model: ThermalModel) -> dict:
    """The grid the files should hold, built from the section without the writer's helpers."""
    section = model.section
    regions, groups = sorted(section.regions), sorted(section.edge_groups)
    n_triangles = section.mesh.t.shape[1]
    triangle_region = np.empty(n_triangles, dtype=np.int32)
    for i, name in enumerate(regions):
        triangle_region[section.regions[name]] = i
    lines = [section.mesh.facets[:, f] for name in groups for f in section.edge_groups[name]]
    line_group = [i for i, name in enumerate(groups) for _ in section.edge_groups[name]]
    return {
        "points": np.column_stack([section.vertices.T, np.zeros(section.vertices.shape[1])]),
        "triangles": section.mesh.t.T,
        "lines": np.array(lines),
        "region": np.concatenate([triangle_region, np.full(len(lines), -1)]),
        "edge_group": np.concatenate([np.full(n_triangles, -1), line_group]),
    }


def read_with_vtk(path: Path) -> dict:
    reader = vtkXMLUnstructuredGridReader()
    reader.SetFileName(str(path))
    reader.Update()
    grid = reader.GetOutput()
    cells = grid.GetCells()
    return {
        "points": vtk_to_numpy(grid.GetPoints().GetData()),
        "connectivity": vtk_to_numpy(cells.GetConnectivityArray()),
        "offsets": vtk_to_numpy(cells.GetOffsetsArray()),
        "types": np.array([grid.GetCellType(i) for i in range(grid.GetNumberOfCells())]),
        "point": {
            name: vtk_to_numpy(grid.GetPointData().GetArray(name))
            for name in ("temperature", "heat_flux")
        },
        "cell": {
            name: vtk_to_numpy(grid.GetCellData().GetArray(name))
            for name in ("region", "edge_group")
        },
        "point_arrays": grid.GetPointData().GetNumberOfArrays(),
        "cell_arrays": grid.GetCellData().GetNumberOfArrays(),
    }


def test_every_file_reads_back_with_vtk(series):
    solution, _, paths = series
    expected = expected_grid(solution.model)
    grids = paths[2:]
    assert len(grids) == len(solution.fields) == 3
    n_triangles, n_lines = len(expected["triangles"]), len(expected["lines"])
    for path, field in zip(grids, solution.fields, strict=True):
        data = read_with_vtk(path)
        np.testing.assert_array_equal(data["points"], expected["points"])
        np.testing.assert_array_equal(
            data["types"], [VTK_TRIANGLE] * n_triangles + [VTK_LINE] * n_lines
        )
        ends = [3 * np.arange(n_triangles + 1), 3 * n_triangles + 2 * np.arange(1, n_lines + 1)]
        np.testing.assert_array_equal(data["offsets"], np.concatenate(ends))
        np.testing.assert_array_equal(
            data["connectivity"],
            np.concatenate([expected["triangles"].ravel(), expected["lines"].ravel()]),
        )
        assert data["point_arrays"] == 2 and data["cell_arrays"] == 2
        np.testing.assert_array_equal(data["point"]["temperature"], field)
        np.testing.assert_array_equal(
            data["point"]["heat_flux"], vertex_heat_flux(solution.model, field)
        )
        np.testing.assert_array_equal(data["cell"]["region"], expected["region"])
        np.testing.assert_array_equal(data["cell"]["edge_group"], expected["edge_group"])
        assert data["cell"]["region"].dtype == np.int32
        assert data["point"]["temperature"].dtype == np.float64


def test_every_file_reads_back_with_meshio(series):
    solution, _, paths = series
    expected = expected_grid(solution.model)
    n_triangles = len(expected["triangles"])
    for path, field in zip(paths[2:], solution.fields, strict=True):
        grid = meshio.read(path)
        np.testing.assert_array_equal(grid.points, expected["points"])
        assert [block.type for block in grid.cells] == ["triangle", "line"]
        np.testing.assert_array_equal(grid.cells[0].data, expected["triangles"])
        np.testing.assert_array_equal(grid.cells[1].data, expected["lines"])
        assert sorted(grid.point_data) == ["heat_flux", "temperature"]
        np.testing.assert_array_equal(grid.point_data["temperature"], field)
        np.testing.assert_array_equal(
            grid.point_data["heat_flux"], vertex_heat_flux(solution.model, field)
        )
        assert sorted(grid.cell_data) == ["edge_group", "region"]
        for name in ("region", "edge_group"):
            triangles, lines = grid.cell_data[name]
            np.testing.assert_array_equal(triangles, expected[name][:n_triangles])
            np.testing.assert_array_equal(lines, expected[name][n_triangles:])


def decode_appended(path: Path) -> tuple[ET.Element, dict[str, np.ndarray], dict[str, int], int]:
    """The XML and every array of a .vtu file with zlib-compressed raw appended data, decoded
    here by the layout of VTK's XML formats: after the ``_`` each array is a UInt64 header
    (number of blocks, uncompressed block size, size of a partial last block or 0, compressed
    size of each block) followed by the zlib streams. Also returns each array's number of
    blocks and the bytes the arrays take in the file."""
    raw = path.read_bytes()
    start = raw.index(b'<AppendedData encoding="raw">')
    data = raw.index(b"_", start) + 1
    end = raw.rindex(b"</AppendedData>")
    root = ET.fromstring(raw[:start] + b"</VTKFile>")
    numpy_types = {"Float64": "<f8", "Int64": "<i8", "Int32": "<i4"}
    arrays, block_counts, used = {}, {}, []
    for array in root.iter("DataArray"):
        assert array.get("format") == "appended"
        position = data + int(array.get("offset"))
        blocks, block_size, partial = np.frombuffer(raw, "<u8", 3, position)
        sizes = np.frombuffer(raw, "<u8", int(blocks), position + 24)
        position += 8 * (3 + int(blocks))
        pieces = []
        for size in sizes.tolist():
            pieces.append(zlib.decompress(raw[position : position + size]))
            position += size
        full = [len(p) for p in pieces[:-1]] if partial else [len(p) for p in pieces]
        assert all(n == block_size for n in full)
        if partial:
            assert len(pieces[-1]) == partial
        values = np.frombuffer(b"".join(pieces), numpy_types[array.get("type")])
        components = int(array.get("NumberOfComponents", "1"))
        arrays[array.get("Name")] = values.reshape(-1, components) if components > 1 else values
        block_counts[array.get("Name")] = int(blocks)
        used.append((int(array.get("offset")), position - data))
    used.sort()
    assert used[0][0] == 0 and all(a[1] == b[0] for a, b in zip(used, used[1:], strict=False))
    assert raw[data + used[-1][1] : end].strip() == b"", "nothing between the arrays and the end"
    return root, arrays, block_counts, used[-1][1]


def test_files_follow_vtks_compressed_appended_layout(series):
    # Decoded by a third reader, written here: zlib blocks with UInt64 headers, the arrays
    # back to back; the mesh arrays compressed (the file is smaller than its arrays).
    solution, _, paths = series
    expected = expected_grid(solution.model)
    n_triangles, n_lines = len(expected["triangles"]), len(expected["lines"])
    for path, field in zip(paths[2:], solution.fields, strict=True):
        root, arrays, block_counts, used = decode_appended(path)
        assert block_counts["connectivity"] > 2 and block_counts["heat_flux"] > 1
        assert root.get("type") == "UnstructuredGrid" and root.get("header_type") == "UInt64"
        assert root.get("byte_order") == "LittleEndian"
        assert root.get("compressor") == "vtkZLibDataCompressor"
        piece = root.find("UnstructuredGrid/Piece")
        assert int(piece.get("NumberOfPoints")) == len(expected["points"])
        assert int(piece.get("NumberOfCells")) == n_triangles + n_lines
        np.testing.assert_array_equal(arrays["Points"], expected["points"])
        np.testing.assert_array_equal(
            arrays["connectivity"],
            np.concatenate([expected["triangles"].ravel(), expected["lines"].ravel()]),
        )
        np.testing.assert_array_equal(
            arrays["offsets"],
            np.concatenate(
                [
                    3 * np.arange(1, n_triangles + 1),
                    3 * n_triangles + 2 * np.arange(1, n_lines + 1),
                ]
            ),
        )
        np.testing.assert_array_equal(
            arrays["types"], [VTK_TRIANGLE] * n_triangles + [VTK_LINE] * n_lines
        )
        np.testing.assert_array_equal(arrays["region"], expected["region"])
        np.testing.assert_array_equal(arrays["edge_group"], expected["edge_group"])
        np.testing.assert_array_equal(arrays["temperature"], field)
        np.testing.assert_array_equal(arrays["heat_flux"], vertex_heat_flux(solution.model, field))
        assert used < sum(a.nbytes for a in arrays.values())


def test_a_failed_file_leaves_nothing_half_written(tmp_path, monkeypatch):
    solution = solve(two_region_model(0.006), end_time=20.0, time_step=2.0, output_interval=10.0)
    calls = []
    original = vtk_series._SectionGrid.write

    def failing_write(self, path, point_data):
        calls.append(path)
        if len(calls) == 2:  # the second file fails after part of it is on disk
            with open(path, "wb") as stream:
                stream.write(b"<?xml")
            raise OSError("disk full")
        original(self, path, point_data)

    monkeypatch.setattr(vtk_series._SectionGrid, "write", failing_write)
    with pytest.raises(OSError, match="disk full"):
        vtk_series.write_vtk_series(solution, tmp_path)
    assert sorted(os.listdir(tmp_path)) == ["temperature_0000.vtu"]
    np.testing.assert_array_equal(
        meshio.read(tmp_path / "temperature_0000.vtu").point_data["temperature"],
        solution.fields[0],
    )
    assert (tmp_path / "temperature_0000.vtu").stat().st_mode & 0o777 == 0o644


def direct_vertex_flux(model: ThermalModel, field: np.ndarray) -> np.ndarray:
    """−k∇T averaged to the vertices with area weights, one triangle at a time: ∇T solves
    Jᵀ∇T = (T1 − T0, T2 − T0) with J = [p1 − p0, p2 − p0]; k at the triangle's mean."""
    section = model.section
    points, t = section.vertices.T, section.mesh.t
    jacobian = np.stack([points[t[1]] - points[t[0]], points[t[2]] - points[t[0]]], axis=2)
    rise = np.stack([field[t[1]] - field[t[0]], field[t[2]] - field[t[0]]], axis=1)
    gradient = np.linalg.solve(np.transpose(jacobian, (0, 2, 1)), rise[:, :, None])[:, :, 0]
    k = np.empty(t.shape[1])
    for name, material in model.materials.items():
        cells = section.regions[name]
        k[cells] = material.conductivity_at(np.mean(field[t[:, cells]], axis=0))
    area = 0.5 * np.abs(np.linalg.det(jacobian))
    summed = np.zeros((points.shape[0], 2))
    weight = np.zeros(points.shape[0])
    for corner in t:
        np.add.at(summed, corner, area[:, None] * -k[:, None] * gradient)
        np.add.at(weight, corner, area)
    return np.column_stack([summed / weight[:, None], np.zeros(points.shape[0])])


def test_heat_flux_agrees_with_a_direct_computation():
    # Two regions, one with k(T): the tabulated k is taken at each triangle's mean
    # temperature, so a curved field exercises both the table and the averaging. The
    # operations differ (LAPACK solve, add.at against factored arrays and a sparse product):
    # agreement to round-off, 1e-12 of the largest flux, is what the two must show.
    model = two_region_model(0.0015)
    x, y = model.section.vertices
    recovery = HeatFluxRecovery(model)
    for field in (
        600.0 - 4.0e5 * x**2 - 4.0e3 * y + 50.0 * np.sin(300.0 * x * y / 0.03),
        20.0 + 1.0e4 * x + 2.0e7 * y**3,
    ):
        reference = direct_vertex_flux(model, field)
        scale = np.abs(reference).max()
        assert scale > 1e4
        np.testing.assert_allclose(recovery(field), reference, rtol=1e-12, atol=1e-12 * scale)
        np.testing.assert_array_equal(recovery(field), vertex_heat_flux(model, field))
        element = recovery.element(field)
        assert element.shape == (model.section.mesh.t.shape[1], 2)
        np.testing.assert_allclose(
            recovery.averaging @ element, reference[:, :2], rtol=1e-12, atol=1e-12 * scale
        )


def test_a_uniform_field_has_no_heat_flux():
    model = two_region_model(0.003)
    uniform = np.full(model.section.vertices.shape[1], 437.25)
    np.testing.assert_array_equal(HeatFluxRecovery(model)(uniform), 0.0)


def test_heat_flux_docstring_example_runs():
    result = doctest.testmod(fem.heat_flux)
    assert result.attempted > 0 and result.failed == 0
