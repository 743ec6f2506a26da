"""Nothing lost: ``--force`` replaces only a results folder soakwise wrote, one run at a time
writes a folder, staging folders never outlive a run, and Ctrl-C or SIGTERM during a solve ends
with one line, exit status 130 and nothing written.

These are properties of the program itself, checked on the file system: no outside reference
applies.
"""

from __future__ import annotations

import json
import os
import re
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from advisor import assess, write_results
from advisor.casefile.starters import starter_text
from advisor.cli import EXIT_INTERRUPTED, EXIT_USAGE, main
from advisor.errors import ResultsFolderExistsError
from advisor.folder_lock import leftovers, lock_path, results_lock
from advisor.results_folder import MARKER, check_results_folder
from fem import Convection, Material, ThermalModel, solve
from geometries import Rectangle

ROOT = Path(__file__).resolve().parents[1]


def small_case(folder: Path, *, time_step: str = "1 s", end_time: str = "1 min") -> Path:
    """The quench-bar starter on a coarse mesh: ``folder/bar.toml``."""
    text = starter_text("quench-bar")
    text = text.replace('mesh_size = "1 mm"', 'mesh_size = "5 mm"')
    text = text.replace('end_time = "10 min"', f'end_time = "{end_time}"')
    text = text.replace('time_step = "1 s"', f'time_step = "{time_step}"')
    path = folder / "bar.toml"
    path.write_text(text, encoding="utf-8")
    return path


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


def write(assessment, folder: Path, force: bool = False) -> list[Path]:
    return write_results(assessment, folder, force=force, animation=False, report=False, vtk=False)


def refused(argv: list[str], capsys) -> str:
    """The one error line of a command that must be refused with exit status 2."""
    assert main(argv) == EXIT_USAGE
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1, err
    return err[0]


# --- --force -----------------------------------------------------------------------------------


def test_force_refuses_a_plain_file(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    case = small_case(tmp_path)
    (tmp_path / "notes.txt").write_text("mine")
    line = refused(["run", str(case), "--out", "notes.txt", "--force"], capsys)
    assert "it is not a folder" in line
    assert (tmp_path / "notes.txt").read_text() == "mine"


@pytest.mark.skipif(not Path("/dev/null").exists(), reason="no /dev/null on this system")
def test_force_refuses_a_device(tmp_path, capsys):
    line = refused(["run", str(small_case(tmp_path)), "--out", "/dev/null", "--force"], capsys)
    assert "it is not a folder (a file or a device)" in line
    assert Path("/dev/null").is_char_device()


@pytest.mark.parametrize("out", [".", "/", ".."])
def test_force_refuses_the_current_root_or_a_holding_folder(out, tmp_path, capsys, monkeypatch):
    work = tmp_path / "work"
    work.mkdir()
    monkeypatch.chdir(work)
    case = small_case(work)
    line = refused(["run", str(case), "--out", out, "--force"], capsys)
    assert "the root folder, the current folder or one holding it" in line
    assert case.is_file()


def test_force_refuses_the_folder_holding_the_case_file(tmp_path, capsys):
    project = tmp_path / "project"
    project.mkdir()
    case = small_case(project)
    (project / MARKER).write_text(json.dumps({"files": ["bar.toml", MARKER]}))
    line = refused(["run", str(case), "--out", str(project), "--force"], capsys)
    assert "it holds bar.toml" in line
    assert case.is_file()


def test_force_refuses_a_folder_soakwise_did_not_write(tmp_path, capsys):
    folder = tmp_path / "data"
    folder.mkdir()
    (folder / "measurements.csv").write_text("t,T\n0,850\n")
    line = refused(["run", str(small_case(tmp_path)), "--out", str(folder), "--force"], capsys)
    assert f"no readable {MARKER}" in line
    assert (folder / "measurements.csv").is_file()


def test_force_replaces_a_results_folder_but_not_one_with_files_added(tmp_path, assessment):
    folder = tmp_path / "results"
    first = write(assessment, folder)
    listed = json.loads((folder / MARKER).read_text())["files"]
    assert sorted(listed) == sorted(f.as_posix() for f in first)
    assert MARKER in listed
    write(assessment, folder, force=True)  # a folder soakwise wrote, as it wrote it
    (folder / "plots" / "my-notes.txt").write_text("keep me")
    with pytest.raises(ResultsFolderExistsError, match="plots/my-notes.txt"):
        write(assessment, folder, force=True)
    (folder / "plots" / "my-notes.txt").unlink()
    (folder / "extra").mkdir()
    with pytest.raises(ResultsFolderExistsError, match="the folder 'extra'"):
        write(assessment, folder, force=True)
    os.symlink(folder, tmp_path / "link")
    with pytest.raises(ResultsFolderExistsError, match="symbolic link"):
        check_results_folder(tmp_path / "link", force=True)


# --- one writer at a time; stale staging ---------------------------------------------------------


def test_a_second_run_into_a_locked_folder_is_refused(tmp_path, capsys):
    out = tmp_path / "results"
    holder = subprocess.Popen(
        [
            sys.executable,
            "-c",
            "import sys, time; from advisor.folder_lock import results_lock\n"
            f"with results_lock({str(out)!r}):\n    print('held', flush=True); time.sleep(60)",
        ],
        cwd=ROOT,
        stdout=subprocess.PIPE,
        text=True,
    )
    try:
        assert holder.stdout.readline().strip() == "held"
        line = refused(["run", str(small_case(tmp_path)), "--out", str(out)], capsys)
        assert f"another run is writing {str(out)!r} (process {holder.pid} holds" in line
    finally:
        holder.kill()
        holder.wait()
    assert not out.exists()


def test_the_lock_is_removed_and_stale_staging_of_this_name_only(tmp_path, assessment):
    folder = tmp_path / "results"
    stale = [tmp_path / ".results.ab12cd34.part", tmp_path / ".results.old"]
    others = [tmp_path / ".results.b.ab12cd34.part", tmp_path / ".other.ab12cd34.part"]
    for path in stale + others:
        path.mkdir()
        (path / "summary.json").write_text("{}")
    assert leftovers(folder) == sorted(stale)
    write(assessment, folder)
    assert all(not p.exists() for p in stale)
    assert all(p.is_dir() for p in others)
    assert not lock_path(folder).exists()
    with results_lock(folder), results_lock(folder):  # held again by the same process
        assert lock_path(folder).is_file()
    assert not lock_path(folder).exists()


def test_a_missing_parent_is_made_and_removed_again_when_nothing_is_written(tmp_path):
    with results_lock(tmp_path / "a" / "b" / "results"):
        assert (tmp_path / "a" / "b").is_dir()
    assert list(tmp_path.iterdir()) == []


# --- signals -------------------------------------------------------------------------------------


@pytest.mark.slow
def as_from_a_terminal() -> None:
    """Ctrl-C at its default in the command, as a terminal starts it (a suite run as a
    background job would hand it an ignored Ctrl-C, which the command rightly keeps)."""
    signal.signal(signal.SIGINT, signal.SIG_DFL)


@pytest.mark.parametrize("stop", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
def test_a_signal_during_the_solve_ends_with_one_line_and_nothing_written(stop, tmp_path):
    # 0.5 ms steps over 10 min: 1.2 million steps, far longer than the wait below
    case = small_case(tmp_path, time_step="0.5 ms", end_time="10 min")
    out = tmp_path / "results"
    environment = {**os.environ, "PYTHONPATH": str(ROOT)}
    run = subprocess.Popen(
        [sys.executable, "-m", "advisor.cli", "run", str(case), "--out", str(out)],
        cwd=tmp_path,
        stderr=subprocess.PIPE,
        text=True,
        env=environment,
        preexec_fn=as_from_a_terminal,
    )
    assert run.stderr.readline().startswith("Meshing and solving")
    deadline = time.monotonic() + 120
    while not any(tmp_path.glob(".results.lock")) and time.monotonic() < deadline:
        time.sleep(0.1)
    time.sleep(15)  # imports and meshing done: the run is stepping
    run.send_signal(stop)
    err = run.communicate(timeout=120)[1]
    assert run.returncode == EXIT_INTERRUPTED, err
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    assert re.fullmatch(
        r"soakwise: interrupted at t = (?:[0-9.]+ (?:s|ms)|\d+ min(?: \d+ s)?) of 10 min; "
        r"nothing written",
        lines[0],
    ), lines[0]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bar.toml"]  # no staging, no lock


# --- study folders -------------------------------------------------------------------------------


def test_force_replaces_a_study_store_only(tmp_path):
    from advisor.studies.store import FILE_NAME, StudyError, StudyStore, check_replaceable
    from advisor.studies.study import open_store

    real = tmp_path / "study"
    real.mkdir()
    store = StudyStore(real / FILE_NAME)
    store.describe({"case": "bar.toml"})
    check_replaceable(real)  # while the store is open, in WAL mode
    store.connection.close()
    check_replaceable(real)
    open_store(real, resume=False, force=True).connection.close()

    other = tmp_path / "other"
    other.mkdir()
    (other / FILE_NAME).write_text("my own notes, not a database")
    (other / "cases").mkdir()
    (other / "cases" / "keep.txt").write_text("mine")
    with pytest.raises(StudyError, match="only a study store soakwise wrote is replaced"):
        open_store(other, resume=False, force=True)
    assert (other / "cases" / "keep.txt").read_text() == "mine"
    assert (other / FILE_NAME).read_text() == "my own notes, not a database"


@pytest.mark.parametrize("delay", [0.5, 1.5, 3.0])
def test_ctrl_c_at_any_early_moment_prints_one_line(delay, tmp_path):
    """Ctrl-C while the modules load, the case is read or the mesh is made: one line, no
    traceback, exit status 130 (or, if the run was quicker than the signal, a finished run)."""
    case = small_case(tmp_path, time_step="0.5 ms", end_time="10 min")
    run = subprocess.Popen(
        [sys.executable, "-m", "advisor.cli", "run", str(case), "--out", str(tmp_path / "out")],
        cwd=tmp_path,
        stderr=subprocess.PIPE,
        text=True,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
        preexec_fn=as_from_a_terminal,
    )
    time.sleep(delay)
    run.send_signal(signal.SIGINT)
    err = run.communicate(timeout=120)[1]
    assert run.returncode == EXIT_INTERRUPTED, err
    assert "Traceback" not in err
    assert err.strip().splitlines()[-1].startswith("soakwise: interrupted"), err
    assert len([line for line in err.splitlines() if "interrupted" in line]) == 1
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bar.toml"]


def test_another_thread_is_refused_like_another_process(tmp_path):
    import threading

    folder = tmp_path / "results"
    refusals: list[str] = []

    def second_writer() -> None:
        try:
            with results_lock(folder):
                pass
        except ResultsFolderExistsError as error:
            refusals.append(str(error))

    with results_lock(folder):
        thread = threading.Thread(target=second_writer)
        thread.start()
        thread.join()
    assert len(refusals) == 1 and "another run is writing" in refusals[0]
    assert not lock_path(folder).exists()
