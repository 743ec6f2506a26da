"""The README's demo command writes every file the README promises, and the VTK files read
back — with the independent ``vtk`` package, not with the project's own writer — holding the
values, times and regions written."""

import json
import re
import shutil
import subprocess
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest
from vtkmodules.util.numpy_support import vtk_to_numpy
from vtkmodules.vtkCommonDataModel import VTK_TRIANGLE
from vtkmodules.vtkIOXML import vtkXMLUnstructuredGridReader

from advisor import assess, write_results
from advisor.demo import TARGET
from fem import Convection, Insulated, Material, ThermalModel, solve
from geometries import Rectangle

ROOT = Path(__file__).resolve().parents[1]


def read_vtu(path: Path) -> dict:
    reader = vtkXMLUnstructuredGridReader()
    reader.SetFileName(str(path))
    reader.Update()
    grid = reader.GetOutput()
    return {
        "points": vtk_to_numpy(grid.GetPoints().GetData()),
        "temperature": vtk_to_numpy(grid.GetPointData().GetArray("temperature")),
        "region": vtk_to_numpy(grid.GetCellData().GetArray("region")),
        "cells": grid.GetNumberOfCells(),
        "types": np.array([grid.GetCellType(i) for i in range(grid.GetNumberOfCells())]),
    }


def read_pvd(path: Path) -> list[tuple[float, str]]:
    return [
        (float(d.get("timestep")), d.get("file")) for d in ET.parse(path).getroot().iter("DataSet")
    ]


def readme_results_layout() -> list[str]:
    """The file patterns listed in the README's results-folder block."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = text.split("### The results folder", 1)[1].split("```", 2)[1]
    return [line.split()[0] for line in block.strip().splitlines()]


@pytest.fixture(scope="module")
def demo_folder(tmp_path_factory):
    soakwise = shutil.which("soakwise")
    if soakwise is None:
        pytest.fail("the soakwise console script is not installed; run `pip install .` first")
    out = tmp_path_factory.mktemp("demo") / "results"
    run = subprocess.run(
        [soakwise, "demo", "--out", str(out)], capture_output=True, text=True, timeout=300
    )
    assert run.returncode == 0, run.stderr
    return out, run.stderr


def test_demo_writes_every_file_the_readme_lists(demo_folder):
    out, _ = demo_folder
    written = sorted(p.relative_to(out).as_posix() for p in out.rglob("*") if p.is_file())
    patterns = readme_results_layout()
    assert patterns, "the README lists no results files"
    for pattern in patterns:
        regex = re.escape(pattern).replace("NNNN", r"\d{4}")
        assert any(re.fullmatch(regex, f) for f in written), f"{pattern} missing from {out}"
    for name in written:  # and nothing the README does not describe
        assert any(re.fullmatch(re.escape(p).replace("NNNN", r"\d{4}"), name) for p in patterns), (
            f"{name} is written but not described in the README"
        )
    summary = json.loads((out / "summary.json").read_text())
    assert sorted(summary["files"]) == written
    assert not list(out.parent.glob(".*part*")), "temporary files were left behind"


def test_demo_summary_answers_the_questions(demo_folder):
    out, printed = demo_folder
    summary = json.loads((out / "summary.json").read_text())
    assert summary["inputs"]["target_degC"] == TARGET
    times = summary["time_to_target_s"]
    # A lumped model cools the whole part at the surface's rate: for this quench its
    # estimate is earlier than the core's, and the core is the slowest point.
    assert times["classical"] < times["slowest"]
    assert times["slowest"] == pytest.approx(times["probe:core"], rel=1e-12)
    assert summary["peak_internal_difference_K"] > 0
    assert summary["checks"]["warnings"] == []
    assert "licensed professional practice" in summary["caution"]
    assert "licensed professional practice" in printed


def test_readme_shows_what_the_demo_prints(demo_folder):
    _, printed = demo_folder
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    shown = readme.split("### The demonstration case", 1)[1].split("```", 2)[1]
    for line in shown.strip().splitlines():
        assert line in printed, f"README line not printed by the demo: {line!r}"


def test_demo_vtk_series_reads_back(demo_folder):
    out, _ = demo_folder
    summary = json.loads((out / "summary.json").read_text())
    series = read_pvd(out / "fields" / "temperature.pvd")
    assert [t for t, _ in series] == pytest.approx(summary["output_times_s"], rel=1e-15)
    first = read_vtu(out / "fields" / series[0][1])
    last = read_vtu(out / "fields" / series[-1][1])
    assert first["points"].shape == (summary["inputs"]["section"]["mesh_nodes"], 3)
    triangles = first["types"] == VTK_TRIANGLE  # the boundary edges are line cells
    assert triangles.sum() == summary["inputs"]["section"]["mesh_triangles"]
    np.testing.assert_array_equal(
        first["temperature"], summary["inputs"]["initial_temperature_degC"]
    )
    final = summary["final"]
    assert last["temperature"].min() == final["minimum_degC"]
    assert last["temperature"].max() == final["maximum_degC"]
    np.testing.assert_array_equal(first["region"][triangles], 0)
    np.testing.assert_array_equal(first["region"][~triangles], -1)


def test_written_fields_read_back_exactly(tmp_path):
    section = Rectangle(0.02, 0.01, region="core").mesh(size=0.002)
    water = Convection(heat_transfer_coefficient=800.0, ambient=15.0)
    model = ThermalModel(
        section,
        Material(15.0, 8000.0, 500.0),
        boundaries={"left": Insulated(), "bottom": water, "right": water, "top": water},
        initial_temperature=400.0,
    )
    solution = solve(model, end_time=120.0, time_step=2.0, output_interval=40.0)
    files = write_results(assess(solution), tmp_path / "run")
    assert "fields/temperature_0003.vtu" in [f.as_posix() for f in files]
    series = read_pvd(tmp_path / "run" / "fields" / "temperature.pvd")
    assert [t for t, _ in series] == pytest.approx([0.0, 40.0, 80.0, 120.0], abs=1e-12)
    for (_, name), field in zip(series, solution.fields, strict=True):
        data = read_vtu(tmp_path / "run" / "fields" / name)
        np.testing.assert_array_equal(data["temperature"], field)
        np.testing.assert_array_equal(data["points"][:, :2], section.mesh.p.T)
