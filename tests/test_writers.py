"""The results writers: VTK and XDMF fields read back with libraries other than the one that
wrote them, CSV histories read back with the csv module, plots, the animation, the report and
the progress line.

The VTK files (written by the project's own .vtu writer) are read with the independent ``vtk``
package, and in ``test_vtk_files.py`` with meshio too; the XDMF series (written through
meshio) is read with ElementTree and h5py directly.
"""

from __future__ import annotations

import csv
import doctest
import html
import io
import json
import re
import xml.etree.ElementTree as ET
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pytest
from PIL import Image, ImageStat
from vtkmodules.util.numpy_support import vtk_to_numpy
from vtkmodules.vtkCommonDataModel import VTK_LINE, VTK_TRIANGLE
from vtkmodules.vtkIOXML import vtkXMLUnstructuredGridReader

import advisor.cli.progress
import advisor.pipeline
import advisor.results_folder
from advisor import AdvisorError, assess, write_results
from advisor.cli.progress import RunProgress
from advisor.time_words import duration_text
from advisor.writers import animation as animation_writer
from advisor.writers.field_plots import snapshot_canvas, snapshot_indices
from advisor.writers.history_plots import lumped_error_figure
from advisor.writers.plots import PLOTS
from advisor.writers.raster_picture import to_pixel
from advisor.writers.report_content import HEADINGS
from advisor.writers.report_document import PROCESS_PARTS
from fem import Convection, Insulated, Material, Radiation, ThermalModel, solve
from fem.heat_flux import vertex_heat_flux
from fem.schedules import PiecewiseLinear
from geometries import Composite, Rectangle, Section

# Names with markup in them: every writer must carry them as text.
STEEL = "steel <b>"
OIL = "oil & <i>water</i>"
STEEL_NAME = "steel <script>alert(1)</script>"
PROBES = {"mid <x>": (0.02, 0.005), "*face*|a": (0.04, 0.005)}


def coated_strip(mesh_size: float = 0.002) -> ThermalModel:
    """A steel strip with a paint layer over part of its top, cooled in oil and air; two
    regions, three edge groups, names full of markup."""
    substrate = Rectangle(
        0.04,
        0.01,
        edge_names={"left": "symmetry", "bottom": OIL, "right": OIL, "top": OIL},
        region=STEEL,
    )
    coating = Rectangle(
        0.03,
        0.002,
        (0.0, 0.01),
        {"left": "symmetry", "top": "sprayed", "right": "sprayed"},
        region="coat",
    )
    section = Composite((substrate, coating)).mesh(mesh_size)
    return ThermalModel(
        section,
        {
            STEEL: Material(40.0, 7850.0, 500.0, name=STEEL_NAME, source="round figures & such"),
            "coat": Material(2.0, 2000.0, 900.0, name="paint"),
        },
        boundaries={
            "symmetry": Insulated("symmetry"),
            OIL: Convection(heat_transfer_coefficient=300.0, ambient=20.0),
            "sprayed": Convection(heat_transfer_coefficient=50.0, ambient=20.0),
        },
        initial_temperature=400.0,
        probes=PROBES,
    )


@pytest.fixture(scope="module")
def run():
    solution = solve(coated_strip(), end_time=300.0, time_step=2.0, output_interval=30.0)
    return assess(solution, target=150.0)


@pytest.fixture(scope="module")
def folder(run, tmp_path_factory):
    out = tmp_path_factory.mktemp("writers") / "results"
    files = write_results(run, out, svg=True)
    return out, files


# -- VTK ------------------------------------------------------------------------------------


def read_vtu(path: Path) -> dict:
    reader = vtkXMLUnstructuredGridReader()
    reader.SetFileName(str(path))
    reader.Update()
    grid = reader.GetOutput()
    cells = [
        [grid.GetCell(i).GetPointId(j) for j in range(grid.GetCell(i).GetNumberOfPoints())]
        for i in range(grid.GetNumberOfCells())
    ]
    return {
        "points": vtk_to_numpy(grid.GetPoints().GetData()),
        "types": np.array([grid.GetCellType(i) for i in range(grid.GetNumberOfCells())]),
        "cells": cells,
        "point": {
            name: vtk_to_numpy(grid.GetPointData().GetArray(name))
            for name in ("temperature", "heat_flux")
        },
        "cell": {
            name: vtk_to_numpy(grid.GetCellData().GetArray(name))
            for name in ("region", "edge_group")
        },
    }


def read_pvd(path: Path) -> list[tuple[float, str]]:
    root = ET.parse(path).getroot()
    return [(float(d.get("timestep")), d.get("file")) for d in root.iter("DataSet")]


def test_vtk_series_reads_back_with_vtk(run, folder):
    out, _ = folder
    solution = run.solution
    section = solution.model.section
    legend = json.loads((out / "fields" / "legend.json").read_text(encoding="utf-8"))
    region_id = {name: int(i) for i, name in legend["region"].items()}
    group_id = {name: int(i) for i, name in legend["edge_group"].items()}
    assert set(region_id) == set(section.regions) and set(group_id) == set(section.edge_groups)

    series = read_pvd(out / "fields" / "temperature.pvd")
    times = [t for t, _ in series]
    assert times[0] == 0.0, "the initial state comes first"
    assert times == solution.output_times.tolist()  # written with repr: exact

    expected_regions = np.empty(section.mesh.t.shape[1], dtype=int)
    for name, cells in section.regions.items():
        expected_regions[cells] = region_id[name]
    facets = section.mesh.facets
    group_of_edge = {
        frozenset(facets[:, f].tolist()): group_id[name]
        for name, indices in section.edge_groups.items()
        for f in indices
    }
    for (_, name), field in zip(series, solution.fields, strict=True):
        data = read_vtu(out / "fields" / name)
        np.testing.assert_array_equal(data["points"][:, :2], section.vertices.T)
        np.testing.assert_array_equal(data["point"]["temperature"], field)
        triangles = data["types"] == VTK_TRIANGLE
        lines = data["types"] == VTK_LINE
        assert triangles.sum() == section.mesh.t.shape[1]
        assert lines.sum() == sum(len(f) for f in section.edge_groups.values())
        assert triangles.sum() + lines.sum() == len(data["types"])
        # Triangles: the mesh's corners, their region, no edge group.
        corners = np.array([c for c, tri in zip(data["cells"], triangles, strict=True) if tri])
        np.testing.assert_array_equal(corners, section.mesh.t.T)
        np.testing.assert_array_equal(data["cell"]["region"][triangles], expected_regions)
        np.testing.assert_array_equal(data["cell"]["edge_group"][triangles], -1)
        # Lines: each a boundary facet, with the id of the group it belongs to.
        np.testing.assert_array_equal(data["cell"]["region"][lines], -1)
        line_cells = [c for c, line in zip(data["cells"], lines, strict=True) if line]
        written = data["cell"]["edge_group"][lines]
        assert [group_of_edge[frozenset(c)] for c in line_cells] == written.tolist()
        flux = data["point"]["heat_flux"]
        assert flux.shape == (section.vertices.shape[1], 3)
        np.testing.assert_array_equal(flux[:, 2], 0.0)
        np.testing.assert_allclose(flux, vertex_heat_flux(solution.model, field), rtol=1e-15)


def test_vertex_heat_flux_is_exact_for_a_linear_field(run):
    # P1 gradients reproduce a linear field, so −k∇T is known exactly at every vertex whose
    # triangles all lie in one region (k of that region); a mixed vertex averages the two.
    model = run.solution.model
    section = model.section
    x, y = section.vertices
    gradient = np.array([2000.0, -800.0])  # K/m
    field = 300.0 + gradient[0] * x + gradient[1] * y
    flux = vertex_heat_flux(model, field)
    conductivity = {STEEL: 40.0, "coat": 2.0}
    for name, k in conductivity.items():
        inside = np.zeros(x.size, dtype=bool)
        inside[np.unique(section.mesh.t[:, section.regions[name]])] = True
        for other in set(conductivity) - {name}:
            inside[np.unique(section.mesh.t[:, section.regions[other]])] = False
        assert inside.sum() > 10
        np.testing.assert_allclose(
            flux[inside, :2], np.tile(-k * gradient, (inside.sum(), 1)), rtol=1e-9
        )
    np.testing.assert_array_equal(flux[:, 2], 0.0)


def test_heat_flux_carries_the_heat_that_leaves_through_the_edges():
    # The recovered flux integrated along the cooled edges against the solver's own heat
    # flow (h·(T − T∞) integrated along them, an independent path). The vertex-averaged P1
    # gradient is first-order accurate at the boundary: on a 1.5 mm mesh of a 30 mm x 20 mm
    # quarter bar (Bi ≈ 0.1) the gap is about 2 %; 4 % is allowed.
    cooled = Convection(heat_transfer_coefficient=400.0, ambient=60.0)
    quarter = Rectangle(
        0.03,
        0.02,
        edge_names={"left": "symmetry", "bottom": "symmetry", "right": "cooled", "top": "cooled"},
    )
    model = ThermalModel(
        quarter.mesh(0.0015),
        Material(40.0, 7850.0, 520.0),
        boundaries={"symmetry": Insulated("symmetry"), "cooled": cooled},
        initial_temperature=850.0,
    )
    solution = solve(model, end_time=200.0, time_step=1.0, output_interval=50.0)
    section = model.section
    x, y = section.vertices
    for k in range(1, len(solution.output_times)):
        flux = vertex_heat_flux(model, solution.fields[k])
        leaving = 0.0
        for facet in section.edge_groups["cooled"]:
            i, j = section.mesh.facets[:, facet]
            normal = (1.0, 0.0) if np.isclose(x[i], 0.03) and np.isclose(x[j], 0.03) else (0, 1)
            length = np.hypot(x[i] - x[j], y[i] - y[j])
            leaving += length * 0.5 * (flux[i, :2] + flux[j, :2]) @ np.array(normal)
        step = int(np.argmin(np.abs(solution.times - solution.output_times[k])))
        assert leaving == pytest.approx(-solution.heat_flow["cooled"][step], rel=0.04)


def test_xdmf_series_reads_back_with_h5py(run, folder):
    h5py = pytest.importorskip("h5py", reason="the XDMF series needs h5py (the xdmf extra)")
    out, files = folder
    assert Path("fields/temperature.xdmf") in files and Path("fields/temperature.h5") in files
    solution = run.solution
    root = ET.parse(out / "fields" / "temperature.xdmf").getroot()
    collection = root.find("Domain/Grid[@CollectionType='Temporal']")
    steps = collection.findall("Grid")
    assert [float(s.find("Time").get("Value")) for s in steps] == pytest.approx(
        solution.output_times.tolist(), rel=1e-15, abs=0
    )

    def dataset(item) -> np.ndarray:
        file_name, name = item.text.strip().split(":")
        assert file_name == "temperature.h5"
        with h5py.File(out / "fields" / file_name, "r") as h5:
            return h5[name.lstrip("/")][()]

    mesh = root.find("Domain/Grid[@Name='mesh']")
    topology = dataset(mesh.find("Topology/DataItem"))
    np.testing.assert_array_equal(topology, solution.model.section.mesh.t.T)
    for step, field in zip(steps, solution.fields, strict=True):
        attributes = {a.get("Name"): a.find("DataItem") for a in step.findall("Attribute")}
        np.testing.assert_array_equal(dataset(attributes["temperature"]), field)
        assert dataset(attributes["heat_flux"]).shape == (len(field), 3)


# -- CSV ------------------------------------------------------------------------------------


def test_histories_csv_reads_back(run, folder):
    out, _ = folder
    solution = run.solution
    with open(out / "histories.csv", newline="", encoding="utf-8") as stream:
        rows = list(csv.reader(stream))
    header, values = rows[0], np.array(rows[1:], dtype=float)
    assert all(re.fullmatch(r".+ \[[^\]]+\]", name) for name in header), header
    column = {name: values[:, i] for i, name in enumerate(header)}
    assert len(values) == len(solution.times)
    expected = {
        "time [s]": solution.times,
        "mean [degC]": solution.mean,
        "minimum [degC]": solution.minimum,
        "maximum [degC]": solution.maximum,
        "internal difference [K]": solution.maximum - solution.minimum,
        "generated heat [W/m]": solution.generated,
        "stored energy [J/m]": solution.stored_energy,
        "absorbed heat [J/m]": solution.absorbed_heat,
    }
    expected |= {f"probe {n} [degC]": h for n, h in solution.probes.items()}
    expected |= {f"lumped {n} [degC]": h for n, h in run.model_temperatures.items()}
    expected |= {f"heat flow {n} [W/m]": h for n, h in solution.heat_flow.items()}
    assert {"lumped classical [degC]", "lumped corrected [degC]"} <= set(expected)
    assert f"heat flow {OIL} [W/m]" in header
    for name, history in expected.items():
        np.testing.assert_array_equal(column[name], history, err_msg=name)


# -- plots ----------------------------------------------------------------------------------


def test_every_plot_is_written_as_png_and_svg(folder):
    out, files = folder
    for stem in PLOTS:
        png, svg = out / "plots" / f"{stem}.png", out / "plots" / f"{stem}.svg"
        assert Path(f"plots/{stem}.png") in files and Path(f"plots/{stem}.svg") in files
        with Image.open(png) as image:
            assert image.format == "PNG" and min(image.size) >= 300
            spread = ImageStat.Stat(image.convert("L")).stddev[0]
            assert spread > 10, f"{png.name} looks blank"
        assert ET.parse(svg).getroot().tag.endswith("svg")
    snapshots = ET.parse(out / "plots" / "field_snapshots.svg").getroot()
    embedded = list(snapshots.iter("{http://www.w3.org/2000/svg}image"))
    assert len(embedded) == 1, "the snapshots' picture is an image inside the SVG"


def test_lumped_error_plot_shows_field_minus_lumped_over_the_driving_difference(run):
    axes = lumped_error_figure(run).axes[0]
    curves = {line.get_label(): line.get_ydata() for line in axes.get_lines()}
    drive = run.lumped.initial_temperature - run.lumped.equilibrium
    slowest = run.solution.maximum  # the strip cools: its hottest point is the slowest
    for model in ("classical", "corrected"):
        lumped = run.model_temperatures[model]
        np.testing.assert_allclose(
            curves[f"{model} lumped vs field mean"], 100 * (run.solution.mean - lumped) / drive
        )
        np.testing.assert_allclose(
            curves[f"{model} lumped vs slowest point"], 100 * (slowest - lumped) / drive
        )
    low, high = axes.get_ylim()
    assert low < -100 * run.verdict.tolerance and high > 100 * run.verdict.tolerance


def test_snapshots_mark_the_hottest_and_coldest_vertex(run):
    solution = run.solution
    canvas, picture = snapshot_canvas(run)
    indices = snapshot_indices(solution.output_times, run.peak_internal_difference_time)
    assert len(canvas.layout.panels) == len(indices) == 4
    x, y = solution.model.section.vertices
    for panel, index in enumerate(indices):
        field = solution.fields[index]
        for vertex, colour in ((np.argmax(field), "warm"), (np.argmin(field), "cool")):
            column, row = to_pixel(canvas, panel, x[vertex], y[vertex])
            # the marker's centre pixel carries its colour (the marker is 11 px across)
            assert picture[int(row), int(column)] == getattr(canvas.palette, colour)


def test_snapshot_times_spread_over_the_run_and_include_the_peak():
    times = np.linspace(0.0, 600.0, 31)
    assert snapshot_indices(times, peak_time=19.0) == [1, 11, 20, 30]
    assert snapshot_indices(times, peak_time=300.0) == [1, 15, 20, 30]
    assert snapshot_indices(times[:3], peak_time=0.0) == [0, 1, 2]


# -- animation ------------------------------------------------------------------------------


def test_frame_count_is_capped():
    assert animation_writer.frame_indices(10) == list(range(10))
    many = animation_writer.frame_indices(1001)
    assert len(many) == animation_writer.MAX_FRAMES == 60
    assert many[0] == 0 and many[-1] == 1000 and np.all(np.diff(many) > 0)


@pytest.fixture(scope="module")
def long_run():
    """A run with more output times (151) than an animation shows."""
    model = coated_strip(mesh_size=0.004)
    return solve(model, end_time=150.0, time_step=1.0, output_interval=1.0)


def test_animation_caps_frames_and_keeps_one_colour_scale(long_run, tmp_path):
    gif, mp4 = tmp_path / "field.gif", tmp_path / "field.mp4"
    written = animation_writer.write_animation(
        long_run, gif, mp4 if animation_writer.mp4_available() else None
    )
    assert written[0] == gif
    layout = animation_writer.film_canvas(long_run).layout
    with Image.open(gif) as image:
        assert image.n_frames == 60
        assert image.size == (layout.width, layout.height)
        assert layout.width % 16 == 0 and layout.height % 16 == 0  # as MP4 encoders want
        assert image.info["loop"] == 0
        frames = []
        for k in (0, image.n_frames - 1):
            image.seek(k)
            frames.append(np.asarray(image.convert("RGB")))
    first, last = frames
    assert np.abs(first.astype(int) - last.astype(int)).max() > 50, "the field did not change"
    # The colour bars and their tick labels are the same in every frame: one colour scale
    # for the whole clip.
    bars = slice(layout.panels[0].bar.top, layout.panels[0].ticks.bottom)
    np.testing.assert_array_equal(first[bars], last[bars])


def test_animation_video(long_run, tmp_path):
    imageio_ffmpeg = pytest.importorskip(
        "imageio_ffmpeg", reason="MP4 needs imageio-ffmpeg (the mp4 extra)"
    )
    mp4 = tmp_path / "field.mp4"
    animation_writer.write_animation(long_run, None, mp4)
    reader = imageio_ffmpeg.read_frames(str(mp4))
    meta = next(reader)
    layout = animation_writer.film_canvas(long_run).layout
    assert tuple(meta["size"]) == (layout.width, layout.height)
    assert sum(1 for _ in reader) == 60


# -- report ---------------------------------------------------------------------------------


class _Page(HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags: list[tuple[str, dict]] = []
        self.headings: list[str] = []
        self.text: list[str] = []
        self._in_heading = False

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))
        self._in_heading = tag == "h2"
        if self._in_heading:
            self.headings.append("")

    def handle_endtag(self, tag):
        if tag == "h2":
            self._in_heading = False

    def handle_data(self, data):
        self.text.append(data)
        if self._in_heading:
            self.headings[-1] += data


def parse_page(path: Path) -> _Page:
    page = _Page()
    page.feed(path.read_text(encoding="utf-8"))
    return page


def test_report_is_one_self_contained_file(folder):
    out, files = folder
    page = parse_page(out / "report.html")
    assert {tag for tag, _ in page.tags}.isdisjoint({"script", "link", "iframe", "object"})
    for tag, attrs in page.tags:
        for value in attrs.values():
            assert not re.match(r"\s*(https?:)?//", value or ""), f"<{tag}> points outside"
    images = [attrs["src"] for tag, attrs in page.tags if tag == "img"]
    assert len(images) == len(PLOTS) + 1  # the plots and the animation
    assert all(
        src.startswith(("data:image/png;base64,", "data:image/gif;base64,")) for src in images
    )
    import base64

    embedded = base64.b64decode(images[0].split(",", 1)[1])
    assert embedded == (out / "plots" / "histories.png").read_bytes()


def test_report_says_what_the_assessment_says(run, folder):
    out, _ = folder
    page = parse_page(out / "report.html")
    text = " ".join(" ".join(page.text).split())
    assert page.headings == [h for k, h in HEADINGS.items() if k not in PROCESS_PARTS]
    verdict = run.verdict
    for sentence in (verdict.direction, verdict.advice, *verdict.reasons):
        assert " ".join(sentence.split()) in text
    assert verdict.rating in text.lower()
    for bi in run.biot:
        assert bi.explanation in text
    assert f"{run.correction_shape:.4g}" in text
    assert (
        f"{run.lumped.time_constant:.5g}" in text and f"{run.corrected.time_constant:.5g}" in text
    )
    if run.two_node is not None:
        assert f"{run.two_node.parameters()['internal_conductance_W_per_K']:.5g}" in text
    for warning in run.solution.checks.warnings:
        assert warning in text
    assert "licensed professional practice" in text
    assert "time to target" in text
    slowest = run.time_to_target["slowest"]
    assert duration_text(slowest) in text  # as a person reads it


def test_report_escapes_every_name(folder):
    out, _ = folder
    page = (out / "report.html").read_text(encoding="utf-8")
    for name in (STEEL, OIL, STEEL_NAME, *PROBES, "round figures & such"):
        assert html.escape(name) in page, name
    assert "<script" not in page and "<i>water" not in page and "<b>" not in page
    text = " ".join(parse_page(out / "report.html").text)
    for name in (STEEL, OIL, STEEL_NAME, *PROBES):
        assert name in text, "the names read as written"
    markdown = (out / "report.md").read_text(encoding="utf-8")
    assert "steel &lt;script&gt;alert\\(1\\)" not in markdown  # parentheses stay as they are
    assert "steel &lt;script&gt;alert(1)&lt;/script&gt;" in markdown
    assert "\\*face\\*\\|a" in markdown and "<x>" not in markdown


def test_markdown_report_refers_to_files_that_exist(folder):
    out, _ = folder
    markdown = (out / "report.md").read_text(encoding="utf-8")
    targets = re.findall(r"!\[[^\]]*\]\(([^)]+)\)", markdown)
    assert len(targets) == len(PLOTS) + 1
    for target in targets:
        assert not target.startswith(("/", "http")) and (out / target).is_file(), target
    for anchor, heading in HEADINGS.items():
        assert (f"## {heading}" in markdown) == (anchor not in PROCESS_PARTS)


# -- the results folder ---------------------------------------------------------------------


def test_results_folder_lists_what_it_holds(folder):
    out, files = folder
    on_disk = sorted(p.relative_to(out).as_posix() for p in out.rglob("*") if p.is_file())
    assert sorted(f.as_posix() for f in files) == on_disk
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    assert sorted(summary["files"]) == on_disk
    for name in ("report.html", "report.md", "histories.csv", "animation.gif"):
        assert name in on_disk
    assert not list(out.parent.glob(".*")), "temporary files were left behind"


def test_switches_leave_their_files_out(run, tmp_path):
    files = write_results(run, tmp_path / "lean", report=False, animation=False, vtk=False)
    names = sorted(f.as_posix() for f in files)
    assert names == sorted(
        [
            "summary.json",
            "histories.csv",
            *(f"plots/{s}.png" for s in PLOTS),  # PNG only unless SVG is asked for
            ".soakwise-results",
        ]
    )
    assert (
        sorted(
            p.relative_to(tmp_path / "lean").as_posix()
            for p in (tmp_path / "lean").rglob("*")
            if p.is_file()
        )
        == names
    )
    bare = write_results(run, tmp_path / "bare", report=False, animation=False, plots=False)
    assert not any(f.as_posix().startswith("plots/") for f in bare)
    assert not (tmp_path / "bare" / "plots").exists()


def test_a_required_extra_that_is_missing_stops_before_writing(run, tmp_path, monkeypatch):
    monkeypatch.setattr(advisor.results_folder, "mp4_available", lambda: False)
    with pytest.raises(AdvisorError, match="mp4"):
        write_results(run, tmp_path / "out", mp4=True)
    assert not (tmp_path / "out").exists() and not list(tmp_path.iterdir())
    # a case's [outputs] mp4 = true: written when the extra is there, else skipped with a note
    asked = advisor.pipeline.Results(run, outputs={"mp4": True})
    files = write_results(asked, tmp_path / "out", report=False, vtk=False)
    assert Path("animation.gif") in files and Path("animation.mp4") not in files
    assert files.notes == [
        "animation.mp4 skipped: it needs the 'mp4' extra (pip install \"soakwise[mp4]\")"
    ]


def test_mp4_is_written_only_on_request(run, tmp_path):
    pytest.importorskip("imageio_ffmpeg", reason="MP4 needs imageio-ffmpeg (the mp4 extra)")
    plain = write_results(run, tmp_path / "plain", report=False, vtk=False, plots=False)
    assert Path("animation.mp4") not in plain and plain.notes == []
    case = advisor.pipeline.Results(run, outputs={"mp4": True})
    asked = write_results(case, tmp_path / "asked", report=False, vtk=False, plots=False)
    assert Path("animation.mp4") in asked


def test_results_docstring_example_runs():
    result = doctest.testmod(advisor.pipeline, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0


def test_an_axisymmetric_run_with_radiation_and_no_target(tmp_path):
    # Whole solid of revolution: heat flows in W and energies in J, locations in r and z; a
    # schedule and radiation mean no closed-form exponential, and there is no target.
    shape = Rectangle(0.02, 0.04, edge_names={"left": "axis"})
    model = ThermalModel(
        Section(shape, axisymmetric=True).mesh(0.005),
        Material(20.0, 7800.0, 460.0),
        boundaries={
            "right": (
                Convection(PiecewiseLinear((0.0, 100.0, 600.0), (10.0, 30.0, 30.0)), 900.0),
                Radiation(0.7, 900.0),
            ),
            "top": Insulated(),
            "bottom": Insulated(),
        },
        initial_temperature=20.0,
    )
    run = assess(solve(model, end_time=600.0, time_step=10.0))
    assert run.fitted is None
    out = tmp_path / "round"
    write_results(run, out, animation=False)
    with open(out / "histories.csv", newline="", encoding="utf-8") as stream:
        header = next(csv.reader(stream))
    for name in ("minimum r [m]", "maximum z [m]", "heat flow right [W]", "stored energy [J]"):
        assert name in header
    text = " ".join(parse_page(out / "report.html").text)
    assert "No target temperature was given" in text
    assert "Not fitted: a single exponential" in text
    assert "radiation, emissivity 0.7" in text and "PiecewiseLinear schedule, 10 to 30" in text
    legend = json.loads((out / "fields" / "legend.json").read_text(encoding="utf-8"))
    assert "(r, z, 0)" in legend["point_data"]["heat_flux"]
    assert legend["extent"].startswith("the modelled section only")
    assert legend["edge_group"] == {"0": "axis", "1": "bottom", "2": "right", "3": "top"}


# -- progress -------------------------------------------------------------------------------


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def _small_model() -> ThermalModel:
    return coated_strip(mesh_size=0.004)


def test_progress_is_quiet_when_not_a_terminal():
    stream = io.StringIO()
    progress = RunProgress(stream)
    solution = solve(_small_model(), end_time=60.0, time_step=1.0, progress=progress)
    assert stream.getvalue() == ""
    assert progress.steps == solution.stats.steps and progress.time == 60.0


def test_progress_shows_simulated_time_steps_and_time_left():
    stream = _Terminal()
    solution = solve(_small_model(), end_time=60.0, time_step=1.0, progress=RunProgress(stream))
    shown = stream.getvalue()
    last = shown.replace("\r", "\n").strip().splitlines()[-1]
    assert "simulated, 1 min of 1 min, " in last  # times as a person reads them
    assert f"{solution.stats.steps} steps" in last
    assert "left" in last and "100%" in last


def test_progress_docstring_example_runs():
    result = doctest.testmod(advisor.cli.progress)
    assert result.attempted > 0 and result.failed == 0
