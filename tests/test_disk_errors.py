"""A full disk or a folder that cannot be written: found before the solve where possible, and
otherwise ending with one line, exit status 1, nothing half-written and no traceback.

These are properties of the program itself, checked on the file system: no outside reference
applies. The full disk is simulated by writers that raise ``OSError(ENOSPC)`` and by a
reported free space; a read-only folder needs a user whom permissions bind (not root).
"""

from __future__ import annotations

import errno
import os
import shutil
from pathlib import Path

import pytest

import advisor.folder_room as folder_room
import advisor.pipeline as pipeline
import advisor.results_folder as results_folder
import advisor.writers.pictures as pictures
import advisor.writers.side_by_side as side_by_side
from advisor import assess, write_results
from advisor.casefile.starters import starter_text
from advisor.cli import EXIT_FAILED, EXIT_OK, main
from advisor.folder_room import CannotWriteError, expected_size
from fem import Convection, Material, ThermalModel, solve
from geometries import Rectangle


def small_case(folder: Path) -> Path:
    """The quench-bar starter on a coarse mesh with 5 s steps: ``folder/bar.toml``."""
    text = starter_text("quench-bar").replace('mesh_size = "1 mm"', 'mesh_size = "5 mm"')
    text = text.replace('time_step = "1 s"', 'time_step = "5 s"')
    path = folder / "bar.toml"
    path.write_text(text, encoding="utf-8")
    return path


def one_error_line(capsys) -> str:
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1, err
    assert "Traceback" not in err[0]
    return err[0]


@pytest.fixture(scope="module")
def assessment():
    air = Convection(heat_transfer_coefficient=20.0, ambient=25.0)
    model = ThermalModel(
        Rectangle(0.02, 0.01).mesh(size=0.005),
        Material(200.0, 2700.0, 900.0),
        boundaries={side: air for side in ("left", "right", "top", "bottom")},
        initial_temperature=180.0,
    )
    return assess(solve(model, end_time=600.0, time_step=60.0))


def no_space(*args, **kwargs):
    raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC), "fields/temperature_0003.vtu")


# Each writer, with only the outputs it needs switched on (the others cost time).
WRITERS = {
    "write_histories_csv": {},
    "write_line_plots": {},
    "write_snapshots": {},
    "write_animation": {"animation": True},
    "write_vtk_series": {"vtk": True},
    "write_xdmf_series": {"vtk": True},
    "write_html_report": {"report": True},
    "write_summary_json": {},
}


@pytest.mark.parametrize("writer", WRITERS)
def test_a_full_disk_in_any_writer_leaves_nothing(writer, assessment, tmp_path, monkeypatch):
    if writer == "write_xdmf_series" and not results_folder.xdmf_available():
        pytest.skip("h5py (the xdmf extra) is not installed: the XDMF writer never runs")
    drawn = writer in ("write_line_plots", "write_snapshots", "write_animation")
    monkeypatch.setattr(pictures if drawn else results_folder, writer, no_space)
    outputs = {"animation": False, "report": False, "vtk": False, **WRITERS[writer]}
    with pytest.raises(CannotWriteError, match="no space left on the device"):
        write_results(assessment, tmp_path / "out", mp4=False, **outputs)
    assert list(tmp_path.iterdir()) == []  # no staging folder, no lock, no results


@pytest.mark.parametrize("beside", [True, False], ids=["pictures-beside", "one-after-other"])
def test_the_command_line_says_it_in_one_line_and_keeps_nothing(
    beside, tmp_path, monkeypatch, capsys
):
    """With the pictures drawn in another process (a free core) the failure here must wait
    for it, or it would still be writing into the folder being removed."""
    monkeypatch.setattr(side_by_side, "cores_free", lambda: beside)
    case = small_case(tmp_path)
    monkeypatch.setattr(results_folder, "write_vtk_series", no_space)
    status = main(["-q", "run", str(case), "--out", str(tmp_path / "out")])
    line = one_error_line(capsys)
    assert status == EXIT_FAILED
    assert line.startswith("soakwise: the run failed: the results could not be written to ")
    assert line.endswith("(no space left on the device); nothing was written")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bar.toml"]


def solve_forbidden(*args, **kwargs):
    raise AssertionError("the check should have come before the solve")


def test_a_path_under_a_file_is_refused_before_the_solve(tmp_path, monkeypatch, capsys):
    case = small_case(tmp_path)
    (tmp_path / "notes.txt").write_text("mine\n", encoding="utf-8")
    monkeypatch.setattr(pipeline, "run_case", solve_forbidden)
    status = main(["-q", "run", str(case), "--out", str(tmp_path / "notes.txt" / "out")])
    line = one_error_line(capsys)
    assert status == EXIT_FAILED
    assert "notes.txt' is a file, not a folder" in line
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bar.toml", "notes.txt"]
    assert (tmp_path / "notes.txt").read_text(encoding="utf-8") == "mine\n"


@pytest.mark.skipif(
    hasattr(os, "geteuid") and os.geteuid() == 0,
    reason="root writes in a read-only folder regardless of its permission bits",
)
def test_a_read_only_folder_is_refused_before_the_solve(tmp_path, monkeypatch, capsys):
    case = small_case(tmp_path)
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o555)
    monkeypatch.setattr(pipeline, "run_case", solve_forbidden)
    try:
        status = main(["-q", "run", str(case), "--out", str(locked / "out")])
        line = one_error_line(capsys)
        assert status == EXIT_FAILED
        assert "cannot write in" in line and "ermission denied" in line
        assert list(locked.iterdir()) == []
    finally:
        locked.chmod(0o755)


def test_no_room_for_the_results_is_found_after_meshing_before_the_solve(
    tmp_path, monkeypatch, capsys
):
    case = small_case(tmp_path)
    monkeypatch.setattr(pipeline, "run_model", solve_forbidden)
    usage = shutil.disk_usage(tmp_path)
    monkeypatch.setattr(
        folder_room.shutil, "disk_usage", lambda path: usage._replace(free=1_000_000)
    )
    status = main(["-q", "run", str(case), "--out", str(tmp_path / "out")])
    line = one_error_line(capsys)
    assert status == EXIT_FAILED
    assert "not enough room for the results" in line
    assert "MB expected, 1 MB free" in line
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bar.toml"]


def test_the_size_estimate_bounds_a_real_results_folder(tmp_path, capsys):
    case = small_case(tmp_path)
    out = tmp_path / "out"
    assert main(["-q", "run", str(case), "--out", str(out)]) == EXIT_OK
    size = sum(p.stat().st_size for p in out.rglob("*") if p.is_file())
    fields = sum(p.stat().st_size for p in (out / "fields").iterdir())
    first = (out / "fields" / "temperature_0000.vtu").read_text(errors="replace")
    nodes = int(first.split('NumberOfPoints="')[1].split('"')[0])
    outputs = len(list((out / "fields").glob("temperature_*.vtu")))
    estimate = expected_size(nodes, outputs)
    # An upper estimate, within a factor that still makes it useful.
    assert size <= estimate <= 5 * size, (size, estimate)
    per_frame = folder_room.FIELD_BYTES_PER_FRAME + folder_room.FIELD_BYTES_PER_NODE * nodes
    assert fields <= per_frame * outputs
