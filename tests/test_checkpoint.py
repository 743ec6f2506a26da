"""Runs that resume: a run stopped after a checkpoint and continued from it ends with the same
histories and fields as the run never stopped, to 1e-10 (the resumed run repeats the same
arithmetic on the same numbers: linear steps reuse the same factorisation of the same matrix,
so the agreement is to round-off, and 1e-10 K leaves room for a different BLAS path).
A checkpoint of another case file, another soakwise version or another format is refused with
the reason.

These are properties of the program itself (the reference is the same run not interrupted):
no outside reference applies.
"""

from __future__ import annotations

import copy
import csv
import os
import re
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest

import advisor.checkpoint as checkpoint_module
from advisor.casefile.case import CaseError, case_from_toml
from advisor.casefile.starters import starter_text
from advisor.checkpoint import (
    Checkpointer,
    CheckpointEvery,
    case_fingerprint,
    checkpoint_path,
    read_checkpoint,
    write_checkpoint,
)
from advisor.cli import EXIT_INTERRUPTED, EXIT_OK, EXIT_USAGE, main
from advisor.cli import run as run_command
from advisor.cli.common import SolvePosition
from advisor.errors import AdvisorError
from fem import (
    Convection,
    Insulated,
    Material,
    ModelError,
    Radiation,
    StopWhen,
    ThermalModel,
    solve,
)
from geometries import Rectangle

ROOT = Path(__file__).resolve().parents[1]
AGREEMENT = 1e-10  # K, J, W: the resumed run repeats the same arithmetic
HISTORIES = ("times", "mean", "minimum", "maximum", "stored_energy", "absorbed_heat")


class StopError(Exception):
    """Raised by a progress callback to stop a run in the middle."""


@pytest.fixture(scope="module")
def model():
    section = Rectangle(0.02, 0.01, edge_names={"left": "symmetry", "bottom": "symmetry"}).mesh(
        size=0.002
    )
    oil = Convection(heat_transfer_coefficient=500.0, ambient=60.0)
    return ThermalModel(
        section,
        Material(45.0, 7850.0, 475.0),
        boundaries={"symmetry": Insulated("symmetry"), "right": oil, "top": oil},
        initial_temperature=850.0,
        probes={"core": (0.0, 0.0)},
    )


def interrupted_state(model, every: int, stop_after: int, **options) -> dict:
    """Run until ``stop_after`` steps, keeping the state every ``every`` steps; the last
    state kept (copied, as a file would hold it)."""
    kept = {}

    def checkpoint(time, steps, snapshot):
        if steps % every == 0:
            kept["state"] = copy.deepcopy(snapshot())

    def progress(time, end_time, steps):
        if steps >= stop_after:
            raise StopError

    with pytest.raises(StopError):
        solve(model, checkpoint=checkpoint, progress=progress, **options)
    return kept["state"]


def assert_same_run(full, resumed) -> None:
    for name in HISTORIES:
        a, b = getattr(full, name), getattr(resumed, name)
        assert a.shape == b.shape, name
        assert np.max(np.abs(a - b)) <= AGREEMENT, name
    for name, values in full.probes.items():
        assert np.max(np.abs(values - resumed.probes[name])) <= AGREEMENT
    for name, values in full.heat_flow.items():
        assert np.max(np.abs(values - resumed.heat_flow[name])) <= AGREEMENT
    np.testing.assert_array_equal(full.output_times, resumed.output_times)
    assert np.max(np.abs(np.asarray(full.fields) - np.asarray(resumed.fields))) <= AGREEMENT
    assert full.stats.steps == resumed.stats.steps
    assert full.stats.rejected_steps == resumed.stats.rejected_steps
    assert full.stop_time == resumed.stop_time


@pytest.mark.parametrize(
    "options",
    [
        {"time_step": 1.0},
        {"method": "bdf2"},
        {"method": "crank-nicolson", "stop": StopWhen("core", 300.0)},
    ],
    ids=["fixed crank-nicolson", "adaptive bdf2", "adaptive with a stop"],
)
def test_a_resumed_run_equals_the_run_never_stopped(model, options):
    options = {"end_time": 600.0, "output_interval": 60.0, **options}
    full = solve(model, **options)
    state = interrupted_state(model, every=7, stop_after=40, **options)
    assert 0 < state["march"]["time"] < full.times[-1]
    resumed = solve(model, resume=state, **options)
    assert_same_run(full, resumed)


def test_a_nonlinear_run_resumes_within_the_newton_tolerance(model):
    hot = Radiation(emissivity=0.8, surroundings=60.0)
    radiating = ThermalModel(
        model.section,
        model.materials,
        boundaries={**model.boundaries, "top": hot},
        initial_temperature=850.0,
    )
    options = {"end_time": 300.0, "time_step": 2.0, "newton_tolerance": 1e-9}
    full = solve(radiating, **options)
    state = interrupted_state(radiating, every=5, stop_after=30, **options)
    resumed = solve(radiating, resume=state, **options)
    # The first step after resuming factorises its Newton tangent afresh: each step then
    # converges to the same solution within the Newton tolerance, damped by the scheme.
    assert np.max(np.abs(full.mean - resumed.mean)) <= 100 * options["newton_tolerance"]
    assert np.max(np.abs(full.maximum - resumed.maximum)) <= 100 * options["newton_tolerance"]


def test_a_state_of_another_model_or_method_is_refused(model):
    options = {"end_time": 600.0, "time_step": 1.0}
    state = interrupted_state(model, every=5, stop_after=12, **options)
    finer = ThermalModel(
        Rectangle(0.02, 0.01, edge_names={"left": "symmetry", "bottom": "symmetry"}).mesh(
            size=0.001
        ),
        model.materials,
        boundaries=model.boundaries,
        initial_temperature=850.0,
        probes={"core": (0.0, 0.0)},
    )
    with pytest.raises(ModelError, match="unknowns"):
        solve(finer, resume=state, **options)
    with pytest.raises(ModelError, match="of a crank-nicolson run"):
        solve(model, resume=state, end_time=600.0, method="bdf2")
    with pytest.raises(ModelError, match="cannot resume"):
        solve(model, resume=state, end_time=600.0, method="exponential")


# --- the file --------------------------------------------------------------------------------


def test_the_file_keeps_the_state_whole_and_refuses_another_case_or_version(tmp_path, monkeypatch):
    state = {
        "march": {"time": 12.5, "smallest": float("inf"), "previous": None, "name": "bdf2"},
        "fields": np.arange(6.0).reshape(2, 3),
        "rows": [np.array([1.0, 2.0]), 3, True],
        "interfaces": {},
    }
    path = tmp_path / ".out.checkpoint.npz"
    mine = case_fingerprint(b"title = 'a'\n")
    write_checkpoint(path, state, mine, 12.5, 40, 600.0)
    back, time_ = read_checkpoint(path, mine)
    assert time_ == 12.5
    assert back["march"] == state["march"]
    np.testing.assert_array_equal(back["fields"], state["fields"])
    np.testing.assert_array_equal(back["rows"][0], state["rows"][0])
    assert back["rows"][1:] == [3, True] and back["interfaces"] == {}
    assert [p.name for p in tmp_path.iterdir()] == [path.name]  # no temporary left

    with pytest.raises(AdvisorError, match="belongs to another case file"):
        read_checkpoint(path, case_fingerprint(b"title = 'b'\n"))
    monkeypatch.setattr(checkpoint_module, "soakwise_version", lambda: "0.0.0-other")
    with pytest.raises(AdvisorError, match="written by soakwise .* this is soakwise 0.0.0-other"):
        read_checkpoint(path, mine)
    monkeypatch.undo()
    path.write_bytes(b"not a zip file")
    with pytest.raises(AdvisorError, match="cannot be read"):
        read_checkpoint(path, mine)
    with pytest.raises(AdvisorError, match="nothing to resume"):
        read_checkpoint(tmp_path / "absent.npz", mine)


def test_checkpoints_are_kept_at_the_interval_and_a_failed_write_warns(tmp_path, monkeypatch):
    now = [0.0]
    keeper = Checkpointer(
        tmp_path / "c.npz", "x", CheckpointEvery(seconds=30.0), 100.0, lambda: now[0]
    )
    taken = []

    def snapshot():
        taken.append(now[0])
        return {"time": now[0]}

    for second in range(0, 100, 10):  # a step every 10 s of wall-clock time
        now[0] = float(second)
        keeper(float(second), second // 10 + 1, snapshot)
    assert taken == [30.0, 60.0, 90.0]
    keeper(100.0, 11, snapshot)  # the end: nothing to resume from there
    assert taken == [30.0, 60.0, 90.0]

    # A checkpoint that takes 5 s to write pushes the next one to 10 × 5 s later.
    clock = [0.0]
    every = CheckpointEvery(seconds=30.0)
    slow = Checkpointer(tmp_path / "w.npz", "x", every, 1e6, lambda: clock[0])
    written = []

    def slow_snapshot():
        written.append(clock[0])
        clock[0] += 5.0  # the writing takes 5 s of wall-clock time
        return {}

    for second in range(0, 200, 10):
        clock[0] = max(clock[0], float(second))
        slow(float(second), second // 10 + 1, slow_snapshot)
    assert written == [30.0, 90.0, 150.0]

    by_steps = Checkpointer(tmp_path / "s.npz", "x", CheckpointEvery(steps=4), 100.0)
    steps_taken = []
    for step in range(1, 13):
        by_steps(float(step), step, lambda s=step: steps_taken.append(s) or {})
    assert steps_taken == [4, 8, 12]

    def full_disk(*args, **kwargs):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(checkpoint_module, "write_checkpoint", full_disk)
    failing = Checkpointer(tmp_path / "f.npz", "x", CheckpointEvery(steps=1), 100.0)
    with pytest.warns(UserWarning, match="No space left on device"):
        failing(1.0, 1, dict)
    failing(2.0, 2, dict)  # no second warning: checkpoints are off for the run
    assert failing.failed and failing.saved_time is None


@pytest.mark.parametrize(
    ("value", "expected"),
    [
        ('"2 min"', CheckpointEvery(seconds=120.0)),
        ("25", CheckpointEvery(steps=25)),
        ("false", None),
    ],
)
def test_the_case_key_reads_a_time_a_count_or_false(value, expected):
    text = starter_text("quench-bar").replace(
        'time_step = "1 s"', f'time_step = "1 s"\ncheckpoint_every = {value}'
    )
    assert case_from_toml(text).checkpoint_every == expected
    assert case_from_toml(starter_text("quench-bar")).checkpoint_every == CheckpointEvery(30.0)


@pytest.mark.parametrize(
    ("value", "phrase"),
    [
        ("0", "1 or more"),
        ('"-5 s"', "above 0 s"),
        ('"5 m"', "different kind"),
        ("1.5", "expected"),
    ],
)
def test_a_bad_interval_names_its_key_and_line(value, phrase):
    text = starter_text("quench-bar").replace(
        'time_step = "1 s"', f'time_step = "1 s"\ncheckpoint_every = {value}'
    )
    line = 1 + [n.startswith("checkpoint_every") for n in text.splitlines()].index(True)
    with pytest.raises(CaseError, match=rf"line {line}: run.checkpoint_every: .*{phrase}"):
        case_from_toml(text)


# --- the command line ------------------------------------------------------------------------


def small_case(folder: Path, extra: str = "checkpoint_every = 10") -> Path:
    """The quench-bar starter on a coarse mesh, 5 s steps: ``folder/bar.toml``."""
    text = starter_text("quench-bar").replace('mesh_size = "1 mm"', 'mesh_size = "5 mm"')
    text = text.replace('time_step = "1 s"', f'time_step = "5 s"\n{extra}')
    text += "\n[outputs]\nanimation = false\nreport = false\nvtk = false\n"  # quicker
    path = folder / "bar.toml"
    path.write_text(text, encoding="utf-8")
    return path


def histories(folder: Path) -> dict[str, np.ndarray]:
    """The columns of a results folder's histories.csv (read with the csv module)."""
    with open(folder / "histories.csv", newline="", encoding="utf-8") as stream:
        rows = [row for row in csv.reader(stream) if row and not row[0].startswith("#")]
    header, body = rows[0], rows[1:]
    return {name: np.array([float(r[i]) for r in body]) for i, name in enumerate(header)}


def test_the_command_line_resumes_to_the_same_results(tmp_path, monkeypatch, capsys):
    case = small_case(tmp_path)
    assert main(["-q", "run", str(case), "--out", str(tmp_path / "whole")]) == EXIT_OK
    out = tmp_path / "out"

    class StopAt(SolvePosition):  # Ctrl-C after 35 steps
        def __call__(self, time_, end_time, steps):
            super().__call__(time_, end_time, steps)
            if steps >= 35:
                raise KeyboardInterrupt

    monkeypatch.setattr(run_command, "SolvePosition", StopAt)
    assert main(["-q", "run", str(case), "--out", str(out)]) == EXIT_INTERRUPTED
    err = capsys.readouterr().err.strip().splitlines()
    kept = checkpoint_path(out)
    assert len(err) == 1 and re.fullmatch(
        rf"soakwise: interrupted at t = [0-9 .mins]+ of 10 min; checkpoint of t = [0-9 .mins]+ "
        rf"kept in {re.escape(str(kept))} \(resume with --resume\)",
        err[0],
    ), err
    assert kept.is_file() and not out.exists()
    monkeypatch.undo()

    # Without --resume the checkpoint is not replaced silently.
    assert main(["-q", "run", str(case), "--out", str(out)]) == EXIT_USAGE
    assert "continue it with --resume" in capsys.readouterr().err
    assert kept.is_file()

    # A run killed while writing a checkpoint leaves its temporary file: the next one removes it.
    (tmp_path / f".{kept.name}.k1ll3d_9.part").write_bytes(b"PK\x03\x04")
    assert main(["-q", "run", str(case), "--out", str(out), "--resume"]) == EXIT_OK
    assert not kept.exists()
    whole, resumed = histories(tmp_path / "whole"), histories(out)
    assert whole.keys() == resumed.keys()
    for name, values in whole.items():
        assert values.shape == resumed[name].shape, name
        assert np.max(np.abs(values - resumed[name])) <= AGREEMENT, name
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bar.toml", "out", "whole"]


def test_resume_refuses_a_changed_case_and_keeps_the_checkpoint(tmp_path, capsys):
    case = small_case(tmp_path)
    out = tmp_path / "out"
    kept = checkpoint_path(out)
    write_checkpoint(kept, {"march": {}}, case_fingerprint(case.read_bytes()), 5.0, 1, 600.0)
    case.write_text(case.read_text(encoding="utf-8") + "# a note\n", encoding="utf-8")
    assert main(["-q", "run", str(case), "--out", str(out), "--resume"]) == EXIT_USAGE
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "belongs to another case file" in err[0], err
    assert kept.is_file() and not out.exists()
    assert (
        main(["-q", "run", str(tmp_path / "bar.toml"), "--out", str(tmp_path / "o2"), "--resume"])
        == EXIT_USAGE
    )
    assert "nothing to resume" in capsys.readouterr().err


@pytest.mark.slow
def test_a_run_killed_by_sigkill_leaves_a_checkpoint_that_resumes(tmp_path):
    # 1 s steps over 10 min with a checkpoint every 20 steps: killed once one exists.
    case = small_case(tmp_path, "checkpoint_every = 20")
    case.write_text(
        case.read_text(encoding="utf-8").replace('time_step = "5 s"', 'time_step = "1 s"'),
        encoding="utf-8",
    )
    out = tmp_path / "out"
    kept = checkpoint_path(out)
    command = [sys.executable, "-m", "advisor.cli", "-q", "run", str(case), "--out"]
    environment = {**os.environ, "PYTHONPATH": str(ROOT)}
    assert subprocess.run([*command, str(tmp_path / "whole")], env=environment).returncode == 0
    run = subprocess.Popen([*command, str(out)], cwd=tmp_path, env=environment)
    deadline = time.monotonic() + 120
    while not kept.exists() and run.poll() is None and time.monotonic() < deadline:
        time.sleep(0.02)
    run.send_signal(signal.SIGKILL)
    run.wait(timeout=60)
    if run.returncode == 0:
        pytest.skip("the run ended before it could be killed (a very fast machine)")
    assert kept.is_file() and not out.exists()
    done = subprocess.run([*command, str(out), "--resume"], env=environment, cwd=tmp_path)
    assert done.returncode == 0
    whole, resumed = histories(tmp_path / "whole"), histories(out)
    for name, values in whole.items():
        assert np.max(np.abs(values - resumed[name])) <= AGREEMENT, name
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bar.toml", "out", "whole"]
